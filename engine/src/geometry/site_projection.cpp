// WGS 84 longitude/latitude to site metres: Boost.Geometry's transverse Mercator on the WGS 84
// ellipsoid, centred on the site origin so that the origin maps to (0, 0).
#include <boost/geometry.hpp>
#include <boost/geometry/srs/projection.hpp>
#include <cmath>

#include "strewn/error.hpp"
#include "strewn/region_io.hpp"

namespace strewn {
namespace bg = boost::geometry;
namespace spar = bg::srs::spar;

namespace {

using Params = spar::parameters<spar::proj_tmerc, spar::ellps_wgs84, spar::lat_0<>, spar::lon_0<>>;
using LonLat = bg::model::point<double, 2, bg::cs::geographic<bg::degree>>;
using XY = bg::model::point<double, 2, bg::cs::cartesian>;

bg::srs::projection<Params> projection_about(const GeoOrigin& origin) {
  return bg::srs::projection<Params>(
      Params(spar::proj_tmerc(), spar::ellps_wgs84(), spar::lat_0<>(origin.lat_deg), spar::lon_0<>(origin.lon_deg)));
}

}  // namespace

Vec2 site_to_lon_lat(const GeoOrigin& origin, const Vec2& site) {
  LonLat ll;
  if (!site.allFinite() || !projection_about(origin).inverse(XY(site.x(), site.y()), ll))
    throw input_error("site point cannot be converted to longitude/latitude");
  return Vec2(bg::get<0>(ll), bg::get<1>(ll));
}

Vec2 project_to_site(const GeoOrigin& origin, double lon_deg, double lat_deg) {
  const auto valid = [](double lon, double lat) {
    return std::isfinite(lon) && std::isfinite(lat) && std::abs(lon) <= 180.0 && std::abs(lat) < 90.0;
  };
  if (!valid(origin.lon_deg, origin.lat_deg))
    throw input_error("site origin must be [longitude, latitude] in degrees (|lat| < 90)");
  if (!valid(lon_deg, lat_deg))
    throw input_error("position [" + std::to_string(lon_deg) + ", " + std::to_string(lat_deg) +
                      "] is not a longitude/latitude in degrees");
  XY xy;
  if (!projection_about(origin).forward(LonLat(lon_deg, lat_deg), xy)) throw input_error("position cannot be projected");
  return Vec2(bg::get<0>(xy), bg::get<1>(xy));
}

}  // namespace strewn
