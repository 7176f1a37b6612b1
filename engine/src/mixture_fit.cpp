// fit_two_component: a core and a wide normal, compared with the single normal by BIC
// (Schwarz 1978).
#include <Eigen/Eigenvalues>
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
  // Model: a core normal (mean mu, covariance C) and a circular wide normal about the same mean
  // (variance v I), weight w: the "wild throw" of a scenario. Sharing the mean and keeping the
  // wide part circular keeps the maximum away from the degenerate solutions of a free mixture
  // (a component collapsing onto one or two stray points), so a handful of wild impacts can
  // carry it. Fitted by ECM (Meng & Rubin 1993): mu given the covariances, then C, v and w.
  MixtureFit m;
  const double n = static_cast<double>(points.size());
  const Mat2 mle = single.covariance * (n - 1.0) / n;
  for (const Vec2& p : points) m.single_log_likelihood += log_density(p, single.mean, mle);
  m.single_bic = -2.0 * m.single_log_likelihood + 5.0 * std::log(n);
  double w = 0.1, v = 9.0 * mle.trace() / 2.0;
  Vec2 mu = single.mean;
  Mat2 core = mle;
  const Mat2 ridge = 1e-12 * mle.trace() * Mat2::Identity();
  std::vector<double> r(points.size());
  double previous = -1e300;
  for (m.iterations = 1; m.iterations <= 2000; ++m.iterations) {
    // E step: responsibility of the wide component for each point.
    double ll = 0.0;
    for (std::size_t i = 0; i < points.size(); ++i) {
      const double a = std::log1p(-w) + log_density(points[i], mu, core);
      const double b = std::log(w) + log_density(points[i], mu, v * Mat2::Identity());
      const double total = log_sum_exp(a, b);
      r[i] = std::exp(b - total);
      ll += total;
    }
    m.log_likelihood = ll;
    if (std::fabs(ll - previous) <= 1e-11 * std::fabs(ll)) break;
    previous = ll;
    // CM steps.
    double sw = 0.0;
    for (double x : r) sw += x;
    if (sw < 1e-9 || n - sw < 1e-9) break;  // one component emptied: no mixture to offer
    w = sw / n;
    const Mat2 core_inv = core.inverse();
    Mat2 precision = Mat2::Zero();
    Vec2 weighted = Vec2::Zero();
    for (std::size_t i = 0; i < points.size(); ++i) {
      const Mat2 pi = (1 - r[i]) * core_inv + (r[i] / v) * Mat2::Identity();
      precision += pi;
      weighted += pi * points[i];
    }
    mu = precision.inverse() * weighted;
    Mat2 cc = Mat2::Zero();
    double vw = 0.0;
    for (std::size_t i = 0; i < points.size(); ++i) {
      const Vec2 d = points[i] - mu;
      cc += (1 - r[i]) * d * d.transpose();
      vw += r[i] * d.squaredNorm();
    }
    core = cc / (n - sw) + ridge;
    v = std::max(vw / (2.0 * sw), 1e-12 * mle.trace());
  }
  m.wide_weight = w;
  m.core_mean = m.wide_mean = mu;
  m.core_covariance = core;
  m.wide_covariance = v * Mat2::Identity();
  m.bic = -2.0 * m.log_likelihood + 7.0 * std::log(n);
  // Offered only as a core with a genuinely wider, minor companion.
  const double core_major = Eigen::SelfAdjointEigenSolver<Mat2>(core).eigenvalues()(1);
  m.preferred = m.bic < m.single_bic && w > 0.005 && w < 0.5 && v > core_major && core.determinant() > 0.0;
  return m;
}

}  // namespace strewn
