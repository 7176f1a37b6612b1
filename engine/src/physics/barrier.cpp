#include "strewn/barrier.hpp"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "geometry/region_internal.hpp"
#include "strewn/constants.hpp"
#include "strewn/error.hpp"
#include "strewn/region_ops.hpp"

namespace strewn {
namespace {

double cross(const Vec2& a, const Vec2& b) { return a.x() * b.y() - a.y() * b.x(); }

// How far the shadow of a barrier reaches along a path that crosses it at ground distance a from
// the source: without a height rule, without end; with one, a h0 / (h0 - h) (barrier.hpp).
std::optional<double> reach_factor(const Barrier& b, std::optional<double> release_height) {
  if (!b.height || !release_height || *b.height >= *release_height) return std::nullopt;
  return *release_height / (*release_height - *b.height);
}

// One segment's wedge behind AB seen from S, as a convex polygon (the cone from S through A and B,
// beyond AB, cut off far out or by the height rule); empty when S is on AB's line.
std::vector<Vec2> segment_shadow(Vec2 a, Vec2 b, const Vec2& s, double reach, std::optional<double> factor) {
  const Vec2 da = a - s, db = b - s;
  const double c = cross(da, db);
  if (!(std::fabs(c) > 1e-12 * da.norm() * db.norm())) return {};
  if (factor) return {a, b, s + *factor * db, s + *factor * da};
  // Far side: chords outside the circle of radius r about S (their distance from S is r), so that
  // every point of the wedge within r is inside. r is at least both ends' distance, so the
  // segment AB lies inside the circle and the polygon is simple.
  const double r = std::max({reach, da.norm(), db.norm()}) * 1.01;
  double ta = std::atan2(da.y(), da.x()), tb = std::atan2(db.y(), db.x());
  if (c < 0) {  // walk counter-clockwise from A's ray to B's ray
    std::swap(a, b);
    std::swap(ta, tb);
  }
  if (tb < ta) tb += kTwoPi;
  const int steps = std::max(1, static_cast<int>(std::ceil((tb - ta) / (kPi / 32.0))));
  const double step = (tb - ta) / steps, far = r / std::cos(step / 2.0);
  std::vector<Vec2> v{a, b};
  for (int k = steps; k >= 0; --k) v.push_back(s + far * Vec2(std::cos(ta + k * step), std::sin(ta + k * step)));
  return v;
}

}  // namespace

void check_barrier(const Barrier& b) {
  if (b.points.size() < 2) throw input_error("a barrier needs at least two points [[x, y], [x, y], ...]");
  for (std::size_t k = 0; k + 1 < b.points.size(); ++k)
    if (!((b.points[k + 1] - b.points[k]).norm() > 0.0))
      throw input_error(fmt::format("points {} and {} of the barrier are the same point", k + 1, k + 2));
  if (!(b.catch_share >= 0.0 && b.catch_share <= 1.0))
    throw input_error(fmt::format("catch must be a share from 0 to 1 (got {:g})", b.catch_share));
  if (b.height && !(*b.height > 0.0)) throw input_error(fmt::format("height must be positive (got {:g})", *b.height));
}

std::vector<std::vector<Vec2>> shadow_pieces(const Barrier& b, const Vec2& from, double reach,
                                             std::optional<double> release_height) {
  const std::optional<double> factor = reach_factor(b, release_height);
  std::vector<std::vector<Vec2>> out;
  for (std::size_t k = 0; k + 1 < b.points.size(); ++k) {
    std::vector<Vec2> w = segment_shadow(b.points[k], b.points[k + 1], from, reach, factor);
    if (!w.empty()) out.push_back(std::move(w));
  }
  return out;
}

Region shadow(const Barrier& b, const Vec2& from, double reach, std::optional<double> release_height) {
  Region out;
  for (const std::vector<Vec2>& piece : shadow_pieces(b, from, reach, release_height)) {
    const Region w = unchecked_polygon(piece);
    // Polygons only: the sagitta matters for arcs, of which there are none.
    out = out.empty() ? w : combine(out, w, BooleanOp::unite, 1e-6);
  }
  return out;
}

bool path_crosses(const Barrier& b, const Vec2& from, const Vec2& point, std::optional<double> release_height) {
  const std::optional<double> factor = reach_factor(b, release_height);
  const Vec2 d = point - from;
  for (std::size_t k = 0; k + 1 < b.points.size(); ++k) {
    const Vec2 a = b.points[k], e = b.points[k + 1] - a;
    const double den = cross(d, e);
    if (den == 0.0) continue;  // parallel: a path along the barrier's line is a null set
    const Vec2 w = a - from;
    const double t = cross(w, e) / den;  // along the path, 0 at the source, 1 at the impact
    const double u = cross(w, d) / den;  // along the segment
    if (t < 0.0 || t > 1.0 || u < 0.0 || u > 1.0) continue;
    // Crossed at ground distance a = t L from the source: stopped when L <= a * factor.
    if (!factor || 1.0 <= t * *factor) return true;
  }
  return false;
}

}  // namespace strewn
