// Coverage of `assess --uncertainty` by seeded simulation: data sets of n impacts drawn from a
// known normal, each fitted (sample mean and covariance, as `strewn fit` records them) and
// passed through assess_uncertainty; the true model's probability of each zone is checked
// against the interval and the one-sided upper bound. Shared by cli_assess_test (a short run) and
// strewn_uncertainty_coverage (the long run whose figures are in docs/).
#ifndef STREWN_TESTS_UNCERTAINTY_COVERAGE_HPP
#define STREWN_TESTS_UNCERTAINTY_COVERAGE_HPP

#include <algorithm>
#include <cmath>
#include <random>
#include <string>
#include <thread>
#include <vector>

#include "strewn/region_builders.hpp"
#include "strewn/site.hpp"
#include "strewn/uncertainty.hpp"

namespace strewn::coverage {

struct ZoneCase {
  std::string name;
  Region region;
  double p_true = 0.0;
  int inside = 0, below = 0, above = 0;  // truth inside, below the interval, above it
  int under_upper = 0;                   // truth at or below the one-sided upper bound
};

using strewn::disk;
using strewn::rectangle;

// A half-plane {x : u.x >= c} (a 2000 m square beyond the line) whose true probability is p:
// c = z_p sqrt(u^T Sigma u) + u.mu, z_p the upper normal quantile.
inline ZoneCase half_plane(const Gaussian& truth, double angle_deg, double p) {
  const double a = angle_deg * M_PI / 180.0;
  const Vec2 u(std::cos(a), std::sin(a));
  // Upper quantile by Newton on log Q (erfc), 60 steps from a start beyond the mode.
  double z = 1.0;
  for (int k = 0; k < 60; ++k) {
    const double q = 0.5 * std::erfc(z / std::sqrt(2.0));
    const double dens = std::exp(-0.5 * z * z) / std::sqrt(2.0 * M_PI);
    z += (q - p) / dens;
  }
  const double c = z * std::sqrt(u.dot(truth.covariance() * u)) + u.dot(truth.mean());
  const Mat2 R = (Mat2() << u.x(), -u.y(), u.y(), u.x()).finished();
  ZoneCase zc;
  zc.name = "half-plane " + std::to_string(static_cast<int>(angle_deg)) + " deg";
  zc.region = transformed(rectangle({c, -1000.0}, {c + 2000.0, 1000.0}), R, Vec2::Zero());
  return zc;
}

struct Run {
  std::vector<ZoneCase> zones;
  int data_sets = 0;
};

// A scenario holding the zones as keep-out zones, each zone's true p under `truth` recorded.
template <class Model>
Site scenario_of(const Model& truth, std::vector<ZoneCase>& zones) {
  Site s;
  s.file = "coverage";
  for (ZoneCase& z : zones) {
    z.p_true = integrate(truth, z.region, s.options).p;
    Zone zone;
    zone.name = z.name;
    zone.region = z.region;
    zone.role = Role::keep_out;
    s.zones.push_back(zone);
  }
  return s;
}

// One fitted source and the seed of its replicates: a data set's share of the work.
struct Draw {
  Source source;
  std::uint64_t seed = 0;
};

// assess_uncertainty of every draw, on every core (each call is single-threaded and depends only
// on its draw), in the draws' order: the counts are a serial run's, since every data set and
// seed is drawn first in the one sequence of the caller's generator.
inline std::vector<Uncertainty> assess_all(const Site& s, const std::vector<Draw>& draws, int replicates,
                                           double confidence, int calibration = 100) {
  std::vector<Uncertainty> out(draws.size());
  const unsigned workers = std::max(1u, std::min(std::thread::hardware_concurrency(), 16u));
  std::vector<std::thread> pool;
  for (unsigned w = 0; w < workers; ++w)
    pool.emplace_back([&, w] {
      Site mine = s;
      for (std::size_t d = w; d < draws.size(); d += workers) {
        mine.sources = {draws[d].source};
        out[d] = assess_uncertainty(mine, replicates, confidence, draws[d].seed, {}, calibration);
      }
    });
  for (std::thread& t : pool) t.join();
  return out;
}

// Each zone's true p against the first source's interval and one-sided bound.
inline void tally(std::vector<ZoneCase>& zones, const Uncertainty& u) {
  for (std::size_t k = 0; k < zones.size(); ++k) {
    const Interval& i = u.zones[k].p_event[0];
    ZoneCase& z = zones[k];
    if (z.p_true < i.low) ++z.below;
    else if (z.p_true > i.high) ++z.above;
    else ++z.inside;
    if (z.p_true <= u.zones[k].p_event_upper[0]) ++z.under_upper;
  }
}

// `data_sets` samples of n impacts from `truth`; each fitted and its interval computed with
// `replicates` draws. Seeded by `seed`.
inline Run simulate(const Gaussian& truth, std::vector<ZoneCase> zones, std::uint64_t n, int data_sets, int replicates,
                    double confidence, std::uint64_t seed, int calibration = 100) {
  Site s = scenario_of(truth, zones);
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> g;
  std::vector<Draw> draws;
  for (int d = 0; d < data_sets; ++d) {
    Vec2 m = Vec2::Zero();
    std::vector<Vec2> pts(n);
    for (Vec2& p : pts) {
      p = truth.mean() + truth.cholesky() * Vec2(g(rng), g(rng));
      m += p;
    }
    m /= static_cast<double>(n);
    Mat2 S = Mat2::Zero();
    for (const Vec2& p : pts) S += (p - m) * (p - m).transpose();
    S /= static_cast<double>(n - 1);
    Source src;
    src.name = "fitted";
    src.model = Gaussian::from_covariance(m, S);
    FitRecord f;
    f.kind = FitRecord::Kind::impacts;
    f.n = n;
    f.mean = m;
    f.covariance = S;
    src.fit = f;
    draws.push_back({src, rng()});
  }
  for (const Uncertainty& u : assess_all(s, draws, replicates, confidence, calibration)) tally(zones, u);
  return {zones, data_sets};
}

// The same for a source fitted as a mixture: data sets of n impacts from a core + wild
// `truth`, fitted as `strewn fit --mixture` does (the two-component fit written when preferred,
// else the single normal), through assess_uncertainty. Counts only the data sets written as a
// mixture (returned in data_sets).
inline Run simulate_mixture(const ScatterModel& truth, std::vector<ZoneCase> zones, std::uint64_t n, int data_sets,
                            int replicates, double confidence, std::uint64_t seed) {
  Site s = scenario_of(truth, zones);
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> g;
  std::uniform_real_distribution<double> u01;
  int mixtures = 0;
  std::vector<Draw> draws;
  for (int d = 0; d < data_sets; ++d) {
    std::vector<Vec2> pts(n);
    Vec2 m = Vec2::Zero();
    for (Vec2& p : pts) {
      const Gaussian& c = u01(rng) < truth.components()[0].weight ? truth.components()[0].gaussian
                                                                   : truth.components()[1].gaussian;
      p = c.mean() + c.cholesky() * Vec2(g(rng), g(rng));
      m += p;
    }
    m /= static_cast<double>(n);
    Mat2 S = Mat2::Zero();
    for (const Vec2& p : pts) S += (p - m) * (p - m).transpose();
    S /= static_cast<double>(n - 1);
    NormalFit single;
    single.n = n;
    single.mean = m;
    single.covariance = S;
    const MixtureFit mix = fit_two_component(pts, single);
    if (!mix.preferred) continue;
    ++mixtures;
    Source src;
    src.name = "fitted mixture";
    src.model = ScatterModel::mixture({{1.0 - mix.wide_weight, Gaussian::from_covariance(mix.core_mean, mix.core_covariance)},
                                       {mix.wide_weight, Gaussian::from_covariance(mix.wide_mean, mix.wide_covariance)}});
    FitRecord f;
    f.kind = FitRecord::Kind::impacts;
    f.n = n;
    f.mean = m;
    f.covariance = S;
    src.fit = f;
    draws.push_back({src, rng()});
  }
  for (const Uncertainty& u : assess_all(s, draws, replicates, confidence)) tally(zones, u);
  return {zones, mixtures};
}

// The same for a centred circular spread of `sigma` known from counts (k of n impacts within
// `radius`, as `strewn fit --counts` records them) or from censored radii (the radii within
// `radius` measured, the others only counted, as `fit --censored` does). Data sets that `fit`
// refuses (counts with k = 0) are skipped; returned in data_sets: the ones used.
inline Run simulate_radial(FitRecord::Kind kind, double sigma, std::vector<ZoneCase> zones, std::uint64_t n,
                           double radius, int data_sets, int replicates, double confidence, std::uint64_t seed) {
  const Gaussian truth = Gaussian::from_axes({0.0, 0.0}, sigma, sigma, 0.0);
  Site s = scenario_of(truth, zones);
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> g;
  int used = 0;
  std::vector<Draw> draws;
  for (int d = 0; d < data_sets; ++d) {
    std::vector<double> radii;
    std::uint64_t within = 0;
    for (std::uint64_t i = 0; i < n; ++i) {
      const double r = sigma * std::hypot(g(rng), g(rng));
      if (r <= radius) {
        ++within;
        radii.push_back(r);
      }
    }
    FitRecord f;
    f.kind = kind;
    f.n = n;
    f.radius = radius;
    double fitted = 0.0;
    if (kind == FitRecord::Kind::counts) {
      if (within == 0) continue;  // fit refuses: the data bound sigma from below only
      const CountFit c = fit_counts(within, n, radius, confidence);
      fitted = within == n ? c.sigma_upper : c.sigma;  // k = n: fit writes the upper bound
      f.k = within;
    } else {
      if (radii.empty()) continue;
      fitted = fit_censored(radii, n - within, radius, confidence, 100).sigma;  // only sigma is read
      f.measured = within;
      f.outside = n - within;
    }
    ++used;
    Source src;
    src.name = "fitted";
    src.model = Gaussian::from_axes({0.0, 0.0}, fitted, fitted, 0.0);
    src.fit = f;
    draws.push_back({src, rng()});
  }
  for (const Uncertainty& u : assess_all(s, draws, replicates, confidence)) tally(zones, u);
  return {zones, used};
}

}  // namespace strewn::coverage

#endif
