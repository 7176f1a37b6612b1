#ifndef STREWN_CLI_SCENARIO_HPP
#define STREWN_CLI_SCENARIO_HPP

// A scenario file: the site, its sources (each a scatter model with its exposure) and its zones
// (each a region with a role and an optional limit). Loading checks every key and value and
// throws strewn::input_error with "FILE:LINE:COLUMN: key: reason" on the first problem.

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "strewn/integrate.hpp"
#include "strewn/region_io.hpp"
#include "strewn/shape_registry.hpp"

namespace strewn::cli {

// The order of the values matches the name tables in scenario.cpp.
enum class Role { target, keep_out, watch };
enum class LimitPer { event, session, year };

// What a fit recorded about the data behind a source's spread (written by `strewn fit`), so that
// `assess --uncertainty` can resample it.
struct FitRecord {
  enum class Kind { impacts, counts, censored };
  Kind kind = Kind::impacts;
  double confidence = 0.95;
  std::uint64_t n = 0;                    // impacts: sample size; counts: trials
  Vec2 mean = Vec2::Zero();               // impacts
  Mat2 covariance = Mat2::Identity();     // impacts
  std::uint64_t k = 0;                    // counts: within radius
  std::uint64_t measured = 0, outside = 0;  // censored
  double radius = 0.0;                    // counts, censored
};

struct Source {
  std::string name;
  Vec2 aim = Vec2::Zero();
  ScatterModel model = Gaussian::from_axes({0, 0}, 1, 1, 0);
  double events_per_session = 1.0;
  double sessions_per_year = 1.0;
  // For deposition: material emitted per event (unit in [deposition]) and events per hour.
  std::optional<double> amount_per_event;
  std::optional<double> events_per_hour;
  std::optional<FitRecord> fit;
};

struct Zone {
  std::string name;
  Role role = Role::watch;
  std::string shape;
  Region region;
  std::string geometry_file;  // when the geometry came from a GeoJSON/WKT file or a template
  std::optional<double> limit;
  LimitPer limit_per = LimitPer::session;
  // Fraction of the exposure time someone is in the zone, for individual risk (1 = always).
  std::optional<double> occupancy;
};

// A catch-can grid: cans of the given opening diameter at origin + (i, j) * spacing.
struct CatchGrid {
  Vec2 origin = Vec2::Zero();
  double spacing = 1.0;
  int columns = 0, rows = 0;
  double can_diameter = 0.1;
};

struct DepositionSettings {
  std::string amount_unit = "litre";  // litre (depth in mm) or count (per m^2)
  double hours = 1.0;
  std::optional<CatchGrid> grid;
  std::string site_zone;  // outside this zone counts as off site
};

struct Scenario {
  std::string file;
  std::string site_name = "unnamed site";
  std::string notes;
  std::optional<GeoOrigin> origin;
  std::vector<Source> sources;
  std::vector<Zone> zones;
  IntegrateOptions options;
  std::optional<DepositionSettings> deposition;
  /// Every file read for this scenario: the scenario itself, templates, GeoJSON and WKT files
  /// (outputs may not be any of them).
  std::vector<std::string> input_files;
};

Scenario load_scenario(const std::string& path, const ShapeRegistry& shapes);
/// The same from text already in memory; `path` names it in messages and anchors relative paths.
Scenario load_scenario_text(const std::string& text, const std::string& path, const ShapeRegistry& shapes);

const char* to_string(Role role);
const char* to_string(LimitPer per);

}  // namespace strewn::cli

#endif
