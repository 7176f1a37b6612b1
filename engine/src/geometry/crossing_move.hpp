#ifndef STREWN_SRC_GEOMETRY_CROSSING_MOVE_HPP
#define STREWN_SRC_GEOMETRY_CROSSING_MOVE_HPP

#include "strewn/region.hpp"

namespace strewn {

// How far (m) a vertex of `result`, the outcome of a boolean operation on the polygonised
// operands `a` and `b`, may lie from the point it stands for. A vertex that is one of the
// operands' own (bit for bit) has not moved. Any other was computed where two edges cross, in
// floating point: if it lies within d1 of one edge's line and d2 of another's, at angle theta,
// it lies within (d1 + d2) / sin(theta) of where those lines cross (the offsets along the two
// normals fix the point; each normal's share is at most its offset over sin(theta)). The
// distances are taken with their own rounding; the pair of edges near the vertex that gives
// the least bound is the crossing it stands for. A vertex with no such pair within 1e-6 of the
// operands' size is taken to have moved that far. The largest over the result's vertices.
double crossing_move(const Region& result, const Region& a, const Region& b);

}  // namespace strewn

#endif
