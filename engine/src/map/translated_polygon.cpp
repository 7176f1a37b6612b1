// A footprint of straight edges at many points (TranslatedFootprint's polygon path): the exact
// method's far form, P = W - sum I_e, with the footprint's whitened vertices tabled once.
//
// Whitening is linear, so the footprint moved by x whitens to z_k = W (x - mean) + W v_k: a cell
// costs one 2 x 2 product and one addition per vertex before the edges' Owen's T closed forms
// (segment_tails, one batch for all loops), where integrate() would copy the moved region, check
// it, whiten every vertex and look for the mean on the boundary. A cell is left to integrate()
// whenever its answer could differ from integrate()'s by more than the two bounds: the whole
// footprint within one sigma of the mean (integrate's near form), the mean on or within
// 1.5e-11 (relative) of an edge or a vertex (integrate's fractional winding), an edge that
// needed quadrature without meeting the request in one pass (integrate tightens and redoes it),
// or a bound above the request.
#include <algorithm>
#include <cmath>
#include <limits>

#include "integrate/exact/edge_tail.hpp"
#include "integrate/exact/gauss_kronrod.hpp"
#include "map/translated_footprint.hpp"
#include "special/fma_clones.hpp"
#include "special/vector_math.hpp"
#include "strewn/constants.hpp"

namespace strewn::detail {
namespace {

// An edge whose line passes at least this many sigma from the mean, with the foot of the
// perpendicular outside the edge, goes straight to quadrature. Its closed form, a difference of
// two Owen's T values (or of two reflected forms), cancels like exp(h^2 / 2) out there
// (segment_tail.cpp's kMaxCancellation turns it down beyond about h = 4.3), and segment_tails
// would then evaluate the T values up to three times before its own quadrature. Measured with
// callgrind on the throwing lane's 200 x 200 rectangle map (compute_risk_map, one thread):
// 1,027 M instructions with no such edge, 823 M from h = 4, 774 M from h = 3, 796 M from h = 2,
// 902 M from h = 5; one rule of 31 batched exponentials usually settles such an edge.
constexpr double kFarLine = 3.0;

// I_e of the segment z1 -> z2 (edge_tail.hpp) for a line at distance h from the mean, the ends
// at t1 < t2 along it on the same side of its foot: the dt form
//   1/(2 pi) integral from t1 to t2 of h exp(-(h^2 + t^2) / 2) / (h^2 + t^2) dt,
// the integrand of segment_tail.cpp's reflected pieces, which never cancels, by the shared
// adaptive Gauss-Kronrod driver with the 31 exponentials of each rule in one batch.
Contribution far_line_tail(double h, double t1, double t2, double rel_tol) {
  const double h2 = h * h;
  const auto f = [h, h2](const double* s, double* v, int n) {
    for (int i = 0; i < n; ++i) v[i] = -0.5 * (h2 + s[i] * s[i]);
    exp_in_place(v, n);
    for (int i = 0; i < n; ++i) v[i] *= kOneDivTwoPi * h / (h2 + s[i] * s[i]);
  };
  return batch_quadrature(f, t1, t2, rel_tol, h2 + std::min(t1 * t1, t2 * t2));
}

}  // namespace

bool TranslatedFootprint::table_polygon(const Region& footprint) {
  if (footprint.approximation_area != 0.0) return false;  // its bound is the full integrator's
  std::size_t vertices = 0;
  for (const Loop& loop : footprint.loops) {
    if (loop.empty()) return false;
    for (std::size_t k = 0; k < loop.size(); ++k) {
      const Edge& e = loop[k];
      // A loop closed only to rounding has gap segments that integrate() counts; keep it there.
      if (e.kind != Edge::Kind::segment || e.from != loop[(k + loop.size() - 1) % loop.size()].to) return false;
    }
    vertices += loop.size();
  }
  if (vertices == 0 || vertices > kPolygonVertices) return false;
  const Mat2& w = g_.whitening();
  vertex_.reserve(vertices);
  for (const Loop& loop : footprint.loops) {
    for (const Edge& e : loop) {
      vertex_.push_back(w * e.from);
      vertex_reach_ = std::max(vertex_reach_, vertex_.back().norm());
    }
    loop_end_.push_back(vertex_.size());
  }
  return true;
}

// Built for x86-64-v3 too (fma_clones.hpp): the winding test takes a cross product with std::fma
// per edge, a library call in the plain build.
STREWN_FMA_CLONES bool TranslatedFootprint::polygon_at(const Vec2& where, Estimate& out) const {
  // z = W (x - mean): the difference first, as integrate() does, then the tabled vertices.
  const Vec2 c = g_.whitening() * (where - g_.mean());
  const std::size_t n = vertex_.size();
  Vec2 from[kPolygonVertices], to[kPolygonVertices];
  Vec2 low = c + vertex_[0], high = low;
  for (std::size_t k = 0; k < n; ++k) {
    from[k] = c + vertex_[k];
    low = low.cwiseMin(from[k]);
    high = high.cwiseMax(from[k]);
  }
  for (std::size_t l = 0, first = 0; l < loop_end_.size(); first = loop_end_[l++])
    for (std::size_t k = first; k < loop_end_[l]; ++k) to[k] = from[k + 1 < loop_end_[l] ? k + 1 : first];
  const double reach = std::hypot(std::max(std::fabs(low.x()), std::fabs(high.x())),
                                  std::max(std::fabs(low.y()), std::fabs(high.y())));
  if (reach <= kNearRadius) return false;  // integrate()'s near form
  // The winding number of the boundary around the mean, by signed crossings of the ray to +x.
  // Every edge is kept 1024 times further from the mean than integrate()'s rounding allowance
  // for "on the boundary" (64 eps times the coordinates' size), so no edge there counts as
  // through the mean, and the sign of each cross product (one rounding) is exact.
  double winding = 0.0;
  const double allowance = 128 * kEps * reach;  // as integrate_exact's clearly_outside()
  if (!(low.x() > allowance || low.y() > allowance || high.x() < -allowance || high.y() < -allowance)) {
    const double margin = 1024 * 64 * kEps * reach;
    int crossings = 0;
    for (std::size_t k = 0; k < n; ++k) {
      const Vec2& a = from[k];
      const Vec2& b = to[k];
      const Vec2 d = b - a;
      const double cross = accurate_cross(a, b);
      const double length2 = d.squaredNorm();
      if (cross * cross <= margin * margin * length2) {
        // The line passes within the margin: how close is the segment itself?
        const double t1 = a.dot(d), t2 = b.dot(d);  // times |d|
        const double closest = t1 >= 0.0 ? a.norm() : (t2 <= 0.0 ? b.norm() : std::fabs(cross) / std::sqrt(length2));
        if (!(closest > margin)) return false;  // integrate()'s fractional winding
      }
      if (a.y() <= 0.0) {
        if (b.y() > 0.0 && cross > 0.0) ++crossings;
      } else if (b.y() <= 0.0 && cross < 0.0) {
        --crossings;
      }
    }
    winding = crossings;
  }
  // Rounding in z_k = W (x - mean) + W v_k against integrate()'s W ((v_k + x) - mean): both
  // products round to a few eps |W| times their argument, |W| |x - mean| <= cond(W) |W (x - mean)|
  // <= cond(W) (|z_k| + |W v_k|), and the sum adds eps |z_k|. Twice whitening_noise's relative
  // term (4.5 eps cond) covers that as 9 eps cond (|z_k| + |W v_k|), on top of the input's own
  // rounding (its absolute term), which both share.
  const double moved_absolute = noise_.absolute + 2 * noise_.relative * vertex_reach_;
  const double moved_relative = 2 * noise_.relative;
  const double quad_tol = options_.rel_tolerance * 0.01;
  // Far edges (kFarLine) by their dt form here, the others in one batch of closed forms. Each
  // far edge carries its share of the moved-ends bound as segment_tails() computes it: the
  // larger move of its ends times min(length / (2 pi), 1 / sqrt(2 pi)) exp(-d^2 / 2), d the
  // distance from the mean to its nearer end. The near edges move to the front of from and to
  // (near <= k, so nothing is overwritten before it is read).
  struct FarEdge {
    double h, t1, t2, sign;
  };
  FarEdge far[kPolygonVertices];
  int near = 0, n_far = 0;
  for (std::size_t k = 0; k < n; ++k) {
    const Vec2 d = to[k] - from[k];
    const double length2 = d.squaredNorm();
    const double cross = accurate_cross(from[k], to[k]);
    if (length2 > 0.0 && cross * cross >= kFarLine * kFarLine * length2) {
      const double length = std::sqrt(length2);
      const double h = std::fabs(cross) / length;
      const double t1 = from[k].dot(d) / length, t2 = to[k].dot(d) / length;
      if ((t1 >= 0.0 || t2 <= 0.0) && h * h + std::min(t1 * t1, t2 * t2) <= kNegligibleR2) {
        far[n_far++] = {h, t1, t2, cross < 0.0 ? -1.0 : 1.0};
        continue;
      }
    }
    from[near] = from[k];
    to[near++] = to[k];
  }
  ContributionSum s = segment_tails(from, to, near, quad_tol, moved_absolute, moved_relative);
  for (int k = 0; k < n_far; ++k) {
    const FarEdge& f = far[k];
    const Contribution c = far_line_tail(f.h, f.t1, f.t2, quad_tol);
    s.value += f.sign * c.value;
    s.magnitude += std::fabs(c.value);
    s.abs_err += c.abs_err;
    s.evaluations += c.evaluations;
    s.converged = s.converged && c.converged;
    s.quadrature = true;
    const double h2 = f.h * f.h, t_near2 = std::min(f.t1 * f.t1, f.t2 * f.t2);
    s.moved += (moved_absolute + moved_relative * std::sqrt(h2 + std::max(f.t1 * f.t1, f.t2 * f.t2))) *
               std::min((f.t2 - f.t1) * kOneDivTwoPi, kOneDivRootTwoPi) * std::exp(-0.5 * (h2 + t_near2));
  }
  if (!s.converged) return false;
  Estimate e;
  e.method = Method::exact;
  e.p = std::max(winding - s.value, 0.0);
  e.q = std::max((1.0 - winding) + s.value, 0.0);
  e.abs_err = s.abs_err + 4 * kEps * s.magnitude;
  e.evaluations = s.evaluations;
  // integrate_exact would tighten the quadrature and sum again: leave such a cell to it.
  const double wanted = 0.5 * options_.rel_tolerance * std::min(e.p, e.q);
  if (s.quadrature && e.abs_err > std::max(wanted, options_.abs_tolerance)) return false;
  e.abs_err += s.moved;
  if (!meets(e, options_)) return false;
  out = e;
  return true;
}

}  // namespace strewn::detail
