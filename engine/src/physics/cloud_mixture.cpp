#include "cloud_mixture.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <numeric>

#include <Eigen/Eigenvalues>
#include <boost/math/distributions/normal.hpp>

#include "../fit/kolmogorov.hpp"
#include "strewn/constants.hpp"
#include "strewn/error.hpp"

namespace strewn::detail {
namespace {

struct Part {
  double weight;
  Vec2 mean;
  Mat2 cov;
};

double log_density(const Part& c, const Vec2& x) {
  const Vec2 d = x - c.mean;
  const double det = c.cov.determinant();
  return -0.5 * d.dot(c.cov.inverse() * d) - 0.5 * std::log(det) - std::log(kTwoPi);
}

// EM from the cloud cut into k groups along its principal axis; log-likelihood out.
std::vector<Part> em(const std::vector<Vec2>& x, int k, double& log_likelihood) {
  const std::size_t n = x.size();
  Vec2 centre = Vec2::Zero();
  for (const Vec2& p : x) centre += p / static_cast<double>(n);
  Mat2 total = Mat2::Zero();
  for (const Vec2& p : x) total += (p - centre) * (p - centre).transpose() / static_cast<double>(n);
  const Eigen::SelfAdjointEigenSolver<Mat2> eig(total);
  const Vec2 axis = eig.eigenvectors().col(1);
  const Mat2 floor = 1e-9 * total.trace() * Mat2::Identity();
  std::vector<std::size_t> order(n);
  std::iota(order.begin(), order.end(), 0);
  std::sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) { return axis.dot(x[a]) < axis.dot(x[b]); });
  std::vector<std::vector<double>> r(static_cast<std::size_t>(k), std::vector<double>(n, 0.0));
  for (std::size_t i = 0; i < n; ++i) r[std::min<std::size_t>(static_cast<std::size_t>(k) - 1, i * k / n)][order[i]] = 1.0;
  std::vector<Part> parts(static_cast<std::size_t>(k));
  log_likelihood = -std::numeric_limits<double>::infinity();
  for (int iteration = 0; iteration < 1000; ++iteration) {
    // M step, in the frame of the cloud's centre.
    for (int j = 0; j < k; ++j) {
      double w = 0.0;
      Vec2 m = Vec2::Zero();
      for (std::size_t i = 0; i < n; ++i) w += r[j][i], m += r[j][i] * (x[i] - centre);
      m /= w;
      Mat2 c = Mat2::Zero();
      for (std::size_t i = 0; i < n; ++i) c += r[j][i] * (x[i] - centre - m) * (x[i] - centre - m).transpose();
      parts[j] = {w / static_cast<double>(n), m, c / w + floor};
    }
    // E step with log-sum-exp.
    double ll = 0.0;
    std::vector<double> lp(static_cast<std::size_t>(k));
    for (std::size_t i = 0; i < n; ++i) {
      for (int j = 0; j < k; ++j) lp[j] = std::log(parts[j].weight) + log_density(parts[j], x[i] - centre);
      const double top = *std::max_element(lp.begin(), lp.end());
      double sum = 0.0;
      for (int j = 0; j < k; ++j) sum += std::exp(lp[j] - top);
      for (int j = 0; j < k; ++j) r[j][i] = std::exp(lp[j] - top) / sum;
      ll += top + std::log(sum);
    }
    const bool done = ll - log_likelihood <= 1e-10 * std::fabs(ll);
    log_likelihood = ll;
    if (done) break;
  }
  for (Part& p : parts) p.mean += centre;
  return parts;
}

ScatterModel model_of(const std::vector<Part>& parts) {
  std::vector<WeightedGaussian> g;
  for (const Part& p : parts) g.push_back({p.weight, Gaussian::from_covariance(p.mean, p.cov)});
  return ScatterModel::mixture(g);
}

}  // namespace

std::pair<double, double> rosenblatt_ks(const ScatterModel& model, const std::vector<Vec2>& points) {
  const boost::math::normal standard;
  std::vector<double> v;
  v.reserve(points.size());
  const auto& cs = model.components();
  for (const Vec2& x : points) {
    // u1 = F(x1): the mixture of the marginal normals; u2 = F(x2 | x1): the conditional normals
    // weighted by w_k phi_k(x1).
    double u1 = 0.0, norm = 0.0, u2 = 0.0;
    std::vector<double> wk(cs.size());
    for (std::size_t k = 0; k < cs.size(); ++k) {
      const Mat2& c = cs[k].gaussian.covariance();
      const Vec2 m = cs[k].gaussian.mean();
      const double s1 = std::sqrt(c(0, 0)), z1 = (x.x() - m.x()) / s1;
      u1 += cs[k].weight * boost::math::cdf(standard, z1);
      wk[k] = cs[k].weight * std::exp(-0.5 * z1 * z1) / s1;
      norm += wk[k];
    }
    for (std::size_t k = 0; k < cs.size(); ++k) {
      const Mat2& c = cs[k].gaussian.covariance();
      const Vec2 m = cs[k].gaussian.mean();
      const double mean2 = m.y() + c(0, 1) / c(0, 0) * (x.x() - m.x());
      const double var2 = c(1, 1) - c(0, 1) * c(0, 1) / c(0, 0);
      u2 += wk[k] / norm * boost::math::cdf(standard, (x.y() - mean2) / std::sqrt(var2));
    }
    const double eps = 1e-300;
    u1 = std::clamp(u1, eps, 1.0 - 1e-16);
    u2 = std::clamp(u2, eps, 1.0 - 1e-16);
    const double a = boost::math::quantile(standard, u1), b = boost::math::quantile(standard, u2);
    v.push_back(-std::expm1(-0.5 * (a * a + b * b)));
  }
  std::sort(v.begin(), v.end());
  const double n = static_cast<double>(v.size());
  double d = 0.0;
  for (std::size_t i = 0; i < v.size(); ++i) d = std::max({d, (i + 1) / n - v[i], v[i] - i / n});
  return {d, kolmogorov_p(d, v.size())};
}

CloudMixture fit_cloud_mixture(const std::vector<Vec2>& fit, const std::vector<Vec2>& check) {
  if (fit.size() < 20 || check.size() < 20) throw input_error("a mixture fit to landings needs at least 20 points in each half");
  CloudMixture best;
  best.bic = std::numeric_limits<double>::infinity();
  const double n = static_cast<double>(fit.size());
  for (int k : {2, 3}) {
    double ll = 0.0;
    const std::vector<Part> parts = em(fit, k, ll);
    const double bic = -2.0 * ll + (6.0 * k - 1.0) * std::log(n);
    if (bic < best.bic) {
      best.bic = bic;
      best.components = k;
      best.model = model_of(parts);
    }
  }
  best.fitted = fit.size();
  best.checked = check.size();
  std::tie(best.ks_statistic, best.ks_p_value) = rosenblatt_ks(best.model, check);
  return best;
}

}  // namespace strewn::detail
