// fit_student_t: EM for location and scale at fixed nu, nu by profile likelihood, parametric
// bootstrap intervals, and the comparison with the normal and the mixture (formulas in
// strewn/student_t_fit.hpp).
#include "strewn/student_t_fit.hpp"

#include <Eigen/LU>
#include <boost/math/tools/toms748_solve.hpp>
#include <algorithm>
#include <cmath>
#include <string>

#include <random>
#include <string>

#include "strewn/constants.hpp"
#include "flat_impacts.hpp"
#include "sample_quantile.hpp"
#include "t_figure_profile.hpp"
#include "strewn/error.hpp"

namespace strewn {
namespace {

// Location and scale at one nu, in coordinates relative to `origin` (the sample mean: national
// grid coordinates lose nothing to the sums).
struct LocationScale {
  Vec2 mu = Vec2::Zero();
  Mat2 sigma = Mat2::Identity();
  bool degenerate = false;
};

// How tightly a fit is solved: the EM's relative step at which it stops, and the width in log nu
// at which the golden-section search stops. The bootstrap's refits need less than the fit itself:
// their figures spread by 5-50% between refits, so an error of order 1e-5 (the EM's step at
// stopping, times at most a few for its linear rate) moves an interval's end by far less than
// its Monte Carlo noise. Measured on shapes/field_data/lane_marks.csv (two groups, six seeds):
// EM at 1e-5 instead of 1e-7 moved the scale intervals' ends by at most 9.5e-6 relative and
// nu's by 2e-9, while the ends' standard deviation between bootstrap seeds is 1.1-6.3%.
struct Tolerance {
  double em = 1e-10, log_nu = 1e-3;
};
const Tolerance kRefit{1e-5, 1e-2};

// EM with Kent, Tyler & Vardi's divisor (see the header), from `start`, until the location moves
// by less than tol.em of the scale and the scale changes by less than tol.em relative. Each pass
// needs one product per impact and no logarithm. `passes` counts the passes over the impacts.
LocationScale em(const std::vector<Vec2>& x, double nu, LocationScale start, double tol, int& passes) {
  LocationScale ls = start;
  const int kMaxPasses = 2000;
  ls.degenerate = false;
  for (int it = 0; it < kMaxPasses; ++it) {
    ++passes;
    const Mat2 inv = ls.sigma.inverse();
    double sw = 0.0;
    Vec2 swd = Vec2::Zero();
    Mat2 swdd = Mat2::Zero();
    for (const Vec2& p : x) {
      const Vec2 d = p - ls.mu;
      const double w = (nu + 2.0) / (nu + d.dot(inv * d));
      sw += w;
      swd += w * d;
      swdd += w * d * d.transpose();
    }
    // New location mu + delta, delta = sum w d / sum w; the scatter about it is
    // sum w d d^T - sw delta delta^T (sum w d = sw delta).
    const Vec2 delta = swd / sw;
    Mat2 next = (swdd - sw * delta * delta.transpose()) / sw;
    next = 0.5 * (next + next.transpose());
    const double size = ls.sigma.trace();
    const bool done = delta.squaredNorm() <= tol * tol * size && (next - ls.sigma).norm() <= tol * size;
    // A scale collapsing onto a line through some impacts (the likelihood unbounded there):
    // stop at the last proper step; the caller sees the flag.
    if (!(next.determinant() > 1e-12 * next.trace() * next.trace())) {
      ls.degenerate = true;
      break;
    }
    ls.mu += delta;
    ls.sigma = next;
    if (done) break;
  }
  return ls;
}

double log_likelihood_relative(const std::vector<Vec2>& x, const LocationScale& ls, double nu) {
  return detail::t_log_likelihood(x, ls.mu, ls.sigma, nu);
}

struct ProfileMax {
  LocationScale ls;
  double nu = 0.0, log_likelihood = 0.0;
  NuAt at = NuAt::interior;
  bool degenerate = false;  // some profile point's scale collapsed: no maximum to report
};

// The profile likelihood's maximum over log nu in [log lo, log hi]: a grid of 7 points (warm
// starts from one to the next), then golden-section search to tol.log_nu in log nu between the best
// grid point's neighbours. l_p is smooth in log nu; the grid keeps a second, lower bump (rare,
// small n) from capturing the search.
ProfileMax profile(const std::vector<Vec2>& x, double lo, double hi, const LocationScale& start, Tolerance tol,
                   int& passes) {
  const double a = std::log(lo), b = std::log(hi);
  const int kGrid = 7;
  std::vector<double> t(kGrid), value(kGrid);
  std::vector<LocationScale> at(kGrid);
  LocationScale ls = start;
  // From the upper end down: at large nu the normal's moments are already close.
  for (int k = kGrid - 1; k >= 0; --k) {
    t[k] = a + (b - a) * k / (kGrid - 1);
    ls = em(x, std::exp(t[k]), ls, tol.em, passes);
    at[k] = ls;
    value[k] = log_likelihood_relative(x, ls, std::exp(t[k]));
  }
  const int best = static_cast<int>(std::max_element(value.begin(), value.end()) - value.begin());
  ProfileMax m{at[best], std::exp(t[best]), value[best], NuAt::interior, false};
  double left = t[std::max(best - 1, 0)], right = t[std::min(best + 1, kGrid - 1)];
  const double g = (std::sqrt(5.0) - 1.0) / 2.0;
  double c = right - g * (right - left), d = left + g * (right - left);
  LocationScale lc = em(x, std::exp(c), at[best], tol.em, passes), ld = em(x, std::exp(d), lc, tol.em, passes);
  double fc = log_likelihood_relative(x, lc, std::exp(c)), fd = log_likelihood_relative(x, ld, std::exp(d));
  while (right - left > tol.log_nu) {
    if (fc >= fd) {
      right = d, d = c, fd = fc, ld = lc;
      c = right - g * (right - left);
      lc = em(x, std::exp(c), lc, tol.em, passes);
      fc = log_likelihood_relative(x, lc, std::exp(c));
    } else {
      left = c, c = d, fc = fd, lc = ld;
      d = left + g * (right - left);
      ld = em(x, std::exp(d), ld, tol.em, passes);
      fd = log_likelihood_relative(x, ld, std::exp(d));
    }
  }
  if (fc > m.log_likelihood) m = {lc, std::exp(c), fc, NuAt::interior, false};
  if (fd > m.log_likelihood) m = {ld, std::exp(d), fd, NuAt::interior, false};
  for (const LocationScale& l : at) m.degenerate = m.degenerate || l.degenerate;
  m.degenerate = m.degenerate || lc.degenerate || ld.degenerate;
  // The ends are grid points: a maximum there (or within the search's tolerance of one) is the
  // end itself.
  if (m.nu <= lo * std::exp(2 * tol.log_nu) && value.front() >= m.log_likelihood - 1e-9 * std::fabs(m.log_likelihood))
    m = {at.front(), lo, value.front(), NuAt::lower_end, m.degenerate};
  else if (m.nu >= hi * std::exp(-2 * tol.log_nu) && value.back() >= m.log_likelihood - 1e-9 * std::fabs(m.log_likelihood))
    m = {at.back(), hi, value.back(), NuAt::upper_end, m.degenerate};
  return m;
}

// The sample mean and covariance (a starting point), relative to the first point.
std::vector<Vec2> relative(const std::vector<Vec2>& points, Vec2& origin) {
  origin = sample_moments(points).first;
  std::vector<Vec2> x;
  x.reserve(points.size());
  for (const Vec2& p : points) x.push_back(p - origin);
  return x;
}

LocationScale moments_start(const std::vector<Vec2>& x) {
  LocationScale ls;
  ls.mu = Vec2::Zero();
  for (const Vec2& p : x) ls.mu += p;
  ls.mu /= static_cast<double>(x.size());
  ls.sigma = Mat2::Zero();
  for (const Vec2& p : x) ls.sigma += (p - ls.mu) * (p - ls.mu).transpose();
  ls.sigma /= static_cast<double>(x.size());
  return ls;
}

void check(const std::vector<Vec2>& points) {
  // Below 10 impacts nothing can be told about the tails, and a few points on one line make the
  // t's likelihood unbounded at small nu.
  if (points.size() < kMinStudentTImpacts)
    throw input_error("a Student-t fit needs at least " + std::to_string(kMinStudentTImpacts) + " impacts (" +
                      std::to_string(points.size()) + " given)");
  for (const Vec2& p : points)
    if (!p.allFinite()) throw input_error("impact coordinates must be finite numbers");
  const Mat2 s = sample_moments(points).second;
  const double scale2 = s.trace() / 2.0;
  if (!(s.determinant() > 1e-12 * scale2 * scale2) || !(scale2 > 0.0))
    throw input_error(detail::flat_impacts_message(points));
}

double quantile_of(const std::vector<double>& v, double q) { return detail::sample_quantile(v, q); }

// The cut-off of a scale figure's profile likelihood-ratio statistic from its values over the
// refits of the world at nu-hat and of the world at nu's lower end (empty when that is nu-hat).
double figure_cutoff(std::vector<double> at_hat, const std::vector<double>& at_low, double confidence) {
  at_hat.insert(at_hat.end(), at_low.begin(), at_low.end());
  return detail::sample_quantile(at_hat, confidence);
}

}  // namespace

Gaussian StudentTFit::spread() const {
  return Gaussian::from_covariance(mean, scale).with_family(ScatterFamily::student_t(nu));
}

double student_t_log_likelihood(const std::vector<Vec2>& points, const Vec2& mean, const Mat2& scale, double nu) {
  LocationScale ls{Vec2::Zero(), scale};
  std::vector<Vec2> x;
  for (const Vec2& p : points) x.push_back(p - mean);
  return log_likelihood_relative(x, ls, nu);
}

double student_t_profile_log_likelihood(const std::vector<Vec2>& points, TScaleFigure figure, double psi,
                                        const StudentTFitOptions& options) {
  if (!(psi > 0.0) || !std::isfinite(psi)) throw input_error("the figure's value must be a positive number");
  StudentTFitOptions o = options;
  o.bootstrap_replicates = 0;
  const StudentTFit f = fit_student_t(points, o);  // checks the points and the range
  Vec2 origin;
  const std::vector<Vec2> x = relative(points, origin);
  const detail::TProfileProblem problem = detail::t_profile_problem(x, f.mean - origin, f.scale, o.nu_min, o.nu_max);
  detail::TShapePoint start = detail::t_shape_point(problem, f.mean - origin, f.scale, f.nu);
  return detail::t_figure_profile(problem, static_cast<detail::TFigure>(figure), psi, start);
}

std::pair<Vec2, Mat2> fit_student_t_fixed_nu(const std::vector<Vec2>& points, double nu) {
  check(points);
  if (!(nu > 0.0 && nu <= 1e6)) throw input_error("nu must be in (0, 1e6]");
  Vec2 origin;
  const std::vector<Vec2> x = relative(points, origin);
  int passes = 0;
  const LocationScale ls = em(x, nu, moments_start(x), Tolerance{}.em, passes);
  if (ls.degenerate)
    throw input_error("the Student-t likelihood has no maximum for these impacts at this nu");
  return {origin + ls.mu, ls.sigma};
}

StudentTFit fit_student_t(const std::vector<Vec2>& points, const StudentTFitOptions& options) {
  check(points);
  if (!(options.nu_min > 0.0 && options.nu_min < options.nu_max && options.nu_max <= 1e6))
    throw input_error("the range of nu must satisfy 0 < nu_min < nu_max <= 1e6");
  if (!(options.confidence > 0.0 && options.confidence < 1.0)) throw input_error("confidence must be in (0, 1)");
  if (options.bootstrap_replicates < 0) throw input_error("the number of bootstrap replicates must not be negative");
  StudentTFit f;
  f.n = points.size();
  f.confidence = options.confidence;
  f.nu_min = options.nu_min;
  f.nu_max = options.nu_max;
  Vec2 origin;
  const std::vector<Vec2> x = relative(points, origin);
  const LocationScale start = moments_start(x);
  const ProfileMax m = profile(x, options.nu_min, options.nu_max, start, Tolerance{}, f.em_iterations);
  if (m.degenerate)
    throw input_error("the Student-t likelihood has no maximum for these impacts: its scale collapses onto a line "
                      "through some of them");
  f.mean = origin + m.ls.mu;
  f.scale = m.ls.sigma;
  f.nu = m.nu;
  f.nu_at = m.at;
  f.log_likelihood = m.log_likelihood;
  const double n = static_cast<double>(f.n);
  f.aic = -2.0 * f.log_likelihood + 2.0 * 6.0;
  f.bic = -2.0 * f.log_likelihood + 6.0 * std::log(n);
  const Gaussian spread = f.spread();
  f.axes = spread.axes();
  f.sigma = std::sqrt(f.scale.trace() / 2.0);
  f.cep = containment_radius(spread, f.mean, 0.5);
  f.r95 = containment_radius(spread, f.mean, 0.95);
  if (options.bootstrap_replicates == 0) return f;

  // Parametric bootstrap: n impacts from a t with the fitted scale about the origin (the
  // figures do not depend on the location), refitted from their own moments. `world_nu` is the
  // nu the data are drawn with; `with_lr` adds each refit's likelihood-ratio statistic there,
  // `with_figures` each scale figure's profile likelihood-ratio statistic at the world's own
  // value of the figure (t_figure_profile.hpp): the law its cut-off is read from.
  std::mt19937_64 rng(options.seed);
  std::normal_distribution<double> z;
  const Mat2 L = spread.cholesky();
  // CEP's and R95's containment factors tabled once for all the profile searches below, over
  // axis ratios from the circle to 20 times the fit's own (containment_table.hpp), when the
  // fit's axes are 4:1 or more: nearer the circle a containment radius costs 3-10 us, about
  // what the table's lookup costs, and the table's 2,000-odd radii would not pay for themselves.
  const double log_rho = std::log(f.axes.sigma_minor / f.axes.sigma_major);
  detail::ContainmentTable cep_table, r95_table;
  if (log_rho < std::log(0.25)) {
    const double log_rho_min = std::max(-40.0, log_rho - 3.0);
    cep_table = detail::ContainmentTable(0.5, log_rho_min, std::log(options.nu_min), std::log(options.nu_max));
    r95_table = detail::ContainmentTable(0.95, log_rho_min, std::log(options.nu_min), std::log(options.nu_max));
  }
  std::vector<Vec2> y(f.n);
  // Progress counts the refits with figures, two worlds' worth (the nu test's worlds are EM
  // refits only, a small part of the time).
  const double figure_refits = 2.0 * options.bootstrap_replicates;
  double figures_done = 0.0;
  const auto bootstrap = [&](double world_nu, bool with_lr, bool with_figures) {
    std::vector<StudentTDraw> draws;
    std::gamma_distribution<double> chi2(world_nu / 2.0, 2.0);
    double truth[detail::kTFigureCount];
    for (int k = 0; k < detail::kTFigureCount; ++k) truth[k] = detail::t_figure(f.scale, world_nu, detail::TFigure(k));
    for (int b = 0; b < options.bootstrap_replicates; ++b) {
      for (Vec2& p : y) p = L * Vec2(z(rng), z(rng)) / std::sqrt(chi2(rng) / world_nu);
      const Mat2 s = sample_moments(y).second;
      if (!(s.determinant() > 0.0)) continue;  // collinear draw: probability 0
      Vec2 y_origin;
      const std::vector<Vec2> yr = relative(y, y_origin);
      int passes = 0;
      const ProfileMax r = profile(yr, options.nu_min, options.nu_max, moments_start(yr), kRefit, passes);
      if (r.degenerate) continue;  // a refit without a maximum (rare, small n): left out
      const Gaussian g = Gaussian::from_covariance(Vec2::Zero(), r.ls.sigma).with_family(ScatterFamily::student_t(r.nu));
      const SpreadAxes ax = g.axes();
      // The refit's profile likelihood-ratio statistic at the nu its data were drawn with.
      double lr = 0.0;
      if (with_lr) {
        const LocationScale at_truth = em(yr, world_nu, r.ls, kRefit.em, passes);
        lr = std::max(0.0, 2.0 * (r.log_likelihood - log_likelihood_relative(yr, at_truth, world_nu)));
      }
      StudentTDraw d{r.nu, std::sqrt(r.ls.sigma.trace() / 2.0), ax.sigma_major, ax.sigma_minor,
                     containment_radius(g, Vec2::Zero(), 0.5), containment_radius(g, Vec2::Zero(), 0.95), lr, {}};
      bool settled = true;
      if (with_figures) {
        const detail::TProfileProblem problem =
            detail::t_profile_problem(yr, r.ls.mu, r.ls.sigma, options.nu_min, options.nu_max, &cep_table, &r95_table);
        for (int k = 0; k < detail::kTFigureCount && settled; ++k) {
          detail::TShapePoint start = detail::t_shape_point(problem, r.ls.mu, r.ls.sigma, r.nu);
          const double lp = detail::t_figure_profile(problem, detail::TFigure(k), truth[k], start);
          settled = !std::isnan(lp);  // a failed search: the refit is left out (its W unknown)
          d.figure_lr[k] = std::max(0.0, 2.0 * (r.log_likelihood - lp));
        }
      }
      if (settled) draws.push_back(d);
      if (with_figures && options.progress) options.progress(std::min(1.0, ++figures_done / figure_refits));
    }
    return draws;
  };
  f.draws = bootstrap(f.nu, true, true);
  if (f.draws.empty()) {
    if (options.progress) options.progress(1.0);
    return f;
  }
  const auto column = [](const std::vector<StudentTDraw>& draws, double StudentTDraw::*field) {
    std::vector<double> v;
    for (const StudentTDraw& d : draws) v.push_back(d.*field);
    return v;
  };
  // nu: the bootstrap test of nu = nu0 inverted over nu0 (Hall 1987, "On the bootstrap and
  // likelihood-based confidence regions", Biometrika 74; Davison & Hinkley 1997, section 5.2.3).
  // nu0 is in the interval when the data's profile likelihood-ratio statistic
  // W(nu0) = 2 (l_max - l_p(nu0)) is within c(nu0), the `confidence` quantile of the same
  // statistic over refits of data drawn at nu0. W's distribution does not depend on the location
  // or the scale (the fit is affine-equivariant), only on nu0 and n, so the test has its level
  // at every nu0 up to the bootstrap's noise, the range's ends included (where W is 0 half the
  // time or more: Self & Liang 1987, JASA 82). c(nu0) is taken from worlds on the 7-point grid
  // of the profile search (and the world at nu-hat), walking out from nu-hat until W exceeds it,
  // then linear in log nu between the last two worlds. Before (docs/intervals.md): one cut-off
  // from the world at nu-hat, joined with the refits' percentile interval, its lower end taken
  // again in a world there: 99.8% at n = 50, nu = 10 (too wide), 90% before that recalibration.
  LocationScale warm = m.ls;
  int passes = 0;
  const auto statistic = [&](double log_nu) {  // the data's W at exp(log_nu), EM warm-started
    warm = em(x, std::exp(log_nu), warm, Tolerance{}.em, passes);
    return std::max(0.0, 2.0 * (f.log_likelihood - log_likelihood_relative(x, warm, std::exp(log_nu))));
  };
  const double log_hat = std::log(f.nu);
  const double c_hat = quantile_of(column(f.draws, &StudentTDraw::lr), options.confidence);
  f.nu_lr_cutoff = c_hat;
  const auto cutoff_at = [&](double nu0) {
    const std::vector<StudentTDraw> d = bootstrap(nu0, true, false);
    return d.empty() ? c_hat : quantile_of(column(d, &StudentTDraw::lr), options.confidence);
  };
  // A W below this is inside the interval without a world: a cut-off under 1 would need
  // P(W > 1) < 5%, where chi^2_1 (the large-sample law away from the ends) has 32% and the
  // ends' mixture 16%.
  const double kSurelyInside = 1.0, kSurelyOutside = 25.0;
  const double step = (std::log(options.nu_max) - std::log(options.nu_min)) / 6.0;
  // One side: from nu-hat towards the end `to` (log nu) by the grid's points; returns the
  // interval's end there and whether it is the range's end (nothing rejected on that side).
  const auto walk = [&](double to, double& cut) -> std::pair<double, bool> {
    const double dir = to > log_hat ? 1.0 : -1.0;
    double node_t = log_hat, node_c = c_hat;  // the last world's log nu and cut-off
    double inside_t = log_hat;                // the last point known to be inside
    cut = c_hat;
    warm = m.ls;
    for (int k = 0; k <= 6; ++k) {
      const double tt = std::log(options.nu_min) + step * (dir > 0 ? k : 6 - k);
      if ((tt - log_hat) * dir <= 0.05) continue;  // at or behind nu-hat (its own world stands for it)
      const double w = statistic(tt);
      if (w <= kSurelyInside) {
        inside_t = tt;
        continue;
      }
      // Far beyond any cut-off (chi^2_1 exceeds 25 with probability 6e-7): rejected without a
      // world, the cut-off taken as the last world's. Saves the worlds of large samples, whose
      // profile falls steeply (`strewn fit` on 2000 impacts: 3.1 s of CPU with them, 1.6 s without).
      const double c_here = w > kSurelyOutside ? node_c : cutoff_at(std::exp(tt));
      if (w <= c_here) {
        node_t = tt, node_c = c_here, inside_t = tt;
        cut = c_here;
        continue;
      }
      // Rejected at tt: the end lies between inside_t and tt, where W meets the cut-off taken
      // linearly in log nu between the last two worlds.
      const double slope = w > kSurelyOutside ? 0.0 : (c_here - node_c) / (tt - node_t);
      const auto excess = [&](double s) { return statistic(s) - (node_c + slope * (s - node_t)); };
      const auto tol = [](double a, double b) { return std::fabs(b - a) <= 1e-4; };
      std::uintmax_t iterations = 60;
      warm = m.ls;
      double end = inside_t;
      try {
        const auto root = boost::math::tools::toms748_solve(excess, std::min(inside_t, tt), std::max(inside_t, tt), tol,
                                                            iterations);
        end = (root.first + root.second) / 2;
      } catch (const std::exception&) {  // no sign change (rounding at a flat profile): the last point inside
      }
      cut = node_c + slope * (end - node_t);
      return {std::exp(end), false};
    }
    return {std::exp(to), true};
  };
  double cut_high = c_hat, cut_low = c_hat;
  const auto high = f.nu_at == NuAt::upper_end ? std::pair<double, bool>{f.nu_max, true}
                                               : walk(std::log(options.nu_max), cut_high);
  const auto low = f.nu_at == NuAt::lower_end ? std::pair<double, bool>{f.nu_min, true}
                                              : walk(std::log(options.nu_min), cut_low);
  f.nu_ci = {low.first, high.first};
  f.nu_ci_open_above = high.second;
  f.nu_lr_cutoff_low = cut_low;

  // The scale figures: the profile likelihood interval {psi : W(psi) <= c} of each
  // (t_figure_profile.hpp), nu and the rest maximised out, its cut-off c the `confidence`
  // quantile of W over the refits of a world where the figure's value is known. Its law is
  // close to chi^2_1 and hardly moves with nu (docs/intervals.md, "Student-t fit": the 95% point
  // 2.9-4.9 over n = 30-200, nu = 1.5-100), where the figures' ratio estimate / truth, which
  // the basic interval used before was read from, spreads more at a smaller nu: that interval
  // needed a second world at nu's lower end and over-covered where nu is not identified.
  std::vector<StudentTDraw> heavy;
  if (f.nu_ci.low < f.nu * (1.0 - 1e-9)) heavy = bootstrap(f.nu_ci.low, false, true);
  const detail::TProfileProblem problem =
      detail::t_profile_problem(x, m.ls.mu, m.ls.sigma, options.nu_min, options.nu_max, &cep_table, &r95_table);
  const detail::TShapePoint at_max = detail::t_shape_point(problem, m.ls.mu, m.ls.sigma, f.nu);
  const double estimates[detail::kTFigureCount] = {f.sigma, f.axes.sigma_major, f.axes.sigma_minor, f.cep, f.r95};
  Interval* intervals[detail::kTFigureCount] = {&f.sigma_ci, &f.sigma_major_ci, &f.sigma_minor_ci, &f.cep_ci, &f.r95_ci};
  for (int k = 0; k < detail::kTFigureCount; ++k) {
    std::vector<double> w;
    for (const StudentTDraw& d : f.draws) w.push_back(d.figure_lr[k]);
    std::vector<double> w_heavy;
    for (const StudentTDraw& d : heavy) w_heavy.push_back(d.figure_lr[k]);
    f.figure_lr_cutoff[k] = figure_cutoff(w, w_heavy, options.confidence);
    *intervals[k] = detail::t_figure_interval(problem, detail::TFigure(k), estimates[k], f.log_likelihood, at_max,
                                              f.figure_lr_cutoff[k]);
  }
  if (options.progress) options.progress(1.0);
  return f;
}

FitComparison compare_fits(const NormalFit& normal, const MixtureFit& mixture, const StudentTFit& t) {
  const double n = static_cast<double>(normal.n);
  // The normal at its maximum: the covariance with divisor n; sum of d^T S^-1 d is then 2 n.
  const Mat2 mle = normal.covariance * (n - 1.0) / n;
  const double normal_ll = -n * std::log(2.0 * kPi) - 0.5 * n * std::log(mle.determinant()) - n;
  FitComparison c;
  const auto add = [&](FitCandidate::Model model, double ll, int k, bool offered) {
    c.candidates.push_back({model, ll, k, -2.0 * ll + 2.0 * k, -2.0 * ll + k * std::log(n), offered});
  };
  add(FitCandidate::Model::normal, normal_ll, 5, true);
  add(FitCandidate::Model::mixture, mixture.log_likelihood, 7, mixture.preferred);
  add(FitCandidate::Model::student_t, t.log_likelihood, 6, true);
  for (std::size_t i = 1; i < c.candidates.size(); ++i) {
    if (!c.candidates[i].offered) continue;
    if (c.candidates[i].aic < c.candidates[c.by_aic].aic) c.by_aic = i;
    if (c.candidates[i].bic < c.candidates[c.by_bic].bic) c.by_bic = i;
  }
  c.recommended = c.by_bic;
  return c;
}

int student_t_default_replicates(std::size_t n) {
  return static_cast<int>(std::clamp(1e6 / static_cast<double>(std::max<std::size_t>(n, 1)), 100.0, 400.0));
}

}  // namespace strewn
