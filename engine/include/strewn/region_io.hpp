#ifndef STREWN_REGION_IO_HPP
#define STREWN_REGION_IO_HPP

/// \file
/// Regions read from the open geometry formats that site plans come in.
///
/// WKT (OGC Simple Features): POLYGON or MULTIPOLYGON, coordinates in site metres (WKT carries no
/// reference system of its own).
///
/// GeoJSON (RFC 7946): a Polygon or MultiPolygon, bare or in a Feature or FeatureCollection.
/// RFC 7946 positions are WGS 84 longitude and latitude in degrees; a file may instead declare
/// its CRS in the older "crs" member ({"type": "name", "properties": {"name": "EPSG:32633"}},
/// GeoJSON 2008). Positions are transformed by PROJ (strewn/crs.hpp) into the site frame: the
/// site's CRS when one is given, else the local transverse Mercator about the site origin.
/// Files exported in local metres instead (CAD drawings) may be read with
/// GeoJsonPositions::site_metres. Other vector formats: strewn/vector_source.hpp.
///
/// Every reader checks the result with check_validity() and throws strewn::input_error naming the
/// fault; regions come back normalised.

#include <optional>
#include <string>

#include "strewn/crs.hpp"
#include "strewn/export.hpp"
#include "strewn/region.hpp"

namespace strewn {

enum class GeoJsonPositions { lon_lat, site_metres };

struct GeoJsonOptions {
  GeoJsonPositions positions = GeoJsonPositions::lon_lat;
  /// The site frame, one of the two required for lon_lat: its CRS (a PROJ definition), else the
  /// local frame about `origin`.
  std::string site_crs;
  std::optional<GeoOrigin> origin;
  /// Which feature of a FeatureCollection: matched against properties.name, then id. Empty: the
  /// file must hold exactly one polygonal feature. A name that several features share is refused
  /// (which of them was meant cannot be told).
  std::string feature;
  /// `feature` is a feature id (the GeoJSON "id" member, a number or a string) only, not a name.
  bool feature_is_id = false;
  /// In the local frame about `origin`, points further than this from it are refused (m).
  double max_distance = 100e3;
};

STREWN_API Region region_from_wkt(const std::string& text);
STREWN_API Region region_from_geojson(const std::string& text, const GeoJsonOptions& options);

/// Site metres (x east, y north) of a WGS 84 position in the local frame about the origin
/// (CrsTransform::lon_lat_to_local).
STREWN_API Vec2 project_to_site(const GeoOrigin& origin, double lon_deg, double lat_deg);
/// The inverse: WGS 84 (longitude, latitude) in degrees of a point in site metres.
STREWN_API Vec2 site_to_lon_lat(const GeoOrigin& origin, const Vec2& site);

}  // namespace strewn

#endif
