#ifndef STREWN_CLI_MAP_OUTPUT_HPP
#define STREWN_CLI_MAP_OUTPUT_HPP

// What `strewn map` writes: the summary (a table or JSON), the SVG plan of the risk field, the
// CSV of the grid, the GeoJSON of the contours (RFC 7946: longitude/latitude when the site has
// an origin).
#include <iosfwd>
#include <string>
#include <vector>

#include "output/svg_canvas.hpp"
#include "strewn/assess.hpp"
#include "strewn/site_map.hpp"

namespace strewn::cli {

/// The summary: grid, largest risk and where, worst relative bound, contours; `seconds` is the
/// time the map took.
void write_map_summary_table(std::ostream& out, const Site& s, const SiteMap& m, double seconds);
void write_map_summary_json(std::ostream& out, const Site& s, const SiteMap& m, double seconds);
/// The plan: the field on a colour scale fitted to its range, the unsafe area at each limit,
/// contours, zones coloured by their verdict in `assessment` (none when null), sources, axes,
/// north, legend and notes (output/svg_canvas.hpp); lengths labelled in the scenario's unit.
std::string risk_map_svg(const Site& s, const SiteMap& m, const Assessment* assessment);
/// The grid: x, y (in the scenario's unit: x_m or x_ft), the risk and its bound per cell.
std::string risk_map_csv(const Site& s, const SiteMap& m);
/// Each zone's verdict from an assessment (no_limit for all when `a` is null).
std::vector<Verdict> zone_verdicts(const Site& s, const Assessment* a);
/// The footprint in words: "a person (shape 'person', default size)".
std::string footprint_words(const SiteMap& m);
/// The contours (MultiLineString) and the unsafe area at each limit (MultiPolygon); site
/// coordinates in the scenario's unit when the site has no origin.
std::string contours_geojson(const Site& s, const SiteMap& m);

}  // namespace strewn::cli

#endif
