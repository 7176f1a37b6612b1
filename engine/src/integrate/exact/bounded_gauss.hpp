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
#include <atomic>
#include <cmath>
#include <cstdint>
#include <cstring>
#include <limits>
#include <mutex>

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

// The rule of n nodes, 1 <= n <= kMaxBoundedNodes, each built at its first use (all 48 at once
// cost about 2.9 million instructions, a millisecond of a one-shot command, most of it for
// rules no panel takes): a flag per size, published with release and read with acquire, the
// building under a lock.
inline const GaussLegendre& gauss_legendre(int n) {
  static std::array<GaussLegendre, kMaxBoundedNodes + 1> rules{};
  static std::array<std::atomic<bool>, kMaxBoundedNodes + 1> ready{};
  static std::mutex building;
  if (!ready[n].load(std::memory_order_acquire)) {
    const std::lock_guard<std::mutex> lock(building);
    if (!ready[n].load(std::memory_order_relaxed)) {
      rules[n] = make_gauss_legendre(n);
      ready[n].store(true, std::memory_order_release);
    }
  }
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
inline constexpr BernsteinAxes bernstein_axes(double rho) { return {0.5 * (rho + 1.0 / rho), 0.5 * (rho - 1.0 / rho)}; }

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

// Rigorous bounds of elementary functions by truncated series with their remainders, for the
// choice of a panel's size: a rule is chosen at several rho per piece, and the bounds on M(rho)
// need cosh, sin and log there, which from libm cost more than the panel's own nodes. Each is
// within about 1e-7 relative of the function (bounded_gauss_test checks them against long
// double libm on dense grids), with a margin for its own rounding.
//
// log: x = m 2^e with m in [1/sqrt 2, sqrt 2), log m = 2 atanh z, z = (m - 1) / (m + 1), |z| <= 0.172,
// whose series 2 (z + z^3/3 + z^5/5 + z^7/7 + ...) leaves a remainder of the sign of z and at most
// 2 |z|^9 / (9 (1 - z^2)) (the tail's terms are below those of a geometric series in z^2).
inline double log_series_part(double x, double* remainder) {
  int e = 0;
  double m = 0.0;
  std::uint64_t bits = 0;
  std::memcpy(&bits, &x, sizeof bits);
  const int biased = static_cast<int>((bits >> 52) & 0x7ff);
  if (biased > 0 && biased < 0x7ff) {  // normal: frexp by its bits (frexp is a library call)
    e = biased - 1022;
    bits = (bits & ((std::uint64_t{1} << 52) - 1)) | (std::uint64_t{1022} << 52);
    std::memcpy(&m, &bits, sizeof m);  // m in [1/2, 1)
  } else {
    m = std::frexp(x, &e);
  }
  if (m < 0.70710678118654752) {
    m *= 2.0;
    --e;
  }
  const double z = (m - 1.0) / (m + 1.0), z2 = z * z;
  const double s = 2.0 * z * (1.0 + z2 * (1.0 / 3.0 + z2 * (1.0 / 5.0 + z2 * (1.0 / 7.0))));
  *remainder = 2.0 * std::fabs(z) * z2 * z2 * z2 * z2 / (9.0 * (1.0 - z2)) + 1e-15;  // + rounding
  return e * 0.69314718055994531 + s;
}
// log x <= log_upper(x) and log x >= log_lower(x), for x > 0 finite.
inline double log_upper(double x) {
  if (!(x > 0.0 && x < std::numeric_limits<double>::infinity()))
    return x == 0.0 ? -std::numeric_limits<double>::infinity() : std::numeric_limits<double>::infinity();
  double rem = 0.0;
  const double v = log_series_part(x, &rem);
  return v + rem + 4e-16 * std::fabs(v);
}
inline double log_lower(double x) {
  if (!(x > 0.0 && x < std::numeric_limits<double>::infinity()))
    return x == std::numeric_limits<double>::infinity() ? x : -std::numeric_limits<double>::infinity();
  double rem = 0.0;
  const double v = log_series_part(x, &rem);
  return v - rem - 4e-16 * std::fabs(v);
}
// cosh t <= cosh_upper(t), t >= 0: below t = 2 by 1 + t^2/2 + t^4/24 + t^6/720 over
// (1 - t^8/8!), the remainder of the even series being at most t^8/8! cosh t; beyond, from exp.
inline double cosh_upper(double t) {
  if (t < 2.0) {
    const double t2 = t * t;
    const double p = 1.0 + t2 * (0.5 + t2 * (1.0 / 24.0 + t2 * (1.0 / 720.0)));
    return p / (1.0 - t2 * t2 * t2 * t2 / 40320.0) * (1.0 + 1e-15);
  }
  const double e = std::exp(t);
  return 0.5 * (e + 1.0 / e) * (1.0 + 1e-15);
}
// sinh t <= sinh_upper(t), t >= 0: below t = 2 by its odd series to t^7/7! plus the remainder,
// sum over k >= 4 of t^(2k+1)/(2k+1)! <= (t^9/9!) / (1 - t^2/110) (each term at most t^2/110
// of the one before), at most 1.04 t^9/9! there; beyond, from exp. (cosh_upper(t)^2 - 1 keeps
// only the absolute rounding of its 1: sinh^2 of 1e-9 came out 2e-15, where it is 1e-18, and
// the bounds built on it failed on every panel near a mean 1e-9 sigma from a line.)
inline double sinh_upper(double t) {
  if (t < 2.0) {
    const double t2 = t * t;
    return t * (1.0 + t2 * (1.0 / 6.0 + t2 * (1.0 / 120.0 + t2 * (1.0 / 5040.0 + t2 * (1.04 / 362880.0))))) *
           (1.0 + 1e-15);
  }
  const double e = std::exp(t);
  return 0.5 * (e - 1.0 / e) * (1.0 + 1e-15);
}
// sin x between sin_lower(x) and sin_upper(x) for 0 <= x <= pi/2: sin's series alternates with
// terms that fall from the first (x^2 < 20 there), so a sum that stops after a negative term
// is below sin x and one that stops after a positive term above it.
inline double sin_lower(double x) {
  const double x2 = x * x;
  return x * (1.0 - x2 * (1.0 / 6.0 - x2 * (1.0 / 120.0 - x2 * (1.0 / 5040.0)))) * (1.0 - 1e-15);
}
inline double sin_upper(double x) {
  const double x2 = x * x;
  return x * (1.0 - x2 * (1.0 / 6.0 - x2 * (1.0 / 120.0 - x2 * (1.0 / 5040.0 - x2 * (1.0 / 362880.0))))) *
         (1.0 + 1e-15);
}

// The ladder of rho, shared by both choices below, and its Bernstein ellipses' semi-axes.
inline constexpr double kGaussLadder[] = {1.5, 2.2, 3.2, 4.8, 7.0, 11.0};
inline constexpr int kGaussRungs = 6;
inline constexpr BernsteinAxes kGaussLadderAxes[] = {bernstein_axes(1.5), bernstein_axes(2.2), bernstein_axes(3.2),
                                                     bernstein_axes(4.8), bernstein_axes(7.0), bernstein_axes(11.0)};

// choose_gauss_rule with the caller's bound as an upper bound of log M: the rule's size from
// log-domain comparisons, n = 1 + max(1, ceil(log((64/15) M half / ((rho^2 - 1) target)) /
// (2 log rho))), so that no rung costs a logarithm or a power; the bound of the chosen rule is
// one exponential (within 1e-12 relative, which it adds). log_m_of_rho(rung) returns the upper
// bound of log M on E_rho for rho = kGaussLadder[rung] (+infinity where none, -infinity where
// f = 0).
template <class LogMBound>
GaussChoice choose_gauss_rule_log(double half, double target, LogMBound log_m_of_rho, int max_n = kMaxBoundedNodes) {
  struct Rung {
    double log_c = 0.0, inv_two_log_rho = 0.0, two_log_rho = 0.0;
  };
  static const auto kRungs = [] {
    std::array<Rung, kGaussRungs> r{};
    for (int i = 0; i < kGaussRungs; ++i) {
      const double rho = kGaussLadder[i];
      r[i].log_c = std::log((64.0 / 15.0) / (rho * rho - 1.0));
      r[i].two_log_rho = 2.0 * std::log(rho);
      r[i].inv_two_log_rho = 1.0 / r[i].two_log_rho;
    }
    return r;
  }();
  constexpr double kInf = std::numeric_limits<double>::infinity();
  GaussChoice best;
  double best_log_m = 0.0;
  if (!(half > 0.0)) return best;
  // (series, not libm: log_half from above, as the bound below takes it; the target's only
  // sizes the rule, whose bound is then checked)
  const double log_half = log_upper(half);
  double unused = 0.0;
  const double log_ratio =
      !(target > 0.0) ? kInf : target < kInf ? log_half - log_series_part(target, &unused) : -kInf;
  int best_rung = -1;
  for (int i = 0; i < kGaussRungs; ++i) {
    const double lm = log_m_of_rho(i);
    if (!(lm < kInf)) break;  // larger rho only worse
    if (lm == -kInf) return {1, kGaussLadder[i], 0.0};  // f = 0 on the piece
    if (!(target > 0.0)) return best;
    const double c = kRungs[i].log_c + lm + log_ratio;
    // n = 1 + max(1, ceil(c / (2 log rho))), the ceiling by a conversion (std::ceil is a
    // library call without SSE4.1)
    const double steps = c <= 0.0 ? 1.0 : c * kRungs[i].inv_two_log_rho;
    int whole = steps < max_n ? static_cast<int>(steps) : max_n;
    if (whole < steps) ++whole;
    const int n = whole < max_n ? 1 + std::max(1, whole) : max_n + 1;
    if (best.n > 0 && n > best.n) break;  // past the best rho (n falls, then rises, with rho)
    if (n <= max_n && (best.n == 0 || n < best.n)) {
      best.n = n;
      best.rho = kGaussLadder[i];
      best_log_m = lm;
      best_rung = i;
    }
  }
  if (best.n > 0)
    best.bound = std::exp(kRungs[best_rung].log_c + best_log_m + log_half - (best.n - 1) * kRungs[best_rung].two_log_rho) *
                 (1.0 + 1e-12);
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
