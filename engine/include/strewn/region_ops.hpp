#ifndef STREWN_REGION_OPS_HPP
#define STREWN_REGION_OPS_HPP

/// \file
/// Boolean operations and validity checks on regions.
///
/// Boolean operations polygonise their operands with the given sagitta tolerance (metres) and
/// combine them exactly as polygons; the area the polygonisation may have moved is carried in
/// Region::approximation_area, and where it lies (the operands' chords, each widened by its
/// sagitta) in Region::approximation_patches, so that integration can bound its effect wherever
/// the result's boundary is. The result may have no loops at all (a sliver thinner than the
/// sagitta) and still patches: integrate() then gives p = 0 with the patches' bound.

#include <string>

#include "strewn/export.hpp"
#include "strewn/region.hpp"

namespace strewn {

enum class BooleanOp { unite, subtract, intersect };

STREWN_API Region combine(const Region& a, const Region& b, BooleanOp op, double sagitta);

/// The outcome of a validity check: `valid`, or the first fault found and where it is.
struct Validity {
  bool valid = true;
  std::string fault;  ///< e.g. "self-intersection at (2.5, 1.0)", "spike at vertex 3 of loop 1"
};

/// Checks a region for self-intersections, spikes, duplicate or too few points, holes outside
/// their outer loop and overlapping holes. Arcs are checked on a fine polygonisation.
STREWN_API Validity check_validity(const Region& region);

}  // namespace strewn

#endif
