// The cubature method: each loop of the region is a signed sum of pieces fanned from an apex of
// the loop, each the smooth image of a rectangle under
//     phi(u, s) = p0(s) + u (p1(s) - p0(s)),   u in [0, 1]:
// a cone over one edge (p0 = apex, p1 = z(s) on the edge; a polar patch when the apex is the
// centre of an ellipse), or, for two consecutive straight edges b -> c -> d, the bilinear
// quadrilateral a -> b -> c -> d with the apex a (p0 = a + s (d - a), p1 = b + s (c - b)).
// The Jacobian is linear in u, j0(s) + u j1(s), and of one sign on each piece (quadrilaterals
// are taken only where convex), so the pieces add up, with their signs, to the loop's winding
// number. Quadrilaterals halve the number of pieces of a convex polygon.
// Each piece is integrated as an iterated integral by hcubature in one dimension (Gauss-Kronrod
// 7-15, h-adaptive, QUADPACK's error estimate) at both levels: the outer rule over s integrates
// the inner integral over u together with the inner error estimate, so that the inner errors
// enter the bound through the outer rule's positive weights. On these smooth integrands this
// takes a few thousand evaluations per polygon at 1e-8 where the two-dimensional Genz-Malik
// rule took fifty thousand.
// Independent of the exact method: it integrates the density itself, not a boundary form.
// Under a Student-t component the density 2 pi f(r) = (1 + r^2/nu)^(-(nu+2)/2) takes the place
// of exp(-r^2/2), with its own bounds for dropped boxes. A density that jumps (the uniform's edge
// at whitened r = 2, a profile whose last rate is above 0, the rays of a part circle's wedge)
// would leave a Gauss-Kronrod rule that straddles the jump without a meaningful error estimate,
// so each ray's inner integral is cut where the ray crosses the jump (the circle by its
// quadratic, a wedge's ray by a cross product) and its pieces integrated apart: inside each the
// density is smooth. The outer integrand over s then only has kinks and square-root points (a
// ray tangent to the circle, a crossing reaching a ray's end or a box's side), and the outer
// range is cut at each of them (jump_breaks, box_breaks): a kink between the rule's nodes can
// leave its two embedded rules in agreement. A profile's density is also a cone at the mean
// (linear in r), cut like a circle of radius 0.
#include <cubature.h>
#include <Eigen/LU>

#include <functional>

#include <algorithm>
#include <cmath>
#include <limits>
#include <sstream>
#include <vector>

#include "strewn/constants.hpp"
#include "strewn/error.hpp"

#include "core/profile_table.hpp"
#include "integrate/exact/edge_tail.hpp"
#include "integrate/integrators.hpp"
#include "geometry/region_internal.hpp"
#include "special/vector_math.hpp"

namespace strewn::detail {
namespace {

// One Gauss-Kronrod rule: the fewest evaluations hcubature makes in one dimension.
constexpr std::uint64_t kRulePoints = 15;
// hcubature's one-dimensional error estimate never falls below 50 eps times the integral of |f|
// (QUADPACK's rounding floor), so no piece is asked for less than about twice that: a tighter
// request (cancelling pieces, a tolerance near eps) would only spend the evaluation budget.
constexpr double kRelativeFloor = 2.5e-14;
// A region whose whitened size passes this is cut by circles about the mean (integrate_cubature):
// below it split_box's 24 halvings bring every part near the mean to a few standard deviations
// (4096 = 2^12 a side); cutting smaller regions too (at 16) cost the elongated spreads of
// degenerate_placements_test several times their time and changed no result.
constexpr double kResolvedExtent = 4096.0;

double cross(double ax, double ay, double bx, double by) { return ax * by - ay * bx; }

struct Piece {
  const Edge* edge = nullptr;  // the cone's edge; null for a quadrilateral
  Vec2 a = Vec2::Zero(), b = Vec2::Zero(), c = Vec2::Zero(), d = Vec2::Zero();  // a: the apex
  double sign = 1.0;           // -1 when a cone's edge runs backwards in its parameter
  // A cone over a straight edge: its constant Jacobian cross(from - a, to - a), and its
  // parameter s, shifted so that s = 0 is where the rays pass the mean: the edge's point is
  // a + base + s (to - from), s in [-shift, 1 - shift] (see cone()).
  double straight_jacobian = 0.0;
  Vec2 base = Vec2::Zero();
  double shift = 0.0;
  double s_lo = 0.0, s_hi = 1.0;
  // The work in progress: evaluations, the budget left for the whole call, the current box's
  // u range and the inner tolerances.
  std::uint64_t calls = 0;
  std::uint64_t max_calls = 0;
  double u0 = 0.0, u1 = 1.0;
  double inner_abs = 0.0, inner_rel = 0.0;
  const ScatterFamily* family = nullptr;  // null for the normal
  const struct Jumps* jumps = nullptr;    // null when the density is continuous

  bool straight() const { return edge && edge->kind == Edge::Kind::segment; }
  // The edge's point at the piece's parameter s (a cone).
  Vec2 edge_point(double s) const { return straight() ? Vec2(a + base + s * (edge->to - edge->from)) : edge->point(s); }
  Vec2 at(double u, double s) const {
    if (straight()) return a + u * (base + s * (edge->to - edge->from));
    if (edge) return a + u * (edge->point(s) - a);
    const Vec2 p0 = a + s * (d - a), p1 = b + s * (c - b);
    return p0 + u * (p1 - p0);
  }
};

// Where a family's density jumps or kinks, in whitened coordinates: circles about the mean (a
// profile's rows, the support's edge r = support; support 0: none) and the two rays of a part
// circle's wedge (directions from the mean), outside which it is 0.
struct Jumps {
  std::vector<double> radii;
  double support = 0.0;
  bool centre = false;  // a kink at the mean itself: a profile's density, linear in r, is a cone there
  bool wedge = false;
  double from = 0.0, sweep = kTwoPi;
  double fx = 1.0, fy = 0.0, tx = 1.0, ty = 0.0;  // unit directions of the wedge's first and last ray

  bool inside(double x, double y) const {
    if (support > 0.0 && x * x + y * y > support * support) return false;
    if (!wedge) return true;
    double a = std::atan2(fx * y - fy * x, fx * x + fy * y);
    if (a < 0.0) a += kTwoPi;
    return a <= sweep;
  }
};

// A cone over a straight edge, where the edge is millions of sigma long and the mean a few
// from it, needs three things done with care, each measured on a half-plane 3e6 sigma across
// under a rotated spread, fanned from the mean 5 sigma inside it (4.4e-12 off with an estimate
// of 1.1e-12 before):
//  - the Jacobian cross(z(s) - a, t) is the constant cross(from - a, to - a), taken once and
//    accurately: formed per ray from the rounded z(s) it cancelled to a relative eps |z - a| / h
//    (h the edge's distance from the apex), a scale of the cone's whole mass;
//  - the ray z(s) - a = base + s t is formed from a point near where the rays pass the mean
//    (from + s t cancels there to eps |from|, a noise along the edge that the constant
//    Jacobian does not follow);
//  - the parameter s is shifted to be 0 there: near s = 0.5 a double resolves s to 5.5e-17, a
//    relative 1.2e-10 of the outer rule's boxes at the mean (4.4e-7 of the edge each), which
//    misplaced its nodes by that much against exact weights (each box 1e-10 off).
// Rounding the edge's points themselves only moves the edge by eps |z|, which the input's
// rounding term bounds. Where the rays pass the mean: from the mean itself, the foot of its
// perpendicular on the edge's line; from any other apex, the ray through the mean (clamped to
// the edge).
Piece cone(const Edge& e, const Vec2& apex) {
  Piece p;
  p.edge = &e;
  p.a = apex;
  p.s_lo = e.param_from();
  p.s_hi = e.param_to();
  if (e.kind == Edge::Kind::segment) {
    const Vec2 f = e.from - apex, to = e.to - apex, t = e.to - e.from;
    p.straight_jacobian = accurate_cross(f, to);  // Kahan's FMA form (edge_tail.hpp): the plain one loses eps |f| |to|
    const double t2 = t.squaredNorm();
    p.base = f;
    if (t2 > 0.0) {
      const Vec2 foot = -p.straight_jacobian / t2 * Vec2(-t.y(), t.x());
      const double s_foot = -f.dot(t) / t2;
      double shift = s_foot;
      if (apex != Vec2::Zero()) {
        const double den = cross(apex.x(), apex.y(), t.x(), t.y());
        shift = den != 0.0 ? -cross(apex.x(), apex.y(), f.x(), f.y()) / den : 0.0;
      }
      shift = std::isfinite(shift) ? std::clamp(shift, 0.0, 1.0) : 0.0;
      p.shift = shift;
      p.base = foot + (shift - s_foot) * t;
      p.s_lo = -shift;
      p.s_hi = 1.0 - shift;
    }
    return p;
  }
  if (p.s_hi < p.s_lo) {
    std::swap(p.s_lo, p.s_hi);
    p.sign = -1.0;
  }
  return p;
}

Piece quadrilateral(const Vec2& a, const Vec2& b, const Vec2& c, const Vec2& d) {
  Piece p;
  p.a = a;
  p.b = b;
  p.c = c;
  p.d = d;
  return p;
}

// A bundle of rays of a piece, one per outer node s: the points p0 + u w with w = p1 - p0, and
// the Jacobian sign * (j0 + u j1) / (2 pi), taken from the box's first point p0 + u0 w with
// v = u - u0 as the inner variable. The exponent -|p0 + v w|^2 / 2 is kept about the ray's
// closest point to the mean, -(h^2 + |w|^2 (v - v*)^2) / 2 with h = cross(p0, w) / |w| and
// v* = -p0.w / |w|^2: each term then carries a rounding of about eps |p0| in position, the
// input's own, where the expanded quadratic e0 + v (e1 + v e2) cancelled to eps |p0|^2 in the
// exponent (a half-plane 1e6 sigma across, the mean 0.5 sigma outside: 4.7e-12 off with a
// bound of 4.4e-13; at 5 sigma 2e-24 for 3.9e-18, the circles' crossings lost with it). The
// inner integrals of a bundle are one vector integrand (one component per ray), so that
// hcubature's bookkeeping is paid once per bundle rather than once per ray.
constexpr std::size_t kBundle = 32;
// A ray's inner variable is v = lo + t len, t the rule's variable: lo = 0, len = 1 (so v = t
// exactly) when the density is continuous; one piece of the ray between two jumps otherwise
// (len = 0 for a piece outside the support, which then adds nothing).
struct Rays {
  Piece* piece;
  double nh2[kBundle], vs[kBundle], nw2[kBundle], j0[kBundle], j1[kBundle];  // -h^2/2, v*, -|w|^2/2
  double px[kBundle], py[kBundle], wx[kBundle], wy[kBundle];  // the ray's start p0 + u0 w, and w
  double lo[kBundle], len[kBundle];
  void set(int i, double u0, double p0x, double p0y, double wx_, double wy_, double jac0, double jac1) {
    p0x += u0 * wx_;
    p0y += u0 * wy_;
    jac0 += u0 * jac1;
    const double w2 = wx_ * wx_ + wy_ * wy_;
    if (w2 > 0.0) {
      const double h = cross(p0x, p0y, wx_, wy_) / std::sqrt(w2);
      nh2[i] = -0.5 * h * h;
      vs[i] = -(p0x * wx_ + p0y * wy_) / w2;
    } else {
      nh2[i] = -0.5 * (p0x * p0x + p0y * p0y);
      vs[i] = 0.0;
    }
    nw2[i] = -0.5 * w2;
    j0[i] = jac0;
    j1[i] = jac1;
    px[i] = p0x;
    py[i] = p0y;
    wx[i] = wx_;
    wy[i] = wy_;
    lo[i] = 0.0;
    len[i] = 1.0;
  }
  // The exponent -|p0 + v w|^2 / 2 of ray j at v.
  double exponent(unsigned j, double v) const {
    const double d = v - vs[j];
    return nh2[j] + d * d * nw2[j];
  }
};

// Inner integrand, vectorised over t and over the rays.
int ray_integrand(unsigned, std::size_t npt, const double* t, void* data, unsigned fdim, double* value) {
  const Rays& r = *static_cast<Rays*>(data);
  r.piece->calls += npt * fdim;
  for (std::size_t i = 0; i < npt; ++i)
    for (unsigned j = 0; j < fdim; ++j) {
      const double v = r.lo[j] + t[i] * r.len[j];
      value[i * fdim + j] = r.exponent(j, v);
    }
  if (const ScatterFamily* f = r.piece->family) {
    if (f->kind() == FamilyKind::student_t) {
      // exp(-r^2/2) becomes 2 pi f(r) = (1 + r^2/nu)^(-(nu+2)/2), with r^2 = -2 x the quadratic.
      const double nu = f->nu();
      for (std::size_t i = 0; i < npt * fdim; ++i) value[i] = -0.5 * (nu + 2.0) * std::log1p(-2.0 * value[i] / nu);
    } else {
      // A profile: log(2 pi f(r)), which the exponential below undoes (log 0 = -inf gives 0).
      for (std::size_t i = 0; i < npt * fdim; ++i) {
        const double d = kTwoPi * f->density(std::sqrt(std::max(-2.0 * value[i], 0.0)));
        value[i] = d > 0.0 ? std::log(d) : -std::numeric_limits<double>::infinity();
      }
    }
  }
  exp_in_place(value, static_cast<int>(npt * fdim));
  for (std::size_t i = 0; i < npt; ++i)
    for (unsigned j = 0; j < fdim; ++j) {
      const double v = r.lo[j] + t[i] * r.len[j];
      value[i * fdim + j] *= (r.j0[j] + v * r.j1[j]) * r.len[j];
    }
  return 0;
}

// The pieces of ray i on [0, v1] between the jumps and kinks it crosses, those inside the
// support: at most `max_ray_pieces` (two crossings of each circle, one of each wedge ray, and
// the ray's closest approach to a kink at the mean). Returns their count.
std::size_t max_ray_pieces(const Jumps& jumps) { return 2 * jumps.radii.size() + 4; }
int ray_pieces(const Rays& r, int i, double v1, const Jumps& jumps, double* cuts, double* lo, double* len) {
  int n = 0;
  cuts[n++] = 0.0;
  const auto add = [&](double v) {
    if (v > 0.0 && v < v1) cuts[n++] = v;
  };
  if (r.nw2[i] < 0.0)
    for (double radius : jumps.radii) {
      // |p0 + v w|^2 = radius^2: v = v* +- sqrt(radius^2 - h^2) / |w|, about the closest point
      // (no cancellation however far the ray's start lies).
      const double rest = radius * radius + 2.0 * r.nh2[i];
      if (rest > 0.0) {
        const double half = std::sqrt(rest / (-2.0 * r.nw2[i]));
        add(r.vs[i] - half);
        add(r.vs[i] + half);
      }
    }
  // A cone at the mean (a profile): along a ray passing at distance h from it the density goes
  // as sqrt(h^2 + (v - v*)^2), near-singular at v = v* +- i h. Where h is below a quarter of the
  // ray's length in the box, the ray is cut at v*, its nearest point, so that the
  // near-singularity sits at a piece's end, where bisection resolves it and the embedded rules'
  // difference measures it (measured: a part circle's head 1e-3 from the cones' apex, 8.8e-12
  // off with an estimate of 2.9e-12). Farther off, the rule converges on the whole ray and a cut
  // would only spend evaluations (7% more over the family comparison, cut everywhere).
  // (h |w| = |cross(p0, w)|, the ray's length v1 |w|, and -2 e2 = |w|^2.)
  if (jumps.centre && r.nw2[i] < 0.0 &&
      std::fabs(cross(r.px[i], r.py[i], r.wx[i], r.wy[i])) < 0.25 * v1 * -2.0 * r.nw2[i])
    add(r.vs[i]);
  if (jumps.wedge)
    for (const auto& d : {std::pair<double, double>{jumps.fx, jumps.fy}, std::pair<double, double>{jumps.tx, jumps.ty}}) {
      // p0 + v w on the ray through the mean in direction d: cross(d, p0 + v w) = 0, and on the
      // ray's own side, dot(d, p0 + v w) > 0.
      const double den = cross(d.first, d.second, r.wx[i], r.wy[i]);
      if (den == 0.0) continue;
      const double v = -cross(d.first, d.second, r.px[i], r.py[i]) / den;
      if (d.first * (r.px[i] + v * r.wx[i]) + d.second * (r.py[i] + v * r.wy[i]) > 0.0) add(v);
    }
  cuts[n++] = v1;
  for (int k = 1; k < n; ++k)  // a few: insertion
    for (int m = k; m > 0 && cuts[m - 1] > cuts[m]; --m) std::swap(cuts[m - 1], cuts[m]);
  int pieces = 0;
  for (int k = 0; k + 1 < n; ++k) {
    const double a = cuts[k], b = cuts[k + 1];
    if (!(b > a)) continue;
    // Inside or outside is the same along the whole piece: its middle tells.
    const double m = 0.5 * (a + b);
    if (!jumps.inside(r.px[i] + m * r.wx[i], r.py[i] + m * r.wy[i])) continue;
    lo[pieces] = a;
    len[pieces] = b - a;
    ++pieces;
  }
  return pieces;
}

// The ray at s of a piece. A cone's arc takes its cosine and sine from the caller (batched).
void set_ray(const Piece& p, double s, double cs, double sn, Rays& rays, int i) {
  const double k = p.sign * kOneDivTwoPi;
  if (!p.edge) {
    const double dax = p.d.x() - p.a.x(), day = p.d.y() - p.a.y();
    const double cbx = p.c.x() - p.b.x(), cby = p.c.y() - p.b.y();
    const double p0x = p.a.x() + s * dax, p0y = p.a.y() + s * day;
    const double wx = p.b.x() + s * cbx - p0x, wy = p.b.y() + s * cby - p0y;
    rays.set(i, p.u0, p0x, p0y, wx, wy, k * cross(wx, wy, dax, day), k * cross(wx, wy, cbx - dax, cby - day));
    return;
  }
  const Edge& e = *p.edge;
  double zx, zy, tx, ty;  // the edge's point and tangent at s
  if (e.kind == Edge::Kind::arc) {
    const Mat2& m = e.axes;
    zx = e.centre.x() + m(0, 0) * cs + m(0, 1) * sn;
    zy = e.centre.y() + m(1, 0) * cs + m(1, 1) * sn;
    tx = -m(0, 0) * sn + m(0, 1) * cs;
    ty = -m(1, 0) * sn + m(1, 1) * cs;
    const double wx = zx - p.a.x(), wy = zy - p.a.y();
    rays.set(i, p.u0, p.a.x(), p.a.y(), wx, wy, 0.0, k * cross(wx, wy, tx, ty));
    return;
  }
  // A straight edge's ray from its line's closest point to the apex: from + s t would cancel
  // there (terms of the edge's size for a point a few sigma from the mean), its rounding
  // eps |from| a noise along the edge that the constant Jacobian does not follow (a half-plane
  // 3e6 sigma across, fanned from the mean 5 sigma inside: 4.4e-12 off with an estimate of
  // 1.7e-12, boxes at the foot each 1e-10 off relative).
  tx = e.to.x() - e.from.x();
  ty = e.to.y() - e.from.y();
  const double wx = p.base.x() + s * tx, wy = p.base.y() + s * ty;
  rays.set(i, p.u0, p.a.x(), p.a.y(), wx, wy, 0.0, k * p.straight_jacobian);
}

// Outer integrand, vectorised over s: for each s the inner integral over u and its error
// estimate (two components).
int piece_integrand(unsigned, std::size_t npt, const double* s, void* data, unsigned, double* value) {
  auto* piece = static_cast<Piece*>(data);
  const bool arc = piece->edge && piece->edge->kind == Edge::Kind::arc;
  double c[kBundle], sn[kBundle], val[kBundle], err[kBundle];
  Rays rays;
  rays.piece = piece;
  for (std::size_t start = 0; start < npt; start += kBundle) {
    const int n = static_cast<int>(std::min(kBundle, npt - start));
    if (arc) {
      for (int i = 0; i < n; ++i) c[i] = s[start + i];
      cos_sin_in_place(c, sn, n);
    }
    for (int i = 0; i < n; ++i) set_ray(*piece, s[start + i], arc ? c[i] : 0.0, arc ? sn[i] : 0.0, rays, i);
    const double v0 = 0.0, v1 = piece->u1 - piece->u0;
    if (!piece->jumps) {
      const std::uint64_t left = piece->calls < piece->max_calls ? piece->max_calls - piece->calls : 0;
      const int status = hcubature_v(static_cast<unsigned>(n), ray_integrand, &rays, 1, &v0, &v1,
                                     static_cast<size_t>(std::max(left / n, kRulePoints)), piece->inner_abs,
                                     piece->inner_rel, ERROR_INDIVIDUAL, val, err);
      if (status != 0) return status;
      for (int i = 0; i < n; ++i) {
        value[2 * (start + i)] = val[i];
        value[2 * (start + i) + 1] = err[i];
      }
      continue;
    }
    // Each ray cut at its jumps: the k-th pieces of all rays in one call over t in [0, 1], each
    // call asked for its share of the inner tolerance.
    const std::size_t m = max_ray_pieces(*piece->jumps);
    std::vector<double> lo(kBundle * m), len(kBundle * m), cuts(m + 1);
    int count[kBundle], most = 0;
    for (int i = 0; i < n; ++i) {
      count[i] = ray_pieces(rays, i, v1, *piece->jumps, cuts.data(), &lo[i * m], &len[i * m]);
      most = std::max(most, count[i]);
      value[2 * (start + i)] = 0.0;
      value[2 * (start + i) + 1] = 0.0;
    }
    const double t0 = 0.0, t1 = 1.0;
    for (int k = 0; k < most; ++k) {
      for (int i = 0; i < n; ++i) {
        rays.lo[i] = k < count[i] ? lo[i * m + k] : 0.0;
        rays.len[i] = k < count[i] ? len[i * m + k] : 0.0;
      }
      const std::uint64_t budget = piece->calls < piece->max_calls ? piece->max_calls - piece->calls : 0;
      const int status = hcubature_v(static_cast<unsigned>(n), ray_integrand, &rays, 1, &t0, &t1,
                                     static_cast<size_t>(std::max(budget / n, kRulePoints)),
                                     piece->inner_abs / most, piece->inner_rel, ERROR_INDIVIDUAL, val, err);
      if (status != 0) return status;
      for (int i = 0; i < n; ++i) {
        value[2 * (start + i)] += val[i];
        value[2 * (start + i) + 1] += err[i];
      }
    }
  }
  return 0;
}

bool collinear(const Vec2& apex, const Vec2& from, const Vec2& to) {
  const Vec2 a = from - apex, b = to - apex;
  return std::fabs(cross(a.x(), a.y(), b.x(), b.y())) <= 1e-15 * (a.squaredNorm() + b.squaredNorm());
}

// A strictly convex quadrilateral: its bilinear map is one-to-one with a Jacobian of one sign,
// so that no box of it cancels within itself (a relative tolerance per box stays reachable).
bool strictly_convex(const Vec2& a, const Vec2& b, const Vec2& c, const Vec2& d) {
  const Vec2 corners[4] = {a, b, c, d};
  int positive = 0, negative = 0;
  for (int i = 0; i < 4; ++i) {
    const Vec2 e1 = corners[(i + 1) % 4] - corners[i], e2 = corners[(i + 2) % 4] - corners[(i + 1) % 4];
    const double turn = cross(e1.x(), e1.y(), e2.x(), e2.y());
    const double scale = 1e-12 * e1.norm() * e2.norm();
    positive += turn > scale;
    negative += turn < -scale;
  }
  return positive == 4 || negative == 4;
}

// The pieces of a loop. A whole ellipse is one polar patch about its centre. Any other loop is
// fanned from its first vertex: the pieces then stay inside the loop's convex hull, whereas
// cones from an arc's centre would overlap and cancel (an annular sector far from the mean
// would lose eight digits). Consecutive straight edges pair into quadrilaterals where these are
// convex; edges collinear with the apex (the loop's first and last) bound no area.
// Under a wedge (a part circle, whose rays leave the mean) the fan starts at the vertex farthest
// from the mean when the first lies within 1e-3 of it: from an apex a distance d from the
// wedge's own apex, each ray's jump sweeps the cones' angles within about d of the ray's
// direction, a step no outer rule resolves at d = 1e-9 (measured: 1.5e-12 off with an estimate
// of 6e-14; from d = 1e-7 on it was resolved).
// `mean_apex`: a whole ellipse around the mean is fanned from the mean itself (see
// integrate_cubature: circles about the mean then cut every ray, and none turns tangent to them).
// `from_mean`: every loop is fanned from the mean (a large region holding the mean; see
// integrate_cubature).
void add_pieces(const Loop& loop, bool quadrilaterals, bool wedge, bool mean_apex, bool from_mean,
                std::vector<Piece>& out) {
  if (from_mean) {
    for (const Edge& e : loop)
      if (e.kind == Edge::Kind::arc || !collinear(Vec2::Zero(), e.from, e.to)) out.push_back(cone(e, Vec2::Zero()));
    return;
  }
  if (loop.size() == 1 && loop.front().kind == Edge::Kind::arc) {
    const Edge& e = loop.front();
    // Inside a convex curve, or on it, every ray from the mean meets the curve once: the cone
    // keeps one sign. Just outside (to a millionth of the ellipse's size) its Jacobian changes
    // sign smoothly where rays turn tangent, which the rule integrates as it is; the mean's peak
    // at the rays' start is what matters (a disk 1.4e7 sigma across with the mean on its arc,
    // fanned from its centre: 0 +- 1.3e-9 for 0.5).
    const bool near_or_inside = mean_apex && e.axes.determinant() != 0.0 &&
                                (e.axes.inverse() * (-e.centre)).norm() <= 1.0 + 1e-6 &&
                                std::fabs(e.s_to - e.s_from) >= kTwoPi;
    out.push_back(cone(e, near_or_inside ? Vec2::Zero() : e.centre));
    return;
  }
  std::size_t first = 0;
  if (wedge && loop.front().from.norm() < 1e-3)
    for (std::size_t k = 1; k < loop.size(); ++k)
      if (loop[k].from.norm() > loop[first].from.norm()) first = k;
  const std::size_t n = loop.size();
  const auto edge = [&](std::size_t i) -> const Edge& { return loop[(first + i) % n]; };
  const Vec2 apex = edge(0).from;
  auto straight = [&](std::size_t i) {
    return i < n && edge(i).kind == Edge::Kind::segment && !collinear(apex, edge(i).from, edge(i).to);
  };
  for (std::size_t i = 0; i < n; ++i) {
    const Edge& e = edge(i);
    if (quadrilaterals && straight(i) && straight(i + 1) && strictly_convex(apex, e.from, e.to, edge(i + 1).to)) {
      out.push_back(quadrilateral(apex, e.from, e.to, edge(i + 1).to));
      ++i;
    } else if (e.kind == Edge::Kind::arc || !collinear(apex, e.from, e.to)) {
      out.push_back(cone(e, apex));
    }
  }
}

// Where a cone over a straight edge changes how its rays meet the jumps: the edge's point z(s)
// crosses a circle or a wedge's ray, the ray from the apex a turns tangent to a circle or
// passes through the mean (a wedge's corner, a profile's cone: measured, a profile's hexagon
// about its mean 3.95e-10 off with an estimate of 1.3e-10 before this cut). There the outer integrand over s has a kink or a square-root
// singularity, which a Gauss-Kronrod rule straddling it can under-estimate (measured: a cone
// profile's triangle across the wetted edge, 1.7e-11 off with an estimate of 1.6e-11); cut at
// these points, each singularity sits at an end of a box, where the embedded rules' difference
// over-estimates. On a straight edge each condition is a quadratic or linear in s
// (z(s) = from + s t):
//   |z(s)|^2 = rho^2;  cross(a, z(s) - a)^2 = rho^2 |z(s) - a|^2 (the line's distance to the mean);
//   cross(d, z(s)) = 0 (a wedge ray d);  cross(a, z(s) - a) = 0;  and the ray through a corner
//   of the support, cross(rho d - a, z(s) - a) = 0, where a wedge's ray meets a circle.
// On an arc (z(s) = centre + axes (cos s, sin s), a cone from the apex or a whole ellipse's polar
// patch) the same conditions are trigonometric: their roots are bracketed by the signs at
// kArcSamples points and refined by bisection (measured: a part circle's disk, its arc left
// whole, came out 2.2e-7 off with an estimate of 1.4e-10). Two roots closer than a sample step
// (an arc all but tangent to a circle, where the kink is weak) can be missed; the rule's estimate
// then stands alone there. Returns the sorted cuts, ends included.
constexpr int kArcSamples = 256;
using Condition = std::function<double(const Vec2&)>;
// The roots between consecutive sorted parameters `at` of each condition along the curve
// point(s), bracketed by the signs there and refined by bisection, appended to `out`.
void sampled_roots(const std::vector<double>& at, const std::function<Vec2(double)>& point,
                   const std::vector<Condition>& conditions, std::vector<double>& out) {
  const std::size_t samples = at.size() - 1;
  const double lo_s = at.front(), hi_s = at.back();
  std::vector<Vec2> z(samples + 1);
  for (std::size_t k = 0; k <= samples; ++k) z[k] = point(at[k]);
  for (const auto& f : conditions)
    for (std::size_t k = 0; k < samples; ++k) {
      double lo = at[k], hi = at[k + 1];
      double flo = f(z[k]);
      const double fhi = f(z[k + 1]);
      if (flo == 0.0 || !((flo < 0.0) != (fhi < 0.0))) continue;
      for (int it = 0; it < 60 && hi - lo > 4 * kEps * std::max(std::fabs(lo), std::fabs(hi)); ++it) {
        const double mid = 0.5 * (lo + hi), fm = f(point(mid));
        if ((fm < 0.0) == (flo < 0.0)) {
          lo = mid;
          flo = fm;
        } else {
          hi = mid;
        }
      }
      const double root = 0.5 * (lo + hi);
      if (root > lo_s && root < hi_s) out.push_back(root);
    }
}
// `samples` equal steps over [lo_s, hi_s].
std::vector<double> even_samples(double lo_s, double hi_s, int samples) {
  std::vector<double> at(samples + 1);
  const double step = (hi_s - lo_s) / samples;
  for (int k = 0; k < samples; ++k) at[k] = lo_s + k * step;
  at[samples] = hi_s;
  return at;
}

std::vector<double> sorted_unique(std::vector<double> v) {
  std::sort(v.begin(), v.end());
  v.erase(std::unique(v.begin(), v.end()), v.end());
  return v;
}

std::vector<double> arc_jump_breaks(const Piece& p) {
  std::vector<double> out{p.s_lo, p.s_hi};
  const Jumps& j = *p.jumps;
  const Edge& e = *p.edge;
  const Vec2 a = p.a;
  // Each condition as a function of the point z(s).
  std::vector<Condition> conditions;
  for (double rho : j.radii) {
    conditions.emplace_back([rho](const Vec2& z) { return z.squaredNorm() - rho * rho; });
    conditions.emplace_back([rho, a](const Vec2& z) {
      const Vec2 w = z - a;
      const double c = cross(a.x(), a.y(), w.x(), w.y());
      return c * c - rho * rho * w.squaredNorm();
    });
  }
  if (j.wedge || j.centre)
    conditions.emplace_back([a](const Vec2& z) { const Vec2 w = z - a; return cross(a.x(), a.y(), w.x(), w.y()); });
  if (j.wedge) {
    for (const Vec2& d : {Vec2(j.fx, j.fy), Vec2(j.tx, j.ty)})
      conditions.emplace_back([d](const Vec2& z) { return cross(d.x(), d.y(), z.x(), z.y()); });
    for (double rho : j.radii)
      for (const Vec2& d : {Vec2(j.fx, j.fy), Vec2(j.tx, j.ty)}) {
        const Vec2 corner = rho * d - a;
        conditions.emplace_back([corner, a](const Vec2& z) {
          const Vec2 w = z - a;
          return cross(corner.x(), corner.y(), w.x(), w.y());
        });
      }
  }
  // An arc millions of sigma long passes the mean within a sliver of its range (1 / its size),
  // where a circle's two crossings fall between two even samples and the outer rule's first
  // nodes see nothing (a disk 2.6e6 m across, the mean 3 m outside its arc under a 1 m x 5 cm
  // spread: 0 for 1.07e-3). About the arc's closest point to the mean the samples, and the
  // outer range's cuts, are graded: steps of 2^k / size on either side, from a quarter of a
  // sigma up to two even steps. Only where an even step is longer than a sigma.
  std::vector<double> at = even_samples(p.s_lo, p.s_hi, kArcSamples);
  const double size = e.axes.norm(), even_step = (p.s_hi - p.s_lo) / kArcSamples;
  if (size * even_step > 1.0) {
    const auto r2 = [&e](double s) { return e.point(s).squaredNorm(); };
    std::size_t best = 0;
    for (std::size_t k = 1; k < at.size(); ++k)
      if (r2(at[k]) < r2(at[best])) best = k;
    // Golden-section search between the neighbours of the closest sample (|z|^2 is unimodal
    // there on an arc whose curvature radius exceeds the mean's distance; elsewhere the grid
    // only lands off the closest point, which costs evaluations, not accuracy).
    double lo = at[best > 0 ? best - 1 : 0], hi = at[std::min(best + 1, at.size() - 1)];
    constexpr double kGolden = 0.6180339887498949;
    double x1 = hi - kGolden * (hi - lo), x2 = lo + kGolden * (hi - lo), f1 = r2(x1), f2 = r2(x2);
    for (int it = 0; it < 80 && hi - lo > 4 * kEps * std::max(std::fabs(lo), std::fabs(hi)); ++it) {
      if (f1 < f2) {
        hi = x2;
        x2 = x1;
        f2 = f1;
        x1 = hi - kGolden * (hi - lo);
        f1 = r2(x1);
      } else {
        lo = x1;
        x1 = x2;
        f1 = f2;
        x2 = lo + kGolden * (hi - lo);
        f2 = r2(x2);
      }
    }
    const double closest = 0.5 * (lo + hi);
    std::vector<double> graded{closest};
    for (double step = 0.25 / size; step < 2.0 * even_step; step *= 2) {
      graded.push_back(closest - step);
      graded.push_back(closest + step);
    }
    for (double g : graded)
      if (g > p.s_lo && g < p.s_hi) {
        at.push_back(g);
        out.push_back(g);
      }
    at = sorted_unique(std::move(at));
  }
  // An apex on a circle (or within a hair of it: a whole ellipse fanned from its centre, the
  // centre on the uniform's edge or a profile's row) has its tangent rays there as a double
  // root of the tangency condition, which no sign change brackets, and just off it as two roots
  // closer than a sample step: the kink where rays stop meeting the circle lay inside a box
  // (an ellipse centred on the uniform's edge: 6.7e-6 off with a bound of 2.4e-15,
  // "converged"; found by an adversarial trial). The rays perpendicular to the apex's
  // direction lie between the two tangent rays (or on the double one): they are cut, and join
  // the samples so that each tangent root has a sign change of its own.
  const double apex_radius = a.norm();
  bool near_circle = false;
  for (double rho : j.radii) near_circle = near_circle || std::fabs(apex_radius - rho) <= 1e-2 * rho;
  if (near_circle && apex_radius > 0.0) {
    std::vector<double> perpendicular;
    const std::vector<Condition> across{[a](const Vec2& z) { return a.dot(z - a); }};
    sampled_roots(at, [&e](double s) { return e.point(s); }, across, perpendicular);
    for (double s : perpendicular) {
      at.push_back(s);
      out.push_back(s);
    }
    at = sorted_unique(std::move(at));
  }
  // An arc grazing a circle crosses it twice between two samples: the sliver between was lost
  // (a disk poking 1e-5 sigma out of the uniform's support: 0.25 +- 5.7e-14 for 0.2499999933; an
  // adversarial trial). The arc's turning points in radius (z . z' = 0) join the samples, so that
  // each crossing has a bracket of its own.
  if (!j.radii.empty()) {
    std::vector<double> turns;
    const std::vector<Condition> turning{[](const Vec2& q) { return q.x(); }};
    sampled_roots(at, [&e](double s) { return Vec2(e.point(s).dot(e.tangent(s)), 0.0); }, turning, turns);
    for (double s : turns) at.push_back(s);
    at = sorted_unique(std::move(at));
  }
  sampled_roots(at, [&e](double s) { return e.point(s); }, conditions, out);
  return sorted_unique(std::move(out));
}

// Where the line from + s t crosses the circle of radius rho about the mean, passed to add:
// s = s* +- sqrt(rho^2 - h^2) / |t| about the line's closest point s* = -from.t / |t|^2, at the
// distance h = |cross(from, t)| / |t|. (The quadratic |from + s t|^2 = rho^2 in expanded form
// cancels for a line far from the mean, its coefficients eps |from|^2 off.)
template <class Add>
void line_circle_crossings(const Vec2& from, const Vec2& t, double rho, const Add& add) {
  const double t2 = t.squaredNorm();
  if (!(t2 > 0.0)) return;
  const double h = cross(from.x(), from.y(), t.x(), t.y()) / std::sqrt(t2);
  const double rest = (rho - h) * (rho + h);
  if (rest < 0.0) return;
  const double mid = -from.dot(t) / t2, half = std::sqrt(rest / t2);
  add(mid - half);
  add(mid + half);
}

std::vector<double> jump_breaks(const Piece& p) {
  std::vector<double> out{p.s_lo, p.s_hi};
  if (!p.jumps || !p.edge) return out;
  if (p.edge->kind == Edge::Kind::arc) return arc_jump_breaks(p);
  const Jumps& j = *p.jumps;
  // The edge in the piece's parameter: from + s t, from = a + base (q0 = from - a = base).
  const Vec2 t = p.edge->to - p.edge->from, q0 = p.base, from = p.a + q0;
  const auto add = [&](double s) {
    if (s > p.s_lo && s < p.s_hi) out.push_back(s);
  };
  const double c0 = cross(p.a.x(), p.a.y(), q0.x(), q0.y()), c1 = cross(p.a.x(), p.a.y(), t.x(), t.y());
  const double apex_distance = p.a.norm();
  for (double rho : j.radii) {
    line_circle_crossings(from, t, rho, add);
    // The rays from the apex tangent to the circle: the directions from a towards the mean
    // turned by +-asin(rho / |a|), met with the edge's line. (The squared condition
    // cross(a, z - a)^2 = rho^2 |z - a|^2 cancelled to nothing for an apex 1e6 sigma off.)
    if (apex_distance > rho) {
      const double ux = -p.a.x() / apex_distance, uy = -p.a.y() / apex_distance;
      const double sn = rho / apex_distance, cs = std::sqrt((1.0 - sn) * (1.0 + sn));
      for (double sign : {-1.0, 1.0}) {
        const double dx = cs * ux - sign * sn * uy, dy = sign * sn * ux + cs * uy;
        const double den = cross(dx, dy, t.x(), t.y());
        if (den != 0.0) add(-cross(dx, dy, q0.x(), q0.y()) / den);
      }
    }
  }
  if ((j.wedge || j.centre) && c1 != 0.0) add(-c0 / c1);  // the ray through the mean
  if (j.wedge) {
    for (const Vec2& d : {Vec2(j.fx, j.fy), Vec2(j.tx, j.ty)}) {
      const double den = cross(d.x(), d.y(), t.x(), t.y());
      if (den != 0.0) add(-cross(d.x(), d.y(), from.x(), from.y()) / den);
    }
    // The ray through a corner of the support, where a wedge's ray meets a circle.
    for (double rho : j.radii)
      for (const Vec2& d : {Vec2(j.fx, j.fy), Vec2(j.tx, j.ty)}) {
        const Vec2 corner = rho * d - p.a;
        const double den = cross(corner.x(), corner.y(), t.x(), t.y());
        if (den != 0.0) add(-cross(corner.x(), corner.y(), q0.x(), q0.y()) / den);
      }
  }
  return sorted_unique(std::move(out));
}

struct PieceSum {
  double value = 0.0;
  double abs_err = 0.0;
  double l1 = 0.0;  // sum of |piece values|: how much the pieces cancel
  std::uint64_t evaluations = 0;
  bool budget_hit = false;
  bool failed = false;
};

struct Box {
  double u0, u1, s0, s1;
  std::size_t piece = 0;
  double mass_bound = 0.0;  // the most the box's image can hold
};

// How far the image of a box's curved side may bulge beyond its chord: the arc's
// big * (1 - cos(ds / 2)), scaled by u toward the apex. Straight sides do not bulge: a
// bilinear map takes a box to the quadrilateral of its corners.
double arc_bulge(const Piece& p, const Box& b) {
  if (!p.edge || p.edge->kind != Edge::Kind::arc) return 0.0;
  const double big = std::max(p.edge->axes.col(0).norm(), p.edge->axes.col(1).norm());
  return b.u1 * big * (1.0 - std::cos(0.5 * (b.s1 - b.s0)));
}

// Centre and radius of a disk holding the image of a (u, s) box.
void box_image_disk(const Piece& p, const Box& b, Vec2& centre, double& radius) {
  centre = p.at(0.5 * (b.u0 + b.u1), 0.5 * (b.s0 + b.s1));
  radius = 0.0;
  for (double u : {b.u0, b.u1})
    for (double s : {b.s0, b.s1}) radius = std::max(radius, (p.at(u, s) - centre).norm());
  radius += arc_bulge(p, b);
}

// Where a box's inner sides (u = u0 > 0, u = u1 < 1, the cuts split_box made across a cone)
// cross a jump: a circle, or a wedge's ray on its own side of the mean. There the piece of a ray
// inside the box gains or loses a crossing, and the outer integrand over s has a kink (a jump's
// crossing entering the box) that jump_breaks, which sees only the whole ray, does not cut. A
// cap of the uniform's disk reaching a little way into a box through its side held 3.9e-7 of
// probability between the outer rule's 15 nodes, where every ray missed it, and the rule
// reported its rounding floor, 1e-15 (found by the exact-vs-cubature comparison in
// family_properties_test over other seeds). The side's points are p0 + u (p1(s) - p0): a
// straight edge's side is a line in s (a quadratic for a circle, linear for a ray), an arc's a
// scaled arc (sampled_roots, as for arcs' own breaks). Returns the sorted cuts, ends included.
std::vector<double> box_breaks(const Piece& p, const Box& b) {
  std::vector<double> out{b.s0, b.s1};
  if (!p.jumps || !p.edge) return out;
  const Jumps& j = *p.jumps;
  const Vec2 d[2] = {Vec2(j.fx, j.fy), Vec2(j.tx, j.ty)};
  for (double u : {b.u0, b.u1}) {
    if (!(u > 0.0 && u < 1.0)) continue;
    if (p.edge->kind == Edge::Kind::arc) {
      // Only the jumps that the disk holding the box's image meets (sampling is the cost here).
      Vec2 centre;
      double radius;
      box_image_disk(p, b, centre, radius);
      std::vector<Condition> conditions;
      for (double rho : j.radii)
        if (std::fabs(centre.norm() - rho) <= radius)
          conditions.emplace_back([rho](const Vec2& z) { return z.squaredNorm() - rho * rho; });
      if (j.wedge)  // either side of the mean: a cut too many costs a box, not accuracy
        for (const Vec2& dir : d)
          if (std::fabs(cross(dir.x(), dir.y(), centre.x(), centre.y())) <= radius)
            conditions.emplace_back([dir](const Vec2& z) { return cross(dir.x(), dir.y(), z.x(), z.y()); });
      // Sampled as finely as the arc's own breaks (kArcSamples over the piece's range).
      const int samples = std::max(8, static_cast<int>(std::ceil(kArcSamples * (b.s1 - b.s0) / (p.s_hi - p.s_lo))));
      if (!conditions.empty())
        sampled_roots(even_samples(b.s0, b.s1, samples), [&p, u](double s) { return p.at(u, s); }, conditions, out);
      continue;
    }
    // The side q + s m.
    const Vec2 q = p.a + u * p.base, m = u * (p.edge->to - p.edge->from);
    const auto add = [&](double s) {
      if (s > b.s0 && s < b.s1) out.push_back(s);
    };
    for (double rho : j.radii) line_circle_crossings(q, m, rho, add);
    if (j.wedge)
      for (const Vec2& dir : d) {
        const double den = cross(dir.x(), dir.y(), m.x(), m.y());
        if (den == 0.0) continue;
        const double s = -cross(dir.x(), dir.y(), q.x(), q.y()) / den;
        if (dir.dot(q + s * m) > 0.0) add(s);
      }
  }
  return sorted_unique(std::move(out));
}

// Splits a piece's box until each part near the mean is at most a couple of standard deviations
// across, so that hcubature's first rule cannot miss the density's peak inside a large region
// (the failure mode of adaptive cubature). Parts whose image stays far from the mean are
// dropped, their mass bounded by the density at their nearest possible point times their area:
// those below `drop_below`, and far parts below 1e-14 of `heaviest`, the largest lower bound
// on a part's mass seen so far (density at the farthest possible point times the area of the
// corners' quadrilateral), so that the far reaches of a large region are not split finely.
void split_box(const Piece& p, const Box& b, double drop_below, int depth, std::vector<Box>& out,
               double& dropped_bound, double& heaviest) {
  Vec2 centre;
  double radius;
  box_image_disk(p, b, centre, radius);
  const double nearest = std::max(centre.norm() - radius, 0.0);
  const auto density = [&p](double r) { return p.family ? p.family->density(r) : kOneDivTwoPi * std::exp(-0.5 * r * r); };
  // The largest density at any radius >= nearest: a measured profile may rise outwards (a
  // sprinkler's ring, zero at the head), where the density at the nearest point bounds nothing
  // (a part about the head of such a profile was dropped with a bound of 0).
  const double peak = p.family ? p.family->density_bound(nearest) : density(nearest);
  const double mass_bound = peak * kPi * radius * radius;
  const double farthest = centre.norm() + radius;
  const Vec2 q[4] = {p.at(b.u0, b.s0), p.at(b.u1, b.s0), p.at(b.u1, b.s1), p.at(b.u0, b.s1)};
  const double area = 0.5 * std::fabs((q[2] - q[0]).x() * (q[3] - q[1]).y() - (q[2] - q[0]).y() * (q[3] - q[1]).x());
  // (A lower bound for the families whose density falls outwards; a profile's may not, but its
  // density is 0 beyond r = 2, so the relative drop beyond 3 below never sees it.)
  // Not on a wedge: outside it the density is 0, and the lower bound would claim mass there.
  if (!(p.jumps && p.jumps->wedge)) heaviest = std::max(heaviest, density(farthest) * area);
  if (mass_bound < drop_below || (nearest > 3.0 && mass_bound < 1e-14 * heaviest)) {
    dropped_bound += mass_bound;
    return;
  }
  // Near the mean a part must be about two standard deviations across. Farther out, at distance
  // d, the density falls by e per 1/rate, rate = d for the normal, so a part must be about
  // 6/rate across; a t's log-density falls at rate (nu + 2) d / (nu + d^2) (its derivative),
  // slower and slower far out: taken as the normal's, a t with nu = 1 under a 1000:1 spread was
  // cut into millions of parts far out and ran for minutes (the normal's limit as nu grows).
  const bool t_family = p.family && p.family->kind() == FamilyKind::student_t;
  const double rate =
      t_family ? (p.family->nu() + 2.0) * nearest / (p.family->nu() + nearest * nearest) : nearest;
  const double size = nearest <= 3.0 ? 2.0 : 6.0 / rate;
  if (radius <= size || depth >= 24) {
    out.push_back(b);
    out.back().mass_bound = mass_bound;
    return;
  }
  // Halve the side whose image is longer.
  const double sm = 0.5 * (b.s0 + b.s1);
  const double su = (p.at(b.u1, sm) - p.at(b.u0, sm)).norm();
  const double ss = std::max((p.at(b.u1, b.s1) - p.at(b.u1, b.s0)).norm(), (p.at(b.u0, b.s1) - p.at(b.u0, b.s0)).norm()) +
                    2 * arc_bulge(p, b);
  if (su >= ss) {
    const double m = 0.5 * (b.u0 + b.u1);
    split_box(p, {b.u0, m, b.s0, b.s1, b.piece}, drop_below, depth + 1, out, dropped_bound, heaviest);
    split_box(p, {m, b.u1, b.s0, b.s1, b.piece}, drop_below, depth + 1, out, dropped_bound, heaviest);
  } else {
    split_box(p, {b.u0, b.u1, b.s0, sm, b.piece}, drop_below, depth + 1, out, dropped_bound, heaviest);
    split_box(p, {b.u0, b.u1, sm, b.s1, b.piece}, drop_below, depth + 1, out, dropped_bound, heaviest);
  }
}

// Sum over all pieces to the absolute tolerance abs_total and the relative tolerance rel_each
// (0 for none) per box. Boxes are integrated heaviest first, so that a light box far from the
// mean may stop at rel_each times the mass already found (shared by all boxes) instead of
// resolving itself to rel_each: the errors still add up to at most
// abs_total + rel_each * (sum of |box values|).
PieceSum sum_pieces(std::vector<Piece>& pieces, double abs_total, double rel_each, std::uint64_t max_evals) {
  PieceSum total;
  std::vector<Box> boxes;
  const double drop_below = 0.01 * abs_total / static_cast<double>(std::max<std::size_t>(pieces.size(), 1));
  double heaviest = 0.0;
  for (std::size_t i = 0; i < pieces.size(); ++i) {
    const std::vector<double> breaks = jump_breaks(pieces[i]);
    for (std::size_t k = 0; k + 1 < breaks.size(); ++k)
      split_box(pieces[i], {0.0, 1.0, breaks[k], breaks[k + 1], i}, drop_below, 0, boxes, total.abs_err, heaviest);
  }
  std::vector<Box> cut;
  for (const Box& b : boxes) {
    const std::vector<double> breaks = box_breaks(pieces[b.piece], b);
    for (std::size_t k = 0; k + 1 < breaks.size(); ++k) {
      cut.push_back(b);
      cut.back().s0 = breaks[k];
      cut.back().s1 = breaks[k + 1];
    }
  }
  boxes.swap(cut);
  std::sort(boxes.begin(), boxes.end(), [](const Box& x, const Box& y) { return x.mass_bound > y.mass_bound; });
  const double nb = static_cast<double>(std::max<std::size_t>(boxes.size(), 1));
  std::uint64_t used = 0;
  for (const Box& b : boxes) {
    Piece& piece = pieces[b.piece];
    const double req_abs = std::max(abs_total, 0.5 * rel_each * total.l1) / nb;
    const double req_rel = std::max(0.5 * rel_each, kRelativeFloor);
    // The budget is shared by the whole call; every box gets at least one rule's worth.
    piece.calls = 0;
    piece.max_calls = used < max_evals ? max_evals - used : 0;
    const std::uint64_t outer_nodes = std::max(piece.max_calls, kRulePoints * kRulePoints) / kRulePoints;
    // The inner errors, summed with the outer rule's positive weights (which add up to the
    // box's s range), stay a tenth of the box's tolerance.
    piece.u0 = b.u0;
    piece.u1 = b.u1;
    piece.inner_abs = 0.1 * req_abs / (b.s1 - b.s0);
    piece.inner_rel = std::max(0.1 * req_rel, kRelativeFloor);
    double val[2] = {0.0, 0.0}, err[2] = {0.0, 0.0};
    const int status = hcubature_v(2, piece_integrand, &piece, 1, &b.s0, &b.s1, static_cast<size_t>(outer_nodes),
                                   req_abs, req_rel, ERROR_L1, val, err);
    // Outer error, plus the inner errors as integrated, plus the outer error of that sum.
    double box_err = err[0] + std::fabs(val[1]) + err[1];
    if (status != 0 || !std::isfinite(val[0]) || !std::isfinite(box_err)) {
      total.failed = true;
      box_err = std::numeric_limits<double>::infinity();
    }
    used += piece.calls;
    total.evaluations += piece.calls;
    // hcubature returns success when it stops at its evaluation limit: an outer or inner call
    // that spent the budget without reaching its tolerance says so.
    if (piece.calls >= piece.max_calls && box_err > std::max(req_abs, req_rel * std::fabs(val[0])))
      total.budget_hit = true;
    total.value += val[0];
    total.l1 += std::fabs(val[0]);
    total.abs_err += box_err;
  }
  return total;
}

// Whether any loop has a curved edge (an arc or a whole ellipse).
bool has_arc(const Region& z) {
  for (const Loop& loop : z.loops)
    for (const Edge& e : loop)
      if (e.kind == Edge::Kind::arc) return true;
  return false;
}

}  // namespace

Estimate integrate_cubature(const Region& z, const IntegrateOptions& options, const ScatterFamily* family,
                           double wedge_from, double wedge_sweep) {
  Estimate est;
  est.method = Method::cubature;
  // A density with a jump (the uniform's edge, a profile whose last rate is above 0, a wedge):
  // the rays are cut there (ray_pieces). A profile's kinks only slow the rule down.
  // A profile's rows are kinks of its density (its rate is linear between them), cut too so that
  // the rule does not spend its budget on them.
  Jumps jumps;
  if (family && family->kind() == FamilyKind::uniform) jumps.radii = {2.0};
  if (family && family->kind() == FamilyKind::profile)
    for (double r : family->profile_table()->r)
      if (r > 0.0) jumps.radii.push_back(r);
  if (!jumps.radii.empty()) jumps.support = 2.0;
  // A profile's density is linear in r near the mean (unless its first two rates are equal): a cone.
  if (family && family->kind() == FamilyKind::profile) jumps.centre = true;  // the whitened wetted radius of both (strewn/scatter_family.hpp)
  if (wedge_sweep < kTwoPi) {
    jumps.wedge = true;
    jumps.from = wedge_from;
    jumps.sweep = wedge_sweep;
    jumps.fx = std::cos(wedge_from);
    jumps.fy = std::sin(wedge_from);
    jumps.tx = std::cos(wedge_from + wedge_sweep);
    jumps.ty = std::sin(wedge_from + wedge_sweep);
  }
  // A region far larger than the spread: the density is a spike in the pieces' rectangles that
  // a first Gauss-Kronrod rule can straddle without one node in it (a unit square with the mean
  // on its corner under sigma = 1e-9 came out 0 +- 0, "computed without error", for 0.25).
  // Circles about the mean at 0.5, 1, 2, 4 and 8 (the normal: 3e-15 of its mass lies beyond;
  // a t's heavy tail: on to the region's size, by fours) cut each ray into pieces that resolve
  // it, and their tangent rays cut the outer range where the spike lies (jump_breaks). Only
  // beyond kResolvedExtent, where split_box cannot shrink the parts near the mean enough.
  // Judged on the whitened area, not the box: an elongated spread's region is a sliver a
  // million sigma long and a few across, whose parts the splitting does shrink (cut by circles,
  // degenerate_placements_test's cubature references took four times as long, to no change).
  // Unless the sliver is curved: whitened, an arc under an elongated spread is an ellipse
  // thousands of sigma across whose curvature radius near the mean can be a hundredth of one,
  // and the fan from a far vertex sweeps past the mean in 1e-8 of the arc's parameter, between
  // every node (a ring sector 1.5e-5 m wide at 1739 m under a 0.4 m x 2.5e-6 m spread on its
  // middle line: 0.108 with a bound of 0.012 for 0.308; at a UTM site, 1.2e-50 +- 4e-6 for
  // 0.499; a random search over thin ring sectors, 4 of 150 beyond the bound). Polygons of the
  // same ring were right.
  const BoundingBox whole = bounds(z);
  const double extent = std::max((whole.max - whole.min).norm(), whole.max.cwiseAbs().maxCoeff() + whole.min.cwiseAbs().maxCoeff());
  const bool big = std::fabs(area(z)) > kResolvedExtent * kResolvedExtent || (extent > kResolvedExtent && has_arc(z));
  // The circles are laid from the boundary's closest approach to the mean on (0 when the mean
  // is inside): a region whose edge passes 8.6 sigma from the mean lies beyond every circle
  // about the mean, and its rays' bumps, a standard deviation wide on rays a million long, fell
  // between the rule's nodes (a half-plane 1e6 sigma across: 2e-24 +- 1.5e-22 for 3.9e-18).
  int winding_at_mean = 0;
  if (big)
    for (const Loop& loop : z.loops) winding_at_mean += loop_winding(loop, Vec2::Zero());
  if (jumps.radii.empty() && (!family || family->kind() == FamilyKind::student_t) && big) {
    double closest = std::numeric_limits<double>::infinity();
    for (const Loop& loop : z.loops)
      for (const Edge& e : loop) closest = std::min(closest, radius_range(e, 8).closest);
    const double from = std::isfinite(closest) && winding_at_mean == 0 ? closest : 0.0;
    for (double r = 0.5; r <= 8.0; r *= 2) jumps.radii.push_back(from + r);
    if (family)
      for (double r = 32.0; from + r < extent && jumps.radii.size() < 24; r *= 4) jumps.radii.push_back(from + r);
  }
  const bool cut = !jumps.radii.empty() || jumps.wedge;
  // Beyond 38.5 standard deviations the density underflows double precision: p is 0 to every
  // digit a double holds, and the integrand would be zero everywhere hcubature looks.
  const BoundingBox box = bounds(z);
  const Vec2 gap = (box.min.cwiseMax(Vec2::Zero()) - Vec2::Zero()).cwiseMax(-box.max.cwiseMin(Vec2::Zero()));
  if (!family && gap.norm() > 38.5) {
    est.p = 0.0;
    est.q = 1.0;
    est.abs_err = 1e-300;
    est.message = "region lies beyond 38.5 standard deviations: p underflows to 0";
    return est;
  }
  std::vector<Piece> pieces;
  // Cut rays come only from cones (a quadrilateral's rays move at both ends, and where they
  // turn tangent to a circle is a quartic's root; see jump_breaks).
  // A whole ellipse around the mean, fanned from its centre, puts the mean at a point a ray may
  // pass near only at a few angles, which the circles' tangent rays (sampled along the arc)
  // cannot find when the ellipse is a million sigma across: a disk of radius 5 m about a 1e-6 m
  // spread came out 0 +- 4.5e-21 (so did a mixture's tiny component inside a large disk). Fanned
  // from the mean, each ray holds the peak at its start and the circles cut it there.
  const bool mean_apex = big;
  // A large region's loop around the mean is fanned from the mean: a ray from a vertex a million
  // sigma off passes the mean's peak within rounding of eps |vertex| only, which moved the
  // density under the whole bulk (a rotated spread's half-plane 1e6 sigma across, the mean
  // 5 sigma inside: 1.45e-11 off with an estimate of 2e-12, at every tolerance). From the
  // mean each ray starts exactly at the peak; the cones' signs give the winding, and their
  // cancellation (holes, a loop not star-shaped about the mean) costs only absolute accuracy,
  // which is all that p near 1 has here.
  // Loop by loop: a hole holding the mean inside a field a million sigma across has its outer
  // loop's mass near 1 and the hole's near 1 - p, whose difference p kept the rays' rounding
  // from a far vertex (a hole 20 sigma across in a square 1.3e6 sigma across: 1.4e-11 off with
  // an estimate of 1.2e-12, "converged"); both fanned from the mean, each is accurate to eps.
  for (const Loop& loop : z.loops)
    add_pieces(loop, !cut, jumps.wedge, mean_apex, big && !jumps.wedge && loop_winding(loop, Vec2::Zero()) != 0, pieces);
  for (Piece& piece : pieces) {
    piece.family = family;
    if (cut) piece.jumps = &jumps;
  }
  // Pieces of opposite sign partly cancel, so a relative tolerance per piece bounds the error of
  // the sum only relative to the sum of |pieces| (l1). The first pass asks each piece for a
  // tenth of the relative tolerance; where the pieces cancel so much that this does not bound
  // the sum to rel * |p|, a second pass asks each piece for rel * |p| / l1 (|p| from the first
  // pass, less its error). The absolute floor is shared by the pieces. The estimate is reported
  // with a safety factor of 10 (below), so every request is ten times tighter.
  const double abs_total = 0.05 * options.abs_tolerance;
  PieceSum fine = sum_pieces(pieces, abs_total, 0.1 * options.rel_tolerance, options.max_evaluations);
  std::uint64_t evaluations = fine.evaluations;
  const double wanted = std::max(options.abs_tolerance, options.rel_tolerance * std::fabs(fine.value));
  if (10 * fine.abs_err > wanted && fine.l1 > std::fabs(fine.value) && !fine.failed && !fine.budget_hit) {
    const double p_low = std::max(std::fabs(fine.value) - fine.abs_err, 0.01 * std::fabs(fine.value));
    const double rel_each = 0.1 * options.rel_tolerance * std::min(p_low / fine.l1, 1.0);
    const std::uint64_t left = options.max_evaluations > evaluations ? options.max_evaluations - evaluations : 0;
    fine = sum_pieces(pieces, abs_total, rel_each, left);
    evaluations += fine.evaluations;
  }
  est.evaluations = evaluations;
  est.p = std::clamp(fine.value, 0.0, 1.0);
  est.q = 1.0 - est.p;  // no direct complement here: q's accuracy is absolute
  // hcubature's error estimate is a heuristic (difference of embedded rules); a safety factor
  // of 10 makes it a bound on every case of the property tests.
  est.abs_err = 10 * fine.abs_err + 4 * std::numeric_limits<double>::epsilon() * est.p +
                approximation_error(z, family);
  // A check the rules cannot fool: the boundary is at least d from the mean (a lower bound per
  // edge, radius_range), so p lies within S(d) of the winding number at the mean (S the
  // family's survival: the mass beyond d). Where the estimate and its bound fall outside that,
  // the rules missed the spread's peak (a polygon 1e10 sigma across, the mean inside: the parts
  // near the mean stay a million sigma wide after split_box's 24 halvings, and the circles'
  // tangent rays from an apex that far are lost to rounding: 0 +- 0 "converged" for 1), and
  // the distance's interval is reported instead. Not on a wedge (its density is renormalised).
  if (!jumps.wedge && !fine.failed) {
    double d = std::numeric_limits<double>::infinity();
    for (const Loop& loop : z.loops)
      for (const Edge& e : loop) d = std::min(d, radius_range(e, 8).closest);
    if (d > 0.0 && std::isfinite(d)) {
      int winding = 0;
      for (const Loop& loop : z.loops) winding += loop_winding(loop, Vec2::Zero());
      const double beyond = family ? family->survival(d) : std::exp(-0.5 * d * d);
      const double lo = winding == 1 ? 1.0 - beyond : 0.0, hi = winding == 1 ? 1.0 : beyond;
      if ((winding == 0 || winding == 1) && (est.p + est.abs_err < lo || est.p - est.abs_err > hi)) {
        est.p = 0.5 * (lo + hi);
        est.q = 1.0 - est.p;
        est.abs_err = 0.5 * (hi - lo) + 4 * std::numeric_limits<double>::epsilon() + approximation_error(z, family);
        est.converged = true;
        est.message = "the cubature rules missed the spread's peak; p is bounded by the distance from the mean to the boundary";
        return est;
      }
    }
  }
  if (fine.failed) {
    est.converged = false;
    est.message = "hcubature failed";
  } else if (fine.budget_hit) {
    // The boxes left when the budget ran out had one rule each, whose estimate is no bound
    // (a ring sector's corner under a spread of 1e-8 of it: p 0 with a bound of 0.002, for
    // 0.25, in an adversarial trial): the result then claims nothing, its bound covers [0, 1].
    est.abs_err = std::max({est.abs_err, est.p, 1.0 - est.p});
    est.converged = false;
    std::ostringstream m;
    m << "hcubature stopped at its evaluation limit (" << options.max_evaluations
      << " in all) before reaching the requested tolerance";
    est.message = m.str();
  }
  return est;
}

}  // namespace strewn::detail
