// Bounds on an edge's distance from the mean, and on the error of a polygonisation.
#include "integrate/exact/edge_tail.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "integrate/exact/gauss_kronrod.hpp"
#include "integrate/exact/periodic_ellipse_tail.hpp"
#include "special/fma_clones.hpp"
#include "special/vector_math.hpp"

namespace strewn::detail {

STREWN_FMA_CLONES RadiusRange radius_range(const Edge& e, int chords) {
  RadiusRange r;
  if (e.kind == Edge::Kind::segment) {
    const Vec2 d = e.to - e.from;
    const double l2 = d.squaredNorm();
    const double t = l2 > 0 ? std::clamp(-e.from.dot(d) / l2, 0.0, 1.0) : 0.0;
    r.closest = (e.from + t * d).norm();
    r.farthest = std::max(e.from.norm(), e.to.norm());
    return r;
  }
  // The arc lies within big * (1 - cos(ds/2)) of its chords, big >= the largest singular value
  // of the axes (the Frobenius norm: the larger column's norm falls short of it when the columns
  // are not orthogonal, as in a whitened ellipse, and let a closest distance of 30.18 pass for
  // 30.58, understating bounds by 1e5 in the far tail); the chords' ends are taken with
  // batched sines and cosines (a few ulps each, allowed for in the slack).
  const double big = e.axes.norm();
  const double ds = (e.s_to - e.s_from) / chords;
  const double slack = big * (1.0 - std::cos(0.5 * ds)) + 16 * kEps * (big + e.centre.norm());
  constexpr int kMaxChords = 32;
  if (chords > kMaxChords)
    return chord_range([&](int k) { return e.point(e.s_from + k * ds); }, chords, slack);
  double c[kMaxChords + 1], sn[kMaxChords + 1];
  for (int k = 0; k <= chords; ++k) c[k] = e.s_from + k * ds;
  cos_sin_in_place(c, sn, chords + 1);
  return chord_range([&](int k) { return Vec2(e.centre + e.axes * Vec2(c[k], sn[k])); }, chords, slack);
}

double min_radius(const Edge& e) { return radius_range(e).closest; }

double approximation_error(const Region& z, const ScatterFamily* family) {
  if (z.approximation_area <= 0.0) return 0.0;
  const auto density = [family](double d) {
    return family ? family->density_bound(d) : kOneDivTwoPi * std::exp(-0.5 * d * d);
  };
  // Each patch: its area times the largest density over its box (the box's nearest point to
  // the mean, the origin here). A boolean's moved area lies in its operands' patches, which
  // the result's boundary need not come near.
  double error = 0.0, located = 0.0;
  for (const ApproximationPatch& p : z.approximation_patches) {
    const Vec2 gap = p.box.min.cwiseMax(-p.box.max).cwiseMax(Vec2::Zero());
    error += p.area * density(gap.norm());
    located += p.area;
  }
  const double rest = z.approximation_area - located;
  if (!(rest > 0.0)) return error;
  // The rest (a reader's stroked arcs) lies within approximation_width of this region's boundary.
  double boundary = std::numeric_limits<double>::infinity();
  for (const Loop& loop : z.loops)
    for (const Edge& e : loop) boundary = std::min(boundary, radius_range(e, 8).closest);
  // No boundary left: nothing says where the rest is, so the largest density anywhere.
  const double d = std::isfinite(boundary) ? std::max(boundary - z.approximation_width, 0.0) : 0.0;
  return error + rest * density(d);
}

}  // namespace strewn::detail
