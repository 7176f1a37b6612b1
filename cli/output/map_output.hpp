#ifndef STREWN_CLI_MAP_OUTPUT_HPP
#define STREWN_CLI_MAP_OUTPUT_HPP

// What `strewn map` writes: the SVG plan of the risk field, the CSV of the grid, the GeoJSON
// of the contours (RFC 7946: longitude/latitude when the site has an origin).
#include <string>
#include <vector>

#include "strewn/site_map.hpp"

namespace strewn::cli {

std::string risk_map_svg(const Site& s, const SiteMap& m);
std::string risk_map_csv(const SiteMap& m);
std::string contours_geojson(const Site& s, const SiteMap& m);

}  // namespace strewn::cli

#endif
