#ifndef STREWN_SWEEP_HPP
#define STREWN_SWEEP_HPP

/// \file
/// Design sweeps: one base scenario, a few of its parameters varied along axes, every
/// combination (or a seeded Latin hypercube sample of them) assessed (strewn/assess.hpp), and
/// which combinations meet every limit.
///
/// An axis varies one parameter of one zone or one source, over a list of values or a range
/// (`steps` values from `from` to `to`, both included). Lengths are in the scenario's unit:
///   zone:   offset_x, offset_y  (moves the zone's region by that much)
///           rotation_deg        (turns it counter-clockwise about the centre of its bounding box)
///   source: aim_x, aim_y        (the aim moves there; the whole scatter moves with it)
///           bias_x, bias_y      (the first component's mean minus the aim becomes that; every
///                                component moves by the same amount)
///           spread_factor       (every component's covariance times factor^2)
///           events_per_session, sessions_per_year
///           drop_height, drop_ground_speed, drop_wind_speed  (a drop from flight, `drop = {...}`:
///                                the fall and its spread are computed again, strewn/drop.hpp,
///                                and an aim the file left out follows the mean landing)
///   layout: layout_spacing      (the layout's heads placed again at that spacing, its pattern
///                                kept, strewn::with_layout_spacing; applied before every other
///                                axis, so a source axis on one of its heads may find it gone)
/// A grid design takes every combination, the first axis varying slowest; a Latin hypercube of
/// n samples cuts every axis into n equal strata and takes each stratum once, in an order and at
/// a point within it drawn from the study's seed (std::mt19937_64, portable bit for bit); a list
/// axis takes the value whose share of the list holds that point.
///
/// Example:
/// \code
///   const strewn::Study study = strewn::load_study("shapes/studies/fire_door_study.toml", shapes);
///   const strewn::SweepResult r = strewn::run_sweep(study);
///   for (const strewn::SweepCombination& c : r.combinations) if (c.meets_every_limit) ...
/// \endcode

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "strewn/distribute.hpp"
#include "strewn/export.hpp"
#include "strewn/shape_registry.hpp"
#include "strewn/site.hpp"
#include "strewn/status.hpp"
#include "strewn/units.hpp"
#include "strewn/work.hpp"

namespace strewn {

/// One varied parameter.
struct SweepAxis {
  std::string label;      ///< the column's name, e.g. "fire exit door offset_x"
  std::string zone;       ///< the zone it varies, or empty
  std::string source;     ///< the source it varies, or empty
  std::string layout;     ///< the layout it varies (layout_spacing), or empty
  std::string parameter;  ///< offset_x, offset_y, rotation_deg, aim_x, aim_y, bias_x, bias_y,
                          ///< spread_factor, events_per_session, sessions_per_year, drop_height,
                          ///< drop_ground_speed, drop_wind_speed, layout_spacing
  std::vector<double> values;  ///< a list axis, or a range's `steps` values (in the scenario's unit)
  bool is_range = false;       ///< a range: a Latin hypercube draws anywhere from values.front() to values.back()
  /// In the scenario's length unit (offsets, aims, biases).
  bool is_length() const {
    return parameter == "offset_x" || parameter == "offset_y" || parameter == "aim_x" || parameter == "aim_y" ||
           parameter == "bias_x" || parameter == "bias_y" || parameter == "drop_height" || parameter == "layout_spacing";
  }
  /// A speed in the scenario's length unit per second (a drop's ground speed and wind speed).
  bool is_speed() const { return parameter == "drop_ground_speed" || parameter == "drop_wind_speed"; }
  /// One of a drop's inputs: the source must be a drop from flight.
  bool is_drop() const { return parameter.rfind("drop_", 0) == 0; }
  /// The output's column for it: the label with its unit, "door moved north (m)".
  std::string heading(LengthUnit units) const {
    return is_length()                 ? label + " (" + symbol(units) + ")"
           : is_speed()                ? label + " (" + symbol(units) + "/s)"
           : parameter == "rotation_deg" ? label + " (deg)"
                                         : label;
  }
};

/// The columns every sweep table has beside its axes (CSV, GeoPackage), in order after them;
/// an axis's heading may not take one of these names.
inline const std::vector<std::string>& sweep_result_columns() {
  static const std::vector<std::string> names = {"combination", "zone", "role", "p_per_event", "p_per_event_bound",
                                                 "p_per_session", "p_per_session_bound", "p_per_year", "p_per_year_bound",
                                                 "limit", "limit_per", "verdict", "accuracy", "meets_every_limit",
                                                 "cu_percent", "du_percent"};
  return names;
}

struct Study {
  std::string file;
  std::string name;
  Site base;  ///< the base scenario, read with load_site
  std::vector<SweepAxis> axes;
  enum class Design { grid, latin_hypercube } design = Design::grid;
  std::size_t samples = 0;  ///< latin_hypercube: how many combinations
  std::uint64_t seed = 1;
};

/// Most combinations a study may ask for (each is one assessment of the whole site).
constexpr std::size_t kMaxSweepCombinations = 100000;

/// Reads a study (TOML, docs/sweeps.md) and its base scenario; every key is checked like a
/// scenario's: strewn::input_error "FILE:LINE:COLUMN: key: why (did you mean ...)".
STREWN_API Study load_study(const std::string& path, const ShapeRegistry& shapes);

/// The values of every combination, one per axis in the axes' order.
STREWN_API std::vector<std::vector<double>> study_combinations(const Study& study);

/// The base site with one combination's values applied.
STREWN_API Site varied_site(const Study& study, const std::vector<double>& values);

/// One zone under one combination. Per event: the largest single source's probability (as
/// limits per event are judged, strewn/risk_map.hpp), with its bound.
struct SweepZoneRow {
  std::string zone;
  Role role = Role::report_only;
  double per_event = 0.0, per_event_err = 0.0;
  double per_session = 0.0, per_session_err = 0.0;
  double per_year = 0.0, per_year_err = 0.0;
  std::optional<double> limit;
  Period limit_per = Period::session;
  std::optional<bool> limit_holds;  ///< as ZoneResult::limit_holds
  bool limit_undecided = false;
  Status status = Status::converged;
};

struct SweepCombination {
  std::vector<double> values;  ///< one per axis
  std::vector<SweepZoneRow> zones;
  bool meets_every_limit = true;  ///< every limit holds (at the upper bounds) and every tolerance is met
  /// Christiansen's CU and the low-quarter DU in percent over the catch cans
  /// (strewn/deposition.hpp, from the cans' central depths), when the base scenario has
  /// sprinkler heads and a [deposition] catch_grid; they judge no limit.
  std::optional<double> cu, du;
};

/// Whether the sweep's rows carry CU and DU (see SweepCombination).
inline bool sweep_has_uniformity(const Study& study) {
  return !study.base.heads.empty() && study.base.deposition && study.base.deposition->grid;
}

struct SweepResult {
  std::vector<SweepCombination> combinations;  ///< in the order of study_combinations
};

struct SweepOptions {
  int threads = 0;                         ///< 0: all cores
  const Distributor* distributor = nullptr;  ///< combinations shared among processes
  ProgressFn progress;
};

/// Units of sweep_work for one fall of a drop computed again: a fall (an adaptive ODE solve, with
/// its share of the check's test and fits) takes about 4.4e-5 s, measured as 0.18 s of CPU per
/// spread of 4019 falls on shapes/drone_drop_flight.toml, against the unit's 5e-5 s.
constexpr double kFallUnits = 0.9;

/// What a sweep will cost before it starts (strewn/work.hpp): combinations x zones x components
/// of every source, each unit about one exact zone-component integration (5e-5 s measured on the
/// demo study, shapes/studies/fire_door_study.toml); plus, when an axis varies a drop's inputs,
/// the drop's spread computed again at every combination (strewn/drop.hpp: its sigma points and
/// the `falls` of its check, kFallUnits each), which dominates a drop sweep (about 0.2 s a
/// combination against 2.5e-4 s for five zones). The combinations are bounded at load
/// (kMaxSweepCombinations); this estimate sizes the progress bar.
STREWN_API WorkEstimate sweep_work(const Study& study);

/// Every combination assessed. With a distributor, only the gathering process's result holds the
/// combinations (the others' is empty); the rows are the same whatever the number of processes.
STREWN_API SweepResult run_sweep(const Study& study, const SweepOptions& options = {});

}  // namespace strewn

#endif
