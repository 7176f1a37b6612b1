// fit_two_component: a core and a wide normal, compared with the single normal by BIC
// (Schwarz 1978).
#include <Eigen/Eigenvalues>
#include <Eigen/LU>
#include <cmath>

#include "strewn/constants.hpp"
#include "strewn/fit.hpp"

namespace strewn {
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
  //
  // Work: one pass over the points per iteration (the E step gathers the weighted moments that
  // the CM steps need), in coordinates relative to the single fit's mean, and a bounded number
  // of iterations: the loop stops when the log-likelihood still to be gained, estimated from the
  // geometric decay of its steps, is below 1e-6 (BIC is reported to 0.1), or when the wide
  // weight has decayed to a level the mixture could never be offered at.
  MixtureFit m;
  const std::size_t count = points.size();
  const double n = static_cast<double>(count);
  const Vec2 origin = single.mean;
  const Mat2 mle = single.covariance * (n - 1.0) / n;
  // The single normal at its maximum: sum of d^T mle^-1 d over the points is 2 n.
  m.single_log_likelihood = -n * std::log(2.0 * kPi) - 0.5 * n * std::log(mle.determinant()) - n;
  m.single_bic = -2.0 * m.single_log_likelihood + 5.0 * std::log(n);
  double w = 0.1, v = 9.0 * mle.trace() / 2.0;
  Vec2 mu = Vec2::Zero();  // relative to origin
  Mat2 core = mle;
  const Mat2 ridge = 1e-12 * mle.trace() * Mat2::Identity();
  double previous = -1e300, previous_step = 0.0;
  const int kMaxIterations = 2000;
  for (m.iterations = 1; m.iterations <= kMaxIterations; ++m.iterations) {
    // E step: responsibility r of the wide component for each point, with the sums the CM steps
    // need: sum r, sum (1 - r) x, sum r x, sum (1 - r) x x^T, sum r |x|^2 (x relative to origin).
    const Mat2 core_inv = core.inverse();
    const double la = std::log1p(-w) - std::log(2.0 * kPi) - 0.5 * std::log(core.determinant());
    const double lb = std::log(w) - std::log(2.0 * kPi) - std::log(v);
    double ll = 0.0, sw = 0.0, r_xx = 0.0;
    Vec2 core_x = Vec2::Zero(), wide_x = Vec2::Zero();
    Mat2 core_xx = Mat2::Zero();
    for (const Vec2& p : points) {
      const Vec2 x = p - origin;
      const Vec2 d = x - mu;
      const double a = la - 0.5 * d.dot(core_inv * d);
      const double b = lb - 0.5 * d.squaredNorm() / v;
      const double e = std::exp(-std::fabs(a - b));
      ll += std::max(a, b) + std::log1p(e);
      const double r = b > a ? 1.0 / (1.0 + e) : e / (1.0 + e);
      sw += r;
      core_x += (1.0 - r) * x;
      wide_x += r * x;
      core_xx += (1.0 - r) * x * x.transpose();
      r_xx += r * x.squaredNorm();
    }
    m.point_evaluations += count;
    m.log_likelihood = ll;
    const double step = ll - previous;
    if (std::fabs(step) <= 1e-11 * std::fabs(ll)) break;
    // Steps shrinking by a factor rho leave about step rho / (1 - rho) to gain. Stop when that
    // is negligible, or when ten times it cannot lift the mixture past the single normal's BIC
    // (a gain of ln n is needed; the factor covers steps that shrink as slowly as 1 / t^1.1).
    if (m.iterations > 2 && step >= 0.0 && step < previous_step) {
      const double rho = step / previous_step;
      const double to_gain = step * rho / (1.0 - rho);
      if (to_gain < 1e-6) break;
      if (ll + 10.0 * to_gain + 1.0 < m.single_log_likelihood + std::log(n)) break;
    }
    previous = ll;
    previous_step = step;
    // CM steps.
    if (sw < 1e-9 || n - sw < 1e-9) break;  // one component emptied: no mixture to offer
    const double w_next = sw / n;
    // The weight decays towards 0 when the data have no wild part: once it is below a tenth of
    // the smallest weight that could be offered (0.005) and still falling, stop.
    if (w_next < 5e-4 && w_next < w) break;
    w = w_next;
    // mu = (sum_i P_i)^-1 sum_i P_i x_i with P_i = (1 - r_i) C^-1 + (r_i / v) I.
    const Mat2 precision = (n - sw) * core_inv + (sw / v) * Mat2::Identity();
    mu = precision.inverse() * (core_inv * core_x + wide_x / v);
    // sum (1 - r)(x - mu)(x - mu)^T and sum r |x - mu|^2 from the moments.
    const Mat2 cc = core_xx - core_x * mu.transpose() - mu * core_x.transpose() + (n - sw) * mu * mu.transpose();
    const double vw = r_xx - 2.0 * mu.dot(wide_x) + sw * mu.squaredNorm();
    core = cc / (n - sw) + ridge;
    v = std::max(vw / (2.0 * sw), 1e-12 * mle.trace());
  }
  m.iterations = std::min(m.iterations, kMaxIterations);
  m.wide_weight = w;
  m.core_mean = m.wide_mean = origin + mu;
  m.core_covariance = core;
  m.wide_covariance = v * Mat2::Identity();
  // The mixture holds the single normal (w = 0), so its maximum is never below the single's. A
  // run stopped early (it could not win on BIC) or led by its start to a lesser maximum ended
  // below it (by up to 0.095 in a statistician's trial), which the output showed as a mixture
  // fitting worse than one of its own members: the single normal, as w = 0, is reported then.
  if (!(m.log_likelihood >= m.single_log_likelihood)) {
    m.wide_weight = 0.0;
    m.core_mean = m.wide_mean = origin;
    m.core_covariance = mle;
    m.log_likelihood = m.single_log_likelihood;
  }
  m.bic = -2.0 * m.log_likelihood + 7.0 * std::log(n);
  // Offered only as a core with a genuinely wider, minor companion.
  const double core_major = Eigen::SelfAdjointEigenSolver<Mat2>(core).eigenvalues()(1);
  m.preferred = m.bic < m.single_bic && w > 0.005 && w < 0.5 && v > core_major && core.determinant() > 0.0;
  return m;
}

}  // namespace strewn
