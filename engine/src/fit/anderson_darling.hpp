#ifndef STREWN_FIT_ANDERSON_DARLING_HPP
#define STREWN_FIT_ANDERSON_DARLING_HPP

// The Anderson-Darling test of normality with the mean and variance estimated (Stephens' case 3),
// for a sample of values, e.g. impacts projected on one principal axis of their fitted spread.
//
//   A^2 = -n - (1/n) sum_i (2i - 1) [ln F(y_(i)) + ln(1 - F(y_(n+1-i)))],
//   y = (x - mean) / s (s with divisor n - 1), F the standard normal CDF,
//
// and its p-value from the modified statistic A* = A^2 (1 + 0.75/n + 2.25/n^2) by the formulas
// of D'Agostino & Stephens (1986), "Goodness-of-Fit Techniques", Table 4.9. Checked against
// scipy.stats.anderson (the statistic and its 1% critical value, 1.035 for A*).

#include <algorithm>
#include <cmath>
#include <vector>

#include "strewn/constants.hpp"

namespace strewn::detail {

struct AndersonDarling {
  double a2 = 0.0;       // A^2
  double p_value = 1.0;  // from A*
};

inline AndersonDarling anderson_darling_normal(std::vector<double> x) {
  AndersonDarling r;
  const std::size_t n = x.size();
  if (n < 3) return r;
  double mean = 0.0;
  for (double v : x) mean += v;
  mean /= static_cast<double>(n);
  double ss = 0.0;
  for (double v : x) ss += (v - mean) * (v - mean);
  const double s = std::sqrt(ss / static_cast<double>(n - 1));
  if (!(s > 0.0)) return r;
  std::sort(x.begin(), x.end());
  // ln F(y) and ln(1 - F(y)) = ln F(-y) from erfc, accurate in both tails; below y = -30 (where
  // erfc nears its underflow) the leading term of the Mills ratio, whose relative error there is
  // under 1/y^2 = 1e-3 of a term that is itself about -450.
  auto log_cdf = [](double y) {
    if (y < -30.0) return -0.5 * y * y - std::log(-y) - 0.5 * std::log(2.0 * kPi);
    return std::log(0.5 * std::erfc(-y / 1.4142135623730951));
  };
  double sum = 0.0;
  for (std::size_t i = 0; i < n; ++i) {
    const double lo = (x[i] - mean) / s, hi = (x[n - 1 - i] - mean) / s;
    sum += (2.0 * static_cast<double>(i) + 1.0) * (log_cdf(lo) + log_cdf(-hi));
  }
  const double nn = static_cast<double>(n);
  r.a2 = -nn - sum / nn;
  const double a = r.a2 * (1.0 + 0.75 / nn + 2.25 / (nn * nn));
  if (a >= 0.6) r.p_value = std::exp(1.2937 - 5.709 * a + 0.0186 * a * a);
  else if (a >= 0.34) r.p_value = std::exp(0.9177 - 4.279 * a - 1.38 * a * a);
  else if (a >= 0.2) r.p_value = 1.0 - std::exp(-8.318 + 42.796 * a - 59.938 * a * a);
  else r.p_value = 1.0 - std::exp(-13.436 + 101.14 * a - 223.73 * a * a);
  r.p_value = std::isfinite(a) ? std::clamp(r.p_value, 0.0, 1.0) : 0.0;
  return r;
}

}  // namespace strewn::detail

#endif
