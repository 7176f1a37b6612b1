// The Monte Carlo method: seeded, reproducible, and its Clopper-Pearson intervals cover.
#include <catch2/catch.hpp>
#include <cmath>

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

TEST_CASE("Clopper-Pearson intervals cover the true probability at their level",
          "[monte_carlo]") {
  // Rectangle under a standard normal: the product of 1-D probabilities is exact.
  const auto g = Gaussian::from_axes({0, 0}, 1.0, 1.0, 0.0);
  const Region r = rect(-0.5, 1.0, 0.2, 2.0);
  const double truth = normal_interval(-0.5, 1.0) * normal_interval(0.2, 2.0);
  IntegrateOptions o;
  o.method = Method::monte_carlo;
  o.samples = 2000;
  o.confidence = 0.95;
  int covered = 0;
  const int trials = 400;
  for (int t = 0; t < trials; ++t) {
    o.seed = 1000 + t;
    const Estimate e = integrate(g, r, o);
    if (e.interval_low <= truth && truth <= e.interval_high) ++covered;
    REQUIRE(std::fabs(e.p - truth) <= e.abs_err + 0.2);
  }
  // Clopper-Pearson is conservative: coverage at least the nominal 95% up to sampling noise
  // (binomial sd over 400 trials ~ 1.1%).
  INFO("covered " << covered << " of " << trials);
  CHECK(covered >= 0.92 * trials);
}

TEST_CASE("zero hits give an interval from 0 to the one-sided bound", "[monte_carlo]") {
  // Clopper & Pearson (1934): k = 0 of n gives upper bound 1 - (alpha/2)^(1/n) two-sided.
  const auto g = Gaussian::from_axes({0, 0}, 1.0, 1.0, 0.0);
  IntegrateOptions o;
  o.method = Method::monte_carlo;
  o.samples = 10;
  o.confidence = 0.90;  // two-sided 90% = one-sided 95% upper bound
  const Estimate e = integrate(g, rect(20, 21, 20, 21), o);
  CHECK(e.p == 0.0);
  CHECK(e.interval_low == 0.0);
  CHECK(e.interval_high == Approx(0.258866).epsilon(1e-5));  // CHECKS.md: 1 - 0.05^(1/10)
}
