#include "strewn/site.hpp"

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
  }
  return box;
}

}  // namespace strewn
