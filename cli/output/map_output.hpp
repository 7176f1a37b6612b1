#ifndef STREWN_CLI_MAP_OUTPUT_HPP
#define STREWN_CLI_MAP_OUTPUT_HPP

// What `strewn map` writes: the summary (a table or JSON), the SVG plan of the risk field, the
// CSV of the grid, the GeoJSON of the contours (RFC 7946: longitude/latitude when the site has
// an origin).
#include <iosfwd>
#include <string>
#include <vector>

#include "strewn/site_map.hpp"

namespace strewn::cli {

/// The summary: grid, largest risk and where, worst relative bound, contours; `seconds` is the
/// time the map took.
void write_map_summary_table(std::ostream& out, const Site& s, const SiteMap& m, double seconds);
void write_map_summary_json(std::ostream& out, const Site& s, const SiteMap& m, double seconds);
std::string risk_map_svg(const Site& s, const SiteMap& m);
std::string risk_map_csv(const Site& s, const SiteMap& m);
std::string contours_geojson(const Site& s, const SiteMap& m);

}  // namespace strewn::cli

#endif
