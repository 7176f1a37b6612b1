// Fitting spreads from field data: against scipy references computed at test time
// (reference/make_fit_references.py), closed forms, and coverage simulations.
#include <Eigen/LU>
#include <boost/math/distributions/chi_squared.hpp>
#include <catch2/catch.hpp>
#include <cmath>
#include <fstream>
#include <nlohmann/json.hpp>
#include <random>
#include <tuple>

#include "strewn/error.hpp"
#include "strewn/constants.hpp"
#include "strewn/fit.hpp"

using namespace strewn;
using nlohmann::json;

namespace {

json references() {
  std::ifstream in(STREWN_TEST_BINARY_DIR "/fit_references.json");
  REQUIRE(in.good());
  return json::parse(in);
}

std::vector<Vec2> points_of(const json& j) {
  std::vector<Vec2> pts;
  for (const auto& p : j) pts.emplace_back(p[0].get<double>(), p[1].get<double>());
  return pts;
}

}  // namespace

TEST_CASE("normal fit: moments, Hotelling's T^2, the chi-square sigma interval and KS match scipy", "[fit]") {
  const json refs = references();  // named: a temporary would dangle in the loop
  // make_fit_references.py writes 3 normal, 5 count and 3 censored cases: an empty or short
  // file must fail, not pass by looping over nothing (deliberate fault: the generator writing
  // empty lists passed every fit test before).
  REQUIRE(refs["normal"].size() == 3);
  for (const auto& c : refs["normal"]) {
    const auto pts = points_of(c["points"]);
    INFO("n = " << pts.size());
    const NormalFit f = fit_normal(pts, Vec2(c["aim"][0].get<double>(), c["aim"][1].get<double>()));
    CHECK(f.mean.x() == Approx(c["mean"][0].get<double>()).epsilon(1e-12));
    CHECK(f.mean.y() == Approx(c["mean"][1].get<double>()).epsilon(1e-12));
    for (int i = 0; i < 2; ++i)
      for (int k = 0; k < 2; ++k) CHECK(f.covariance(i, k) == Approx(c["cov"][i][k].get<double>()).epsilon(1e-12));
    CHECK(f.t2 == Approx(c["t2"].get<double>()).epsilon(1e-10));
    CHECK(f.no_bias_p_value == Approx(c["no_bias_p"].get<double>()).epsilon(1e-8).margin(1e-300));
    // The mean region: S^-1 / r^2 with r^2 from the F quantile.
    const Mat2 expected = f.covariance.inverse() / c["mean_region_r2"].get<double>();
    CHECK(f.mean_region(0, 0) == Approx(expected(0, 0)).epsilon(1e-9));
    CHECK(f.sigma == Approx(c["sigma"].get<double>()).epsilon(1e-12));
    CHECK(f.sigma_ci.low == Approx(c["sigma_ci"][0].get<double>()).epsilon(1e-9));
    CHECK(f.sigma_ci.high == Approx(c["sigma_ci"][1].get<double>()).epsilon(1e-9));
    // Satterthwaite's degrees of freedom and the one-sided bound behind the design factor.
    CHECK(f.sigma_dof == Approx(c["sigma_dof"].get<double>()).epsilon(1e-10));
    CHECK(f.sigma_upper == Approx(c["sigma_upper"].get<double>()).epsilon(1e-9));
    CHECK(f.design_factor == Approx(c["sigma_upper"].get<double>() / c["sigma"].get<double>()).epsilon(1e-9));
    // The mean's ellipse: its stated axes end on the boundary of (mu - m)^T A (mu - m) <= 1.
    const double t = f.mean_region_axes.angle_deg * M_PI / 180;
    const Vec2 major(std::cos(t), std::sin(t)), minor(-std::sin(t), std::cos(t));
    const Vec2 a = f.mean_region_axes.sigma_major * major, b = f.mean_region_axes.sigma_minor * minor;
    CHECK(a.dot(f.mean_region * a) == Approx(1.0).epsilon(1e-12));
    CHECK(b.dot(f.mean_region * b) == Approx(1.0).epsilon(1e-12));
    CHECK(a.dot(f.mean_region * b) == Approx(0.0).margin(1e-12));
    CHECK(f.ks_statistic == Approx(c["ks"].get<double>()).epsilon(1e-10));
    // CEP of the fitted normal: between the minor- and major-axis circular values, and for
    // circular data close to sigma sqrt(2 ln 2) (Rayleigh median).
    CHECK(f.cep > f.axes.sigma_minor * std::sqrt(2 * std::log(2.0)));
    CHECK(f.cep < f.axes.sigma_major * std::sqrt(2 * std::log(2.0)));
    CHECK(f.sigma_major_ci.low < f.axes.sigma_major);
    CHECK(f.sigma_major_ci.high > f.axes.sigma_major);
  }
}

TEST_CASE("count fit: the Clopper-Pearson interval matches scipy.stats.beta", "[fit]") {
  const json refs = references();  // named: a temporary would dangle in the loop
  REQUIRE(refs["counts"].size() == 5);
  for (const auto& c : refs["counts"]) {
    const auto k = c["k"].get<std::uint64_t>(), n = c["n"].get<std::uint64_t>();
    INFO(k << " of " << n);
    const CountFit f = fit_counts(k, n, 0.5, c["confidence"].get<double>());
    CHECK(f.fraction_ci.low == Approx(c["low"].get<double>()).epsilon(1e-10).margin(1e-300));
    CHECK(f.fraction_ci.high == Approx(c["high"].get<double>()).epsilon(1e-10));
    // sigma = a / sqrt(-2 ln(1 - f)) maps the interval, ends swapped.
    if (k > 0 && k < n) {
      CHECK(f.sigma == Approx(0.5 / std::sqrt(-2 * std::log1p(-f.fraction))).epsilon(1e-14));
      CHECK(f.sigma_ci.low == Approx(0.5 / std::sqrt(-2 * std::log1p(-c["high"].get<double>()))).epsilon(1e-9));
    }
    // One-sided bounds: the lower bound on the fraction bounds sigma from above (finite also
    // for k = n, where there is no point estimate), the upper one from below.
    if (k > 0)
      CHECK(f.sigma_upper == Approx(0.5 / std::sqrt(-2 * std::log1p(-c["low_one_sided"].get<double>()))).epsilon(1e-9));
    else
      CHECK(std::isinf(f.sigma_upper));
    if (k < n)
      CHECK(f.sigma_lower == Approx(0.5 / std::sqrt(-2 * std::log1p(-c["high_one_sided"].get<double>()))).epsilon(1e-9));
    else
      CHECK(f.sigma_lower == 0.0);
  }
}

TEST_CASE("censored fit: the closed-form MLE and the likelihood-ratio interval kept for comparison", "[fit]") {
  const json refs = references();  // named: a temporary would dangle in the loop
  REQUIRE(refs["censored"].size() == 3);
  for (const auto& c : refs["censored"]) {
    std::vector<double> radii = c["radii"].get<std::vector<double>>();
    const CensoredFit f = fit_censored(radii, c["outside"].get<std::uint64_t>(), c["radius"].get<double>());
    CHECK(f.sigma == Approx(c["sigma"].get<double>()).epsilon(1e-13));
    CHECK(f.lr_ci.low == Approx(c["sigma_ci"][0].get<double>()).epsilon(1e-9));
    CHECK(f.lr_ci.high == Approx(c["sigma_ci"][1].get<double>()).epsilon(1e-9));
    CHECK(f.lr_upper == Approx(c["sigma_upper"].get<double>()).epsilon(1e-9));
  }
}

TEST_CASE("censored fit: with nothing censored the exact bounds are the chi-square ones", "[fit]") {
  // Uncensored, sum r^2 / sigma^2 ~ chi^2(2n) exactly, so the level-u upper bound on sigma is
  // sqrt(sum r^2 / chi^2_{2n}(1 - u)) (e.g. NIST/SEMATECH e-Handbook 1.3.5.8, the chi-square
  // interval for a variance); chi-square quantiles from Boost. A radius far beyond every impact
  // leaves nothing censored. Tolerance: 20000 reference samples put a level's standard error at
  // 0.0015, about 0.3% of sigma at these levels.
  const std::vector<double> radii = {0.31, 1.42, 0.77, 2.05, 0.12, 1.13, 0.95, 1.61, 0.48, 1.29};
  double sum = 0;
  for (double r : radii) sum += r * r;
  const CensoredFit f = fit_censored(radii, 0, 1e3);
  const boost::math::chi_squared_distribution<> chi(20.0);
  CHECK(f.sigma_upper == Approx(std::sqrt(sum / boost::math::quantile(chi, 0.05))).epsilon(0.01));
  CHECK(f.sigma_ci.high == Approx(std::sqrt(sum / boost::math::quantile(chi, 0.025))).epsilon(0.01));
  CHECK(f.sigma_ci.low == Approx(std::sqrt(sum / boost::math::quantile(chi, 0.975))).epsilon(0.01));
}

TEST_CASE("censored fit: the exact bounds cover at their level under heavy censoring", "[fit][coverage]") {
  // 200 throws, sigma 1 m, radii measured within 0.25 m (about 6 measured): the likelihood-ratio
  // interval covered 92.7% two-sided in docs/intervals.md's 1000 data sets. The exact bounds
  // (each data set with its own seeded reference of 200 samples: the reference's noise averages
  // out over data sets) must cover at 95% within 2.5 binomial standard errors of 1000 data sets
  // (0.69%), two-sided and one-sided. Seeded: the counts are fixed.
  std::mt19937_64 rng(20261203);
  std::normal_distribution<double> z;
  const double a = 0.25;
  int sets = 0, exact_two = 0, exact_upper = 0;
  while (sets < 1000) {
    std::vector<double> radii;
    std::uint64_t outside = 0;
    for (int i = 0; i < 200; ++i) {
      const double r = std::hypot(z(rng), z(rng));
      if (r <= a) radii.push_back(r);
      else ++outside;
    }
    if (radii.empty()) continue;
    ++sets;
    double sum = outside * a * a;
    for (double r : radii) sum += r * r;
    const double sigma_hat = std::sqrt(sum / (2.0 * radii.size()));
    const CensoredConfidence h(radii.size(), outside, a, sigma_hat, 1000 + sets, 200);
    exact_two += h.quantile(0.025) <= 1.0 && 1.0 <= h.quantile(0.975);
    exact_upper += 1.0 <= h.quantile(0.95);
  }
  INFO("exact two-sided " << exact_two << ", one-sided " << exact_upper << " of " << sets);
  CHECK(exact_two >= 933);
  CHECK(exact_two <= 967);
  CHECK(exact_upper >= 933);
  CHECK(exact_upper <= 967);
}

TEST_CASE("count fit: all inside gives a finite one-sided upper bound, none inside only a lower one", "[fit]") {
  // CHECKS.md: k = 0 of n = 10, one-sided 95% upper bound on the fraction 1 - 0.05^(1/10) =
  // 0.258866 (Clopper & Pearson 1934); by symmetry k = n gives the lower bound 0.05^(1/10).
  const CountFit none = fit_counts(0, 10, 1.0);
  CHECK(none.sigma_lower == Approx(1.0 / std::sqrt(-2 * std::log(1 - 0.258866))).epsilon(2e-6));
  const CountFit all = fit_counts(10, 10, 1.0);
  CHECK(std::isfinite(all.sigma_upper));
  CHECK(all.sigma_upper == Approx(1.0 / std::sqrt(-2 * std::log(0.258866))).epsilon(2e-6));
  // n = 1e18: 1 - 0.05^(1/n) = 3.0e-18 (-expm1(ln 0.05 / n)), so sigma <= 1 / sqrt(-2 ln 3.0e-18),
  // not the 0 that the rounded fraction 1 would give.
  const CountFit huge = fit_counts(1000000000000000000ULL, 1000000000000000000ULL, 1.0);
  CHECK(huge.sigma_upper == Approx(1.0 / std::sqrt(-2 * std::log(-std::expm1(std::log(0.05) / 1e18)))).epsilon(1e-12));
  CHECK(huge.sigma_upper > 0.1);
}

TEST_CASE("outlier cut-off: the Beta(1, (n - 3) / 2) quantile matches scipy.stats.beta.ppf", "[fit][outliers]") {
  const json refs = references();  // named: a temporary would dangle in the loop
  // Nine cut-offs, n = 4 to 100000: an empty list must fail, not pass by looping over nothing
  // (deliberate fault: make_fit_references.py writing no outlier cases passed this test).
  REQUIRE(refs["outliers"].size() == 9);
  for (const auto& c : refs["outliers"]) {
    const auto n = c["n"].get<std::size_t>();
    INFO("n = " << n);
    // scipy's beta.ppf is good to about 3e-11 here (at n = 1e5); the closed form
    // (n - 1)^2 / n (1 - (0.01 / n)^(2 / (n - 3))) in mpmath at 40 digits to the last bit.
    CHECK(outlier_cutoff_d2(n, 0.01) == Approx(c["d2"].get<double>()).epsilon(1e-10));
    CHECK(outlier_cutoff_d2(n, 0.01) == Approx(c["d2_mpmath"].get<double>()).epsilon(1e-14));
  }
  CHECK(std::isinf(outlier_cutoff_d2(3, 0.01)));
}

TEST_CASE("outliers: an impact 1e6 m away is flagged from n = 4 to 16", "[fit][outliers]") {
  // Issue 13 item 1: the former chi^2_2 cut-off -2 ln(0.01 / n) exceeds the largest possible
  // d^2, (n - 1)^2 / n, for n <= 16, so this point was reported as "outliers: none".
  // The others lie on a unit circle (a cluster squeezed onto a near-line, 1e-6 m across at
  // n = 4, would be refused as "on one line" by the degeneracy check instead).
  for (std::size_t n = 4; n <= 16; ++n) {
    std::vector<Vec2> pts;
    for (std::size_t i = 0; i + 1 < n; ++i) {
      const double t = 2 * M_PI * double(i) / double(n - 1) + 0.3;
      pts.emplace_back(std::cos(t), std::sin(t));
    }
    pts.emplace_back(1e6, 3.0);
    const NormalFit f = fit_normal(pts, Vec2::Zero(), FitOptions{0.95, 0, 1});
    INFO("n = " << n << ", d^2 = " << f.mahalanobis2.back() << ", cut-off " << f.outlier_d2);
    REQUIRE(f.outliers.size() == 1);
    CHECK(f.outliers.front() == n - 1);
  }
}

TEST_CASE("outliers: about 1% false flags, and the power against a 6-sigma impact", "[fit][outliers][coverage]") {
  // Seeded simulation. Reference: the same rule (successive deletion, below) simulated with
  // numpy (/usr/bin/python3, 100,000 data sets each, seed 20261205): any flag in 0.90%, 0.84%,
  // 0.87% of normal data sets at n = 12, 20, 40; with one impact drawn from a normal displaced
  // by 6 sigma, 49.8%, 76.4%, 88.9% (the single test at 1%, before: 53.6%, 79.1%, 90.4%; issue
  // 13 quotes 55/79/91%). 2000 data sets here: 1 s.e. is 0.2% and 0.7-1.1%.
  std::mt19937_64 rng(12);
  std::normal_distribution<double> z;
  const int reps = 2000;
  const std::vector<std::pair<std::size_t, double>> power = {{12, 0.498}, {20, 0.764}, {40, 0.889}};
  for (const auto& [n, expected] : power) {
    int false_flags = 0, hits = 0;
    std::vector<Vec2> pts(n);
    for (int r = 0; r < reps; ++r) {
      for (Vec2& p : pts) p = Vec2(z(rng), z(rng));
      false_flags += !fit_normal(pts, Vec2::Zero(), FitOptions{0.95, 0, 1}).outliers.empty();
      pts[0].x() += 6.0;
      hits += !fit_normal(pts, Vec2::Zero(), FitOptions{0.95, 0, 1}).outliers.empty();
    }
    INFO("n = " << n << ": false flags " << false_flags << ", hits " << hits << " of " << reps);
    CHECK(false_flags >= 0.003 * reps);  // 1% expected: 4 s.e. either side
    CHECK(false_flags <= 0.019 * reps);
    CHECK(std::fabs(hits / double(reps) - expected) <= 0.045);
  }
}

TEST_CASE("circular-equivalent sigma: 95% intervals cover 95 +- 1.5% for round and elongated spreads", "[fit][coverage]") {
  // Issue 13 item 2: the chi-square interval with 2 (n - 1) degrees of freedom covered 88-89%
  // for axes 1.5:0.6 and 84% for 2:0.2; Satterthwaite's nu restores 95%. Seeded; 4000 data sets
  // per case (1 s.e. 0.34%); the long version is tests/bench/fit_coverage.cpp. The one-sided
  // upper bound (the design factor) is held to the same window. The window is the target
  // 95 +- 1.5% widened by 3 s.e. of this simulation's own noise: the true coverage of the
  // plug-in nu runs from 94.3% (1.5:0.6, one-sided, n = 12) to 96.5% (circular, n = 12), measured
  // with 40,000 data sets (docs/intervals.md), so a bare +-1.5% would fail on noise alone.
  std::mt19937_64 rng(2026);
  std::normal_distribution<double> z;
  const int reps = 4000;
  for (const auto& [major, minor] : std::vector<std::pair<double, double>>{{1.0, 1.0}, {1.5, 0.6}, {2.0, 0.2}})
    for (std::size_t n : {12, 40, 400}) {
      const double sigma = std::sqrt((major * major + minor * minor) / 2);
      int two = 0, one = 0;
      std::vector<Vec2> pts(n);
      for (int r = 0; r < reps; ++r) {
        Vec2 m = Vec2::Zero();
        for (Vec2& p : pts) m += (p = Vec2(major * z(rng), minor * z(rng)));
        m /= double(n);
        Mat2 s = Mat2::Zero();
        for (const Vec2& p : pts) s += (p - m) * (p - m).transpose();
        s /= double(n - 1);
        const Interval ci = circular_sigma_interval(s, n, 0.95);
        two += ci.low <= sigma && sigma <= ci.high;
        one += sigma <= circular_sigma_upper_bound(s, n, 0.95);
      }
      INFO(major << ":" << minor << ", n = " << n << ": two-sided " << two << ", one-sided " << one << " of " << reps);
      const double window = 0.015 + 3 * std::sqrt(0.95 * 0.05 / reps);
      CHECK(std::fabs(two / double(reps) - 0.95) <= window);
      CHECK(std::fabs(one / double(reps) - 0.95) <= window);
    }
}

TEST_CASE("mixture fit: the work is linear in the impacts (2e5 impacts, counted)", "[fit][speed]") {
  // Issue 12 item 6: the ECM loop ran up to 2000 passes over the data (1293 at n = 1e3, the cap
  // from n = 1e5) before it stopped, 2000 n density pairs; now the passes are bounded.
  std::mt19937_64 rng(5);
  std::normal_distribution<double> z;
  for (bool heavy : {false, true}) {
    std::vector<Vec2> pts;
    for (int i = 0; i < 200000; ++i)
      pts.push_back(heavy && i % 11 == 0 ? Vec2(4 * z(rng), 4 * z(rng)) : Vec2(z(rng), 0.5 * z(rng)));
    const NormalFit single = fit_normal(pts, Vec2::Zero(), FitOptions{0.95, 2000, 1});
    const MixtureFit m = fit_two_component(pts, single);
    INFO((heavy ? "heavy tails" : "normal") << ": " << m.iterations << " passes");
    CHECK(m.preferred == heavy);
    CHECK(m.point_evaluations == std::size_t(m.iterations) * pts.size());
    CHECK(m.iterations <= 60);
  }
}

// The mixture holds the single normal (wide weight 0), so its reported maximum may not lie below
// the single normal's (a statistician's trial saw it 0.095 below: the run had stopped once it
// could not win on BIC). Seeded normal data, n = 10 to 60, 300 data sets: on every one the
// mixture's log-likelihood is at least the single's and its BIC at most the single's + 2 ln n
// (two parameters more). Deliberate fault that made it fail: the w = 0 fallback removed (248
// of the 300 ended below, where the run stopped on seeing it could not win).
TEST_CASE("mixture fit: never below the single normal it contains", "[fit][mixture]") {
  std::mt19937_64 rng(20261205);
  std::normal_distribution<double> z;
  int fallbacks = 0;
  for (int r = 0; r < 300; ++r) {
    std::vector<Vec2> pts(10 + r % 51);
    for (Vec2& p : pts) p = Vec2(z(rng), 0.6 * z(rng));
    const NormalFit single = fit_normal(pts, Vec2::Zero(), FitOptions{0.95, 0, 1});
    const MixtureFit m = fit_two_component(pts, single);
    const double n = static_cast<double>(pts.size());
    INFO("data set " << r << ", n = " << pts.size() << ": mixture " << m.log_likelihood << ", single " << m.single_log_likelihood);
    CHECK(m.log_likelihood >= m.single_log_likelihood);
    CHECK(m.bic <= m.single_bic + 2.0 * std::log(n) + 1e-9);
    CHECK(m.wide_weight >= 0.0);
    fallbacks += m.wide_weight == 0.0;
  }
  WARN(fallbacks << " of 300 normal data sets end at the single normal (w = 0)");
}

TEST_CASE("95% intervals cover the true parameters in 93-97% of 1000 seeded data sets", "[fit][coverage]") {
  std::mt19937_64 rng(7);
  std::normal_distribution<double> z;
  std::uniform_real_distribution<double> u(0.0, 1.0);
  const double sigma = 0.4;
  const Vec2 true_mean(0.1, -0.05);
  int sigma_cover = 0, mean_cover = 0, count_cover = 0, censored_cover = 0;
  FitOptions o;
  o.bootstrap_replicates = 0;  // the axes' bootstrap is not under test here
  for (int trial = 0; trial < 1000; ++trial) {
    std::vector<Vec2> pts;
    for (int i = 0; i < 25; ++i) pts.push_back(true_mean + sigma * Vec2(z(rng), z(rng)));
    const NormalFit f = fit_normal(pts, Vec2::Zero(), o);
    sigma_cover += f.sigma_ci.low <= sigma && sigma <= f.sigma_ci.high;
    mean_cover += (true_mean - f.mean).dot(f.mean_region * (true_mean - f.mean)) <= 1.0;
    // Counts: 400 throws, radius 0.5, P(inside) = 1 - exp(-0.5^2 / (2 sigma^2)).
    std::uint64_t k = 0;
    for (int i = 0; i < 400; ++i) k += (sigma * Vec2(z(rng), z(rng))).norm() <= 0.5;
    const CountFit c = fit_counts(k, 400, 0.5);
    count_cover += c.sigma_ci.low <= sigma && sigma <= c.sigma_ci.high;
    // Censored: 150 throws, centred, those beyond 0.6 only counted.
    std::vector<double> radii;
    std::uint64_t outside = 0;
    for (int i = 0; i < 150; ++i) {
      const double r = (sigma * Vec2(z(rng), z(rng))).norm();
      if (r <= 0.6) radii.push_back(r);
      else ++outside;
    }
    // The likelihood-ratio interval here (light censoring, where it is close to nominal); the
    // exact bounds' coverage has its own test below (each call of fit_censored reads one fixed
    // reference, too costly for 1000 data sets at its full size).
    const CensoredFit cf = fit_censored(radii, outside, 0.6, 0.95, 100);
    censored_cover += cf.lr_ci.low <= sigma && sigma <= cf.lr_ci.high;
  }
  INFO("sigma " << sigma_cover << ", mean " << mean_cover << ", counts " << count_cover << ", censored "
                << censored_cover);
  for (int cover : {sigma_cover, mean_cover, count_cover, censored_cover}) {
    CHECK(cover >= 930);
    CHECK(cover <= 970);
  }
}

TEST_CASE("heavy tails: the two-component fit is offered, a clean normal sample keeps one", "[fit]") {
  std::mt19937_64 rng(11);
  std::normal_distribution<double> z;
  std::vector<Vec2> clean, heavy;
  for (int i = 0; i < 400; ++i) clean.push_back(0.3 * Vec2(z(rng), z(rng)));
  heavy = clean;
  for (int i = 0; i < 40; ++i) heavy.push_back(2.0 * Vec2(z(rng), z(rng)));
  const MixtureFit none = fit_two_component(clean, fit_normal(clean, Vec2::Zero()));
  CHECK_FALSE(none.preferred);
  const NormalFit single = fit_normal(heavy, Vec2::Zero());
  CHECK(single.ks_p_value < 0.01);  // the single normal is rejected
  CHECK_FALSE(single.outliers.empty());
  const MixtureFit two = fit_two_component(heavy, single);
  CHECK(two.preferred);
  CHECK(two.wide_weight == Approx(40.0 / 440.0).margin(0.04));
  CHECK(std::sqrt(two.core_covariance.trace() / 2) == Approx(0.3).epsilon(0.1));
  CHECK(std::sqrt(two.wide_covariance.trace() / 2) == Approx(2.0).epsilon(0.25));
}

TEST_CASE("containment radius: CEP and R95 of a circular normal", "[fit]") {
  // CEP = sigma sqrt(2 ln 2), R95 = sigma sqrt(-2 ln 0.05) (Rayleigh quantiles); the offset
  // centre takes the root-finding path: check it against the same closed form by placing the
  // centre on the mean but splitting the model into two identical halves.
  const Gaussian g = Gaussian::from_axes({1, 2}, 0.7, 0.7, 0);
  CHECK(containment_radius(g, {1, 2}, 0.5) == Approx(0.7 * std::sqrt(2 * std::log(2.0))).epsilon(1e-14));
  const ScatterModel halves = ScatterModel::mixture({{0.5, g}, {0.5, g}});
  CHECK(containment_radius(halves, {1, 2}, 0.95) == Approx(0.7 * std::sqrt(-2 * std::log(0.05))).epsilon(1e-9));
}

TEST_CASE("containment radius of an elliptical normal about its mean: the 1-D integral", "[fit]") {
  // The centred elliptical case goes through a one-dimensional integral; the same model split
  // into two identical halves takes the general path (root finding on exact disk
  // integrations), which must agree. At 1e6:1 the spread is one-dimensional to 1e-12:
  // P(a |U| <= r) = erf(r / (a sqrt 2)), so CEP = 0.6744897501960817 a and R95 =
  // 1.959963984540054 a (normal quantiles at 0.75 and 0.975, scipy.stats.norm.ppf).
  for (const auto& [major, minor, angle] : std::vector<std::tuple<double, double, double>>{{2, 0.5, 30}, {1, 0.9, 0}, {3, 0.01, 100}}) {
    const Gaussian g = Gaussian::from_axes({1, -2}, major, minor, angle);
    const ScatterModel halves = ScatterModel::mixture({{0.5, g}, {0.5, g}});
    for (double fraction : {0.5, 0.95}) {
      INFO(major << ":" << minor << " at " << fraction);
      CHECK(containment_radius(g, {1, -2}, fraction) == Approx(containment_radius(halves, {1, -2}, fraction)).epsilon(1e-9));
    }
  }
  const Gaussian line = Gaussian::from_axes({0, 0}, 1e6, 1.0, 20);
  CHECK(containment_radius(line, {0, 0}, 0.5) == Approx(0.6744897501960817e6).epsilon(1e-11));
  CHECK(containment_radius(line, {0, 0}, 0.95) == Approx(1.959963984540054e6).epsilon(1e-11));
}

TEST_CASE("fits refuse data that cannot support them", "[fit][errors]") {
  CHECK_THROWS_WITH(fit_normal({{0, 0}, {1, 1}}, Vec2::Zero()), Catch::Contains("at least 3"));
  CHECK_THROWS_WITH(fit_normal({{1, 1}, {1, 1}, {1, 1}, {1, 1}}, Vec2::Zero()), Catch::Contains("identical"));
  CHECK_THROWS_WITH(fit_normal({{0, 0}, {1, 1}, {2, 2}, {3, 3}}, Vec2::Zero()), Catch::Contains("one line"));
  CHECK_THROWS_WITH(fit_counts(5, 4, 1.0), Catch::Contains("cannot exceed"));
  CHECK_THROWS_WITH(fit_counts(0, 0, 1.0), Catch::Contains("at least 1"));
  CHECK_THROWS_WITH(fit_censored({0.5, 2.0}, 3, 1.0), Catch::Contains("beyond the radius"));
  CHECK_THROWS_WITH(fit_censored({}, 3, 1.0), Catch::Contains("at least one measured"));
}

TEST_CASE("the normality checks fire on two groups and a ring at the sizes users have, on about 1% of normal data",
          "[fit][goodness]") {
  // A statistician's trial: a ring of 50 impacts (KS p 2e-11) and two groups 12 sd apart
  // (KS p 0.64) were fitted and written out as one normal without a word. The axes'
  // Anderson-Darling tests (anderson_darling.hpp; the statistic is checked against scipy in
  // python/tests/test_fit.py) and the KS check, 1% each, now say so. Seeded simulation here:
  // numpy's of the same checks gave 0.7-1.1% for the axes alone on normal data at n = 8 to 1000,
  // power 100% on two groups 12 sd apart at n = 20, 87% and 100% on a thin ring at n = 30, 50.
  std::mt19937_64 rng(20261205);
  std::normal_distribution<double> z;
  std::uniform_real_distribution<double> u(0.0, 2 * strewn::kPi);
  FitOptions o;
  o.bootstrap_replicates = 0;  // the checks do not use the bootstrap
  auto rate = [&](int sets, int n, auto draw) {
    int rejected = 0;
    for (int s = 0; s < sets; ++s) {
      std::vector<Vec2> xy;
      for (int i = 0; i < n; ++i) xy.push_back(draw(i, n));
      rejected += fit_normal(xy, Vec2::Zero(), o).normal_rejected() ? 1 : 0;
    }
    return static_cast<double>(rejected) / sets;
  };
  const auto normal = [&](int, int) { return Vec2(1.0 * z(rng), 0.3 * z(rng)); };
  const auto groups = [&](int i, int n) { return Vec2(z(rng) + (2 * i < n ? 12.0 : 0.0), z(rng)); };
  const auto ring = [&](int, int) {
    const double a = u(rng), r = 1.0 + 0.05 * z(rng);
    return Vec2(r * std::cos(a), r * std::sin(a));
  };
  for (const int n : {10, 20, 50}) {
    const double false_alarm = rate(3000, n, normal);
    INFO("n " << n << ": " << false_alarm);
    CHECK(false_alarm >= 0.005);  // binomial sd at 1% and 3000 sets: 0.18%
    CHECK(false_alarm <= 0.02);
  }
  CHECK(rate(200, 20, groups) >= 0.95);
  CHECK(rate(200, 30, groups) >= 0.99);
  CHECK(rate(200, 50, ring) >= 0.95);
  CHECK(rate(200, 30, ring) >= 0.7);
}

TEST_CASE("censored fit: one measured impact puts no upper bound on sigma above its confidence distribution's plateau",
          "[fit][censored]") {
  // A statistician's trial: one mark at 0.3 m, three beyond 0.6 m, and "[0.3556, 73.3] m" was
  // printed as exact; every such upper end was 244 r whatever the data. As sigma grows, the one
  // measured impact of a reference sample falls uniformly in the disk (r^2 uniform on [0, a^2],
  // the Rayleigh law's limit), so H(sigma) -> 1 - r^2 / a^2 = 0.75 here (derivation in
  // censored_confidence.cpp): levels above 0.75 have no finite bound.
  const CensoredFit f = fit_censored({0.3}, 3, 0.6);
  CHECK(std::isinf(f.sigma_ci.high));
  CHECK(std::isinf(f.sigma_upper));
  CHECK(std::isfinite(f.sigma_ci.low));
  const CensoredConfidence h(1, 3, 0.6, f.sigma);
  CHECK(std::isfinite(h.quantile(0.7)));
  CHECK(std::isinf(h.quantile(0.8)));
  // At 5 sigma-hat (a / sigma = 0.16) about 960 of the 20000 samples have an impact measured:
  // the level's sd is 0.014.
  CHECK(h.level(5 * f.sigma) == Approx(0.75).margin(0.05));
  // Two measured impacts: H reaches 1, the bound is finite (fit_test above checks its coverage).
  CHECK(std::isfinite(fit_censored({0.3, 0.2}, 3, 0.6).sigma_upper));
  // 1e12 impacts beyond the radius: the reference samples' order statistics one at a time
  // (Renyi 1953), no array of 1e12 (std::bad_alloc, exit 1, before).
  const CensoredFit huge = fit_censored({0.3, 0.5}, 1000000000000ULL, 0.6);
  CHECK(std::isfinite(huge.sigma_upper));
  CHECK(huge.sigma_ci.low < huge.sigma);
  CHECK(huge.sigma < huge.sigma_ci.high);
}

// A statistician's trial: two or three gross errors together masked each other (each widens the
// covariance the others are measured by): flagged in 1 data set of 20. Successive deletion
// (Rosner 1983's generalized ESD with Wilks' statistic) tests again after removing each
// candidate. Seeded simulation: n = 20 and 40 normal impacts, 2 or 3 of them replaced by
// impacts about (10, 10) sd from the mean (within 0.3 sd of each other); the share of data
// sets where all of them are flagged, against the single test of the whole sample, and the
// false flags on clean data held to the 1% window as above. Deliberate fault that made it
// fail: successive deletion limited to one step.
TEST_CASE("outliers: two or three gross errors together are all flagged, not masked", "[fit][outliers][coverage]") {
  std::mt19937_64 rng(20261205);
  std::normal_distribution<double> z;
  const int reps = 400;
  for (const std::size_t n : {20u, 40u})
    for (const std::size_t bad : {2u, 3u}) {
      int all_flagged = 0, single_rule = 0;
      std::vector<Vec2> pts(n);
      for (int r = 0; r < reps; ++r) {
        for (Vec2& p : pts) p = Vec2(z(rng), z(rng));
        for (std::size_t k = 0; k < bad; ++k) pts[k] = Vec2(10.0 + 0.3 * z(rng), 10.0 + 0.3 * z(rng));
        const NormalFit f = fit_normal(pts, Vec2::Zero(), FitOptions{0.95, 0, 1});
        bool all = f.outliers.size() >= bad;
        for (std::size_t k = 0; k < bad && all; ++k)
          all = std::find(f.outliers.begin(), f.outliers.end(), k) != f.outliers.end();
        all_flagged += all;
        int single = 0;
        for (std::size_t k = 0; k < bad; ++k) single += f.mahalanobis2[k] > f.outlier_d2;
        single_rule += single == static_cast<int>(bad);
      }
      INFO("n = " << n << ", " << bad << " gross errors: all flagged in " << all_flagged << " of " << reps
                  << " (the single test of the whole sample: " << single_rule << ")");
      CHECK(all_flagged >= 0.95 * reps);
      // At n = 20 the single test is masked every time (at n = 40 two are too few to mask it).
      if (n == 20) CHECK(single_rule <= 0.05 * reps);
    }
}
