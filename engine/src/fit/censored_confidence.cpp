// CensoredConfidence: the exact confidence distribution of sigma from censored radii, by
// inverting the test on the maximum-likelihood estimate over seeded reference samples.
#include <algorithm>
#include <cmath>
#include <limits>
#include <random>

#include "strewn/error.hpp"
#include "strewn/fit.hpp"

namespace strewn {

CensoredConfidence::CensoredConfidence(std::uint64_t measured, std::uint64_t outside, double radius, double sigma_hat,
                                       std::uint64_t seed, int reference)
    : sigma_hat_(sigma_hat) {
  if (measured == 0) throw input_error("censored fit: at least one measured impact is needed");
  if (!(radius > 0.0 && std::isfinite(radius) && sigma_hat > 0.0 && std::isfinite(sigma_hat)))
    throw input_error("censored fit: the radius and sigma must be positive numbers");
  if (reference < 100) throw input_error("censored confidence: at least 100 reference samples are needed");
  const std::uint64_t n = measured + outside;
  const double a2 = radius * radius, obs = sigma_hat * sigma_hat;
  std::mt19937_64 rng(seed);
  std::exponential_distribution<double> exp1(1.0);
  std::vector<double> e(n), prefix(n + 1);
  const double inf = std::numeric_limits<double>::infinity();
  for (int j = 0; j < reference; ++j) {
    for (double& x : e) x = exp1(rng);
    std::sort(e.begin(), e.end());
    prefix[0] = 0.0;
    for (std::uint64_t k = 0; k < n; ++k) prefix[k + 1] = prefix[k] + e[k];
    // With sigma, an impact is measured when 2 sigma^2 E <= a^2: k(sigma) impacts for sigma in
    // (s_{k+1}, s_k], s_k = a / sqrt(2 E_(k)), and the estimate there is
    // theta(sigma) = sigma^2 P_k / k + (n - k) a^2 / (2 k) (P_k the sum of the k smallest E):
    // rising in sigma within each piece and jumping up where k drops (the numerator is
    // continuous, the divisor falls). So it crosses theta_obs once, below s_1 or never.
    const auto s = [&](std::uint64_t k) { return k > n ? 0.0 : radius / std::sqrt(2.0 * e[k - 1]); };
    const double end = s(1);
    double crossing = inf;
    for (std::uint64_t k = n; k >= 1; --k) {
      const double kk = static_cast<double>(k), rest = static_cast<double>(n - k) * a2 / 2.0;
      const double top = s(k) * s(k) * prefix[k] / kk + rest / kk;
      if (top >= obs) {
        const double num = kk * obs - rest;
        const double root = num > 0.0 ? std::sqrt(num / prefix[k]) : 0.0;
        crossing = std::max(s(k + 1), root);
        break;
      }
    }
    end_.push_back(end);
    if (crossing < inf) {
      crossing_.push_back(crossing);
      crossing_end_.push_back(end);
    }
  }
  std::sort(crossing_.begin(), crossing_.end());
  std::sort(crossing_end_.begin(), crossing_end_.end());
  std::sort(end_.begin(), end_.end());
}

double CensoredConfidence::level(double sigma) const {
  // Among the samples with an impact measured at sigma (sigma <= end), the share whose estimate
  // exceeds theta_obs (crossing < sigma); a crossing always lies below its sample's end.
  const auto below = [sigma](const std::vector<double>& v) {
    return static_cast<double>(std::lower_bound(v.begin(), v.end(), sigma) - v.begin());
  };
  const double live = static_cast<double>(end_.size()) - below(end_);
  if (live <= 0.0) return 1.0;
  return std::clamp((below(crossing_) - below(crossing_end_)) / live, 0.0, 1.0);
}

double CensoredConfidence::quantile(double u) const {
  if (!(u > 0.0 && u < 1.0)) throw input_error("censored confidence: the level must be in (0, 1)");
  double lo = sigma_hat_, hi = sigma_hat_;
  for (int i = 0; i < 200 && level(lo) >= u; ++i) lo /= 2.0;
  for (int i = 0; i < 200 && level(hi) < u; ++i) hi *= 2.0;
  // inf { sigma : H(sigma) >= u }, H a step function: bisection in log sigma to 1e-13.
  while (hi / lo - 1.0 > 1e-13) {
    const double mid = std::sqrt(lo * hi);
    if (!(mid > lo && mid < hi)) break;
    (level(mid) >= u ? hi : lo) = mid;
  }
  return hi;
}

}  // namespace strewn
