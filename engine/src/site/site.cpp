#include "strewn/site.hpp"

#include "strewn/error.hpp"

namespace strewn {

const char* to_string(Role role) noexcept {
  switch (role) {
    case Role::target: return "target";
    case Role::keep_out: return "keep_out";
    case Role::report_only: return "report_only";
  }
  return "?";
}

BoundingBox site_extent(const Site& site) {
  BoundingBox box{Vec2(1e300, 1e300), Vec2(-1e300, -1e300)};
  for (const Zone& z : site.zones) {
    const BoundingBox b = bounds(z.region);
    box.min = box.min.cwiseMin(b.min);
    box.max = box.max.cwiseMax(b.max);
  }
  for (const Source& src : site.sources) {
    box.min = box.min.cwiseMin(src.aim);
    box.max = box.max.cwiseMax(src.aim);
    for (const Vec2& p : src.positions) {  // where throwers stand
      box.min = box.min.cwiseMin(p);
      box.max = box.max.cwiseMax(p);
    }
  }
  for (const Barrier& b : site.barriers)
    for (const Vec2& p : b.points) {
      box.min = box.min.cwiseMin(p);
      box.max = box.max.cwiseMax(p);
    }
  return box;
}

CrsTransform lon_lat_to_site(const Site& site) {
  if (!site.crs.empty()) return CrsTransform(lon_lat_crs(), site.crs);
  if (site.origin) return CrsTransform::lon_lat_to_local(*site.origin);
  throw input_error("the site has neither crs nor origin: its frame is not tied to the globe");
}

std::string site_frame_crs(const Site& site) {
  if (!site.crs.empty()) return site.crs;
  if (site.origin) return local_frame_definition(*site.origin);
  return "";
}

}  // namespace strewn
