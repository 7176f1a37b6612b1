// fit_censored: centred circular spread from measured radii plus a count beyond a radius;
// closed-form maximum likelihood, the exact interval by test inversion (CensoredConfidence) and
// the likelihood-ratio interval for comparison (formulas in fit.hpp).
#include <boost/math/distributions/chi_squared.hpp>
#include <boost/math/tools/toms748_solve.hpp>
#include <algorithm>
#include <cmath>

#include "strewn/error.hpp"
#include "strewn/fit.hpp"

namespace strewn {

CensoredFit fit_censored(const std::vector<double>& radii, std::uint64_t outside, double radius, double confidence,
                         int reference) {
  if (radii.empty()) throw input_error("censored fit: at least one measured impact is needed");
  if (!(radius > 0.0 && std::isfinite(radius))) throw input_error("censored fit: the radius must be a positive number");
  if (!(confidence > 0.0 && confidence < 1.0)) throw input_error("confidence must be in (0, 1)");
  double sum_r2 = 0.0;
  for (double r : radii) {
    if (!(r >= 0.0 && std::isfinite(r))) throw input_error("censored fit: distances must be finite and not negative");
    if (r > radius * (1 + 1e-12))
      throw input_error("censored fit: a measured impact lies beyond the radius (" + std::to_string(r) +
                        " m > " + std::to_string(radius) + " m) that bounds the unmeasured ones");
    sum_r2 += r * r;
  }
  CensoredFit f;
  f.measured = radii.size();
  f.outside = outside;
  f.radius = radius;
  f.confidence = confidence;
  const double nm = static_cast<double>(radii.size());
  const double total = sum_r2 + static_cast<double>(outside) * radius * radius;
  if (!(total > 0.0)) throw input_error("censored fit: every measured impact is exactly on the aim");
  const double theta = total / (2.0 * nm);  // sigma^2
  f.sigma = std::sqrt(theta);
  // 2 (l(theta_hat) - l(theta)) = 2 n_m (u - 1 - ln u), u = theta_hat / theta; the interval is
  // where this stays below the chi^2_1 quantile.
  const double c = boost::math::quantile(boost::math::chi_squared_distribution<>(1.0), confidence);
  const auto g = [&](double u) { return 2.0 * nm * (u - 1.0 - std::log(u)) - c; };
  const auto tol = [](double a, double b) { return std::fabs(b - a) <= 1e-14 * std::max(std::fabs(a), 1e-300); };
  std::uintmax_t it = 200;
  double lo = 1.0;
  while (g(lo) < 0.0) lo /= 2.0;
  const auto low_root = boost::math::tools::toms748_solve(g, lo, 1.0, tol, it);
  it = 200;
  double hi = 1.0;
  while (g(hi) < 0.0) hi *= 2.0;
  const auto high_root = boost::math::tools::toms748_solve(g, 1.0, hi, tol, it);
  const double u_low = (low_root.first + low_root.second) / 2, u_high = (high_root.first + high_root.second) / 2;
  f.lr_ci = {std::sqrt(theta / u_high), std::sqrt(theta / u_low)};
  // One-sided upper bound on sigma: the signed root of the likelihood ratio is about N(0, 1), so
  // the bound is where 2 (l_max - l) reaches the chi^2_1 quantile at 2 confidence - 1 (the
  // square of the normal quantile at confidence), on the side of larger sigma (u < 1).
  if (confidence > 0.5) {
    const double c1 = boost::math::quantile(boost::math::chi_squared_distribution<>(1.0), 2.0 * confidence - 1.0);
    const auto g1 = [&](double u) { return 2.0 * nm * (u - 1.0 - std::log(u)) - c1; };
    it = 200;
    lo = 1.0;
    while (g1(lo) < 0.0) lo /= 2.0;
    const auto root = boost::math::tools::toms748_solve(g1, lo, 1.0, tol, it);
    f.lr_upper = std::sqrt(theta / ((root.first + root.second) / 2));
  } else {
    f.lr_upper = f.sigma;
  }
  // The exact bounds: the confidence distribution's quantiles (seeded, so a file always gives
  // the same interval). About 4e6 reference exponentials, between 2000 and 20000 samples.
  const double n = nm + static_cast<double>(outside);
  if (reference <= 0) reference = static_cast<int>(std::clamp(4e6 / n, 2000.0, 20000.0));
  const CensoredConfidence h(f.measured, outside, radius, f.sigma, 1, reference);
  f.sigma_ci = {h.quantile((1 - confidence) / 2), h.quantile((1 + confidence) / 2)};
  f.sigma_upper = h.quantile(confidence);
  return f;
}

}  // namespace strewn
