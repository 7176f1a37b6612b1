// The Monte Carlo method: seeded, reproducible, and its Clopper-Pearson intervals cover.
#include <catch2/catch.hpp>
#include <cmath>
#include <cstdio>
#include <sstream>
#include <utility>

#include "strewn/integrate.hpp"
#include "test_support.hpp"

using namespace strewn;
using namespace strewn::test;

TEST_CASE("Monte Carlo is reproducible for a given seed", "[monte_carlo]") {
  const auto g = Gaussian::from_axes({0, 0}, 1.0, 0.5, 20.0);
  IntegrateOptions o;
  o.method = Method::monte_carlo;
  o.samples = 20000;
  const Estimate a = integrate(g, disk({0.5, 0}, 1.0), o);
  const Estimate b = integrate(g, disk({0.5, 0}, 1.0), o);
  CHECK(a.p == b.p);
  o.seed += 1;
  CHECK(integrate(g, disk({0.5, 0}, 1.0), o).p != a.p);
  CHECK_THAT(a.message, Catch::Contains("seed"));
}

TEST_CASE("Clopper-Pearson intervals cover the true probability at their level, no more and no less",
          "[monte_carlo]") {
  // Rectangle under a standard normal: the product of 1-D probabilities is exact, p = 0.21205.
  // The exact coverage of the 95% Clopper-Pearson interval at n = 2000 for this p is 0.95111
  // (sum over k of the binomial pmf where the interval holds p; scipy.stats.beta.ppf and
  // scipy.stats.binom.pmf, Debian's python3-scipy). Over 1000 seeds the count covered is
  // binomial: mean 951.1, sd 6.8; the band is +-4 sd. Two-sided, so an interval of [0, 1]
  // (coverage 1000) fails, as does one too narrow. Deliberate faults that made it fail: the
  // interval set to [0, 1] (1000 covered) and each half-width halved (718 covered).
  const auto g = Gaussian::from_axes({0, 0}, 1.0, 1.0, 0.0);
  const Region r = rectangle({-0.5, 0.2}, {1.0, 2.0});
  const double truth = normal_interval(-0.5, 1.0) * normal_interval(0.2, 2.0);
  IntegrateOptions o;
  o.method = Method::monte_carlo;
  o.samples = 2000;
  o.confidence = 0.95;
  int covered = 0;
  const int trials = 1000;
  for (int t = 0; t < trials; ++t) {
    o.seed = 1000 + t;
    const Estimate e = integrate(g, r, o);
    const bool inside = e.interval_low <= truth && truth <= e.interval_high;
    if (inside) ++covered;
    // abs_err is the interval's larger half-width (it covers whenever the interval does) plus
    // the whitening's rounding of the zone's corners (relative eps, a few 1e-16 here).
    if (inside) CHECK(std::fabs(e.p - truth) <= e.abs_err);
    const double half_width = std::max(e.p - e.interval_low, e.interval_high - e.p);
    CHECK(e.abs_err >= half_width);
    CHECK(e.abs_err <= half_width + 1e-14);
  }
  INFO("covered " << covered << " of " << trials);
  CHECK(covered >= 924);
  CHECK(covered <= 978);
}

namespace {

// Clopper-Pearson ends from scipy.stats.beta.ppf (Debian's python3-scipy, not Boost):
// low = Beta(alpha/2; k, n - k + 1), high = Beta(1 - alpha/2; k + 1, n - k).
std::pair<double, double> scipy_clopper_pearson(long k, long n, double confidence) {
  std::ostringstream cmd;
  cmd.precision(17);
  cmd << "/usr/bin/python3 -c 'from scipy.stats import beta; k, n, a = " << k << ", " << n << ", 1 - " << confidence
      << "; print(repr(float(beta.ppf(a / 2, k, n - k + 1)) if k > 0 else 0.0), "
         "repr(float(beta.ppf(1 - a / 2, k + 1, n - k)) if k < n else 1.0))'";
  FILE* pipe = ::popen(cmd.str().c_str(), "r");
  REQUIRE(pipe != nullptr);
  double low = -1, high = -1;
  const int got = std::fscanf(pipe, "%lf %lf", &low, &high);
  REQUIRE(::pclose(pipe) == 0);
  REQUIRE(got == 2);
  return {low, high};
}

}  // namespace

TEST_CASE("Clopper-Pearson interval ends equal scipy's beta quantiles", "[monte_carlo]") {
  // Deliberate fault that made it fail: alpha instead of alpha / 2 in the engine's lower end.
  const auto g = Gaussian::from_axes({0, 0}, 1.0, 1.0, 0.0);
  int cases = 0;
  for (const double confidence : {0.95, 0.999}) {
    for (const std::uint64_t samples : {37ull, 2000ull, 100000ull}) {
      IntegrateOptions o;
      o.method = Method::monte_carlo;
      o.samples = samples;
      o.confidence = confidence;
      o.seed = 4242;
      const Estimate e = integrate(g, rectangle({-0.5, 0.2}, {1.0, 2.0}), o);
      const long k = std::lround(e.p * static_cast<double>(samples));
      const auto [low, high] = scipy_clopper_pearson(k, static_cast<long>(samples), confidence);
      INFO(k << " of " << samples << " at " << confidence << ": [" << e.interval_low << ", " << e.interval_high
              << "] vs scipy [" << low << ", " << high << "]");
      CHECK(k > 0);
      CHECK(e.interval_low == Approx(low).epsilon(1e-10));
      CHECK(e.interval_high == Approx(high).epsilon(1e-10));
      ++cases;
    }
  }
  CHECK(cases == 6);
}

TEST_CASE("zero hits give an interval from 0 to the one-sided bound", "[monte_carlo]") {
  // Clopper & Pearson (1934): k = 0 of n gives upper bound 1 - (alpha/2)^(1/n) two-sided.
  const auto g = Gaussian::from_axes({0, 0}, 1.0, 1.0, 0.0);
  IntegrateOptions o;
  o.method = Method::monte_carlo;
  o.samples = 10;
  o.confidence = 0.90;  // two-sided 90% = one-sided 95% upper bound
  const Estimate e = integrate(g, rectangle({20, 20}, {21, 21}), o);
  CHECK(e.p == 0.0);
  CHECK(e.interval_low == 0.0);
  CHECK(e.interval_high == Approx(0.258866).epsilon(1e-5));  // CHECKS.md: 1 - 0.05^(1/10)
}
