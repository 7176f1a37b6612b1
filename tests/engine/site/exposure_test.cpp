// The one combiner of per-event probabilities into per-session and per-year ones
// (strewn/exposure.hpp), used by assess and by every risk-map cell.
#include <catch2/catch.hpp>
#include <cmath>
#include <string>

#include "strewn/exposure.hpp"

using strewn::ExposureSum;
using strewn::Period;

TEST_CASE("one source: 1 - (1 - p)^n against the direct product", "[site][exposure]") {
  // Source: the definition, P(at least one hit in n independent events) = 1 - (1 - p)^n,
  // computed here as a plain product where it loses nothing (p = 0.01, n = 10).
  ExposureSum sum;
  sum.add(0.01, 0.0, 10);
  double none = 1.0;
  for (int i = 0; i < 10; ++i) none *= 0.99;
  CHECK(sum.any() == Approx(1.0 - none).epsilon(1e-14));
  // Source: the binomial series n p - C(n, 2) p^2 + C(n, 3) p^3, exact to 1e-30 relative here,
  // where 1 - pow(1 - p, n) would keep no digit (p = 1e-15, n = 1000).
  ExposureSum tiny;
  tiny.add(1e-15, 0.0, 1000);
  const double p = 1e-15, n = 1000;
  CHECK(tiny.any() == Approx(n * p - n * (n - 1) / 2 * p * p).epsilon(1e-13));
}

TEST_CASE("independent sources multiply their chances of no hit", "[site][exposure]") {
  // Source: independence, P(no hit) = (1 - p1)^n1 (1 - p2)^n2.
  ExposureSum sum;
  sum.add(0.02, 0.0, 3);
  sum.add(0.1, 0.0, 2);
  const double none = std::pow(0.98, 3) * std::pow(0.9, 2);
  CHECK(sum.any() == Approx(1.0 - none).epsilon(1e-14));
  CHECK(sum.log_none() == Approx(std::log(none)).epsilon(1e-14));
  CHECK(sum.largest() == 0.1);
}

TEST_CASE("bounds: the interval [f(p - e), f(p + e)] and the largest single source", "[site][exposure]") {
  // 1 - (1 - p)^n increases with p, so the bound maps through f(p) = 1 - (1 - p)^n.
  const auto f = [](double p, double n) { return 1.0 - std::pow(1.0 - p, n); };
  ExposureSum sum;
  sum.add(0.01, 0.001, 10);
  sum.add(0.002, 0.0005, 4);
  const double p = 1.0 - std::pow(0.99, 10) * std::pow(0.998, 4);
  const double upper = 1.0 - std::pow(0.989, 10) * std::pow(0.9975, 4);
  const double lower = 1.0 - std::pow(0.991, 10) * std::pow(0.9985, 4);
  CHECK(sum.any() == Approx(p).epsilon(1e-13));
  CHECK(sum.any_upper() == Approx(upper).epsilon(1e-13));
  CHECK(sum.any_abs_err() == Approx(std::max(upper - p, p - lower)).epsilon(1e-11));
  CHECK(sum.largest() == 0.01);
  CHECK(sum.largest_upper() == Approx(0.011).epsilon(1e-15));
  CHECK(sum.largest_abs_err() == 0.001);
  CHECK(f(0.01, 10) < sum.any());
}

TEST_CASE("a certain hit is certain, p + e is clamped to 1, and nothing gives +0", "[site][exposure]") {
  ExposureSum none;
  CHECK(none.any() == 0.0);
  CHECK_FALSE(std::signbit(none.any()));  // no -0 printed for a zone nothing can reach
  ExposureSum certain;
  certain.add(1.0, 0.5, 3);
  CHECK(certain.any() == 1.0);
  CHECK(certain.largest_upper() == 1.0);
  // P(no hit) = 0: its log is -inf (1 - 1e-300 rounds to 1), and the individual risk
  // -expm1(f * log_none) is 1 for any occupancy f > 0.
  CHECK(-std::expm1(0.25 * certain.log_none()) == 1.0);
}

TEST_CASE("events in a period: 1, N, N x sessions", "[site][exposure]") {
  const strewn::Exposure e{40.0, 25.0};
  CHECK(e.events(Period::event) == 1.0);
  CHECK(e.events(Period::session) == 40.0);
  CHECK(e.events(Period::year) == 1000.0);
  CHECK(std::string(strewn::to_string(Period::year)) == "year");
}
