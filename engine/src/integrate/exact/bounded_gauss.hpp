#ifndef STREWN_SRC_INTEGRATE_EXACT_BOUNDED_GAUSS_HPP
#define STREWN_SRC_INTEGRATE_EXACT_BOUNDED_GAUSS_HPP

// One-panel Gauss-Legendre rules with a proven error bound, for edge integrands that are
// analytic on a known neighbourhood of their piece (arc_tail.cpp's family arcs).
//
// The bound. Let f be analytic inside the Bernstein ellipse E_rho (rho > 1), the image of the
// circle |w| = rho under x = (w + 1/w) / 2, its semi-axes (rho + 1/rho) / 2 along [-1, 1] and
// (rho - 1/rho) / 2 across it, and |f| <= M there. Then the (n + 1)-point Gauss-Legendre rule
// I_n (exact for degree 2n + 1) satisfies
//     |integral from -1 to 1 of f - I_n(f)| <= (64 / 15) M rho^(-2n) / (rho^2 - 1)
// (L. N. Trefethen, "Is Gauss quadrature better than Clenshaw-Curtis?", SIAM Review 50(1),
// 2008, Theorem 4.5, whose I_n has n + 1 points; "Approximation Theory and Approximation
// Practice", SIAM 2013, ch. 19). So an m-point rule, m >= 2, errs by at most
// (64 / 15) M rho^(2 - 2m) / (rho^2 - 1). (The proof: f's Chebyshev coefficients are at most
// 2 M rho^(-k); the rule is exact below degree 2m and errs by at most 2 + 2 / (k^2 - 1) on T_k.
// With rho^(-2m) in place of rho^(2 - 2m) the bound would tend to 0 as rho grows for
// f = T_2m, which the m-point rule does not integrate exactly: bounded_gauss_test checks the
// bound against that case, where it is within a factor 1.5 of the true error.)
// On [a, b] the substitution s = m + h x (m the midpoint, h = (b - a) / 2) multiplies the bound
// by h, with E_rho scaled into the s-plane: within |Re s - m| <= h (rho + 1/rho) / 2 and
// |Im s| <= h (rho - 1/rho) / 2, the rectangle the callers bound f on.
//
// The choice. For a few rho (a geometric ladder), the caller's M(rho) (infinite where f is not
// analytic on E_rho, or no bound is known) gives the smallest n meeting a target; the smallest
// n over the ladder wins. Where no n up to kMaxBoundedNodes meets it, the caller falls back to
// adaptive quadrature. The bound covers the rule's truncation error only; rounding in f is the
// caller's to add.

#include <array>
#include <cmath>
#include <limits>

namespace strewn::detail {

inline constexpr int kMaxBoundedNodes = 48;

// The n-point Gauss-Legendre rule on [-1, 1]: nodes x[0..n) (descending) and weights w[0..n),
// by Newton's method on the three-term recurrence of the Legendre polynomials, from the
// starting values cos(pi (i - 1/4) / (n + 1/2)) (Abramowitz & Stegun 22.16.6; to about 1e-15).
struct GaussLegendre {
  int n = 0;
  double x[kMaxBoundedNodes] = {};
  double w[kMaxBoundedNodes] = {};
};

// P_n'(x) for |x| < 1 by the three-term recurrence (P_0 = 1, P_1 = x,
// k P_k = (2k - 1) x P_(k-1) - (k - 1) P_(k-2)), with P_n(x) in *p.
inline double legendre_slope(int n, double x, double* p) {
  double p0 = 1.0, p1 = x;
  for (int k = 2; k <= n; ++k) {
    const double p2 = ((2.0 * k - 1.0) * x * p1 - (k - 1.0) * p0) / k;
    p0 = p1;
    p1 = p2;
  }
  *p = p1;
  return n * (x * p1 - p0) / (x * x - 1.0);
}

inline GaussLegendre make_gauss_legendre(int n) {
  GaussLegendre g;
  g.n = n;
  for (int i = 0; i < n; ++i) {
    double x = std::cos(3.14159265358979323846 * (i + 0.75) / (n + 0.5)), p = 0.0;
    for (int it = 0; it < 100; ++it) {
      const double slope = legendre_slope(n, x, &p), dx = p / slope;
      x -= dx;
      if (std::fabs(dx) <= 1e-16) break;
    }
    // The weight from the slope at the converged node.
    const double slope = legendre_slope(n, x, &p);
    g.x[i] = x;
    g.w[i] = 2.0 / ((1.0 - x * x) * slope * slope);
  }
  return g;
}

// The rules for n = 1 .. kMaxBoundedNodes, built once.
inline const GaussLegendre& gauss_legendre(int n) {
  static const std::array<GaussLegendre, kMaxBoundedNodes + 1> rules = [] {
    std::array<GaussLegendre, kMaxBoundedNodes + 1> r{};
    for (int k = 1; k <= kMaxBoundedNodes; ++k) r[k] = make_gauss_legendre(k);
    return r;
  }();
  return rules[n];
}

// Trefethen's bound for the n-point rule (n >= 2) on a piece of half-length `half`, f analytic
// with |f| <= m inside the scaled E_rho.
inline double gauss_error_bound(int n, double rho, double m, double half) {
  return (64.0 / 15.0) * m * std::pow(rho, 2.0 - 2.0 * n) / (rho * rho - 1.0) * half;
}

struct GaussChoice {
  int n = 0;  // 0: no rule on the ladder meets the target
  double rho = 0.0;
  double bound = std::numeric_limits<double>::infinity();
};

// The semi-axes of E_rho over [-1, 1]: along (rho + 1/rho) / 2, across (rho - 1/rho) / 2.
struct BernsteinAxes {
  double along = 1.0, across = 0.0;
};
inline BernsteinAxes bernstein_axes(double rho) { return {0.5 * (rho + 1.0 / rho), 0.5 * (rho - 1.0 / rho)}; }

// The smallest n <= max_n whose bound is at most `target` over the ladder of rho;
// m_of_rho(rho) returns M on the scaled E_rho (or infinity).
template <class MBound>
GaussChoice choose_gauss_rule(double half, double target, MBound m_of_rho, int max_n = kMaxBoundedNodes) {
  static constexpr double kLadder[] = {1.5, 2.2, 3.2, 4.8, 7.0, 11.0};
  static const auto kLog = [] {
    std::array<double, 6> l{};
    for (int i = 0; i < 6; ++i) l[i] = std::log(kLadder[i]);
    return l;
  }();
  GaussChoice best;
  double best_m = 0.0;
  if (!(half > 0.0)) return best;
  for (int i = 0; i < 6; ++i) {
    const double rho = kLadder[i];
    const double m = m_of_rho(rho);
    if (!(m < std::numeric_limits<double>::infinity())) break;  // larger rho only worse
    if (m == 0.0) return {1, rho, 0.0};  // f = 0 on the piece
    if (!(target > 0.0)) return best;
    const double c = (64.0 / 15.0) * m * half / ((rho * rho - 1.0) * target);
    const int n = 1 + (c <= 1.0 ? 1 : static_cast<int>(std::ceil(std::log(c) / (2.0 * kLog[i]))));
    if (best.n > 0 && n > best.n) break;  // past the best rho (n falls, then rises, with rho)
    if (n <= max_n && (best.n == 0 || n < best.n)) {
      best.n = n;
      best.rho = rho;
      best_m = m;
    }
  }
  if (best.n > 0) best.bound = gauss_error_bound(best.n, best.rho, best_m, half);
  return best;
}

// The n-point rule of a batch integrand f(s, v, k) (k values at once, k <= 31) on [a, b]:
// the value (negated for b < a, as for the adaptive driver) and the rule's L1 norm
// sum of w |f| (for judging a relative tolerance).
struct GaussPanel {
  double value = 0.0, l1 = 0.0;
};
template <class Batch>
GaussPanel gauss_panel(Batch& f, double a, double b, int n) {
  const GaussLegendre& g = gauss_legendre(n);
  const double mid = 0.5 * (a + b), half = 0.5 * std::fabs(b - a);
  GaussPanel out;
  double s[31], v[31];
  for (int start = 0; start < n; start += 31) {
    const int k = n - start < 31 ? n - start : 31;
    for (int i = 0; i < k; ++i) s[i] = mid + half * g.x[start + i];
    f(s, v, k);
    for (int i = 0; i < k; ++i) {
      out.value += g.w[start + i] * v[i];
      out.l1 += g.w[start + i] * std::fabs(v[i]);
    }
  }
  out.value *= (b < a ? -half : half);
  out.l1 *= half;
  return out;
}

}  // namespace strewn::detail

#endif
