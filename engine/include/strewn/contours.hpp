#ifndef STREWN_CONTOURS_HPP
#define STREWN_CONTOURS_HPP

/// \file
/// Iso-risk lines of a risk map by marching squares (Lorensen & Cline 1987, in its 2-D form):
/// each grid square whose corners straddle the level gets a segment between points found by
/// linear interpolation of log10(value) along the square's edges; ambiguous squares (a saddle)
/// are resolved by the mean of the four corners. Segments are then joined into polylines.
///
/// Accuracy: along an edge of length h, linear interpolation of f = log10(value) misplaces the
/// level by at most D2 / 8 in f, D2 = h^2 max(|f_xx|, |f_yy|). Inside a square the line is a
/// straight segment between two such edge points; along it f departs from the chord of its ends
/// by at most (dx^2 |f_xx| + 2 |dx dy| |f_xy| + dy^2 |f_yy|) / 8 <= (2 D2 + 2 Dxy) / 8 with
/// Dxy = h^2 max|f_xy|. So everywhere on the lines |f - log10(level)| <= (3 D2 + 2 Dxy) / 8,
/// and the field is within a factor 10^that of the level. `log10_error` is that bound, with
/// h^2 f_xx, h^2 f_yy estimated by the largest second differences at the corners of the squares
/// the lines cross, and h^2 f_xy by the largest mixed difference over those squares and their
/// neighbours (values below the floor count as the floor). The derivatives are estimated from
/// the grid, not certified: a feature narrower than a cell is invisible to them.

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
