#ifndef STREWN_VECTOR_SOURCE_HPP
#define STREWN_VECTOR_SOURCE_HPP

/// \file
/// Zones from any vector source GDAL/OGR opens: GeoPackage, Shapefile, DXF, KML, GeoJSON,
/// FlatGeobuf and the rest of `ogrinfo --formats`.
///
/// A query picks one layer of the source (by name; the only one when the source has one), then
/// features: those passing `where` (an OGR SQL attribute filter such as "kind = 'bench'"), and
/// of those the one whose `name_field` attribute, or else whose feature id, equals `feature`
/// (or whose id is `fid`). A `feature` name several features share is refused unless `where`
/// is given (then all those passing it are meant).
///
/// Geometry: polygons and multipolygons; a closed line string (first point equal to the last,
/// at least four points: DXF closed polylines) is taken as a ring. Curved geometries
/// (CircularString, CompoundCurve, CurvePolygon, MultiSurface: GeoPackage curves) become exact
/// circular arcs (strewn/region.hpp), so no polygonisation error enters the bound. GDAL 3.6
/// reads DXF arcs and circles as line strings: strewn sets OGR_ARC_STEPSIZE to 0.25 degrees
/// while it reads (unless the user set it), a chord error of 2.4e-6 of the radius, which is not
/// in the bound. A line that does not close, a point or an empty
/// geometry is refused with the feature and the reason. Z and M values are ignored.
///
/// Coordinates: a layer with a CRS is transformed by GDAL/PROJ into `site_crs` (traditional GIS
/// axis order on both sides, strewn/crs.hpp); a layer without one (most DXF drawings) is taken
/// as site metres. A layer with a CRS for a site without one is refused: its coordinates would
/// be read as metres of an unknown frame.
///
/// Every problem throws strewn::input_error with one line: a source GDAL cannot open (with
/// GDAL's reason), a layer or feature that is not there (with the nearest names), a filter GDAL
/// refuses (an attribute the layer lacks named, with the nearest field names), a transformation
/// that fails, a vertex too far from the site origin, a DXF HATCH with an elliptical-arc or
/// spline edge (as ELLIPSE and SPLINE entities), an invalid polygon (where, as for every region).
///
/// Example:
///   strewn::VectorQuery q;
///   q.layer = "benches";
///   q.feature = "north bench";
///   q.site_crs = "EPSG:32633";
///   const strewn::Region bench = strewn::region_from_vector_source("plan.gpkg", q);

#include <cstdint>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "strewn/export.hpp"
#include "strewn/region.hpp"

namespace strewn {

struct VectorQuery {
  std::string layer;               ///< empty: the source's only layer
  std::string where;               ///< OGR SQL attribute filter; empty: every feature
  std::string feature;             ///< name (name_field) or feature id; empty: every feature passing `where`
  /// A feature id alone (a scenario's `feature = 3`, a number): only the feature with this id
  /// (and passing `where`), whatever the names; unset: `feature` decides.
  std::optional<std::int64_t> fid;
  std::string name_field = "name";  ///< the attribute that names a feature
  std::string site_crs;            ///< PROJ definition of the site frame; empty: site metres
  /// A layer without a CRS is drawn in the site's own unit: metres per that unit (1, or 0.3048
  /// for a site in feet), so that the region comes back in metres. Layers with a CRS are
  /// transformed into the site frame (in metres) and not scaled.
  double unframed_metres_per_unit = 1.0;
  /// Set when the site frame is the local one about site.origin: a layer with a CRS whose
  /// vertex lands farther than this (metres) from the origin is refused, as the GeoJSON reader
  /// refuses it (strewn/region_io.hpp, max_distance): a swapped longitude and latitude.
  std::optional<double> max_distance_from_origin;
};

/// One feature of a layer: its name (the name_field attribute, else "LAYER fid N"), id,
/// attributes as text, and region in site metres.
struct STREWN_API VectorFeature {
  std::string name;
  std::int64_t fid = 0;
  std::vector<std::pair<std::string, std::string>> attributes;
  Region region;

  /// The attribute's value as text, or nullptr when the layer has no such field.
  const std::string* attribute(const std::string& field) const;
};

/// The features `query` selects, in layer order; throws strewn::input_error when none is
/// selected.
STREWN_API std::vector<VectorFeature> read_vector_features(const std::string& path, const VectorQuery& query);

/// Every file GDAL reads for the source (GDALDataset::GetFileList: a Shapefile's .shp, .shx,
/// .dbf, .prj, .cpg...), so that no output of the run can overwrite one of them.
STREWN_API std::vector<std::string> vector_source_files(const std::string& path);

/// The selected features as one region (several features: their union as a multipolygon, which
/// must then be valid: features that overlap are refused).
STREWN_API Region region_from_vector_source(const std::string& path, const VectorQuery& query);

}  // namespace strewn

#endif
