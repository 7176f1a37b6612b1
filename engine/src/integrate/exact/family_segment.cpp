// Straight edges under a family other than the normal (DESIGN.md, "Scatter families").
//
// On the line of a segment, at distance h from the mean and tangential coordinate t,
// dtheta = (z x u) / r^2 dt = +-h / (h^2 + t^2) dt, the sign that of z x u (u the direction of
// travel). On a piece of the line where t keeps its sign, the angle alpha = atan2(h, |t|)
// between the radius and the line takes the pole away:
//     integral from a to b of K(r) h / (h^2 + t^2) dt = integral from alpha(b) to alpha(a) of
//     K(h / sin alpha) dalpha,   0 <= a < b,
// with r = h / sin alpha, whose integrand is bounded by max |K| however close the line passes
// (a line 1e-12 from the mean sweeps pi within a few 1e-12 of it: in t a peak no rule sees,
// in alpha a flat stretch). sin alpha keeps its relative accuracy both for far pieces (small
// alpha) and near ones (alpha near pi/2), where cos of the polar angle would not. For the
// normal, K = exp(-r^2/2) gives Owen's T (segment_tail.cpp), which keeps its closed form.
// The line is cut at its foot (t = 0) and where r crosses 1 and each radius at which the
// family's density has a kink (the uniform's edge at r = 2), so that every piece is smooth.
//
// The Student-t with a whole nu (1, 2, 3, 4, ...) needs no quadrature: with
// q = nu + h^2, r^2 = h^2 + t^2 and k = nu/2, 1 - G(r) = nu^k / (q + t^2)^k, and partial fractions,
//     1 / ((h^2 + t^2)(q + t^2)) = (1/nu) [1 / (h^2 + t^2) - 1 / (q + t^2)]   (q - h^2 = nu),
// peel one power of (q + t^2) at a time off the integrand h nu^k / ((h^2 + t^2)(q + t^2)^k):
//     integral of (1 - G) dtheta = T0(t) - sum over j of D_j(t),
// j = 1, 2, ..., k (nu even) or j = 3/2, 5/2, ..., k (nu odd), where
//     D_j = h nu^(j-1) integral of dt / (q + t^2)^j,
//     D_1 = (h / sqrt q) atan(t / sqrt q),  D_3/2 = (h t / q) sqrt(s),
//     D_(j+1) = (h t / (2 j q)) s^j + ((2j - 1) / (2j)) (nu / q) D_j,   s = nu / (nu + r^2) <= 1,
// (the textbook reduction formula for the integral of dt / (q + t^2)^j, scaled
// so that nothing overflows), T0 = atan(t / h) for even nu and T0 = atan(t sqrt(s) / h) for odd
// nu (from integral of dt / ((h^2 + t^2) sqrt(q + t^2)) = atan(t sqrt(nu) / (h sqrt(q + t^2)))
// / (h sqrt(nu)), checked by differentiating). The near form is the same
// sum with the sign turned: integral of G dtheta = sum of D_j (+ atan(t/h) - atan(t sqrt(s)/h)
// for odd nu, taken as one atan so that it keeps its digits). These are the bivariate t's
// closed forms for whole nu that Dunnett & Sobel (1954, Biometrika 41) found for
// its orthant probabilities, here on a segment. Every term is at most of the order of pi/2; where
// the difference between the two ends cancels (a segment far out in the tail, where
// T0 ~ sum D_j), the bound 4 (k + 2) eps times the terms' magnitude says so and the segment goes
// to quadrature instead.
#include <algorithm>
#include <cmath>
#include <vector>

#include "integrate/exact/edge_tail.hpp"
#include "integrate/exact/gauss_kronrod.hpp"
#include "strewn/constants.hpp"

namespace strewn::detail {

namespace {

// Up to this nu (a whole number) the t's segments take the closed form (its cost grows as nu).
constexpr double kClosedFormMaxNu = 64.0;

struct TEnd {
  double value = 0.0;      // the antiderivative at one end, tail or near form
  double magnitude = 0.0;  // the sum of its terms' absolute values
};

// The antiderivative of (1 - G) dtheta (near: of G dtheta) along the line at distance h > 0,
// at tangential coordinate t, per the closed form above.
TEnd t_antiderivative(double t, double h, double nu, bool half, bool near) {
  const double q = nu + h * h, r2 = h * h + t * t;
  const double s = nu / (nu + r2), p = nu / q, root_s = half ? std::sqrt(s) : 1.0;
  double j = half ? 1.5 : 1.0;
  double d = half ? (h * t / q) * root_s : (h / std::sqrt(q)) * std::atan(t / std::sqrt(q));
  double s_power = half ? s * root_s : s;  // s^j
  if (j > 0.5 * nu) d = 0.0;  // nu = 1: T0 alone
  double sum = d, magnitude = std::fabs(d);
  for (; j + 1.0 <= 0.5 * nu; j += 1.0) {
    d = (h * t / (2.0 * j * q)) * s_power + ((2.0 * j - 1.0) / (2.0 * j)) * p * d;
    s_power *= s;
    sum += d;
    magnitude += std::fabs(d);
  }
  if (near) {
    // atan(t/h) - atan(t sqrt(s)/h) as one atan: 1 - sqrt(s) = (r^2 / (nu + r^2)) / (1 + sqrt(s)).
    const double gap = half ? std::atan2(t * h * ((r2 / (nu + r2)) / (1.0 + root_s)), h * h + t * t * root_s) : 0.0;
    return {gap + sum, std::fabs(gap) + magnitude};
  }
  const double t0 = std::atan2(t * root_s, h);
  return {t0 - sum, std::fabs(t0) + magnitude};
}

// The closed form for a t with a whole nu, or false where it cancels (or does not apply).
bool t_closed_form(double t1, double t2, double h, double nu, bool near, double rel_tol, Contribution& out) {
  if (!(nu <= kClosedFormMaxNu) || nu != std::floor(nu)) return false;
  const bool half = static_cast<long>(nu) % 2 == 1;  // k = nu/2 half a whole number
  const TEnd a = t_antiderivative(t1, h, nu, half, near), b = t_antiderivative(t2, h, nu, half, near);
  const double value = b.value - a.value;
  const double err = 4.0 * (0.5 * nu + 2.0) * kEps * (a.magnitude + b.magnitude);
  if (!std::isfinite(value) || !std::isfinite(err) || err > std::max(rel_tol, 64 * kEps) * std::fabs(value))
    return false;
  out.value = value;
  out.abs_err = err;
  out.evaluations = 2;
  return true;
}

}  // namespace

Contribution family_segment(const Vec2& z1, const Vec2& z2, const ScatterFamily& family, bool near, double rel_tol) {
  Contribution total;
  const Vec2 d = z2 - z1;
  const double length = d.norm();
  if (!(length > 0.0)) return total;
  const Vec2 u = d / length;
  const double signed_h = accurate_cross(z1, d) / length;
  const double h = std::fabs(signed_h);
  // A line through the mean: dtheta = 0 along it (the caller counts a jump at the mean).
  if (h == 0.0) return total;
  const double t1 = z1.dot(u), t2 = t1 + length;
  const double scale = (signed_h > 0.0 ? 1.0 : -1.0) * kOneDivTwoPi;
  if (family.kind() == FamilyKind::student_t && t_closed_form(t1, t2, h, family.nu(), near, rel_tol, total)) {
    total.value *= scale;
    total.abs_err *= kOneDivTwoPi;
    return total;
  }
  std::vector<double> cuts{t1, t2, 0.0};
  std::vector<double> radii = family.kinks();
  radii.push_back(1.0);
  for (double radius : radii)
    if (radius > h) {
      const double t = std::sqrt((radius - h) * (radius + h));
      cuts.push_back(t);
      cuts.push_back(-t);
    }
  std::sort(cuts.begin(), cuts.end());
  const auto integrand = [&family, h, near](double alpha) {
    const double r = h / std::sin(alpha);
    return near ? family.cdf(r) : family.survival(r);
  };
  for (std::size_t i = 0; i + 1 < cuts.size(); ++i) {
    const double a = cuts[i], b = cuts[i + 1];
    if (a < t1 || b > t2 || !(b > a)) continue;
    // By symmetry a piece at t < 0 is the mirror piece at -t.
    const double lo = a >= 0.0 ? a : -b, hi = a >= 0.0 ? b : -a;
    const double alpha_lo = std::atan2(h, hi), alpha_hi = std::atan2(h, lo);
    const double r_min = h / std::sin(alpha_hi);
    const Contribution c = quadrature(integrand, alpha_lo, alpha_hi, rel_tol, near ? 0.0 : family_noise_r2(family, r_min));
    add(total, c, 1.0);
  }
  total.value *= scale;
  total.abs_err *= kOneDivTwoPi;
  return total;
}

}  // namespace strewn::detail
