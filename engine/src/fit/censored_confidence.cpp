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
  // With one measured impact, as sigma grows the reference samples' one measured impact lies
  // uniformly in the disk (r^2 uniform on [0, a^2]) and the estimate exceeds theta_obs when it
  // lies beyond the observed one: H(inf) = 1 - r_obs^2 / a^2, r_obs^2 = 2 theta_obs - outside a^2.
  // With two or more, the estimate at least (n - 1) a^2 / 2 exceeds theta_obs <= n a^2 / (2 m).
  if (measured == 1)
    h_infinity_ = std::clamp(1.0 - (2.0 * obs - static_cast<double>(outside) * a2) / a2, 0.0, 1.0);
  std::mt19937_64 rng(seed);
  std::exponential_distribution<double> exp1(1.0);
  const double inf = std::numeric_limits<double>::infinity();
  const double nn = static_cast<double>(n);
  for (int j = 0; j < reference; ++j) {
    // With sigma, an impact is measured when 2 sigma^2 E <= a^2: k(sigma) impacts for sigma in
    // (s_{k+1}, s_k], s_k = a / sqrt(2 E_(k)), and the estimate there is
    // theta(sigma) = sigma^2 P_k / k + (n - k) a^2 / (2 k) (P_k the sum of the k smallest E):
    // rising in sigma within each piece and jumping up where k drops (the numerator is
    // continuous, the divisor falls). So it crosses theta_obs once, below s_1 or never, in the
    // piece of the largest k whose top, theta(s_k), reaches it; the tops fall as k grows.
    // The order statistics come one at a time by Renyi's (1953) representation,
    // E_(k) = E_(k-1) + X_k / (n - k + 1) with X_k independent Exp(1), and the scan stops at the
    // first top below theta_obs: work in the crossing's k, not n. (All n sorted took 29 s at
    // 1e5 impacts beyond the radius and failed to allocate at 1e12.)
    double e_k = 0.0, prefix = 0.0, end = 0.0, crossing = inf;
    std::uint64_t found = 0;  // the largest k whose top reaches theta_obs (0: none)
    double s_next = 0.0;      // s_{found + 1} (0 when found = n)
    double prefix_found = 0.0;
    for (std::uint64_t k = 1; k <= n; ++k) {
      e_k += exp1(rng) / (nn - static_cast<double>(k) + 1.0);
      prefix += e_k;
      const double kk = static_cast<double>(k);
      const double s2 = a2 / (2.0 * e_k);  // s_k^2
      if (k == 1) end = std::sqrt(s2);
      const double top = s2 * prefix / kk + (nn - kk) * a2 / (2.0 * kk);
      if (top < obs) {
        s_next = std::sqrt(s2);
        break;
      }
      found = k;
      prefix_found = prefix;
    }
    if (found > 0) {
      const double kk = static_cast<double>(found), rest = (nn - kk) * a2 / 2.0;
      const double num = kk * obs - rest;
      const double root = num > 0.0 ? std::sqrt(num / prefix_found) : 0.0;
      crossing = std::max(s_next, root);
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
  // Beyond the largest sample's end no reference sample has an impact measured, and level()
  // says 1 there by convention; H itself may level off below u first (h_infinity_: a
  // statistician's trial had 73.3 m printed as the exact upper end for one mark at 0.3 m inside
  // 0.6 m, 244 times r whatever the data). Then, or where too few samples are left to tell H,
  // the bound is infinite.
  if (u >= h_infinity_) return std::numeric_limits<double>::infinity();
  const double resolved = end_.size() >= 100 ? end_[end_.size() - 100] : 0.0;  // 100 samples live up to here
  for (int i = 0; i < 200 && level(hi) < u; ++i) {
    if (hi * 2.0 > resolved) return std::numeric_limits<double>::infinity();
    hi *= 2.0;
  }
  // inf { sigma : H(sigma) >= u }, H a step function: bisection in log sigma to 1e-13.
  while (hi / lo - 1.0 > 1e-13) {
    const double mid = std::sqrt(lo * hi);
    if (!(mid > lo && mid < hi)) break;
    (level(mid) >= u ? hi : lo) = mid;
  }
  return hi;
}

}  // namespace strewn
