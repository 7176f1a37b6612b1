#ifndef STREWN_DEPOSITION_HPP
#define STREWN_DEPOSITION_HPP

/// \file
/// Deposition: where the emitted material lands (what `strewn deposition` prints).
/// Each source emits amount_per_event * events_per_hour * hours; the expected amount in a region
/// is that times the probability of the region. A can catches what falls on its opening (a disk);
/// a cell is the spacing x spacing square around a can, so the cells tile the grid rectangle and
/// their amounts add up to what lands on the grid (additivity of the integral). Barriers count as
/// in assess (strewn/barrier_effect.hpp): what a barrier stops lands in no can, cell or zone, and
/// the amounts outside the grid and off the site include it.
///
/// Sprinkler heads (strewn/head.hpp) are sources emitting their flow: depths are litres per m^2
/// (mm). For them the deposition also gives (docs/irrigation.md):
///  - each head's own precipitation rate, 60 Q / (sweep/360 pi R^2) mm/h, and its share of the
///    layout's mean rate, 60 Q / A, where A is the irrigated area: the site boundary zone, else
///    the first layout's zone, else the target zones together;
///  - the layout's mean precipitation rate 60 sum(Q) / A (flow over area, the designer's
///    nominal figure) and, with a catch grid, the rate the cans catch (mean can depth / hours);
///  - with a target depth, the run time target / rate, from the cans' mean when there is a grid
///    (its bound from the cans' bounds), else from the nominal rate; and the run time with the
///    uniformity allowance of common practice, divided by DU_lq / 100, so that the driest
///    quarter gets about the target (needs a grid: DU comes from the cans' central values).

#include <optional>
#include <string>
#include <vector>

#include "strewn/export.hpp"
#include "strewn/site.hpp"
#include "strewn/uniformity.hpp"

namespace strewn {

/// The share of the area whose driest window the scheduling coefficient looks at: 5%, a common
/// choice in irrigation practice (from memory).
constexpr double kSchedulingShare = 0.05;

struct Can {
  Vec2 centre;
  double depth = 0.0;       // amount per m^2 over the opening (litre/m^2 = mm)
  double depth_err = 0.0;
  double cell_depth = 0.0;  // mean over the can's cell
  double cell_amount = 0.0, cell_amount_err = 0.0;
};

struct ZoneShare {
  std::string zone;
  std::string role;
  double amount = 0.0, amount_err = 0.0;
  double fraction = 0.0;
};

/// A head's figures (strewn/head.hpp), in the order of Site::heads.
struct HeadRate {
  std::string name, layout;
  Vec2 position = Vec2::Zero();
  double radius_m = 0.0, sweep_deg = 360.0, flow_l_per_min = 0.0;
  double own_rate_mm_per_h = 0.0;  ///< 60 Q / (sweep/360 pi R^2)
  double share_mm_per_h = 0.0;     ///< 60 Q / A: its part of the layout's mean rate
};

/// How long a run must last to apply the target depth.
struct RunTime {
  std::string basis;              ///< "catch cans" or "flow over area"
  double hours = 0.0, hours_err = 0.0;
  /// Divided by DU_lq/100 (common practice); absent without a catch grid.
  std::optional<double> with_allowance_hours, with_allowance_err;
};

struct Deposition {
  std::string unit;          // of amounts
  std::string depth_unit;    // of depths
  double emitted = 0.0;
  std::vector<Can> cans;     // row by row from the grid origin
  double on_grid = 0.0, on_grid_err = 0.0;       // sum of the cells
  double off_grid = 0.0, off_grid_err = 0.0;     // emitted * P(outside the grid rectangle, or stopped by a barrier)
  double cu = 0.0, du = 0.0;                     // percent, over the cans
  /// The scheduling coefficient over the can grid (strewn/uniformity.hpp) at the share asked
  /// for (kSchedulingShare unless said); none when there is no grid or its driest window
  /// catches nothing.
  std::optional<SchedulingCoefficient> sc;
  double sc_share = 0.0;                         // the share asked for (the window's own is in sc)
  double mean_depth = 0.0, min_depth = 0.0, max_depth = 0.0;
  std::vector<ZoneShare> zones;
  bool has_site = false;
  double off_site = 0.0, off_site_err = 0.0;     // amount outside the site zone
  /// Cans whose centre lies outside the site zone (a rectangular catch grid over a bevelled
  /// lawn): CU, DU and the run time count them as placed; the caller should say so.
  int cans_outside_site = 0;
  // Sprinkler heads only (empty otherwise): see above.
  std::vector<HeadRate> heads;
  std::string area_from;          ///< the zone(s) whose area is A
  double area_m2 = 0.0;           ///< A; 0 when no zone gives it
  double rate_mm_per_h = 0.0;     ///< 60 sum(Q) / A
  double catch_rate_mm_per_h = 0.0, catch_rate_err = 0.0;  ///< mean can depth / hours (with a grid)
  std::optional<RunTime> run_time;  ///< with a target depth
};

/// Throws input_error when the site has no deposition settings, a source lacks its amounts or
/// nothing is emitted.
STREWN_API Deposition compute_deposition(const Site& s);
/// The same with the scheduling coefficient over the driest window of `sc_share` of the area,
/// in (0, 1] (throws strewn::input_error outside it).
STREWN_API Deposition compute_deposition(const Site& s, double sc_share);

/// Expected depth at points (amount per m^2 over the run: litre/m^2 = mm): the sum over sources
/// of amount_per_event * events_per_hour * hours times the source's density there, each
/// component's weight * f(|W (x - m)|) / det L with L the Cholesky factor, W = L^-1 and f the
/// family's radial density (the normal's exp(-r^2/2) / (2 pi)); on a part circle f is divided by
/// the arc's share of the turn inside the arc and 0 outside (strewn/scatter_family.hpp). A closed form with rounding error only (a few ulps); for pictures of the whole
/// field, where the cans' values are integrals over their openings. Throws input_error like
/// compute_deposition.
STREWN_API std::vector<double> depth_at(const Site& s, const std::vector<Vec2>& points);

}  // namespace strewn

#endif
