#ifndef STREWN_SRC_INTEGRATE_EXACT_GAUSS_KRONROD_HPP
#define STREWN_SRC_INTEGRATE_EXACT_GAUSS_KRONROD_HPP

// The adaptive Gauss-Kronrod driver shared by the edge integrals (segment_tail.cpp,
// arc_tail.cpp, edge_near.cpp), and their small common helpers.

#include <boost/math/quadrature/gauss.hpp>
#include <boost/math/quadrature/gauss_kronrod.hpp>
#include <algorithm>
#include <cmath>
#include <cstdint>
#include <limits>
#include <vector>

#include "integrate/exact/edge_tail.hpp"
#include "integrate/exact/periodic_ellipse_tail.hpp"
#include "strewn/constants.hpp"

namespace strewn::detail {

using GK = boost::math::quadrature::gauss_kronrod<double, 31>;

// Adaptive Gauss-Kronrod of f over [a, b]. `r2_min`, the smallest squared radius on the path,
// sets the noise floor: exp(-r^2/2) carries a relative rounding error of about eps r^2/2, and
// since r^2 exp(-r^2/2) decreases beyond r^2 = 2, the integral's rounding is at most
// eps (1 + max(r2_min/2, 1)) times its L1 norm. A tolerance below that would never be met.
struct Piece {
  double a, b, value, err, l1;
  bool operator<(const Piece& o) const { return err < o.err; }
};

// Boost's 31-point Gauss-Kronrod rule on one interval, its abscissae and weights from
// boost::math::quadrature::gauss_kronrod<double, 31> and gauss<double, 15>, combined as Boost's
// integrate_non_adaptive_m1_1 does (value, |Kronrod - Gauss| error, L1 norm), but with the 31
// integrand values asked for at once, so that arcs can take their sines, cosines and
// exponentials in batches. Boost 1.74's own version returns the error without the interval's
// scale (b - a) / 2; here every output is scaled. An interval with b < a is integrated over
// [b, a] and negated, as Boost does.
template <class Batch>
inline Piece rule(Batch& f, double a, double b) {
  using Gauss = boost::math::quadrature::gauss<double, 15>;
  static const auto& x = GK::abscissa();
  static const auto& wk = GK::weights();
  static const auto& wg = Gauss::weights();
  const double lo = std::min(a, b), hi = std::max(a, b);
  const double mid = 0.5 * (lo + hi), half = 0.5 * (hi - lo);
  double s[31], v[31];
  s[0] = mid;
  for (int i = 1; i < 16; ++i) {
    s[2 * i - 1] = mid + half * x[i];
    s[2 * i] = mid - half * x[i];
  }
  f(s, v, 31);
  double kronrod = v[0] * wk[0], gauss = v[0] * wg[0], l1 = std::fabs(kronrod);
  for (int i = 1; i < 16; ++i) {
    const double fp = v[2 * i - 1], fm = v[2 * i];
    kronrod += (fp + fm) * wk[i];
    l1 += (std::fabs(fp) + std::fabs(fm)) * wk[i];
    if (i % 2 == 0) gauss += (fp + fm) * wg[i / 2];
  }
  const double err = std::max(std::fabs(kronrod - gauss), std::fabs(kronrod) * 2 * kEps);
  const double sign = b < a ? -1.0 : 1.0;
  return Piece{a, b, sign * half * kronrod, half * err, half * l1};
}

// A scalar integrand as a batch one.
template <class F>
auto batched(F& f) {
  return [&f](const double* s, double* v, int n) {
    for (int i = 0; i < n; ++i) v[i] = f(s[i]);
  };
}

// Globally adaptive Gauss-Kronrod (the QUADPACK QAG strategy): split the interval with the
// largest error estimate until the total meets abs_tol or kMaxPieces intervals are in use.
// Boost's own recursive driver measures its tolerance against the integral, which never
// converges when the integrand changes sign and the integral cancels (an arc seen from a mean
// outside it); here the tolerance is absolute, chosen relative to the L1 norm.
inline constexpr std::size_t kMaxPieces = 4000;

// f(s, v, n) fills v[i] with the integrand at s[i]; quadrature() takes scalar integrands.
template <class Batch>
Contribution batch_quadrature(Batch f, double a, double b, double rel_tol, double r2_min) {
  Contribution c;
  std::uint64_t calls = 0;
  auto counted = [&](const double* s, double* v, int n) {
    calls += static_cast<std::uint64_t>(n);
    f(s, v, n);
  };
  const double noise = 8 * kEps * (1.0 + std::max(0.5 * r2_min, 1.0));
  const double tol = std::max({rel_tol, kMinQuadTolerance, noise});
  std::vector<Piece> heap{rule(counted, a, b)};
  const double abs_tol = tol * heap.front().l1;
  double total_err = heap.front().err;
  while (total_err > abs_tol && heap.size() < kMaxPieces) {
    std::pop_heap(heap.begin(), heap.end());
    const Piece worst = heap.back();
    heap.pop_back();
    const double mid = 0.5 * (worst.a + worst.b);
    if (mid <= std::min(worst.a, worst.b) || mid >= std::max(worst.a, worst.b)) {
      heap.push_back(worst);  // cannot split further in double precision
      std::push_heap(heap.begin(), heap.end());
      break;
    }
    const Piece left = rule(counted, worst.a, mid), right = rule(counted, mid, worst.b);
    total_err += left.err + right.err - worst.err;
    heap.push_back(left);
    std::push_heap(heap.begin(), heap.end());
    heap.push_back(right);
    std::push_heap(heap.begin(), heap.end());
  }
  double value = 0.0, err = 0.0, l1 = 0.0;
  for (const Piece& p : heap) {
    value += p.value;
    err += p.err;
    l1 += p.l1;
  }
  c.value = value;
  c.abs_err = err + noise * l1;
  // Whether the request is met is judged on the final bound; here only failures count.
  c.converged = std::isfinite(value) && std::isfinite(err);
  c.evaluations = calls;
  return c;
}

template <class F>
Contribution quadrature(F f, double a, double b, double rel_tol, double r2_min) {
  return batch_quadrature(batched(f), a, b, rel_tol, r2_min);
}

inline double square(double x) { return x * x; }

inline void add(Contribution& total, const Contribution& piece, double sign) {
  total.value += sign * piece.value;
  total.abs_err += piece.abs_err;
  total.evaluations += piece.evaluations;
  total.converged = total.converged && piece.converged;
}

}  // namespace strewn::detail

#endif
