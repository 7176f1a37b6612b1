#ifndef STREWN_FIT_SAMPLE_QUANTILE_HPP
#define STREWN_FIT_SAMPLE_QUANTILE_HPP

// The q quantile of a sample by linear interpolation between order statistics at position
// q (n - 1) (Hyndman & Fan 1996, type 7): the bootstrap percentiles of the fits.
#include <algorithm>
#include <cmath>
#include <vector>

namespace strewn::detail {

inline double sample_quantile(std::vector<double> v, double q) {
  std::sort(v.begin(), v.end());
  const double pos = q * static_cast<double>(v.size() - 1);
  const auto i = static_cast<std::size_t>(std::floor(pos));
  const double f = pos - static_cast<double>(i);
  return i + 1 < v.size() ? v[i] * (1 - f) + v[i + 1] * f : v[i];
}

}  // namespace strewn::detail

#endif
