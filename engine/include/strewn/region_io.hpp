#ifndef STREWN_REGION_IO_HPP
#define STREWN_REGION_IO_HPP

/// \file
/// Regions read from the open geometry formats that site plans come in.
///
/// WKT (OGC Simple Features): POLYGON or MULTIPOLYGON, coordinates in site metres (WKT carries no
/// reference system of its own).
///
/// GeoJSON (RFC 7946): a Polygon or MultiPolygon, bare or in a Feature or FeatureCollection.
/// RFC 7946 positions are WGS 84 longitude and latitude in degrees; they are projected to site
/// metres (x east, y north) with a transverse Mercator projection centred on the site origin
/// (Boost.Geometry's projection of the WGS 84 ellipsoid, scale 1 at the origin), whose scale error
/// is below 1.3e-4 within 100 km of the origin (k = 1 + d^2 / (2 R^2), from the series for the
/// transverse Mercator scale factor). Files exported in local metres instead (CAD drawings) may be
/// read with GeoJsonPositions::site_metres.
///
/// Every reader checks the result with check_validity() and throws strewn::input_error naming the
/// fault; regions come back normalised.

#include <optional>
#include <string>

#include "strewn/export.hpp"
#include "strewn/region.hpp"

namespace strewn {

/// A site's origin on the globe (WGS 84, degrees).
struct GeoOrigin {
  double lon_deg = 0.0;
  double lat_deg = 0.0;
};

enum class GeoJsonPositions { lon_lat, site_metres };

struct GeoJsonOptions {
  GeoJsonPositions positions = GeoJsonPositions::lon_lat;
  std::optional<GeoOrigin> origin;  ///< required for lon_lat
  /// Which feature of a FeatureCollection: matched against properties.name, then id. Empty: the
  /// file must hold exactly one polygonal feature.
  std::string feature;
  /// Projected points further than this from the origin are refused (m).
  double max_distance = 100e3;
};

STREWN_API Region region_from_wkt(const std::string& text);
STREWN_API Region region_from_geojson(const std::string& text, const GeoJsonOptions& options);

/// Site metres (x east, y north) of a WGS 84 position, transverse Mercator about the origin.
STREWN_API Vec2 project_to_site(const GeoOrigin& origin, double lon_deg, double lat_deg);
/// The inverse: WGS 84 (longitude, latitude) in degrees of a point in site metres.
STREWN_API Vec2 site_to_lon_lat(const GeoOrigin& origin, const Vec2& site);

}  // namespace strewn

#endif
