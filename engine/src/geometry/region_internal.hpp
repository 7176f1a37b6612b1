#ifndef STREWN_SRC_REGION_INTERNAL_HPP
#define STREWN_SRC_REGION_INTERNAL_HPP

#include <cstddef>
#include <vector>

#include "strewn/region.hpp"

namespace strewn {

// Winding number of one loop around p (no copy of the loop into a Region).
int loop_winding(const Loop& loop, const Vec2& p);

// For each probe i, the loops j != skip[i] that wind around it (nonzero winding), by an R-tree
// of the loops' boxes: n log n for n loops and probes where testing every pair was n^2.
std::vector<std::vector<std::size_t>> loops_around(const Region& region, const std::vector<Vec2>& probes,
                                                   const std::vector<std::size_t>& skip);

// The polygon through `vertices` (at least three, finite), normalised but not validated: for
// the engine's own polygons that are simple by construction (a barrier's shadow pieces), where
// the public polygon() would pay the validity test on every build.
Region unchecked_polygon(const std::vector<Vec2>& vertices);

// x -> M (x - origin): the engine's local frame. The difference is taken before the product, so
// that points near `origin` keep their relative accuracy however large their coordinates (a
// vertex at y = 5.4e6 a centimetre from the mean: M x - M origin would cancel to nothing).
Region transformed_about(const Region& region, const Mat2& M, const Vec2& origin);

}  // namespace strewn

#endif
