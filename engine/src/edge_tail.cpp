#include "edge_tail.hpp"

#include <boost/math/quadrature/gauss_kronrod.hpp>
#include <cmath>
#include <limits>

#include "strewn/owens_t.hpp"

namespace strewn::detail {
namespace {

constexpr double kOneDivTwoPi = 0.15915494309189533577;
constexpr double kOneDivRootTwo = 0.70710678118654752440;
constexpr double kEps = std::numeric_limits<double>::epsilon();
// Relative accuracy of strewn::owens_t as measured against boost::math::owens_t over a dense
// grid (tests/owens_t_test.cpp asserts it), with a safety factor.
constexpr double kOwensTRel = 4e-15;
// Above this ratio of term size to result, the closed form would lose more than ~2 digits of
// the 16, so the edge is integrated by quadrature instead.
constexpr double kMaxCancellation = 64.0;
constexpr unsigned kMaxDepth = 30;
// Below about 10 ulps the Kronrod error estimate is rounding noise and bisection would never
// stop; tighter requests are raised to this.
constexpr double kMinQuadTolerance = 1e-14;

using GK = boost::math::quadrature::gauss_kronrod<double, 31>;

template <class F>
Contribution quadrature(F f, double a, double b, double rel_tol) {
  Contribution c;
  double err = 0.0, l1 = 0.0;
  std::uint64_t calls = 0;
  auto counted = [&](double s) {
    ++calls;
    return f(s);
  };
  const double tol = std::max(rel_tol, kMinQuadTolerance);
  c.value = GK::integrate(counted, a, b, kMaxDepth, tol, &err, &l1);
  // The Kronrod estimate does not see rounding; add a few ulps of the L1 norm.
  c.abs_err = err + 8 * kEps * l1;
  c.evaluations = calls;
  c.converged = std::isfinite(c.value) && err <= tol * l1 * 10 + 1e-300;
  return c;
}

// T(h, b/h) - T(h, a/h) for |a|, |b| <= h by the direct form.
Contribution direct_piece(double h, double a, double b, double rel_tol) {
  const double ta = owens_t(h, a / h);
  const double tb = owens_t(h, b / h);
  Contribution c;
  c.value = tb - ta;
  c.evaluations = 2;
  const double terms = std::fabs(ta) + std::fabs(tb);
  if (terms > kMaxCancellation * std::fabs(c.value)) {
    // dtheta form: 1/(2 pi) integral of exp(-h^2 / (2 cos^2 phi)) dphi, phi = atan(t / h).
    Contribution q = quadrature(
        [h](double phi) {
          const double c2 = std::cos(phi);
          return kOneDivTwoPi * std::exp(-0.5 * h * h / (c2 * c2));
        },
        std::atan(a / h), std::atan(b / h), rel_tol);
    q.evaluations += 2;
    return q;
  }
  c.abs_err = kOwensTRel * terms + 2 * kEps * terms;
  return c;
}

// T(h, b/h) - T(h, a/h) for h <= a < b, by Owen's reflection
//   T(h, t/h) = Q(h)/2 + Q(t)/2 - Q(h) Q(t) - T(t, h/t),
// whose a-independent Q(h)/2 cancels between the ends:
//   = (1/2 - Q(h)) (Q(b) - Q(a)) - [T(b, h/b) - T(a, h/a)].
Contribution reflected_piece(double h, double a, double b, double rel_tol) {
  const double half_erf_h = 0.5 * std::erf(h * kOneDivRootTwo);  // 1/2 - Q(h)
  const double qa = normal_upper_tail(a);
  const double qb = normal_upper_tail(b);
  const double ta = owens_t(a, h / a);
  const double tb = owens_t(b, h / b);
  Contribution c;
  c.value = half_erf_h * (qb - qa) - (tb - ta);
  c.evaluations = 2;
  const double terms = half_erf_h * (qa + qb) + std::fabs(ta) + std::fabs(tb);
  if (terms > kMaxCancellation * std::fabs(c.value)) {
    // dt form: 1/(2 pi) integral of h exp(-(h^2 + t^2)/2) / (h^2 + t^2) dt.
    Contribution q = quadrature(
        [h](double t) {
          const double r2 = h * h + t * t;
          return kOneDivTwoPi * h * std::exp(-0.5 * r2) / r2;
        },
        a, b, rel_tol);
    q.evaluations += 2;
    return q;
  }
  c.abs_err = kOwensTRel * (std::fabs(ta) + std::fabs(tb)) + 4 * kEps * terms;
  return c;
}

void add(Contribution& total, const Contribution& piece, double sign) {
  total.value += sign * piece.value;
  total.abs_err += piece.abs_err;
  total.evaluations += piece.evaluations;
  total.converged = total.converged && piece.converged;
}

}  // namespace

double accurate_cross(const Vec2& a, const Vec2& b) {
  const double w = b.x() * a.y();
  const double e = std::fma(-b.x(), a.y(), w);
  const double f = std::fma(a.x(), b.y(), -w);
  return f + e;
}

Contribution segment_tail(const Vec2& z1, const Vec2& z2, double rel_tol) {
  Contribution total;
  const Vec2 d = z2 - z1;
  const double length = d.norm();
  if (length == 0.0) return total;
  const Vec2 u = d / length;
  const double hs = accurate_cross(z1, z2) / length;  // signed distance of the line
  const double h = std::fabs(hs);
  if (h == 0.0) return total;  // on a line through the origin dtheta vanishes
  const double sign = hs > 0 ? 1.0 : -1.0;
  const double t1 = z1.dot(u);
  const double t2 = z2.dot(u);
  // With the line x = h n + t u, dtheta = h dt / (h^2 + t^2), and (Owen 1956)
  // I_e = sign * [T(h, t2/h) - T(h, t1/h)]. Split at t = -h and t = h so that each piece is
  // wholly in |a| <= 1 (direct) or |a| >= 1 (reflected); T is odd in a.
  if (t1 < -h) add(total, reflected_piece(h, -std::min(t2, -h), -t1, rel_tol), sign);
  const double lo = std::max(t1, -h), hi = std::min(t2, h);
  if (lo < hi) add(total, direct_piece(h, lo, hi, rel_tol), sign);
  if (t2 > h) add(total, reflected_piece(h, std::max(t1, h), t2, rel_tol), sign);
  return total;
}

Contribution arc_tail(const Edge& arc, double rel_tol) {
  // dtheta = (z x z') / |z|^2 ds along z(s) = c + A (cos s, sin s).
  return quadrature(
      [&arc](double s) {
        const Vec2 z = arc.point(s);
        const double r2 = z.squaredNorm();
        if (r2 == 0.0) return 0.0;
        return kOneDivTwoPi * std::exp(-0.5 * r2) * accurate_cross(z, arc.tangent(s)) / r2;
      },
      arc.s_from, arc.s_to, rel_tol);
}

Contribution edge_near(const Edge& edge, double rel_tol) {
  // (1 - exp(-r^2/2)) / r^2 -> 1/2 at the origin, so the integrand is smooth there.
  return quadrature(
      [&edge](double s) {
        const Vec2 z = edge.point(s);
        const double r2 = z.squaredNorm();
        const double factor = r2 < 1e-300 ? 0.5 : -std::expm1(-0.5 * r2) / r2;
        return kOneDivTwoPi * factor * accurate_cross(z, edge.tangent(s));
      },
      edge.param_from(), edge.param_to(), rel_tol);
}

}  // namespace strewn::detail
