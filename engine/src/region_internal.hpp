#ifndef STREWN_SRC_REGION_INTERNAL_HPP
#define STREWN_SRC_REGION_INTERNAL_HPP

#include "strewn/region.hpp"

namespace strewn {

// Winding number of one loop around p (no copy of the loop into a Region).
int loop_winding(const Loop& loop, const Vec2& p);

}  // namespace strewn

#endif
