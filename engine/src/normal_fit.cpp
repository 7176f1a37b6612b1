// fit_normal: moments, Hotelling's T^2, the chi-square interval for the circular-equivalent
// sigma, bootstrap intervals for the axes, and the goodness-of-fit check (formulas in fit.hpp).
#include <Eigen/Eigenvalues>
#include <Eigen/LU>
#include <algorithm>
#include <boost/math/distributions/chi_squared.hpp>
#include <boost/math/distributions/fisher_f.hpp>
#include <cmath>
#include <random>

#include "strewn/error.hpp"
#include "strewn/fit.hpp"

namespace strewn {
namespace {

void check_points(const std::vector<Vec2>& points, const Vec2& aim) {
  if (points.size() < 3)
    throw input_error("a normal fit needs at least 3 impacts (" + std::to_string(points.size()) + " given)");
  for (const Vec2& p : points)
    if (!p.allFinite()) throw input_error("impact coordinates must be finite numbers");
  if (!aim.allFinite()) throw input_error("the aim point must be finite");
}

std::pair<Vec2, Mat2> moments(const std::vector<Vec2>& points) {
  // About the first point: at national-grid coordinates a plain sum carries n ulps of 5e6
  // (n 1e-9 m) into the mean; the differences to a nearby point are exact.
  const Vec2 origin = points.front();
  Vec2 sum = Vec2::Zero();
  for (const Vec2& p : points) sum += p - origin;
  const Vec2 mean = origin + sum / static_cast<double>(points.size());
  Mat2 cov = Mat2::Zero();
  for (const Vec2& p : points) cov += (p - mean) * (p - mean).transpose();
  cov /= static_cast<double>(points.size() - 1);
  return {mean, cov};
}

// Kolmogorov's limiting distribution, P(K > x) = 2 sum_k (-1)^(k-1) exp(-2 k^2 x^2)
// (Kolmogorov 1933), with Stephens' (1970) factor sqrt(n) + 0.12 + 0.11 / sqrt(n) on D.
double kolmogorov_p(double d, std::size_t n) {
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

double quantile_of(std::vector<double> v, double q) {
  std::sort(v.begin(), v.end());
  const double pos = q * static_cast<double>(v.size() - 1);
  const auto i = static_cast<std::size_t>(std::floor(pos));
  const double f = pos - static_cast<double>(i);
  return i + 1 < v.size() ? v[i] * (1 - f) + v[i + 1] * f : v[i];
}

}  // namespace

NormalFit fit_normal(const std::vector<Vec2>& points, const Vec2& aim, const FitOptions& options) {
  check_points(points, aim);
  if (!(options.confidence > 0.0 && options.confidence < 1.0)) throw input_error("confidence must be in (0, 1)");
  NormalFit f;
  f.n = points.size();
  f.confidence = options.confidence;
  f.aim = aim;
  std::tie(f.mean, f.covariance) = moments(points);
  const double n = static_cast<double>(f.n);
  // Identical or collinear points leave S singular: no spread can be fitted from them.
  const double scale2 = f.covariance.trace() / 2.0;
  if (!(f.covariance.determinant() > 1e-12 * scale2 * scale2) || !(scale2 > 0.0))
    throw input_error("the impacts are identical or lie on one line; no two-dimensional spread can be fitted");
  f.axes = f.gaussian().axes();
  const double alpha = 1.0 - options.confidence;

  // Hotelling's T^2 for the bias, and the confidence ellipse of the mean.
  const Mat2 s_inv = f.covariance.inverse();
  const Vec2 bias = f.mean - aim;
  f.t2 = n * bias.dot(s_inv * bias);
  const boost::math::fisher_f_distribution<> fdist(2.0, n - 2.0);
  const double fstat = (n - 2.0) / (2.0 * (n - 1.0)) * f.t2;
  f.no_bias_p_value = f.n > 3 ? boost::math::cdf(boost::math::complement(fdist, fstat)) : 1.0;
  const double radius2 = f.n > 3 ? 2.0 * (n - 1.0) / (n * (n - 2.0)) * boost::math::quantile(fdist, options.confidence)
                                 : std::numeric_limits<double>::infinity();
  f.mean_region = s_inv / radius2;

  // Circular-equivalent sigma: 2 (n - 1) s^2 / sigma^2 ~ chi^2_{2(n-1)}.
  f.sigma = std::sqrt(scale2);
  const boost::math::chi_squared_distribution<> chi(2.0 * (n - 1.0));
  const double dof = 2.0 * (n - 1.0);
  f.sigma_ci = {f.sigma * std::sqrt(dof / boost::math::quantile(boost::math::complement(chi, alpha / 2))),
                f.sigma * std::sqrt(dof / boost::math::quantile(chi, alpha / 2))};
  f.design_factor = f.sigma_ci.high / f.sigma;
  const ScatterModel fitted = f.gaussian();
  f.cep = containment_radius(fitted, f.mean, 0.5);
  f.r95 = containment_radius(fitted, f.mean, 0.95);
  f.cep_ci = {f.cep * f.sigma_ci.low / f.sigma, f.cep * f.sigma_ci.high / f.sigma};
  f.r95_ci = {f.r95 * f.sigma_ci.low / f.sigma, f.r95 * f.sigma_ci.high / f.sigma};

  // Parametric bootstrap for the axes: n impacts from the fitted normal, refitted.
  std::mt19937_64 rng(options.seed);
  std::normal_distribution<double> z;
  const Mat2 L = f.gaussian().cholesky();
  std::vector<double> majors, minors;
  std::vector<Vec2> sample(f.n);
  for (int b = 0; b < options.bootstrap_replicates; ++b) {
    // About the origin: the axes do not depend on the mean, and national-grid coordinates
    // would round each sampled point to 1e-9 m.
    for (Vec2& p : sample) p = L * Vec2(z(rng), z(rng));
    const Eigen::SelfAdjointEigenSolver<Mat2> eig(moments(sample).second);
    minors.push_back(std::sqrt(std::max(eig.eigenvalues()(0), 0.0)));
    majors.push_back(std::sqrt(std::max(eig.eigenvalues()(1), 0.0)));
  }
  if (!majors.empty()) {
    f.sigma_major_ci = {quantile_of(majors, alpha / 2), quantile_of(majors, 1 - alpha / 2)};
    f.sigma_minor_ci = {quantile_of(minors, alpha / 2), quantile_of(minors, 1 - alpha / 2)};
  }

  // Goodness of fit: d^2 against chi^2_2, whose CDF is 1 - exp(-d^2 / 2).
  for (const Vec2& p : points) f.mahalanobis2.push_back((p - f.mean).dot(s_inv * (p - f.mean)));
  std::vector<double> sorted = f.mahalanobis2;
  std::sort(sorted.begin(), sorted.end());
  for (std::size_t i = 0; i < sorted.size(); ++i) {
    const double cdf = -std::expm1(-sorted[i] / 2.0);
    f.ks_statistic = std::max({f.ks_statistic, (i + 1) / n - cdf, cdf - i / n});
  }
  f.ks_p_value = kolmogorov_p(f.ks_statistic, f.n);
  const double outlier_d2 = -2.0 * std::log(0.01 / n);  // chi^2_2 quantile at 1 - 0.01 / n
  for (std::size_t i = 0; i < f.n; ++i)
    if (f.mahalanobis2[i] > outlier_d2) f.outliers.push_back(i);
  return f;
}

}  // namespace strewn
