// fit_counts: Clopper-Pearson interval on the hit fraction, mapped to a centred circular sigma.
#include <boost/math/distributions/beta.hpp>
#include <cmath>
#include <limits>

#include "strewn/error.hpp"
#include "strewn/fit.hpp"

namespace strewn {

// P(r <= a) = 1 - exp(-a^2 / (2 sigma^2)) solved for sigma (Rayleigh distribution).
double sigma_for_fraction(double radius, double fraction) {
  if (fraction <= 0.0) return std::numeric_limits<double>::infinity();
  if (fraction >= 1.0) return 0.0;
  return radius / std::sqrt(-2.0 * std::log1p(-fraction));
}

CountFit fit_counts(std::uint64_t k, std::uint64_t n, double radius, double confidence) {
  if (n == 0) throw input_error("counts: n must be at least 1");
  if (k > n) throw input_error("counts: k (" + std::to_string(k) + ") cannot exceed n (" + std::to_string(n) + ")");
  if (!(radius > 0.0 && std::isfinite(radius))) throw input_error("counts: the radius must be a positive number");
  if (!(confidence > 0.0 && confidence < 1.0)) throw input_error("confidence must be in (0, 1)");
  CountFit c;
  c.k = k;
  c.n = n;
  c.radius = radius;
  c.confidence = confidence;
  c.fraction = static_cast<double>(k) / static_cast<double>(n);
  const double alpha = 1.0 - confidence, dk = static_cast<double>(k), dn = static_cast<double>(n);
  // Clopper & Pearson (1934): beta quantiles at alpha/2 and 1 - alpha/2.
  c.fraction_ci.low = k == 0 ? 0.0 : boost::math::quantile(boost::math::beta_distribution<>(dk, dn - dk + 1), alpha / 2);
  c.fraction_ci.high = k == n ? 1.0 : boost::math::quantile(boost::math::beta_distribution<>(dk + 1, dn - dk), 1 - alpha / 2);
  c.sigma = sigma_for_fraction(radius, c.fraction);
  // A larger share inside means a smaller sigma: the ends swap.
  c.sigma_ci = {sigma_for_fraction(radius, c.fraction_ci.high), sigma_for_fraction(radius, c.fraction_ci.low)};
  // One-sided bounds at the full confidence: the lower Clopper-Pearson bound on the fraction,
  // Beta(k, n - k + 1) at alpha (alpha^(1/n) for k = n), bounds sigma from above; the upper one,
  // Beta(k + 1, n - k) at 1 - alpha (1 - alpha^(1/n) for k = 0), from below.
  const double fraction_low = k == 0 ? 0.0 : boost::math::quantile(boost::math::beta_distribution<>(dk, dn - dk + 1), alpha);
  const double fraction_high = k == n ? 1.0 : boost::math::quantile(boost::math::beta_distribution<>(dk + 1, dn - dk), 1 - alpha);
  c.sigma_upper = sigma_for_fraction(radius, fraction_low);
  // k = n: 1 - alpha^(1/n) taken directly, so that the bound stays positive for any n (the
  // fraction itself rounds to 1 beyond n ~ 1e16).
  if (k == n) c.sigma_upper = radius / std::sqrt(-2.0 * std::log(-std::expm1(std::log(alpha) / dn)));
  c.sigma_lower = sigma_for_fraction(radius, fraction_high);
  return c;
}

}  // namespace strewn
