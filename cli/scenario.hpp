#ifndef STREWN_CLI_SCENARIO_HPP
#define STREWN_CLI_SCENARIO_HPP

// A scenario file: the site, its sources (each a scatter model with its exposure) and its zones
// (each a region with a role and an optional limit). Loading checks every key and value and
// throws strewn::input_error with "FILE:LINE:COLUMN: key: reason" on the first problem.

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

struct Source {
  std::string name;
  Vec2 aim = Vec2::Zero();
  ScatterModel model = Gaussian::from_axes({0, 0}, 1, 1, 0);
  double events_per_session = 1.0;
  double sessions_per_year = 1.0;
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

struct Scenario {
  std::string file;
  std::string site_name;
  std::string notes;
  std::optional<GeoOrigin> origin;
  std::vector<Source> sources;
  std::vector<Zone> zones;
  IntegrateOptions options;
};

Scenario load_scenario(const std::string& path, const ShapeRegistry& shapes);
/// The same from text already in memory; `path` names it in messages and anchors relative paths.
Scenario load_scenario_text(const std::string& text, const std::string& path, const ShapeRegistry& shapes);

const char* to_string(Role role);
const char* to_string(LimitPer per);

}  // namespace strewn::cli

#endif
