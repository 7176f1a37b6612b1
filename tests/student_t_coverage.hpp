#ifndef STREWN_TESTS_STUDENT_T_COVERAGE_HPP
#define STREWN_TESTS_STUDENT_T_COVERAGE_HPP

// Coverage of fit_student_t's bootstrap intervals by seeded simulation: data sets of n impacts
// from a known bivariate t, each fitted with intervals, and the share of data sets whose
// interval holds the true value. Shared by the ctest (tests/engine/fit/student_t_fit_test.cpp)
// and the long runs of docs/intervals.md (tests/bench/t_fit_coverage.cpp).
#include <algorithm>
#include <array>
#include <cmath>
#include <random>
#include <thread>
#include <vector>

#include "strewn/student_t_fit.hpp"

namespace strewn::coverage {

struct TCoverage {
  int sets = 0;
  // Data sets whose interval holds the truth; "_low"/"_high": misses with the truth below the
  // interval / above it.
  int sigma = 0, cep = 0, r95 = 0, nu = 0, sigma_major = 0;
  int sigma_high = 0, cep_high = 0, nu_low = 0, nu_high = 0;
  // The percentile interval of the refits' nu and the basic one on log nu, for comparison (not
  // what the fit prints).
  int nu_percentile = 0, nu_basic = 0;
  int nu_at_upper = 0, nu_at_lower = 0;  // fits whose nu is an end of the range
  // nu intervals reaching the range's cap: the one-sided statement "nu >= low", counted as
  // covering when the truth is at or above low (for a truth within the range, the same count).
  int nu_open_above = 0;
  int r95_high = 0;
  double sigma_width = 0.0;              // mean relative width of the sigma interval
};

// Truth: scale axes 1.0 and 0.6 m at 30 degrees about (2, -1), `nu` degrees of freedom.
inline Gaussian t_truth(double nu) {
  return Gaussian::from_axes({2.0, -1.0}, 1.0, 0.6, 30.0).with_family(ScatterFamily::student_t(nu));
}

// The simulation's data sets of n impacts from t_truth(nu), each with its bootstrap seed, drawn
// in the one sequence of a generator seeded by `seed` (what simulate_t fits, set for set).
struct TDataSets {
  std::vector<std::vector<Vec2>> data;
  std::vector<std::uint64_t> seeds;
};
inline TDataSets draw_t_data_sets(int sets, std::size_t n, double nu, std::uint64_t seed) {
  const Gaussian truth = t_truth(nu);
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> z;
  std::gamma_distribution<double> chi2(nu / 2.0, 2.0);
  TDataSets d{std::vector<std::vector<Vec2>>(static_cast<std::size_t>(sets), std::vector<Vec2>(n)),
              std::vector<std::uint64_t>(static_cast<std::size_t>(sets))};
  for (int s = 0; s < sets; ++s) {
    for (Vec2& p : d.data[s]) p = truth.mean() + truth.cholesky() * Vec2(z(rng), z(rng)) / std::sqrt(chi2(rng) / nu);
    d.seeds[s] = rng();
  }
  return d;
}

// f(s) for s in [0, count) on every core (each call single-threaded and independent).
template <class F>
void on_every_core(std::size_t count, F f) {
  const unsigned workers = std::max(1u, std::min(std::thread::hardware_concurrency(), 16u));
  std::vector<std::thread> pool;
  for (unsigned w = 0; w < workers; ++w)
    pool.emplace_back([&, w] {
      for (std::size_t s = w; s < count; s += workers) f(s);
    });
  for (std::thread& t : pool) t.join();
}

inline TCoverage simulate_t(int sets, std::size_t n, double nu, int replicates, std::uint64_t seed,
                            double confidence = 0.95) {
  const Gaussian truth = t_truth(nu);
  const double sigma = std::sqrt(truth.covariance().trace() / 2.0);
  const double cep = containment_radius(truth, truth.mean(), 0.5), r95 = containment_radius(truth, truth.mean(), 0.95);
  TCoverage c;
  c.sets = sets;
  // Every data set and its bootstrap seed drawn first, in the one sequence of `rng`, then the fits
  // on every core (each fit is single-threaded and independent), then tallied in order: the
  // counts are those of a serial run.
  const TDataSets drawn = draw_t_data_sets(sets, n, nu, seed);
  const std::vector<std::vector<Vec2>>& data = drawn.data;
  const std::vector<std::uint64_t>& seeds = drawn.seeds;
  std::vector<StudentTFit> fits(static_cast<std::size_t>(sets));
  on_every_core(fits.size(), [&](std::size_t s) {
    StudentTFitOptions o;
    o.confidence = confidence;
    o.bootstrap_replicates = replicates;
    o.seed = seeds[s];
    fits[s] = fit_student_t(data[s], o);
  });
  for (int s = 0; s < sets; ++s) {
    const StudentTFit& f = fits[static_cast<std::size_t>(s)];
    const auto in = [](const Interval& i, double v) { return i.low <= v && v <= i.high; };
    c.sigma += in(f.sigma_ci, sigma);
    c.sigma_high += sigma > f.sigma_ci.high;
    c.sigma_major += in(f.sigma_major_ci, 1.0);
    c.cep += in(f.cep_ci, cep);
    c.cep_high += cep > f.cep_ci.high;
    c.r95 += in(f.r95_ci, r95);
    c.r95_high += r95 > f.r95_ci.high;
    c.nu += f.nu_ci_open_above ? f.nu_ci.low <= nu : in(f.nu_ci, nu);
    c.nu_open_above += f.nu_ci_open_above;
    c.nu_low += nu < f.nu_ci.low;
    c.nu_high += !f.nu_ci_open_above && nu > f.nu_ci.high;
    {
      std::vector<double> v;
      for (const StudentTDraw& d : f.draws) v.push_back(d.nu);
      std::sort(v.begin(), v.end());
      const double a = (1 - confidence) / 2;
      const double lo = v[static_cast<std::size_t>(a * (v.size() - 1))], hi = v[static_cast<std::size_t>((1 - a) * (v.size() - 1))];
      c.nu_percentile += lo <= nu && nu <= hi;
      const double bl = f.nu * f.nu / hi, bh = f.nu * f.nu / lo;
      c.nu_basic += bl <= nu && nu <= bh;
    }
    c.nu_at_upper += f.nu_at == NuAt::upper_end;
    c.nu_at_lower += f.nu_at == NuAt::lower_end;
    c.sigma_width += (f.sigma_ci.high - f.sigma_ci.low) / f.sigma / sets;
  }
  return c;
}

}  // namespace strewn::coverage

#endif
