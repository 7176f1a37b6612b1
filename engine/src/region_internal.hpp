#ifndef STREWN_SRC_REGION_INTERNAL_HPP
#define STREWN_SRC_REGION_INTERNAL_HPP

#include "strewn/region.hpp"

namespace strewn {

// Winding number of one loop around p (no copy of the loop into a Region).
int loop_winding(const Loop& loop, const Vec2& p);

// x -> M (x - origin): the engine's local frame. The difference is taken before the product, so
// that points near `origin` keep their relative accuracy however large their coordinates (a
// vertex at y = 5.4e6 a centimetre from the mean: M x - M origin would cancel to nothing).
Region transformed_about(const Region& region, const Mat2& M, const Vec2& origin);

}  // namespace strewn

#endif
