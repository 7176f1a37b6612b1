#ifndef STREWN_SRC_PERIODIC_ELLIPSE_TAIL_HPP
#define STREWN_SRC_PERIODIC_ELLIPSE_TAIL_HPP

// The tail integral I of a whole whitened ellipse z(s) = c + A (cos s, sin s) by the periodic
// trapezoidal rule, written once for two callers that get their nodes differently: the exact
// integrator computes each node from its sine and cosine, the risk map reads them from a table
// computed once per footprint and Gaussian (only the centre c changes from cell to cell).
//
// Two steps:
// 1. Subtract the pole. With rho the distance from the mean to the curve (a lower bound) and
//    c0 = exp(-rho^2/2), I = c0 w + 1/(2 pi) integral (exp(-r^2/2) - c0) dtheta, where w is the
//    loop's winding number about the mean (the integral of dtheta / 2 pi). The remaining
//    integrand is c0 expm1(-(r^2 - rho^2)/2) dtheta/ds: where the curve passes at distance rho
//    of the mean, dtheta/ds peaks like rho / (rho^2 + t^2) but the factor r^2 - rho^2 ~ t^2
//    cancels it, leaving a dip of width rho and depth rho / 2 whose whole integral is about
//    pi rho^2 / 2 (a straight-line model), i.e. rho^2 / 4 after the 1/(2 pi).
// 2. Trapezoidal rule: the integrand is periodic and analytic in s, so it converges
//    geometrically (Trefethen & Weideman 2014, "The exponentially convergent trapezoidal rule",
//    SIAM Review 56(3)); each doubling reuses the previous nodes and its change bounds the error.
//    Convergence is accepted once the nodes resolve the peak of exp(-r^2/2) (about
//    2 pi / (r_max^2 - r_min^2) wide) and either resolve the dip (r_min / a_max wide, a_max the
//    largest semi-axis) or the dip's whole integral, rho^2 / 2 with a safety factor of 2, is
//    added to the bound. Not converged: the caller uses adaptive Gauss-Kronrod.

#include <algorithm>
#include <cmath>
#include <limits>

#include "integrate/exact/edge_tail.hpp"
#include "special/vector_math.hpp"
#include "strewn/constants.hpp"

namespace strewn::detail {

// Most nodes the rule may use; a power of two, so that tables of this many nodes serve every
// level of the nesting.
inline constexpr int kPeriodicMaxNodes = 256;
// Below about 10 ulps an error estimate is rounding noise; tighter requests are raised to this.
inline constexpr double kMinQuadTolerance = 1e-14;

// What the rule needs to know of the ellipse besides its nodes.
struct EllipseView {
  RadiusRange range;         // distances from the mean to the curve (bounds)
  double a_max = 0.0;        // largest semi-axis
  double inside = 0.0;       // |A^{-1} (-c)|^2: below 1 when the mean is inside
  double orientation = 1.0;  // +1 when the loop runs counter-clockwise
  double sign = 1.0;         // +1 when s increases along the loop
};

// Bounds on the distance from the origin to a closed or open polyline through
// point_at(0..chords), widened by `slack`, the largest distance of the curve from its chords.
template <class PointAt>
RadiusRange chord_range(PointAt point_at, int chords, double slack) {
  // Squared distances throughout: sqrt is monotone and correctly rounded, so one root of the
  // extreme equals the extreme of the roots.
  // (The first point counts too: left out, an arc whose radius falls from its start had its
  // farthest distance understated, 0.654 for 0.683, and a profile's row at 0.667 went uncut.)
  Vec2 prev = point_at(0);
  double closest2 = std::numeric_limits<double>::infinity(), farthest2 = prev.squaredNorm();
  for (int k = 1; k <= chords; ++k) {
    const Vec2 next = point_at(k);
    const Vec2 d = next - prev;
    const double l2 = d.squaredNorm();
    const double t = l2 > 0 ? std::clamp(-prev.dot(d) / l2, 0.0, 1.0) : 0.0;
    closest2 = std::min(closest2, (prev + t * d).squaredNorm());
    farthest2 = std::max(farthest2, next.squaredNorm());
    prev = next;
  }
  RadiusRange r;
  r.closest = std::max(std::sqrt(closest2) - slack, 0.0);
  r.farthest = std::sqrt(farthest2) + slack;
  return r;
}

// node_at(k, n) returns {z, z'} at s = s_0 + 2 pi k / n (s_0 fixed), for n up to
// kPeriodicMaxNodes.
// Adds the nodes k = first, first + step, ... < n of the n-node rule to sum and l1, with
// term(r2, cross, em1) giving a node's value from |z|^2, z x z' and expm1(scale * |z|^2 + shift);
// the expm1s of a level are taken in one batch (vector_math.hpp).
template <class NodeAt, class Term>
void add_nodes(NodeAt& node_at, int n, int first, int step, double scale, double shift, Term term, double& sum,
               double& l1) {
  double em1[kPeriodicMaxNodes], r2s[kPeriodicMaxNodes], cross[kPeriodicMaxNodes];
  int m = 0;
  for (int k = first; k < n; k += step, ++m) {
    const auto [z, tangent] = node_at(k, n);
    r2s[m] = z.squaredNorm();
    cross[m] = accurate_cross(z, tangent);
    em1[m] = scale * r2s[m] + shift;
  }
  expm1_in_place(em1, m);
  for (int i = 0; i < m; ++i) {
    const double v = term(r2s[i], cross[i], em1[i]);
    sum += v;
    l1 += std::fabs(v);
  }
}

// node_at(k, n) returns {z, z'} at s = s_0 + 2 pi k / n (s_0 fixed), for n up to
// kPeriodicMaxNodes.
template <class NodeAt>
Contribution periodic_ellipse_tail(const EllipseView& view, NodeAt node_at, double rel_tol) {
  Contribution c;
  c.converged = false;
  // The mean exactly on the curve is the integrator's boundary case, not this one.
  if (!(std::fabs(view.inside - 1.0) > 1e-12)) return c;
  const double w = view.inside < 1.0 ? view.orientation : 0.0;
  const double rho = view.range.closest;
  const double rho2 = rho * rho;
  const double c0 = std::exp(-0.5 * rho2);
  // Node value c0 expm1(-(r^2 - rho^2)/2) (z x z') / (2 pi r^2).
  const auto term = [c0](double r2, double cross, double em1) { return kOneDivTwoPi * c0 * em1 * cross / r2; };
  const double far2 = view.range.farthest * view.range.farthest;
  const double peak_nodes = std::max(32.0, 2.0 * (far2 - rho2));
  const double dip_nodes = 4.0 * kTwoPi * view.a_max / std::max(rho, 1e-300);
  const double noise = 8 * kEps * (1.0 + std::max(0.5 * rho2, 1.0));
  const double tol = std::max({rel_tol, kMinQuadTolerance, noise});
  // When the dip can neither be resolved cheaply nor neglected, adaptive Gauss-Kronrod (which
  // concentrates its nodes there) is the cheaper method: leave it the case.
  const bool dip_negligible = 0.5 * rho2 * c0 <= 0.1 * tol * c0 * std::max(std::fabs(w), 0.1);
  if (std::max(peak_nodes, dip_negligible ? 0.0 : dip_nodes) > kPeriodicMaxNodes) return c;
  int n = 16;
  double sum = 0.0, l1 = 0.0;
  add_nodes(node_at, n, 0, 1, -0.5, 0.5 * rho2, term, sum, l1);
  double previous = sum * kTwoPi / n;
  for (n = 32; n <= kPeriodicMaxNodes; n *= 2) {
    add_nodes(node_at, n, 1, 2, -0.5, 0.5 * rho2, term, sum, l1);
    const double value = sum * kTwoPi / n, l1_value = l1 * kTwoPi / n;
    const double change = std::fabs(value - previous);
    const double dip = n >= dip_nodes ? 0.0 : 0.5 * rho2 * c0;
    const double scale = l1_value + c0 * std::fabs(w);
    if (n >= peak_nodes && change + dip <= tol * scale) {
      c.value = c0 * w + view.sign * value;
      c.abs_err = change + dip + noise * scale;
      c.evaluations = static_cast<std::uint64_t>(n);
      c.converged = true;
      return c;
    }
    previous = value;
  }
  return c;
}

// The same tail integral with its error bounded a priori instead of estimated from a doubling,
// for an ellipse well away from the mean (the risk map's cells; the exact integrator keeps the
// rule above). Without the pole subtracted, I = integral over [0, 2 pi] of
// g(t) = exp(-r^2/2) (z x z') / (2 pi r^2), with z(t) = c + A u(t), u = (cos t, sin t). The
// N-node rule's error is 2 pi times the sum of g's Fourier coefficients c_k, k = +-N, +-2N, ...
// (Trefethen & Weideman 2014, "The exponentially convergent trapezoidal rule", SIAM Review
// 56(3), proof of Thm 3.2); moving the coefficient's integral to Im t = -+a, where g is analytic
// in |Im t| <= a, gives |c_k| <= e^{-a|k|} m, m the mean of |g| along Im t = +-a, so
//
//   |T_N - I| <= 4 pi m / (exp(a N) - 1)
//
// (Thm 3.2 itself has the supremum of |g| for m; the mean is the same proof and, for a peaked g,
// smaller). For t = x + i y: u(t) = cosh y u(x) + i sinh y u'(x), so with S = A^T A
// (eigenvalues l1 >= l2) and u'^T S u' = tr S - u^T S u,
//   Re r^2 = |c|^2 + tr S / 2 + 2 cosh y (A^T c).u(x) + cosh 2y (u^T S u - tr S / 2),
// at least |c|^2 + tr S / 2 - cosh 2y (l1 - l2)/2 + 2 cosh y (A^T c).u(x), and at least
//
//   L(y) = |c|^2 + (l1 + l2)/2 - 2 cosh y |A^T c| - cosh 2y (l1 - l2)/2
//
// for every x; L(0) = |c|^2 + l2 - 2 |A^T c| <= min |z|^2 on the real line (equal for a
// circle). Where L(a) > 0: |r^2| >= Re r^2 >= L(a); z x z' = det A + (A^T J c).u'(t) (J the
// quarter turn) with |u'(t)|^2 = cosh 2y, so |z x z'| <= C = |det A| + |A^T J c| sqrt(cosh 2a);
// and the mean over x of exp(-Re r^2 / 2) is at most exp(-L(a)/2) e^{-w} I_0(w), w = cosh a
// |A^T c| (the mean of exp(-w cos x) is the Bessel function I_0(w)), bounded by E(w)
// (periodic_bessel_bound, below). So
//
//   |T_N - I| <= 2 (C / L(a)) exp(-L(a)/2) E(w) / (exp(a N) - 1).
//
// The best a balances L(a)/2 against a N; its stationary point sinh a (|A^T c| + 2 cosh a
// (l1 - l2)/2) = N is taken after one fixed-point step, kept where L >= L(0)/2. The exponent
// matches the rule's true error: for a circle of radius R at distance d, g's Fourier
// coefficients are Bessel I_k(d R) ~ exp(d R - k^2 / (2 d R)), and the bound's
// exp(-L(a)/2 - a N) ~ exp(-N^2 / (2 d R)) too, so it asks for about sqrt(2 d R ln(1/tol))
// nodes where the doubling's "resolve the peak" rule asked for 8 d R.
struct EllipseStrip {
  double centre2 = 0.0;     // |c|^2
  double beta = 0.0;        // |A^T c|
  double delta = 0.0;       // |A^T J c|
  double half_trace = 0.0;  // (l1 + l2) / 2
  double gamma = 0.0;       // (l1 - l2) / 2
  double det = 0.0;         // |det A|
  // L at cosh y = ch, cosh 2y = 2 ch^2 - 1.
  double floor_at(double ch) const { return centre2 + half_trace - 2.0 * ch * beta - (2.0 * ch * ch - 1.0) * gamma; }
  // An upper bound on |z|^2 over the real line: |c|^2 + 2 |A^T c| + l1.
  double ceiling() const { return centre2 + 2.0 * beta + half_trace + gamma; }
};

// An upper bound on e^{-w} I_0(w) = (1/pi) int_0^pi exp(-w (1 - cos s)) ds for w >= 0: on
// [0, 1], 1 - cos s >= (s^2/2)(1 - s^2/12) >= (11/24) s^2 (cos s <= 1 - s^2/2 + s^4/24), which
// gives at most 1 / sqrt(2 pi w 11/12); on [1, pi], 1 - cos s >= 1 - cos 1 = 0.4596976..., at
// most ((pi - 1)/pi) e^{-x}, x = 0.4596976 w, with e^{-x} <= 1 / (1 + x + x^2/2 + x^3/6).
// About 1.05 / sqrt(2 pi w) for large w (its asymptote); never above 1.
inline double periodic_bessel_bound(double w) {
  if (!(w > 1.0)) return 1.0;
  const double x = 0.4596976941 * w;
  const double far = (kPi - 1.0) / kPi / (1.0 + x * (1.0 + x * (0.5 + x / 6.0)));
  return std::min(1.0, 1.0 / std::sqrt(kTwoPi * (11.0 / 12.0) * w) + far);
}

// The bound above on |T_n f - I| for n a power of two, times exp(L(0)/2) (the nodes' scale
// below), or +infinity where the strip cannot be used. `floor0` is strip.floor_at(1) > 0.
// Written without logarithms (they cost more than the nodes): exp(a n) = (sinh a + cosh a)^n
// by squaring.
inline double periodic_strip_bound(const EllipseStrip& strip, double floor0, int n) {
  // sinh a from the stationary point, one fixed-point step from cosh a = 1.
  double sh = n / (strip.beta + 2.0 * strip.gamma);
  sh = n / (strip.beta + 2.0 * strip.gamma * std::sqrt(1.0 + sh * sh));
  double ch = std::sqrt(1.0 + sh * sh);
  double floor = strip.floor_at(ch);
  if (floor < 0.5 * floor0) {
    // The a at which L = L(0)/2: 2 gamma ch^2 + 2 beta ch - (centre2 + half_trace + gamma - L) = 0.
    const double rhs = strip.centre2 + strip.half_trace + strip.gamma - 0.5 * floor0;
    // The positive root, written without cancellation: rhs / (beta + sqrt(beta^2 + 2 gamma rhs)).
    ch = rhs / (strip.beta + std::sqrt(strip.beta * strip.beta + 2.0 * strip.gamma * rhs));
    ch = std::max(ch, 1.0);
    sh = std::sqrt(std::max(ch * ch - 1.0, 0.0));
    floor = std::min(0.5 * floor0, strip.floor_at(ch));
  }
  double growth = sh + ch;  // exp(a)
  for (int m = 1; m < n; m *= 2) growth *= growth;
  const double excess = growth - 1.0;
  if (!(excess > 0.0) || !(floor > 0.0)) return std::numeric_limits<double>::infinity();
  const double cross = strip.det + strip.delta * std::sqrt(2.0 * ch * ch - 1.0);
  const double bessel = periodic_bessel_bound(ch * strip.beta);
  return 2.0 * cross / floor * std::exp(0.5 * (floor0 - floor)) * bessel / excess;
}

// I of a whole ellipse by the n-node trapezoidal rule with n the smallest power of two from 8
// to kPeriodicMaxNodes whose a-priori bound is at most rel_tol |I|: the first 8 nodes' value
// guides the choice and the final value confirms it. `strip` describes the ellipse;
// add_level(n, shift, sum, l1) adds to sum and l1 the values and absolute values of
// exp(shift - r^2/2) (z x z') / (2 pi r^2) at the nodes t = t_0 + 2 pi k / n that the n/2-node
// rule does not have (all of them for n = 8), so that levels nest. Not converged where the
// strip bound cannot be used (L(0) <= 0: an ellipse near the mean or far from round) or needs
// more nodes; the caller then uses the rule above. abs_err is the bound plus the rounding of
// the nodes (8 ulps of each exponential's argument).
inline constexpr int kBoundedFirstNodes = 8;
template <class AddLevel>
Contribution periodic_ellipse_tail_bounded(const EllipseStrip& strip, AddLevel add_level, double rel_tol) {
  Contribution c;
  c.converged = false;
  const double floor0 = strip.floor_at(1.0);
  if (!(floor0 > 0.0) || floor0 > kNegligibleR2) return c;
  const double tol = std::max(rel_tol, kMinQuadTolerance);
  // Nodes scaled by exp(L(0)/2), so that the largest is about 1 and none underflows early.
  const double shift = 0.5 * floor0;
  int n = kBoundedFirstNodes;
  double sum = 0.0, l1 = 0.0;
  add_level(n, shift, sum, l1);
  double bound = periodic_strip_bound(strip, floor0, n);
  for (;;) {
    const double value = sum * kTwoPi / n;
    if (bound <= tol * std::fabs(value)) {
      const double noise = 8 * kEps * (1.0 + std::max(0.5 * strip.ceiling(), 1.0)) * l1 * kTwoPi / n;
      const double scale = std::exp(-shift);
      c.value = value * scale;
      c.abs_err = (bound + noise) * scale;
      c.evaluations = static_cast<std::uint64_t>(n);
      c.converged = true;
      return c;
    }
    // The next n to try: the smallest whose bound meets half the tolerance on this value (the
    // value itself may still be off), then nodes added to reach it, nested; its bound is kept
    // for the check above.
    int next = 2 * n;
    for (; next <= kPeriodicMaxNodes; next *= 2) {
      bound = periodic_strip_bound(strip, floor0, next);
      if (bound <= 0.5 * tol * std::fabs(value)) break;
    }
    // None would do, on this value: the caller's rule is likelier to settle the cell.
    if (next > kPeriodicMaxNodes) return c;
    for (int m = 2 * n; m <= next; m *= 2) add_level(m, shift, sum, l1);
    n = next;
  }
}

// The near form's integrand at z with tangent z': (1 - exp(-r^2/2)) / (2 pi r^2) (z x z'),
// smooth at the origin, where the factor tends to 1/2.
inline double near_integrand(const Vec2& z, const Vec2& tangent) {
  const double r2 = z.squaredNorm();
  const double factor = r2 < 1e-300 ? 0.5 : -std::expm1(-0.5 * r2) / r2;
  return kOneDivTwoPi * factor * accurate_cross(z, tangent);
}

// The near integral J of a whole ellipse lying within radius 1 of the mean,
// 1/(2 pi) closed integral of (1 - exp(-r^2/2)) / r^2 (z x z') ds, by the same nested
// trapezoidal rule. Here there is no pole to subtract: (1 - exp(-u/2)) / u is entire in u, and
// r^2 and z x z' are trigonometric polynomials of degree 2 in s, so the integrand is entire and
// the rule converges faster than geometrically; the change of the last doubling bounds the
// error. `sign` is +1 when s increases along the loop.
template <class NodeAt>
Contribution periodic_ellipse_near(double sign, NodeAt node_at, double rel_tol) {
  Contribution c;
  c.converged = false;
  // near_integrand() with the expm1 from the batch.
  const auto term = [](double r2, double cross, double em1) {
    return kOneDivTwoPi * (r2 < 1e-300 ? 0.5 : -em1 / r2) * cross;
  };
  const double noise = 16 * kEps;
  const double tol = std::max({rel_tol, kMinQuadTolerance, noise});
  int n = 16;
  double sum = 0.0, l1 = 0.0;
  add_nodes(node_at, n, 0, 1, -0.5, 0.0, term, sum, l1);
  double previous = sum * kTwoPi / n;
  for (n = 32; n <= kPeriodicMaxNodes; n *= 2) {
    add_nodes(node_at, n, 1, 2, -0.5, 0.0, term, sum, l1);
    const double value = sum * kTwoPi / n, l1_value = l1 * kTwoPi / n;
    const double change = std::fabs(value - previous);
    if (change <= tol * l1_value) {
      c.value = sign * value;
      c.abs_err = change + noise * l1_value;
      c.evaluations = static_cast<std::uint64_t>(n);
      c.converged = true;
      return c;
    }
    previous = value;
  }
  return c;
}

// cos and sin of 2 pi k / kPeriodicMaxNodes, so that the nodes of an ellipse starting at s_0
// cost a rotation by s_0 (two products each) instead of a sine and cosine.
struct UnitCircleNodes {
  double cos[kPeriodicMaxNodes], sin[kPeriodicMaxNodes];
};
const UnitCircleNodes& unit_circle_nodes();

// I_e and J_e of a whole ellipse by the rule above (whole_ellipse.cpp); not converged when the
// rule does not settle, and the caller falls back to adaptive quadrature.
Contribution whole_ellipse_tail(const Edge& arc, double rel_tol);
Contribution whole_ellipse_near(const Edge& edge, double rel_tol);

}  // namespace strewn::detail

#endif
