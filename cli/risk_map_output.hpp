#ifndef STREWN_CLI_RISK_MAP_OUTPUT_HPP
#define STREWN_CLI_RISK_MAP_OUTPUT_HPP

// What `strewn map` writes: the SVG plan of the risk field, the CSV of the grid, the GeoJSON
// of the contours (RFC 7946: longitude/latitude when the site has an origin).

#include <string>
#include <vector>

#include "scenario.hpp"
#include "strewn/contours.hpp"

namespace strewn::cli {

struct LabelledContours {
  ContourSet set;
  std::string label;  // "1e-4" or "limit of 'bench' (1e-4)"
};

struct MapResult {
  RiskMap map;
  std::string footprint;  // description
  std::string per;        // event, session, year
  std::vector<LabelledContours> contours;
};

std::string risk_map_svg(const Scenario& s, const MapResult& m);
std::string risk_map_csv(const MapResult& m);
std::string contours_geojson(const Scenario& s, const MapResult& m);

}  // namespace strewn::cli

#endif
