#ifndef STREWN_SRC_CORE_T_POWER_HPP
#define STREWN_SRC_CORE_T_POWER_HPP

// The Student-t's radial powers for a small whole nu without logarithms or exponentials. With
// w = nu / (nu + r^2) (<= 1) and g = 1 - w = r^2 / (nu + r^2), each formed with one rounding
// from the squared radius,
//     S = (1 + r^2/nu)^(-nu/2) = w^(nu/2),   G = 1 - S = g (1 + w + ... + w^(k-1)) + w^k g / (1 + sqrt w)
// (k = floor(nu/2); the last term for an odd nu only: 1 - sqrt w = g / (1 + sqrt w)), and the
// density's power w^(nu/2 + 1) alike: products, a sum of positive terms and at most one square
// root. For nu <= kTWholeMaxNu (k <= 4) the arithmetic errs by at most about 6 eps relative
// (w and g 1 eps each, each power adding its factor's error and half an eps a product), within
// the 8 eps that exp(-nu/2 log1p(r^2/nu)) is allowed in the exact method's noise floor
// (arc_tail.cpp, family_noise_r2) and far cheaper than log1p and exp.
#include <cmath>

namespace strewn::detail {

inline constexpr double kTWholeMaxNu = 8.0;

// Whether nu is a whole number in [1, kTWholeMaxNu] (then twice_k = nu as an int).
inline bool t_whole_nu(double nu, int* twice_k) {
  const int m = static_cast<int>(nu);
  *twice_k = m;
  return m >= 1 && static_cast<double>(m) == nu && nu <= kTWholeMaxNu;
}

// w^(m/2) for a whole m >= 0 (m <= 2 kTWholeMaxNu + 2).
inline double t_half_power(double w, int m) {
  double p = (m & 1) ? std::sqrt(w) : 1.0;
  for (int i = 0; i < m / 2; ++i) p *= w;
  return p;
}

// 1 - w^(m/2) from w and g = 1 - w, without cancellation.
inline double t_half_power_complement(double w, double g, int m) {
  double sum = 0.0, power = 1.0;
  for (int i = 0; i < m / 2; ++i) {
    sum += power;
    power *= w;
  }
  double c = g * sum;
  if (m & 1) c += power * g / (1.0 + std::sqrt(w));
  return c;
}

}  // namespace strewn::detail

#endif
