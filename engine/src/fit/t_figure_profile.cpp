// The profile likelihood of a t's scale figure and its interval (t_figure_profile.hpp).
#include "t_figure_profile.hpp"

#include <nlopt.h>

#include <Eigen/Eigenvalues>
#include <boost/math/tools/toms748_solve.hpp>
#include <algorithm>
#include <cmath>
#include <limits>
#include <new>

#include "strewn/constants.hpp"

namespace strewn::detail {
namespace {

// S = exp([[p, q], [q, -p]]) = cosh m I + (sinh m / m) [[p, q], [q, -p]], m = |(p, q)|: symmetric,
// positive definite, det S = 1, axes e^(m/2) and e^(-m/2) (an axis ratio e^m).
Mat2 shape_of(double p, double q) {
  const double m = std::hypot(p, q);
  const double c = std::cosh(m), s = m > 1e-4 ? std::sinh(m) / m : 1.0 + m * m / 6.0;
  Mat2 S;
  S << c + s * p, s * q, s * q, c - s * p;
  return S;
}

struct Search {
  const TProfileProblem* problem;
  TFigure figure;
  double psi;
};

// The objective: the log-likelihood of the t at the point, its overall scale set so that the
// figure is psi. A point where that fails (a figure that is not a positive number) is far from
// any maximum: the lowest finite value keeps BOBYQA's quadratic model finite.
double objective(unsigned, const double* v, double*, void* data) {
  const auto* s = static_cast<const Search*>(data);
  const TProfileProblem& problem = *s->problem;
  const Mat2 shape = shape_of(v[2], v[3]);  // in the frame
  const double nu = std::exp(v[4]);
  // The figure of the scale in the data's frame, F S F^T, up to the overall scale.
  const Mat2 scale = problem.frame * shape * problem.frame.transpose();
  // CEP and R95 from their tables where they hold: the figure is sqrt(major) k(rho, nu).
  const ContainmentTable* table = s->figure == TFigure::cep ? problem.cep : s->figure == TFigure::r95 ? problem.r95 : nullptr;
  double figure = std::numeric_limits<double>::quiet_NaN();
  if (table) {
    const double major = 0.5 * scale.trace() + std::hypot(0.5 * (scale(0, 0) - scale(1, 1)), scale(0, 1));
    const double log_factor = table->log_factor(0.5 * std::log(scale.determinant() / (major * major)), v[4]);
    figure = std::sqrt(major) * std::exp(log_factor);
  }
  if (std::isnan(figure)) figure = t_figure(scale, nu, s->figure);
  if (!(figure > 0.0) || !std::isfinite(figure)) return -std::numeric_limits<double>::max();
  const double k = s->psi / figure;
  const double value = t_log_likelihood(problem.z, Vec2(v[0], v[1]), k * k * shape, nu) -
                       static_cast<double>(problem.z.size()) * problem.log_det_frame;
  return std::isfinite(value) ? value : -std::numeric_limits<double>::max();
}

}  // namespace

double t_figure(const Mat2& scale, double nu, TFigure figure) {
  switch (figure) {
    case TFigure::sigma:
      return std::sqrt(scale.trace() / 2.0);
    case TFigure::sigma_major:
    case TFigure::sigma_minor: {
      // The 2x2 eigenvalues in closed form, the smaller one as det / larger (no cancellation).
      const double half_trace = 0.5 * scale.trace();
      const double r = std::hypot(0.5 * (scale(0, 0) - scale(1, 1)), 0.5 * (scale(0, 1) + scale(1, 0)));
      const double major = half_trace + r;
      return std::sqrt(figure == TFigure::sigma_major ? major : scale.determinant() / major);
    }
    case TFigure::cep:
    case TFigure::r95: {
      const Gaussian g = Gaussian::from_covariance(Vec2::Zero(), scale).with_family(ScatterFamily::student_t(nu));
      return containment_radius(g, Vec2::Zero(), figure == TFigure::cep ? 0.5 : 0.95);
    }
  }
  return std::numeric_limits<double>::quiet_NaN();
}

double t_log_likelihood(const std::vector<Vec2>& x, const Vec2& mu, const Mat2& scale, double nu) {
  const double det = scale.determinant();
  if (!(det > 0.0)) return -std::numeric_limits<double>::infinity();
  const Mat2 inv = scale.inverse();
  double sum = 0.0;
  for (const Vec2& p : x) {
    const Vec2 d = p - mu;
    sum += std::log1p(d.dot(inv * d) / nu);
  }
  const double n = static_cast<double>(x.size());
  return -n * std::log(2.0 * kPi) - 0.5 * n * std::log(det) - 0.5 * (nu + 2.0) * sum;
}

TProfileProblem t_profile_problem(const std::vector<Vec2>& x, const Vec2& origin, const Mat2& reference_scale,
                                  double nu_min, double nu_max, const ContainmentTable* cep, const ContainmentTable* r95) {
  TProfileProblem p;
  p.origin = origin;
  p.frame = reference_scale.llt().matrixL();
  p.log_det_frame = std::log(p.frame(0, 0)) + std::log(p.frame(1, 1));
  const Mat2 inverse = p.frame.inverse();
  p.z.reserve(x.size());
  for (const Vec2& point : x) p.z.push_back(inverse * (point - origin));
  p.nu_min = nu_min;
  p.nu_max = nu_max;
  p.cep = cep;
  p.r95 = r95;
  return p;
}

TShapePoint t_shape_point(const TProfileProblem& problem, const Vec2& mu, const Mat2& scale, double nu) {
  const Mat2 inverse = problem.frame.inverse();
  Mat2 s = inverse * scale * inverse.transpose();
  s = 0.5 * (s + s.transpose());
  s /= std::sqrt(s.determinant());
  const Eigen::SelfAdjointEigenSolver<Mat2> e(s);
  const Mat2 log_s = e.eigenvectors() * e.eigenvalues().array().log().matrix().asDiagonal() * e.eigenvectors().transpose();
  const Vec2 w = inverse * (mu - problem.origin);
  TShapePoint p;
  p.v[0] = w.x();
  p.v[1] = w.y();
  p.v[2] = 0.5 * (log_s(0, 0) - log_s(1, 1));  // traceless part (the trace is 0 up to rounding)
  p.v[3] = 0.5 * (log_s(0, 1) + log_s(1, 0));
  p.v[4] = std::log(nu);
  return p;
}

double t_figure_profile(const TProfileProblem& problem, TFigure figure, double psi, TShapePoint& start) {
  Search search{&problem, figure, psi};
  const double log_lo = std::log(problem.nu_min), log_hi = std::log(problem.nu_max);
  double x[5];
  std::copy(start.v, start.v + 5, x);
  x[4] = std::clamp(x[4], log_lo, log_hi);
  const double m = std::hypot(x[2], x[3]);
  // Bounds: the location within 1e4 of the data's scale of where it starts, the axis ratio up
  // to e^(m + 40), nu within its range.
  const double lower[5] = {x[0] - 1e4, x[1] - 1e4, -(m + 40.0), -(m + 40.0), log_lo};
  const double upper[5] = {x[0] + 1e4, x[1] + 1e4, m + 40.0, m + 40.0, log_hi};
  const double nu_step = std::min(0.2, 0.25 * (log_hi - log_lo));
  const double at_start = objective(5, x, nullptr, &search);
  double best = at_start;
  // BOBYQA stops when a step changes l by less than its tolerance, which along the flat
  // direction of nu can come well before the maximum: it is restarted from where it stopped
  // (a fresh quadratic model) until a run gains less than 1e-7. (Restarting with steps a tenth
  // of the last run's stopped short again: one of the 12 checks against scipy failed.)
  const double step[5] = {0.1, 0.1, 0.1, 0.1, nu_step};
  for (int run = 0; run < 8; ++run) {
    nlopt_opt opt = nlopt_create(NLOPT_LN_BOBYQA, 5);
    if (!opt) throw std::bad_alloc();
    nlopt_set_lower_bounds(opt, lower);
    nlopt_set_upper_bounds(opt, upper);
    nlopt_set_max_objective(opt, objective, &search);
    nlopt_set_ftol_abs(opt, 1e-8);
    nlopt_set_xtol_rel(opt, 1e-7);
    nlopt_set_maxeval(opt, 5000);
    nlopt_set_initial_step(opt, step);
    double value = best;
    const nlopt_result r = nlopt_optimize(opt, x, &value);
    nlopt_destroy(opt);
    // NLopt leaves x at the best point it evaluated, also when it stops at rounding or the
    // evaluation cap. Any other failure gives NaN: a value of l_p short of the maximum would
    // make W too large and the interval too narrow, so the callers count such a psi as inside.
    if (r < 0 && r != NLOPT_ROUNDOFF_LIMITED && r != NLOPT_MAXEVAL_REACHED) return std::numeric_limits<double>::quiet_NaN();
    const double gain = value - best;
    if (value > best) best = value;
    if (!(gain > 1e-7)) break;
  }
  if (!(best > at_start)) return at_start;
  std::copy(x, x + 5, start.v);
  return best;
}

Interval t_figure_interval(const TProfileProblem& problem, TFigure figure, double psi_hat, double l_max,
                           const TShapePoint& at_max, double cutoff) {
  Interval out{psi_hat, psi_hat};
  const double log_hat = std::log(psi_hat);
  for (const double dir : {-1.0, 1.0}) {
    TShapePoint warm = at_max;
    // A search that failed (NaN) counts as W = 0: psi inside, the interval wider, not narrower.
    const auto excess = [&](double t) {
      const double w = 2.0 * (l_max - t_figure_profile(problem, figure, std::exp(t), warm));
      return (std::isnan(w) ? 0.0 : w) - cutoff;
    };
    // Out from the estimate by steps growing 1.6 times until W passes the cut-off.
    double inside = log_hat, inside_excess = -cutoff, outside = 0.0, outside_excess = 0.0;
    bool bracketed = false;
    for (double step = 0.05; step <= 40.0; step *= 1.6) {
      const double t = log_hat + dir * step;
      const double e = excess(t);
      if (e > 0.0) {
        outside = t, outside_excess = e, bracketed = true;
        break;
      }
      inside = t, inside_excess = e;
    }
    double end = dir < 0 ? 0.0 : std::numeric_limits<double>::infinity();
    if (bracketed) {
      const double a = std::min(inside, outside), b = std::max(inside, outside);
      const double fa = dir < 0 ? outside_excess : inside_excess, fb = dir < 0 ? inside_excess : outside_excess;
      std::uintmax_t iterations = 60;
      const auto close = [](double u, double v) { return std::fabs(u - v) <= 1e-4; };
      try {
        const auto root = boost::math::tools::toms748_solve(excess, a, b, fa, fb, close, iterations);
        end = std::exp(0.5 * (root.first + root.second));
      } catch (const std::exception&) {  // W not monotone within the bracket: its outer end (wider)
        end = std::exp(outside);
      }
    }
    (dir < 0 ? out.low : out.high) = end;
  }
  return out;
}

}  // namespace strewn::detail
