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
// A t's edge without a closed form (a fractional nu, or one that cancels) is taken whole in the
// angle phi below (t_angle_form: Gauss-Legendre panels with a proven bound), or, where 1 - G is
// small all along it and that form's difference would cancel, by the same integrand taken
// directly (t_direct_form); where both fail, pieces in alpha by panels (bounded_t_piece),
// adaptive Gauss-Kronrod where they fail; the other families' pieces, adaptive Gauss-Kronrod.
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
//
// A profile (piecewise linear rate, so G piecewise cubic in r with no linear term,
// core/profile_table.hpp) needs no quadrature either. With r^2 = h^2 + t^2 and
// dtheta = h dt / r^2,
//     integral of dtheta = atan(t / h),  integral of r^2 dtheta = h t,
//     integral of r^3 dtheta = h integral of sqrt(h^2 + t^2) dt = (h / 2) (t r + h^2 asinh(t / h)),
// the last the integral of sec^3 in the polar angle phi (r = h sec phi, h^3 sec^3 phi dphi;
// Gradshteyn & Ryzhik, Table of Integrals, 2.526; in t, G&R 2.271). The line is cut where r
// crosses a row of the table, so that each piece holds one cubic: the tail form anchors it at
// the piece's far end rho (S(r) = S(rho) + c2 (rho^2 - r^2) + c3 (rho^3 - r^3)), the near form
// at its near end. Between ends ta < tb of the same sign (|t| taken, the line's mirror image)
// each difference is formed without cancellation:
//     d atan = atan2(h (tb - ta), h^2 + ta tb),
//     d (t r) = (tb - ta)(tb + ta)(h^2 + ta^2 + tb^2) / (tb rb + ta ra),
//     d asinh(t / h) = asinh((tb - ta)(tb + ta) / (tb ra + ta rb))
// (the last from asinh x - asinh y = asinh(x sqrt(1 + y^2) - y sqrt(1 + x^2)), rationalised).
// Beyond the wetted radius (r >= 2) S = 0 and G = 1. What can still cancel is the sum of the
// three terms (a steep piece has large c2, c3 of opposite signs); the bound 16 eps times the
// terms' magnitude says so, and such a piece goes to quadrature.
#include <algorithm>
#include <cmath>
#include <vector>

#include "core/profile_table.hpp"
#include "integrate/exact/bounded_gauss.hpp"
#include "integrate/exact/edge_tail.hpp"
#include "integrate/exact/gauss_kronrod.hpp"
#include "special/vector_math.hpp"
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

// The closed form for an even nu (k = nu/2 whole) taken as differences between the ends, so
// that the segment's own angle, not the ends' angles from the foot, sets the rounding: with
// t2 = t1 + L, a = q + t1^2 and b = q + t2^2 (nu + r^2 at the ends),
//     dT0 = atan(t2/h) - atan(t1/h) = atan2(h L, h^2 + t1 t2),
//     dD_1 = (h / sqrt q) atan2(sqrt q L, q + t1 t2)
// (the difference of two arctangents whose sum of angles lies in (0, pi) as L > 0), and, with
// u_j = t2 s2^j - t1 s1^j (s = nu / (nu + r^2)),
//     dD_(j+1) = (h / (2 j q)) u_j + ((2j - 1) / (2j)) (nu / q) dD_j,
//     u_0 = L,  u_j = (nu / b) u_(j-1) - (t1 (t1 + t2) L nu / (a b)) (nu / a)^(j-1)
// (from t2 a^j - t1 b^j = a (t2 a^(j-1) - t1 b^(j-1)) + t1 b^(j-1) (a - b), a - b = -L (t1 + t2),
// scaled by nu^j / (a b)^j; every factor is at most 1, so nothing overflows). The tail is
// dT0 - sum of dD_j, the near form the sum. Each u_j may cancel; m_j, the same recursion on
// absolute values, bounds it, and the terms' magnitude carries m_j in place of |u_j|. The
// bound 8 (k + 2) eps times that magnitude (twice the end form's constant) was checked against
// 40-digit mpmath quadrature at 2,300 random segments (nu 2 to 64, h 1e-3 to 100, |t1| to 1e3,
// L 1e-4 to 1e3, tail and near): the error reached 0.06 of it. On a segment at a few sigma the
// ends' forms cancel like the sum of the ends' angles over the segment's value, this like its
// own sweep over its value: the sector's radial edge (sweep 0.14, value 0.0097) was refused by
// the end form at a 1e-12 tolerance and is served by this one.
bool t_closed_form_even(double t1, double length, double h, double nu, bool near, double rel_tol, Contribution& out) {
  const int k = static_cast<int>(0.5 * nu);
  const double t2 = t1 + length, q = nu + h * h, root_q = std::sqrt(q);
  const double a = q + t1 * t1, b = q + t2 * t2;
  double d = (h / root_q) * std::atan2(root_q * length, q + t1 * t2);  // dD_1 > 0
  double sum = d, magnitude = d, d_magnitude = d;
  const double nu_b = nu / b, s_a = nu / a, c = t1 * (t1 + t2) * length * nu / (a * b);
  double u = length, m = length, s_a_power = 1.0;
  for (int j = 1; j < k; ++j) {
    u = nu_b * u - c * s_a_power;
    m = nu_b * m + std::fabs(c) * s_a_power;
    s_a_power *= s_a;
    const double f1 = h / (2.0 * j * q), f2 = (2.0 * j - 1.0) / (2.0 * j) * (nu / q);
    d = f1 * u + f2 * d;
    d_magnitude = f1 * m + f2 * d_magnitude;
    sum += d;
    magnitude += d_magnitude;
  }
  double value = sum;
  if (!near) {
    const double d_t0 = std::atan2(h * length, h * h + t1 * t2);
    value = d_t0 - sum;
    magnitude += d_t0;
  }
  const double err = 8.0 * (0.5 * nu + 2.0) * kEps * magnitude;
  if (!std::isfinite(value) || !std::isfinite(err) || err > std::max(rel_tol, 64 * kEps) * std::fabs(value))
    return false;
  out.value = value;
  out.abs_err = err;
  out.evaluations = 1;
  return true;
}

// The closed form for a t with a whole nu, or false where it cancels (or does not apply): an
// even nu as differences first (above), then from the antiderivative at each end.
bool t_closed_form(double t1, double length, double h, double nu, bool near, double rel_tol, Contribution& out) {
  if (!(nu <= kClosedFormMaxNu) || nu != std::floor(nu)) return false;
  if (static_cast<long>(nu) % 2 == 0 && t_closed_form_even(t1, length, h, nu, near, rel_tol, out)) return true;
  const double t2 = t1 + length;
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

// The profile's closed form over the piece 0 <= ta < tb of the line at distance h > 0 (a piece
// within one row interval of the table, or wholly beyond it), or false where it cancels.
bool profile_closed_form(const ProfileTable& table, double ta, double tb, double h, bool near, double rel_tol,
                         Contribution& out) {
  const double h2 = h * h, ra = std::sqrt(h2 + ta * ta), rb = std::sqrt(h2 + tb * tb);
  const double d_theta = std::atan2(h * (tb - ta), h2 + ta * tb);
  double value = 0.0, magnitude = 0.0;
  if (0.5 * (ra + rb) >= table.r.back()) {
    value = near ? d_theta : 0.0;  // beyond the wetted radius: G = 1, S = 0
    magnitude = value;
  } else {
    const double sum = tb + ta, gap = tb - ta;
    const double i2 = h * gap;  // integral of r^2 dtheta
    const double d_tr = gap * sum * (h2 + ta * ta + tb * tb) / (tb * rb + ta * ra);
    const double i3 = 0.5 * h * (d_tr + h2 * std::asinh(gap * sum / (tb * ra + ta * rb)));  // of r^3 dtheta
    const std::size_t i = table.index(0.5 * (ra + rb));
    const ProfileTable::Cubic c = table.cubic(i);
    const double rho = near ? ra : rb, rho2 = rho * rho, rho3 = rho2 * rho;
    const double k_rho = near ? table.cdf(rho) : table.survival(rho);
    // Tail: S(rho) dtheta + c2 (rho^2 dtheta - r^2 dtheta) + c3 (rho^3 dtheta - r^3 dtheta);
    // near: G(rho) dtheta + c2 (r^2 dtheta - rho^2 dtheta) + c3 (r^3 dtheta - rho^3 dtheta).
    const double sign = near ? 1.0 : -1.0;
    const double t2 = sign * c.c2 * (i2 - rho2 * d_theta), t3 = sign * c.c3 * (i3 - rho3 * d_theta);
    value = k_rho * d_theta + t2 + t3;
    magnitude = std::fabs(k_rho * d_theta) + std::fabs(c.c2) * (i2 + rho2 * d_theta) + std::fabs(c.c3) * (i3 + rho3 * d_theta);
  }
  const double err = 16.0 * kEps * magnitude;
  if (!std::isfinite(value) || !std::isfinite(err) || err > std::max(rel_tol, 64 * kEps) * std::fabs(value)) return false;
  out.value = value;
  out.abs_err = err;
  out.evaluations = 1;
  return true;
}

// A t's straight edge (a fractional nu, or a whole one whose closed form cancels) in the angle phi = atan(t / sqrt q), q = nu + h^2, k = nu / 2. With
// t = sqrt(q) tan phi: h^2 + t^2 = (h^2 + nu sin^2 phi) / cos^2 phi, (q + t^2)^(-k) =
// q^(-k) cos^nu phi and dt = sqrt(q) sec^2 phi dphi, so
//     integral of (1 - G) dtheta = h nu^k integral of dt / ((h^2 + t^2)(q + t^2)^k)
//       = h nu^k q^(1/2 - k) integral of cos^nu phi / (h^2 + nu sin^2 phi) dphi.
// Splitting off the constant C = (q / nu)^k, the value of cos^nu phi where the denominator
// vanishes (sin phi = +-i h / sqrt nu, cos^2 phi = q / nu), takes the poles out: the constant's
// part is h nu^k q^(1/2 - k) C integral of dphi / (h^2 + nu sin^2 phi) = dT0, the angle
// atan(t / h) the edge sweeps, and with x = (h^2 + nu sin^2 phi) / q the rest is
//     (h / sqrt q) integral of E(x(phi)) dphi,   E(x) = ((1 - x)^k - 1) / x,
// so that the tail form is dT0 + (h / sqrt q) integral of E dphi and the near form
// (h / sqrt q) integral of -E dphi. (At nu = 2, E = -1: dT0 - (h / sqrt q) d phi, the closed
// form's T0 - D_1.) On the real line -E lies between 1 and k ((1 - x)^k <= 1 - x for k >= 1,
// and 1 - x <= (1 - x)^k <= 1 - k x for k <= 1, Bernoulli), taken as -expm1(k L) / x with
// L = log1p(-x) without cancellation (for k < 1 and x > 1/2, L = log(w) from cos phi, where
// 1 - x would lose the digits that w^(k - 1) then magnifies). The integrand has no peak
// however close the line passes to the mean, and no pole: with w = 1 - x = (nu / q) cos^2 phi,
//     E = -k integral from 0 to 1 of (1 - s + s w)^(k - 1) ds,
// along a path from 1 to w that never meets the negative reals while |Re phi| < pi/2 (cos phi
// is imaginary only on Re phi = +-pi/2), so E is analytic on that strip, t = +-infinity its only
// singularities. For |Im phi| <= Y there (phi = u + i v, |cos phi|^2 = cos^2 u + sinh^2 v):
// for k >= 1, |E| <= k max(1, |w|)^(k - 1) <= k max(1, (nu / q) cosh^2 Y)^(k - 1); for k < 1,
// |E| <= k / D^(1 - k), D the distance from 0 to the path, at least min(1, Re w) where Re w > 0,
// and Re cos^2 phi = (1 + cos 2u cosh 2v) / 2 >= (1 + c m) / 2 with c = cos 2u at the largest |u|
// and m = 1 where c >= 0, cosh 2Y where c < 0. So the whole edge, on both sides of its
// foot, is one Gauss-Legendre panel with Trefethen's bound (bounded_gauss.hpp) on an ellipse
// that stays within the strip, cut only where the edge runs far along its line (phi near
// +-pi/2). The tail form's difference is checked as the closed forms' are, and refused where it
// cancels (a segment far out, where 1 - G is small next to 1); the caller then takes the direct
// form below, or the pieces in alpha after it. (Those pieces, the only way before, erred by up to 1e-10 under a
// bound of 4e-14 with the mean 1e-9 from a vertex, at every nu: family_segment_test.)

// k_low: the least of the ends' 1 - G (tail) or G (near), a lower bound of it along the edge
// (the radius is largest, and smallest, at an end or the foot), which sizes the panels: in the
// tail form the integral's error is measured against dT0 - (h / sqrt q) integral of -E, at
// least k_low dT0, not against the integral.
bool t_angle_form(double t1, double length, double h, double nu, bool near, double k_low, double rel_tol,
                  Contribution& out) {
  if (!(nu > 0.0)) return false;
  const double k = 0.5 * nu, q = nu + h * h, root_q = std::sqrt(q), h2 = h * h;
  const double t2 = t1 + length;
  // Each node's E errs by a few eps relative: x's own rounding (from sin and the squares,
  // about 12 eps) moves E by at most as much relative (|x E'(x) / E| <= 1), the logarithm's
  // through y = k L by |y| e^y / (1 - e^y) <= 1 times it, expm1 and the division by a few ulps;
  // for k < 1 the logarithm of w where x > 1/2 by up to 1 / (e k) times w's (k |log w| w^k <= 1/e).
  const double noise = 64.0 * kEps * (1.0 + 1.0 / std::min(k, 1.0));
  const double tol = std::max({rel_tol, kMinQuadTolerance, noise});
  const double phi1 = std::atan(t1 / root_q), phi2 = std::atan(t2 / root_q), factor = h / root_q;
  const double d_t0 = std::atan2(h * length, h2 + t1 * t2);
  // the share of the integral's own size the result's tolerance allows (-E <= e_high)
  const double e_low = std::min(1.0, k), e_high = std::max(1.0, k);  // -E on the reals
  const double share = near ? 1.0 : std::min(1.0, k_low * d_t0 / (factor * e_high * (phi2 - phi1)));
  if (!(share > 1e-6)) return false;  // cancels too far: the pieces in alpha
  // log M on the rung's ellipse (of half-width Y = half * across): log k + (k - 1) max(0,
  // log(nu / q) + Y^2), from above; +infinity where the ellipse leaves the strip.
  const double log_k = log_upper(k), log_ratio = log_upper(nu / q) + 4 * kEps, ratio = nu / q;
  const bool small_k = k < 1.0;
  constexpr double kEdge = 0.5 * kPi * (1.0 - 1e-12);
  auto f = [&](const double* s, double* v, int n) {
    double x[31], w[31];
    for (int i = 0; i < n; ++i) v[i] = s[i];
    if (small_k) {
      cos_sin_in_place(v, w, n);  // v = cos, w = sin
      for (int i = 0; i < n; ++i) {
        x[i] = std::max((h2 + nu * w[i] * w[i]) / q, 1e-300);
        w[i] = ratio * v[i] * v[i];
        v[i] = -x[i];
      }
      log1p_in_place(v, n);
      log_in_place(w, n);
      for (int i = 0; i < n; ++i) v[i] = k * (x[i] > 0.5 ? w[i] : v[i]);
    } else {
      sin_in_place(v, n);
      for (int i = 0; i < n; ++i) {
        x[i] = std::max((h2 + nu * v[i] * v[i]) / q, 1e-300);
        v[i] = -x[i];
      }
      log1p_in_place(v, n);
      for (int i = 0; i < n; ++i) v[i] *= k;
    }
    expm1_in_place(v, n);
    for (int i = 0; i < n; ++i) v[i] = -v[i] / x[i];
  };
  struct Piece {
    double a, b;
  };
  Piece stack[64];
  int top = 0;
  stack[top++] = {phi1, phi2};
  Contribution integral;  // of -E dphi
  int pieces = 0;
  while (top > 0) {
    const Piece piece = stack[--top];
    const double mid = 0.5 * (piece.a + piece.b), half = 0.5 * (piece.b - piece.a);
    if (!(half > 0.0)) continue;
    const auto log_m = [&](int rung) {
      const BernsteinAxes& e = kGaussLadderAxes[rung];
      constexpr double kInf = std::numeric_limits<double>::infinity();
      const double reach = std::fabs(mid) + half * e.along;
      if (!(reach < kEdge)) return kInf;
      if (small_k) {
        // Re w from below: c = cos 2u at the largest |u| (lowered by its rounding), cosh 2Y from
        // above where c < 0; log M = log k - (1 - k) log min(1, Re w).
        const double c = std::cos(2.0 * reach) - 4 * kEps;
        const double re_w = ratio * 0.5 * (1.0 + c * (c >= 0.0 ? 1.0 : cosh_upper(2.0 * half * e.across))) * (1.0 - 4 * kEps);
        if (!(re_w > 0.0)) return kInf;
        return log_k - (1.0 - k) * std::min(0.0, log_lower(re_w));
      }
      if (k == 1.0) return log_k;
      const double y = half * e.across;  // 2 log cosh Y <= Y^2 (cosh Y <= exp(Y^2 / 2), term by term)
      return log_k + (k - 1.0) * std::max(0.0, log_ratio + y * y * (1.0 + 4 * kEps));
    };
    // -E >= e_low on the reals: the piece's integral is at least e_low times its length
    const GaussChoice choice = choose_gauss_rule_log(half, share * tol * e_low * (piece.b - piece.a), log_m);
    if (choice.n == 0) {
      // Cut next to the end nearer +-pi/2 a piece as long as that end's distance from it
      // (whose ellipse then fits), else in half.
      if (++pieces > 48 || top + 2 > 64) return false;
      const double d_a = 0.5 * kPi + piece.a, d_b = 0.5 * kPi - piece.b, len = piece.b - piece.a;
      double c = mid;
      if (d_b <= d_a && d_b < 0.5 * len) c = piece.b - d_b;
      else if (d_a < d_b && d_a < 0.5 * len) c = piece.a + d_a;
      stack[top++] = {piece.a, c};
      stack[top++] = {c, piece.b};
      continue;
    }
    const GaussPanel p = gauss_panel(f, piece.a, piece.b, choice.n);
    integral.evaluations += static_cast<std::uint64_t>(choice.n);
    if (!std::isfinite(p.value) || !(choice.bound <= share * tol * p.l1)) return false;
    integral.value += p.value;
    integral.abs_err += choice.bound + noise * p.l1;
  }
  const double rest = factor * integral.value;
  // the ends' angles phi err by an eps or two each, where |E| <= e_high
  const double ends = 4.0 * kEps * e_high * (std::fabs(phi1) + std::fabs(phi2));
  double value = rest, err = factor * (integral.abs_err + ends) + 4.0 * kEps * rest;
  if (!near) {
    value = d_t0 - rest;
    err += 4.0 * kEps * d_t0;
  }
  if (!std::isfinite(value) || !std::isfinite(err) || err > std::max(rel_tol, 64 * kEps) * std::fabs(value)) return false;
  out.value = value;
  out.abs_err = err;
  out.evaluations = integral.evaluations;
  return true;
}

// The tail form where 1 - G is small all along the edge. There dT0 - (h / sqrt q) integral of
// -E above is the small remainder of the angle the edge sweeps and loses digits (at nu = 30.5
// an edge 3 sigma out kept 1e-12 of its value, where the integrator asks 1e-12 of it), so
// the integrand above is taken directly instead, scaled at the edge's point nearest the mean
// (t_ref = max(t1, 0), its angle phi_ref, S_ref = 1 - G there):
//     integral of (1 - G) dtheta = S_ref h sqrt(q) integral of D(phi) dphi,
//     D = (cos^2 phi / cos^2 phi_ref)^k / (h^2 + nu sin^2 phi),
// since (nu / q)^k cos^(2k) phi_ref = (nu / (q + t_ref^2))^k = S_ref. Both factors of D fall
// with |phi|, so on a piece D is least at the end farther from 0, and D is analytic where
// cos phi != 0 (|Re phi| < pi/2) and h^2 + nu sin^2 phi != 0 (cos phi has no zero there, so
// cos^(2k) has a branch whose modulus is |cos phi|^(2k)). On the rectangle holding a panel's
// Bernstein ellipse, |u| >= u_n and |v| <= Y (phi = u + i v, |Re phi| < pi/2):
//     |cos phi|^2 = cos^2 u + sinh^2 v <= cos^2 u_n + sinh^2 Y,
//     |h^2 + nu sin^2 phi| >= h^2 + nu Re sin^2 phi = h^2 + (nu / 2)(1 - cos 2u cosh 2v)
//       >= h^2 + (nu / 2)(1 - c cosh 2Y) where c = cos 2u_n >= 0,
//       >= h^2 + (nu / 2)(1 - c) where c < 0 (then cos 2u <= c < 0 on the whole rectangle),
// which give Trefethen's M. Each node's D errs relatively by the node's own rounding (2 eps
// |phi| moves log cos^2 by 4 eps |phi tan phi| and the denominator by less than 4 eps |phi|
// sqrt(nu) / h), the cos, sin, log and exp of libmvec (4 ulps each) and the exponent's
// rounding (eps times k |log ratio|): at most eps (48 + k (16 + 8 |tan u_f|) + 8 k |log
// ratio at u_f| + 2 u_f min(sqrt(nu) / h, 2 / tan u_n)) on a panel whose farther end is u_f
// and nearer u_n. s1, s2: 1 - G at the ends. Refused (false) where 1 - G is not small, or
// where the panels do not reach the tolerance.
bool t_direct_form(double t1, double length, double h, double nu, double s1, double s2, double rel_tol,
                   Contribution& out) {
  if (!(nu > 0.0) || !(s1 <= 0.25) || !(s2 > 0.0)) return false;  // S_ref >= s1: not small
  const double k = 0.5 * nu, h2 = h * h, q = nu + h2, root_q = std::sqrt(q);
  const double t2 = t1 + length, t_ref = std::max(t1, 0.0);
  // S_ref: the foot's own where the edge holds it, else the nearer end's (s1, from |z1| where
  // this has h^2 + t1^2: the two differ by a few eps relative, k times that in S)
  const double s_ref = t1 < 0.0 ? std::exp(-k * std::log1p(h2 / nu)) : s1;
  if (!(s_ref <= 0.25) || !(s_ref > 0.0) || !std::isfinite(q + t2 * t2)) return false;
  const double c2ref = q / (q + t_ref * t_ref), inv_c2ref = 1.0 / c2ref;
  const double tol = std::max({rel_tol, kMinQuadTolerance, 256.0 * kEps});
  const double phi1 = std::atan(t1 / root_q), phi2 = std::atan(t2 / root_q);
  const double total_len = phi2 - phi1;
  if (!(total_len > 0.0)) return false;
  // D at an end from 1 - G there: (s_end / S_ref) over the denominator q (h^2 + t^2) / (q + t^2).
  const auto d_end = [&](double t, double s_end) { return s_end / s_ref * (q + t * t) / (q * (h2 + t * t)); };
  // D at a real angle from its tangent T: cos^2 = 1 / (1 + T^2); its -log ratio k log(c2ref (1 + T^2)) too.
  const auto d_of_tan = [&](double tan_u, double& log_ratio) {
    const double tt = tan_u * tan_u;
    log_ratio = k * std::log(c2ref * (1.0 + tt));
    return std::exp(-log_ratio) / (h2 + nu * tt / (1.0 + tt));
  };
  const double root_nu = std::sqrt(nu), nu_over_2h2 = 0.5 * nu / h2, log_inv_h2 = log_upper(1.0 / h2 * (1.0 + 4 * kEps));
  constexpr double kEdge = 0.5 * kPi * (1.0 - 1e-12);
  auto f = [&](const double* s, double* v, int n) {
    double w[31], den[31];
    for (int i = 0; i < n; ++i) v[i] = s[i];
    cos_sin_in_place(v, w, n);  // v = cos, w = sin
    for (int i = 0; i < n; ++i) {
      den[i] = h2 + nu * w[i] * w[i];
      v[i] = std::max(v[i] * v[i] * inv_c2ref, 1e-300);
    }
    log_in_place(v, n);
    for (int i = 0; i < n; ++i) v[i] *= k;
    exp_in_place(v, n);
    for (int i = 0; i < n; ++i) v[i] /= den[i];
  };
  struct Piece {
    double a, b, tan_far;  // tan_far: tan of the larger of |a|, |b|
  };
  Piece stack[64];
  int top = 0;
  stack[top++] = {phi1, phi2, std::max(std::fabs(t1), std::fabs(t2)) / root_q};
  // the whole edge's D at its far end (t2: |t1| <= |t2|) and log(S_ref / S_far), without libm
  const double d_far = d_end(t2, s2), log_far = std::max(0.0, log_upper(s_ref / s2));
  double running = d_far * total_len;  // a lower bound of the integral, then what is done
  double value = 0.0, err = 0.0;
  std::uint64_t evaluations = 0;
  int pieces = 0;
  while (top > 0) {
    const Piece piece = stack[--top];
    const double half = 0.5 * (piece.b - piece.a);
    if (!(half > 0.0)) continue;
    const double u_near = piece.a < 0.0 && piece.b > 0.0 ? 0.0 : std::min(std::fabs(piece.a), std::fabs(piece.b));
    const double u_far = std::max(std::fabs(piece.a), std::fabs(piece.b));
    double log_ratio_far = log_far;
    const double d_low = pieces == 0 ? d_far : d_of_tan(piece.tan_far, log_ratio_far);
    const double target = 0.5 * tol * std::max(d_low * (piece.b - piece.a), running * (piece.b - piece.a) / total_len);
    // log M without a logarithm per rung: with u_n = u_near - delta (delta the ellipse's reach
    // past the piece), log(cos^2 u_n / cos^2 phi_ref) <= 2 tan(u_near) delta + log(cos^2
    // u_near / cos^2 phi_ref) (the slope of -log cos^2 is 2 tan u, largest at u_near), the last
    // term 0 on the edge's first piece (u_near = phi_ref) and at most 0 on any other;
    // log(a + b) <= log a + b / a with a = cos^2 u_n >= cos^2 u_near = 1 / (1 + tan^2 u_near)
    // for the sinh^2 Y; and -log(h^2 (1 + x)) <= -log h^2 - x / (1 + x),
    // x = (nu / 2h^2)(1 - c cosh 2Y) > -1, lowered by its rounding.
    const double tan_near = pieces == 0 ? t_ref / root_q : std::tan(u_near);
    const double inv_cos2_near = (1.0 + tan_near * tan_near) * (1.0 + 4 * kEps);
    const auto log_m = [&](int rung) {
      const BernsteinAxes& e = kGaussLadderAxes[rung];
      constexpr double kInf = std::numeric_limits<double>::infinity();
      const double delta = half * (e.along - 1.0);
      if (!(u_far + delta < kEdge)) return kInf;
      const double un = std::max(0.0, u_near - delta), y = half * e.across;
      const double sl = sin_lower(un), sh = sinh_upper(y);
      const double sinh2 = sh * sh * (1.0 + 4 * kEps);
      // 1 - cos 2u_n cosh 2Y = 2 (sin^2 u_n - sinh^2 Y + 2 sin^2 u_n sinh^2 Y) >= 2 (sl^2 -
      // sinh^2 Y) where cos 2u_n >= 0 (sl <= sin(pi/4)); 1 - cos 2u_n = 2 sin^2 u_n >= 2 sl^2 where
      // it is below 0. Formed from the small terms, not from 1 - c m: that difference kept only
      // the absolute rounding of its 1, which nu / 2h^2 then magnified past -1 for a line 1e-9
      // sigma from the mean.
      const double sl2 = sl * sl * (1.0 - 4 * kEps);
      const double half_gap = sl2 <= 0.5 ? sl2 - sinh2 : sl2;
      const double x = nu_over_2h2 * 2.0 * half_gap * (half_gap >= 0.0 ? 1.0 - 4 * kEps : 1.0 + 4 * kEps);
      if (!(x > -1.0)) return kInf;
      return k * (2.0 * tan_near * std::min(delta, u_near) + sinh2 * inv_cos2_near) * (1.0 + 8 * kEps) - x / (1.0 + x) +
             log_inv_h2 + 1e-12;
    };
    const GaussChoice choice = choose_gauss_rule_log(half, target, log_m);
    if (choice.n == 0) {
      // Cut next to the far end a piece as long as its distance from +-pi/2 (whose ellipse
      // then fits), else in half; the nearer part goes on top.
      if (++pieces > 48 || top + 2 > 64) return false;
      const double len = piece.b - piece.a, to_edge = 0.5 * kPi - u_far;
      const double cut_len = to_edge < 0.5 * len ? to_edge : 0.5 * len;
      const bool far_is_b = std::fabs(piece.b) >= std::fabs(piece.a);
      const double c = far_is_b ? piece.b - cut_len : piece.a + cut_len;
      const double tan_c = std::fabs(std::tan(c));
      if (far_is_b) {
        stack[top++] = {c, piece.b, piece.tan_far};
        stack[top++] = {piece.a, c, std::max(tan_c, std::fabs(std::tan(piece.a)))};
      } else {
        stack[top++] = {piece.a, c, piece.tan_far};
        stack[top++] = {c, piece.b, std::max(tan_c, std::fabs(std::tan(piece.b)))};
      }
      continue;
    }
    const GaussPanel p = gauss_panel(f, piece.a, piece.b, choice.n);
    evaluations += static_cast<std::uint64_t>(choice.n);
    // (the denominator's share: nu |sin 2 phi| / (h^2 + nu sin^2 phi) <= min(sqrt(nu) / h,
    // 2 / tan u_near) times the node's 2 eps u_far)
    const double den_slope = tan_near > 0.0 ? std::min(root_nu / h, 2.0 / tan_near) : root_nu / h;
    const double noise =
        kEps * (48.0 + k * (16.0 + 8.0 * piece.tan_far) + 8.0 * log_ratio_far + 2.0 * u_far * den_slope);
    if (!std::isfinite(p.value) || !(choice.bound <= tol * std::max(p.l1, running * (piece.b - piece.a) / total_len)))
      return false;
    value += p.value;
    err += choice.bound + noise * p.l1;
    running = std::max(running, value);
  }
  // The ends' angles err by 3 eps |phi| each.
  const double ends = 3.0 * kEps * (std::fabs(phi1) * d_end(t1, s1) + std::fabs(phi2) * d_end(t2, s2));
  const double scale = s_ref * h * root_q;
  const double result = scale * value;
  const double s_ref_rel = kEps * (8.0 + 8.0 * k + 4.0 * std::max(0.0, log_upper(1.0 / s_ref)));
  const double result_err = scale * (err + ends) + (s_ref_rel + 8.0 * kEps) * result;
  if (!std::isfinite(result) || !std::isfinite(result_err) || result_err > std::max(rel_tol, 64 * kEps) * std::fabs(result))
    return false;
  out.value = result;
  out.abs_err = result_err;
  out.evaluations = evaluations;
  return true;
}

// A t's piece 0 < a < b <= pi/2 in the angle alpha (a fractional nu, or one whose closed form
// cancels) by one Gauss-Legendre panel with a proven bound (bounded_gauss.hpp), or false.
// The integrand K(alpha) = (1 + h^2 / (nu sin^2 alpha))^(-nu/2) (tail; near: 1 - K) is analytic
// where Re(1 + h^2 / (nu sin^2 alpha)) > 0 (principal branch), with |K| <= that real part to the
// power -nu/2. For alpha = x + i y, Re(1 / sin^2 alpha) = Re(sin^2 alpha) / |sin alpha|^4,
// Re(sin^2 alpha) = (1 - cos 2x cosh 2y) / 2 and |sin alpha|^2 = sin^2 x + sinh^2 y; on the
// rectangle holding the panel's Bernstein ellipse, x in [x0, x1] within (d, pi - d), |y| <= Y:
//     cos 2x cosh 2y <= cos 2d cosh 2Y (cos 2d >= 0) or cos 2d (cos 2d < 0),
//     sin^2 d <= |sin alpha|^2 <= sin^2 min(x1, pi/2) + sinh^2 Y,
// which bound the real part below. The singularities near alpha = 0 (r = infinity, a branch
// point for a fractional nu) call for pieces no longer than their distance from 0: the piece is
// cut at a / 2^k; each part's L1 norm is at least K at its small end times its length (K
// increases with alpha), which sizes its panel.
bool bounded_t_piece(double a, double b, double h, double nu, bool near, double tol, double noise, Contribution& out) {
  Contribution total;
  const auto k_of = [h, nu](double alpha) {
    const double r = h / std::sin(alpha);
    return std::exp(-0.5 * nu * std::log1p(r * r / nu));
  };
  // K at a panel's nodes at once: their sines, then the t's kernel, through libmvec.
  auto f = [&](const double* s, double* v, int n) {
    for (int i = 0; i < n; ++i) v[i] = s[i];
    sin_in_place(v, n);
    for (int i = 0; i < n; ++i) v[i] = square(h / v[i]);
    t_kernel_in_place(v, n, nu, near);
  };
  for (double hi = b; hi > a;) {
    const double lo = std::max(a, 0.5 * hi);
    const double mid = 0.5 * (lo + hi), half = 0.5 * (hi - lo);
    // An upper bound of log M on E_rho (choose_gauss_rule_log) from rigorous series bounds
    // (bounded_gauss.hpp): sinh^2 Y from sinh_upper, sin d from below and sin min(x1, pi/2) from above, cos 2d = 1 - 2 sin^2 d from above,
    // and the power through log_lower of its base (lowered by its rounding, which nu/2
    // magnifies); the near form's 1 + K by max(log K, 0) + log 2.
    const auto log_m = [&](int rung) {
      const BernsteinAxes& e = kGaussLadderAxes[rung];
      const double x0 = mid - half * e.along, x1 = mid + half * e.along, y = half * e.across;
      const double d = std::min(x0, kPi - x1);
      if (!(d > 0.0)) return std::numeric_limits<double>::infinity();
      const double sh = sinh_upper(y), sinh2 = sh * sh * (1.0 + 4 * kEps);
      const double s_lo = sin_lower(std::min(d, 0.5 * kPi)), s_lo2 = s_lo * s_lo * (1.0 - 4 * kEps);
      // (1 - cos 2d cosh 2Y) / 2 = sin^2 d - sinh^2 Y + 2 sin^2 d sinh^2 Y >= sin^2 d - sinh^2 Y
      // where cos 2d >= 0; (1 - cos 2d) / 2 = sin^2 d where it is below 0. From the small terms:
      // 1 - c2d cosh2y lost them to the rounding of its 1 on panels 1e-9 wide (a mean 1e-9
      // sigma from a line: every panel near it refused, and the fallback missed the feature).
      const double num = s_lo2 <= 0.5 ? s_lo2 - sinh2 : s_lo2;
      const double s_hi = sin_upper(std::min(x1, 0.5 * kPi));
      const double den = num >= 0.0 ? square(s_hi * s_hi + sinh2) : square(s_lo * s_lo);
      const double re = (1.0 + h * h / nu * num / den) * (1.0 - 1e-12);
      if (!(re > 0.0)) return std::numeric_limits<double>::infinity();
      const double log_k = -0.5 * nu * log_lower(re * (1.0 - 4 * kEps)) + 1e-12;
      return near ? std::max(log_k, 0.0) + 0.69314718055994531 + 1e-12 : log_k;
    };
    const double low = near ? -std::expm1(-0.5 * nu * std::log1p(square(h / std::sin(hi)) / nu)) : k_of(lo);
    GaussChoice choice = choose_gauss_rule_log(half, tol * low * (hi - lo), log_m);
    if (choice.n == 0) return false;
    const GaussPanel p = gauss_panel(f, lo, hi, choice.n);
    total.evaluations += static_cast<std::uint64_t>(choice.n);
    if (!std::isfinite(p.value) || !(choice.bound <= tol * p.l1)) return false;
    total.value += p.value;
    total.abs_err += choice.bound + noise * p.l1;
    hi = lo;
  }
  out = total;
  return true;
}

}  // namespace

Contribution family_segment(const Vec2& z1, const Vec2& z2, const ScatterFamily& family, bool near, double rel_tol) {
  Contribution total;
  const Vec2 d = z2 - z1;
  const double length = d.norm();
  if (!(length > 0.0)) return total;
  // Integrated from the end nearer the mean (the other way round it is the same integral with
  // the sign changed): that end's t = z . u is then right to a few eps of itself, and the far
  // end's t1 + length errs by eps of the length, small next to its own distance. With h from
  // the ends themselves (z1 x z2 = z1 x d without d's rounding, which is eps |z1|), each end's
  // angle atan2(t, h) is right to a few eps, as the adjacent edge's angle of the same vertex
  // is, so that the two agree. (Measured: with h from d and t from the first end, a mean 1e-8
  // sigma from a vertex put the sum 4e-10 off under a bound of 5e-15; the error went as
  // eps |z| / d.)
  if (z2.squaredNorm() < z1.squaredNorm()) {
    Contribution reversed = family_segment(z2, z1, family, near, rel_tol);
    reversed.value = -reversed.value;
    return reversed;
  }
  const Vec2 u = d / length;
  const double signed_h = accurate_cross(z1, z2) / length;
  const double h = std::fabs(signed_h);
  // A line through the mean: dtheta = 0 along it (the caller counts a jump at the mean).
  if (h == 0.0) return total;
  const double t1 = z1.dot(u), t2 = t1 + length;
  const double scale = (signed_h > 0.0 ? 1.0 : -1.0) * kOneDivTwoPi;
  if (family.kind() == FamilyKind::student_t && t_closed_form(t1, length, h, family.nu(), near, rel_tol, total)) {
    total.value *= scale;
    total.abs_err *= kOneDivTwoPi;
    return total;
  }
  if (family.kind() == FamilyKind::student_t) {
    const double r1 = z1.norm(), r2 = z2.norm();
    const double k1 = near ? family.cdf(r1) : family.survival(r1), k2 = near ? family.cdf(r2) : family.survival(r2);
    const double k_low = near ? 1.0 : std::min(k1, k2);  // (the near form needs none)
    // The angle form's rounding is about 128 eps of the angle swept, at most 1 / k_low times the
    // value: where that passes the tolerance, the direct form first; else it only where the
    // angle form fails.
    const bool direct_first = !near && k_low * rel_tol < 256.0 * kEps;
    const auto direct = [&] { return t_direct_form(t1, length, h, family.nu(), k1, k2, rel_tol, total); };
    if ((direct_first && direct()) || t_angle_form(t1, length, h, family.nu(), near, k_low, rel_tol, total) ||
        (!near && !direct_first && direct())) {
      total.abs_err += 3.0 * kEps * (k1 + k2);
      total.value *= scale;
      total.abs_err *= kOneDivTwoPi;
      return total;
    }
  }
  const ProfileTable* table = family.profile_table();
  std::vector<double> cuts{t1, t2, 0.0};
  std::vector<double> radii = family.kinks();
  if (!table) radii.push_back(1.0);  // the closed form needs no cut there
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
    Contribution closed;
    if (table && profile_closed_form(*table, lo, hi, h, near, rel_tol, closed)) {
      add(total, closed, 1.0);
      continue;
    }
    // The uniform in closed form: G(r) = r^2 / 4 inside its support r < 2, and r^2 dtheta =
    // h dt along the line, so the piece's integral of G dtheta is h (hi - lo) / 4 and of
    // S dtheta = (1 - G) dtheta the piece's angle less that; beyond the support G = 1, S = 0.
    // (Its quadrature in alpha missed the layer of width h at r = 2 when the mean lies within
    // h of the line: 4.7e-9 off under a bound of 5e-13 with the mean 1e-7 sigma from a vertex.)
    if (family.kind() == FamilyKind::uniform) {
      const double d_theta = std::atan2(h * (hi - lo), h * h + lo * hi), g_part = 0.25 * h * (hi - lo);
      const double mid = 0.5 * (lo + hi);
      Contribution c;
      if (h * h + mid * mid < 4.0) {
        c.value = near ? g_part : d_theta - g_part;
        c.abs_err = 4.0 * kEps * (d_theta + g_part);
      } else if (near) {
        c.value = d_theta;
        c.abs_err = 4.0 * kEps * d_theta;
      }  // else S = 0 beyond the support: exactly 0, no rounding

      c.evaluations = 1;
      add(total, c, 1.0);
      continue;
    }
    const double r_min = h / std::sin(alpha_hi);
    const double noise_r2 = near ? 0.0 : family_noise_r2(family, r_min);
    if (family.kind() == FamilyKind::student_t && alpha_lo > 0.0) {
      const double noise = 8 * kEps * (1.0 + std::max(0.5 * noise_r2, 1.0));
      Contribution c;
      if (bounded_t_piece(alpha_lo, alpha_hi, h, family.nu(), near, std::max({rel_tol, kMinQuadTolerance, noise}), noise, c)) {
        add(total, c, 1.0);
        continue;
      }
    }
    // Adaptive Gauss-Kronrod has no bound of its own: its first rule over the whole piece puts
    // no node within 1e-3 of its length of an end, and where the family's radius scale lies at
    // alpha ~ h near the small end (a line 1e-9 sigma from the mean, alpha from 1e-9 to pi/2)
    // the Kronrod and Gauss sums agree on the flat rest: 0.5 + 2.49e-10 with a bound of 1e-14
    // for 0.5 + 3.96e-10. Cut in halves from the top down to alpha_lo, as bounded_t_piece
    // does, so that every scale of r = h / sin alpha has pieces of its own size.
    for (double top = alpha_hi; top > alpha_lo;) {
      const double bottom = alpha_lo > 0.0 ? std::max(alpha_lo, 0.5 * top) : alpha_lo;
      const Contribution c = quadrature(integrand, bottom, top, rel_tol, noise_r2);
      add(total, c, 1.0);
      top = bottom;
    }
  }
  // Each edge places its ends on its own line: t1 = z1 . u and h carry an absolute rounding of
  // about 2 eps |z| each, so an end's angle atan2(t, h) may be off by up to about 3 eps, and the
  // adjacent edge computes the angle of the vertex they share apart from this one. The
  // integral moves by K(r) times that at each end (K = S, or G in the near form). Small, but on
  // a tiny region far out (p ~ 1e-8 from edges of 1e-4 each) it is what limits the result.
  const double r1 = z1.norm(), r2 = z2.norm();
  total.abs_err += 3.0 * kEps * (near ? family.cdf(r1) + family.cdf(r2) : family.survival(r1) + family.survival(r2));
  total.value *= scale;
  total.abs_err *= kOneDivTwoPi;
  return total;
}

}  // namespace strewn::detail
