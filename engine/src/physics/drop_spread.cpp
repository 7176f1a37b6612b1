// drop_spread: the unscented transform of a drop's uncertain inputs to its landing point, checked
// by a seeded Monte Carlo of the same fall (the method and its sources in strewn/drop.hpp).
#include <Eigen/LU>
#include <algorithm>
#include <array>
#include <chrono>
#include <cmath>
#include <random>
#include <vector>

#include <fmt/format.h>

#include "strewn/constants.hpp"
#include "strewn/drop.hpp"
#include "strewn/error.hpp"
#include "strewn/fit.hpp"

#include "cloud_mixture.hpp"

namespace strewn {
namespace {

constexpr int kInputs = 9;
using Inputs = std::array<double, kInputs>;  // deviations from the means, in the order below

// The parameters at one set of deviations: release east and north (m), timing (s), height (m),
// ground speed (m/s), heading (deg), wind speed (m/s), wind direction (deg), drag (relative).
DropParameters perturbed(const DropParameters& d, const Inputs& e) {
  DropParameters p = d;
  const double a = d.heading_deg * kPi / 180.0;
  const Vec2 track(std::sin(a), std::cos(a));
  // A late release (timing > 0) starts further along the track.
  p.release = d.release + Vec2(e[0], e[1]) + e[2] * d.ground_speed * track;
  // A sample's height or drag below zero has no meaning: held at a small positive floor (the
  // loader keeps their deviations small enough that this is a far tail: under a quarter).
  p.height = std::max(d.height + e[3], 1e-3 * d.height);
  p.ground_speed = std::max(d.ground_speed + e[4], 0.0);
  p.heading_deg = d.heading_deg + e[5];
  p.wind.speed = d.wind.speed + e[6];
  p.wind.from_deg = d.wind.from_deg + e[7];
  const double drag = std::max(1.0 + e[8], 1e-3);
  p.drag_area = d.drag_area * drag;
  if (p.parachute) p.parachute->drag_area *= drag;
  return p;
}

Inputs deviations(const DropUncertainty& u) {
  return {u.position, u.position, u.timing,     u.height,        u.ground_speed,
          u.heading_deg, u.wind_speed, u.wind_from_deg, u.drag};
}

bool bad(double v) { return !(std::isfinite(v) && v >= 0.0); }

}  // namespace

std::string DropUncertainty::invalid_reason() const {
  const std::pair<double, const char*> all[] = {
      {position, "position"},       {timing, "timing"},         {height, "height"},
      {ground_speed, "ground_speed"}, {heading_deg, "heading_deg"}, {wind_speed, "wind_speed"},
      {wind_from_deg, "wind_from_deg"}, {drag, "drag"}};
  for (const auto& [v, name] : all)
    if (bad(v)) return std::string(name) + " must be a standard deviation of 0 or more";
  if (drag > 0.25) return "drag must be at most 0.25 (a relative standard deviation; the drag area cannot be negative)";
  if (heading_deg > 30.0 || wind_from_deg > 30.0) return "heading_deg and wind_from_deg must be at most 30 degrees";
  return {};
}

DropSpread drop_spread(const DropParameters& d, const DropUncertainty& u, const DropSpreadOptions& o) {
  if (const std::string why = u.invalid_reason(); !why.empty()) throw input_error("drop.uncertainty: " + why);
  if (u.height > 0.25 * d.height) throw input_error("drop.uncertainty: height must be at most a quarter of the height");
  if (o.falls < 100) throw input_error("drop: the Monte Carlo check needs at least 100 falls");
  DropSpread r;
  r.nominal = fall_of(d, o.fall);

  // Unscented transform over the inputs whose deviation is not zero (the others add nothing).
  const Inputs sd = deviations(u);
  std::vector<int> active;
  for (int i = 0; i < kInputs; ++i)
    if (sd[i] > 0.0) active.push_back(i);
  const double n = static_cast<double>(active.size());
  const double kappa = std::max(0.0, 3.0 - n);
  const double spread = std::sqrt(n + kappa);
  std::vector<std::pair<double, Vec2>> points{{kappa / (n + kappa), r.nominal.landing}};
  for (int i : active)
    for (double sign : {-1.0, 1.0}) {
      Inputs e{};
      e[i] = sign * spread * sd[i];  // the inputs are independent: the Cholesky factor is diagonal
      points.push_back({1.0 / (2.0 * (n + kappa)), fall_of(perturbed(d, e), o.fall).landing});
    }
  r.sigma_points = static_cast<int>(points.size());
  // Moments about the nominal landing (small numbers on a national grid).
  Vec2 mean_offset = Vec2::Zero();
  for (const auto& [w, p] : points) mean_offset += w * (p - r.nominal.landing);
  Mat2 cov = Mat2::Zero();
  for (const auto& [w, p] : points) {
    const Vec2 dv = p - r.nominal.landing - mean_offset;
    cov += w * dv * dv.transpose();
  }
  r.ut_mean = r.nominal.landing + mean_offset;
  r.ut_covariance = cov;
  const double scale = std::max(cov.trace(), 1e-300);
  if (!(cov.allFinite() && cov.determinant() > 1e-10 * scale * scale)) {
    // With position given the landings still spread across: the spread along one line is then
    // too long beside it (a fall of hours drifting kilometres; a hostile trial was told to give
    // the position it had given).
    if (u.position > 0.0 && cov.allFinite() && scale > 0.0)
      throw input_error(fmt::format(
          "drop.uncertainty: the landing points spread along one line: {:.3g} m along it against {:.3g} m across (below "
          "1e-5 of it); a fall this long drifts far more than the release's position error, check height, mass and "
          "drag_area",
          std::sqrt(scale), std::sqrt(std::max(cov.determinant(), 0.0) / scale)));
    throw input_error(
        "drop.uncertainty: the landing points spread along one line or not at all; give position (the "
        "navigation error) or another uncertainty that moves the landing across the track");
  }

  // The Monte Carlo check: the same falls at seeded normal deviations.
  std::mt19937_64 rng(o.seed);
  std::normal_distribution<double> normal(0.0, 1.0);
  std::vector<Vec2> cloud;
  cloud.reserve(o.falls);
  const auto start = std::chrono::steady_clock::now();
  constexpr std::uint64_t kTimed = 8;  // falls timed for the estimate
  for (std::uint64_t k = 0; k < o.falls; ++k) {
    Inputs e{};
    for (int i = 0; i < kInputs; ++i) e[i] = sd[i] * normal(rng);
    cloud.push_back(fall_of(perturbed(d, e), o.fall).landing);
    if (k + 1 == kTimed && o.estimate) {
      WorkEstimate w;
      w.what = fmt::format("drop: {} falls of the Monte Carlo check", o.falls);
      w.units = static_cast<double>(o.falls);
      w.seconds_per_unit = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count() / kTimed;
      o.estimate(w);
    }
    if (o.progress && (k + 1) % 64 == 0) o.progress(static_cast<double>(k + 1) / static_cast<double>(o.falls));
  }
  if (o.progress) o.progress(1.0);
  r.falls = o.falls;
  FitOptions fo;
  fo.bootstrap_replicates = 0;  // only the moments and the goodness of fit are wanted
  const NormalFit single = fit_normal(cloud, r.ut_mean, fo);
  r.mc_mean = single.mean;
  r.mc_covariance = single.covariance;
  r.ks_statistic = single.ks_statistic;
  r.ks_p_value = single.ks_p_value;
  r.normal = single.ks_p_value >= o.normality_level;
  if (r.normal) {
    r.model = ScatterModel(Gaussian::from_covariance(r.ut_mean, r.ut_covariance));
    r.shape = "normal (unscented transform)";
  } else {
    // Components with their own means fitted to half the landings (even index) and checked on
    // the other half (cloud_mixture.hpp), so the check is not flattered by the fit.
    std::vector<Vec2> fit_half, check_half;
    for (std::size_t k = 0; k < cloud.size(); ++k) (k % 2 == 0 ? fit_half : check_half).push_back(cloud[k]);
    const detail::CloudMixture m = detail::fit_cloud_mixture(fit_half, check_half);
    r.model = m.model;
    r.mixture_bic = m.bic;
    const NormalFit half = fit_normal(fit_half, r.ut_mean, fo);
    double single_ll = 0.0;
    // The single normal's maximum likelihood (covariance over n, not n - 1) on the same half.
    const Mat2 ml = half.covariance * (static_cast<double>(fit_half.size()) - 1.0) / static_cast<double>(fit_half.size());
    const Mat2 precision = ml.inverse();
    for (const Vec2& p : fit_half)
      single_ll += -0.5 * (p - half.mean).dot(precision * (p - half.mean)) - 0.5 * std::log(ml.determinant()) - std::log(kTwoPi);
    r.normal_bic = -2.0 * single_ll + 5.0 * std::log(static_cast<double>(fit_half.size()));
    r.mixture_components = m.components;
    r.mixture_ks_statistic = m.ks_statistic;
    r.mixture_ks_p_value = m.ks_p_value;
    r.mixture_check_passed = m.ks_p_value >= o.normality_level;
    r.shape = fmt::format("mixture of {} fitted to {} falls (not normal: KS p = {:.2g}); checked on {} other falls: {} "
                          "(KS p = {:.2g})",
                          m.components, m.fitted, r.ks_p_value, m.checked,
                          r.mixture_check_passed ? "passed" : "NOT passed", m.ks_p_value);
  }
  return r;
}

}  // namespace strewn
