// WGS 84 longitude/latitude to and from the local frame about a site origin: the PROJ pipeline of
// CrsTransform::lon_lat_to_local (a transverse Mercator centred on the origin, scale 1).
#include <cmath>

#include "strewn/crs.hpp"
#include "strewn/error.hpp"
#include "strewn/region_io.hpp"

namespace strewn {

Vec2 site_to_lon_lat(const GeoOrigin& origin, const Vec2& site) {
  if (!site.allFinite()) throw input_error("site point cannot be converted to longitude/latitude");
  try {
    return CrsTransform::lon_lat_to_local(origin).inverse(site);
  } catch (const input_error&) {
    throw input_error("site point cannot be converted to longitude/latitude");
  }
}

Vec2 project_to_site(const GeoOrigin& origin, double lon_deg, double lat_deg) {
  if (!(std::isfinite(lon_deg) && std::isfinite(lat_deg) && std::abs(lon_deg) <= 180.0 && std::abs(lat_deg) < 90.0))
    throw input_error("position [" + std::to_string(lon_deg) + ", " + std::to_string(lat_deg) +
                      "] is not a longitude/latitude in degrees");
  return CrsTransform::lon_lat_to_local(origin).forward(Vec2(lon_deg, lat_deg));
}

}  // namespace strewn
