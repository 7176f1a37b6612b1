// The batched elementary functions (engine/src/special/vector_math.*) against glibc's scalar
// libm (std::log1p, std::sin, std::log), which glibc documents within 1-2 ulp on x86-64: the
// batched forms must stay within a few ulps of them, as the error allowances of their callers
// (arc_tail.cpp, family_segment.cpp: 16 eps (1 + exponent)) assume.
#include <catch2/catch.hpp>
#include <cmath>
#include <limits>
#include <random>
#include <vector>

#include "special/vector_math.hpp"

using namespace strewn::detail;

namespace {

// |a - b| in units of the last place of b.
double ulps(double a, double b) {
  if (a == b) return 0.0;
  const double ulp = std::nextafter(std::fabs(b), std::numeric_limits<double>::infinity()) - std::fabs(b);
  return std::fabs(a - b) / ulp;
}

}  // namespace

TEST_CASE("log1p_in_place keeps log1p's relative accuracy from tiny to huge arguments", "[vector_math]") {
  std::mt19937_64 rng(20261204);
  std::uniform_real_distribution<double> exponent(-30.0, 30.0), unit(0.0, 1.0);
  std::vector<double> x;
  // Tiny (where log(1 + x) alone loses every digit), near 1 + x = 2, near -1/2, and huge.
  for (double v : {1e-300, 5e-324, 1e-17, 1.1e-16, 2.3e-16, 1e-8, 0.5, 0.999999, 1.0, 1.0000001, 3.0, -0.5, -0.25,
                   -1e-10, 1e10, 1e300})
    x.push_back(v);
  for (int i = 0; i < 2000; ++i) x.push_back(std::pow(10.0, exponent(rng)));
  for (int i = 0; i < 500; ++i) x.push_back(-0.5 * unit(rng));  // x in (-1/2, 0]
  std::vector<double> y = x;
  log1p_in_place(y.data(), static_cast<int>(y.size()));
  double worst = 0.0;
  for (std::size_t i = 0; i < x.size(); ++i) {
    const double want = std::log1p(x[i]);
    INFO("x = " << x[i] << " batched " << y[i] << " std::log1p " << want);
    const double u = ulps(y[i], want);
    worst = std::max(worst, u);
    CHECK(u <= 4.0);
  }
  INFO("worst " << worst << " ulps");
  CHECK(worst <= 4.0);
}

TEST_CASE("sin_in_place and log_in_place meet std::sin and std::log to a few ulps", "[vector_math]") {
  std::mt19937_64 rng(7);
  std::uniform_real_distribution<double> angle(1e-6, 3.2), positive(1e-3, 1e3);
  std::vector<double> a, b;
  for (int i = 0; i < 2000; ++i) {
    a.push_back(angle(rng));
    b.push_back(positive(rng));
  }
  std::vector<double> sa = a, lb = b;
  sin_in_place(sa.data(), static_cast<int>(sa.size()));
  log_in_place(lb.data(), static_cast<int>(lb.size()));
  for (std::size_t i = 0; i < a.size(); ++i) {
    INFO("sin(" << a[i] << ")");
    CHECK(ulps(sa[i], std::sin(a[i])) <= 4.0);
    INFO("log(" << b[i] << ")");
    CHECK(std::fabs(lb[i] - std::log(b[i])) <= 4.0 * std::numeric_limits<double>::epsilon() * std::max(1.0, std::fabs(std::log(b[i]))));
  }
}
