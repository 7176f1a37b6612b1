// fit_two_component: a core and a wide normal by expectation-maximisation, compared with the
// single normal by BIC (Schwarz 1978).
#include <Eigen/LU>
#include <cmath>

#include "strewn/fit.hpp"

namespace strewn {
namespace {

double log_density(const Vec2& x, const Vec2& mean, const Mat2& cov) {
  const Vec2 d = x - mean;
  return -std::log(2.0 * M_PI) - 0.5 * std::log(cov.determinant()) - 0.5 * d.dot(cov.inverse() * d);
}

double log_sum_exp(double a, double b) {
  const double m = std::max(a, b);
  return m + std::log(std::exp(a - m) + std::exp(b - m));
}

}  // namespace

ScatterModel MixtureFit::model() const {
  return ScatterModel::mixture({{1.0 - wide_weight, Gaussian::from_covariance(core_mean, core_covariance)},
                                {wide_weight, Gaussian::from_covariance(wide_mean, wide_covariance)}});
}

MixtureFit fit_two_component(const std::vector<Vec2>& points, const NormalFit& single) {
  MixtureFit m;
  const double n = static_cast<double>(points.size());
  const Mat2 mle = single.covariance * (n - 1.0) / n;
  for (const Vec2& p : points) m.single_log_likelihood += log_density(p, single.mean, mle);
  m.single_bic = -2.0 * m.single_log_likelihood + 5.0 * std::log(n);
  // Start: the single fit as the core, a three times wider component with 10% of the weight.
  double w = 0.1;
  m.core_mean = m.wide_mean = single.mean;
  m.core_covariance = mle;
  m.wide_covariance = 9.0 * mle;
  const Mat2 ridge = 1e-12 * mle.trace() * Mat2::Identity();
  std::vector<double> r(points.size());
  double previous = -1e300;
  for (m.iterations = 1; m.iterations <= 1000; ++m.iterations) {
    // E step: responsibility of the wide component for each point.
    double ll = 0.0;
    for (std::size_t i = 0; i < points.size(); ++i) {
      const double a = std::log1p(-w) + log_density(points[i], m.core_mean, m.core_covariance);
      const double b = std::log(w) + log_density(points[i], m.wide_mean, m.wide_covariance);
      const double total = log_sum_exp(a, b);
      r[i] = std::exp(b - total);
      ll += total;
    }
    m.log_likelihood = ll;
    if (std::fabs(ll - previous) <= 1e-10 * std::fabs(ll)) break;
    previous = ll;
    // M step.
    double sw = 0.0;
    Vec2 mc = Vec2::Zero(), mw = Vec2::Zero();
    for (std::size_t i = 0; i < points.size(); ++i) {
      sw += r[i];
      mw += r[i] * points[i];
      mc += (1 - r[i]) * points[i];
    }
    const double sc = n - sw;
    if (sw < 1e-6 || sc < 1e-6) break;  // one component emptied: no mixture to offer
    m.wide_mean = mw / sw;
    m.core_mean = mc / sc;
    Mat2 cw = Mat2::Zero(), cc = Mat2::Zero();
    for (std::size_t i = 0; i < points.size(); ++i) {
      cw += r[i] * (points[i] - m.wide_mean) * (points[i] - m.wide_mean).transpose();
      cc += (1 - r[i]) * (points[i] - m.core_mean) * (points[i] - m.core_mean).transpose();
    }
    m.wide_covariance = cw / sw + ridge;
    m.core_covariance = cc / sc + ridge;
    w = sw / n;
  }
  m.wide_weight = w;
  // A wide component is the one with the larger spread; swap if EM turned them round.
  if (m.wide_covariance.trace() < m.core_covariance.trace()) {
    std::swap(m.wide_mean, m.core_mean);
    std::swap(m.wide_covariance, m.core_covariance);
    m.wide_weight = 1.0 - w;
  }
  m.bic = -2.0 * m.log_likelihood + 11.0 * std::log(n);
  m.preferred = m.bic < m.single_bic && m.wide_weight > 0.005 && m.wide_weight < 0.5 &&
                m.core_covariance.determinant() > 0.0 && m.wide_covariance.determinant() > 0.0;
  return m;
}

}  // namespace strewn
