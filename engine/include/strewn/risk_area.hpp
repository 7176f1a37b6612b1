#ifndef STREWN_RISK_AREA_HPP
#define STREWN_RISK_AREA_HPP

/// \file
/// The area of a risk map where the field is at or above a level ("where it is unsafe to
/// stand" when the level is a limit), as polygons whose boundary inside the map is exactly the
/// contour line of strewn/contours.hpp (marching squares on log10 of the field, the same
/// crossing points and the same saddle rule: the mean of a square's four corners decides) and,
/// where the area reaches the edge of the map, the map's edge (the nodes' hull: from the first
/// cell centre to the last).
///
/// Method: each grid square contributes the part of it on the high side of its contour
/// segments (a polygon through its high corners and its edge crossings, or two triangles at a
/// separated saddle); directed edges shared by two squares cancel, and what remains is chained
/// into loops. Outer loops come out counter-clockwise and holes clockwise (the region is
/// normalised), loops never touch (crossings are kept a millionth of an edge away from the
/// corners), so the result is a valid polygon set (OGC simple features). Its accuracy is that of
/// the contour line: strewn::ContourSet::log10_error.
///
/// Example:
///   const strewn::Region unsafe = strewn::area_at_or_above(map, 1e-4);
///   double square_metres = strewn::area(unsafe);

#include "strewn/export.hpp"
#include "strewn/region.hpp"
#include "strewn/risk_map.hpp"

namespace strewn {

/// Values at or below `floor` count as the floor (as for strewn::contour). An empty region when
/// no node reaches the level; the whole map's hull when every node does.
STREWN_API Region area_at_or_above(const RiskMap& map, double level, double floor = 1e-300);

}  // namespace strewn

#endif
