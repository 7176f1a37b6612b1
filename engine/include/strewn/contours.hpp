#ifndef STREWN_CONTOURS_HPP
#define STREWN_CONTOURS_HPP

/// \file
/// Iso-risk lines of a risk map by marching squares (Lorensen & Cline 1987, in its 2-D form):
/// each grid square whose corners straddle the level gets a segment between points found by
/// linear interpolation of log10(value) along the square's edges; ambiguous squares (a saddle)
/// are resolved by the mean of the four corners. Segments are then joined into polylines.
///
/// Accuracy: along an edge of length h, linear interpolation of f = log10(value) misplaces the
/// level by at most h^2 / 8 max|f''| in f, so the field on the line is within a factor
/// 10^(h^2/8 max|f''|) of the level; `log10_error` is that bound with f'' estimated by the
/// largest second difference of f over the grid (values below the floor count as the floor).

#include <vector>

#include "strewn/export.hpp"
#include "strewn/risk_map.hpp"

namespace strewn {

struct ContourLine {
  std::vector<Vec2> points;
  bool closed = false;
};

struct ContourSet {
  double level = 0.0;
  std::vector<ContourLine> lines;
  double log10_error = 0.0;  ///< bound on |log10(field / level)| along the lines
};

/// Values at or below `floor` (default 1e-300) are treated as the floor.
STREWN_API ContourSet contour(const RiskMap& map, double level, double floor = 1e-300);

}  // namespace strewn

#endif
