#ifndef STREWN_FIT_KOLMOGOROV_HPP
#define STREWN_FIT_KOLMOGOROV_HPP

// The Kolmogorov-Smirnov test's p-value for the statistic d of n points: the goodness-of-fit
// checks of fit_normal and of the drop's fitted mixture.
#include <algorithm>
#include <cmath>
#include <cstddef>

namespace strewn::detail {

// Kolmogorov's limiting distribution, P(K > x) = 2 sum_k (-1)^(k-1) exp(-2 k^2 x^2)
// (Kolmogorov 1933), with Stephens' (1970) factor sqrt(n) + 0.12 + 0.11 / sqrt(n) on D.
inline double kolmogorov_p(double d, std::size_t n) {
  const double rn = std::sqrt(static_cast<double>(n));
  const double x = (rn + 0.12 + 0.11 / rn) * d;
  if (x < 0.2) return 1.0;
  double sum = 0.0;
  for (int k = 1; k <= 100; ++k) {
    const double term = std::exp(-2.0 * k * k * x * x);
    sum += (k % 2 == 1 ? term : -term);
    if (term < 1e-17) break;
  }
  return std::clamp(2.0 * sum, 0.0, 1.0);
}

}  // namespace strewn::detail

#endif
