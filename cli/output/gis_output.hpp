#ifndef STREWN_CLI_GIS_OUTPUT_HPP
#define STREWN_CLI_GIS_OUTPUT_HPP

// Files a GIS opens directly, written through GDAL into memory (/vsimem/) and returned as bytes,
// so that they go out through the same all-or-none atomic writes as every other output.
// Coordinates are the site frame's, tagged with its CRS (strewn/crs.hpp: site.crs, or the local
// transverse Mercator about site.origin); a site tied to neither gets files without a CRS.
#include <string>

#include "output/sweep_output.hpp"
#include "strewn/assess.hpp"
#include "strewn/site_map.hpp"

namespace strewn::cli {

/// The risk map as a GeoTIFF: band 1 the risk, band 2 its error bound, Float64, nodata -1 (no
/// cell is ever negative; the value marks nothing in strewn's own maps but lets a GIS mask
/// edits), north up, cell size the grid's spacing; tiled and DEFLATE-compressed, and
/// cloud-optimised (GDAL's COG driver) when that driver is present.
std::string risk_map_geotiff(const Site& s, const SiteMap& m);

/// A GeoPackage with the layers:
/// * `zones`: each zone (arcs polygonised to a chord error of 1 mm) with its role, limit,
///   verdict, and the probabilities per event (largest source), session and year with bounds;
/// * when `map` is given: `contours` (the iso-risk lines, level and label), `unsafe_areas` (for
///   each keep-out limit of the map's period, the cells whose risk, at its upper bound, exceeds
///   it, merged into polygons), `source_means` (each component's mean impact point) and
///   `source_ellipses` (its 1- and 2-sigma ellipses, 128-gons);
/// * `barriers` (each barrier's line with its catch and height), with a map `barrier_shadows`
///   (each barrier's shadow from each source's standing point, or from both ends of a throwing
///   line, cut to the map's extent: the same areas the SVG hatches);
/// * for drops, `flight_tracks` (the track through the release point) and `drop_points` (the
///   release point and the nominal landing, kind and label).
std::string site_geopackage(const Site& s, const Assessment& a, const SiteMap* map);

/// A sweep's rows as a GeoPackage of tables without geometry (sweep_output.hpp):
/// * `rows`: the CSV's columns and rows, numbers as Real (Integer for the combination), the
///   same values the CSV prints, empty cells as nulls;
/// * `combinations`: one row per combination, its axis values and meets_every_limit;
/// * `study`: the summary as (item, value) lines.
std::string sweep_geopackage(const SweepTable& table, std::size_t axes,
                             const std::vector<std::pair<std::string, std::string>>& facts);

}  // namespace strewn::cli

#endif
