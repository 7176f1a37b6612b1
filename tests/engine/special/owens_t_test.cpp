// strewn::owens_t (Patefield & Tandy algorithm) against published values and against
// boost::math::owens_t as the reference library.
#include <boost/math/special_functions/owens_t.hpp>
#include <catch2/catch.hpp>
#include <algorithm>
#include <cmath>
#include <cstdint>
#include <utility>
#include <vector>

#include "strewn/owens_t.hpp"
#include "test_support.hpp"

using strewn::owens_t;
using strewn::test::kPi;

TEST_CASE("Owen's T matches the published AS 76 test values", "[owens_t]") {
  // Values published with J. Burkardt's AS 76 implementation, computed with Mathematica
  // (../shared/CHECKS.md).
  CHECK(owens_t(0.0625, 0.25) == Approx(3.8911930234701366e-02).epsilon(1e-14));
  CHECK(owens_t(2.0, 0.5) == Approx(8.6250779855215071e-03).epsilon(1e-14));
  CHECK(owens_t(6.5, 0.4375) == Approx(2.0005773048508315e-11).epsilon(1e-14));
  CHECK(owens_t(7.0, 0.96875) == Approx(6.3990627193898685e-13).epsilon(1e-14));
}

TEST_CASE("Owen's T special values (Owen 1956)", "[owens_t]") {
  for (double h : {0.0, 0.3, 1.0, 2.5, 6.0}) {
    CHECK(owens_t(h, 0.0) == 0.0);
    const double Q = strewn::test::upper_tail(h);
    CHECK(owens_t(h, 1.0) == Approx(0.5 * (1 - Q) * Q).epsilon(1e-14));
    CHECK(owens_t(h, INFINITY) == Approx(0.5 * Q).epsilon(1e-14));
    CHECK(owens_t(-h, 0.7) == owens_t(h, 0.7));
    CHECK(owens_t(h, -0.7) == -owens_t(h, 0.7));
  }
  for (double a : {0.01, 0.5, 1.0, 3.0, 100.0})
    CHECK(owens_t(0.0, a) == Approx(std::atan(a) / (2 * kPi)).epsilon(1e-15));
  CHECK(std::isnan(owens_t(NAN, 0.5)));
  CHECK(std::isnan(owens_t(0.5, NAN)));
}

TEST_CASE("Owen's T agrees with boost::math::owens_t over a dense grid", "[owens_t]") {
  // Relative accuracy wherever T is a normal double; the bound the exact method assumes for
  // its error estimate (edge_tail.cpp, kOwensTRel) must hold with margin.
  double worst = 0.0, worst_h = 0, worst_a = 0;
  for (int i = 0; i <= 400; ++i) {
    const double h = i < 200 ? i * 0.025 : 5.0 + (i - 200) * 0.16;  // 0 .. 37
    for (int j = -120; j <= 120; ++j) {
      const double a = std::copysign(std::pow(10.0, std::fabs(j) / 30.0 - 3.0), j);  // 1e-3 .. 1e1
      const double ref = boost::math::owens_t(h, a);
      if (std::fabs(ref) < 1e-300) continue;
      const double err = std::fabs(owens_t(h, a) - ref) / std::fabs(ref);
      if (err > worst) {
        worst = err;
        worst_h = h;
        worst_a = a;
      }
    }
  }
  INFO("worst relative error " << worst << " at h = " << worst_h << ", a = " << worst_a);
  CHECK(worst < 2e-15);
}

TEST_CASE("Owen's T in batches equals single calls and Boost", "[owens_t]") {
  // The batch groups pairs by method and runs four lanes at a time; every lane must give what a
  // single call gives, but for the rounding of the vector exp, expm1, erf and atan (a few ulps,
  // which T1's alternating series can double), and agree with Boost as single calls do.
  std::vector<double> h, a;
  for (int i = 0; i <= 160; ++i)
    for (int j = -40; j <= 40; ++j) {
      h.push_back(i < 80 ? (i - 10) * 0.07 : 4.9 + (i - 80) * 0.35);  // -0.7 .. 32.9
      a.push_back(j == 0 ? 0.0 : std::copysign(std::pow(10.0, std::fabs(j) / 10.0 - 2.5), j));  // 3e-3 .. 30
    }
  for (double special : {0.0, 1.0, -1.0, double(INFINITY)}) {
    h.push_back(1.3);
    a.push_back(special);
  }
  h.push_back(NAN);
  a.push_back(0.4);
  std::vector<double> t(h.size());
  strewn::owens_t(h.data(), a.data(), t.data(), h.size());
  double worst_single = 0.0, worst_boost = 0.0;
  for (std::size_t i = 0; i + 1 < h.size(); ++i) {
    const double single = owens_t(h[i], a[i]);
    if (single == 0.0) {
      CHECK(t[i] == 0.0);
      continue;
    }
    worst_single = std::max(worst_single, std::fabs(t[i] - single) / std::fabs(single));
    const double ref = boost::math::owens_t(h[i], a[i]);
    if (std::fabs(ref) > 1e-300) worst_boost = std::max(worst_boost, std::fabs(t[i] - ref) / std::fabs(ref));
  }
  CHECK(worst_single < 2e-15);
  CHECK(worst_boost < 2e-15);
  CHECK(std::isnan(t.back()));
}

TEST_CASE("Owen's T in batches equals single calls across every region boundary", "[owens_t]") {
  // The batch runs four lanes of one method at once, each lane to its own region's order, and
  // finds the regions by vector comparisons: pairs just below, at and just above every range end
  // of Patefield & Tandy's table (2000, Table 3: h 0.02 .. 4.8, a 0.025 .. 0.99999), in both
  // orders of h and a and shuffled so that every chunk mixes regions, must each give what a
  // single call gives (to the vector exp's rounding) and what boost::math::owens_t gives.
  const double h_ends[] = {0.02, 0.06, 0.09, 0.125, 0.26, 0.4, 0.6, 1.6, 1.7, 2.33, 2.4, 3.36, 3.4, 4.8};
  const double a_ends[] = {0.025, 0.09, 0.15, 0.36, 0.5, 0.9, 0.99999};
  std::vector<double> hs, as;
  for (double e : h_ends)
    for (double f : {0.97, 0.999, 1.0, 1.001, 1.03}) hs.push_back(e * f);
  for (double e : a_ends)
    for (double f : {0.97, 0.999, 1.0, 1.001, 1.03})
      if (e * f < 1.0) as.push_back(e * f);
  for (double x = 0.005; x < 6.0; x *= 1.17) hs.push_back(x);
  for (double x = 0.004; x < 1.0; x *= 1.21) as.push_back(x);
  std::vector<double> h, a;
  for (double x : hs)
    for (double y : as) {
      h.push_back(x);
      a.push_back(y);
      h.push_back(-x);  // the signs: T is even in h and odd in a
      a.push_back(-y);
    }
  // A fixed shuffle (a linear congruential walk), so that each chunk of four mixes regions.
  std::uint64_t state = 20261203;
  for (std::size_t i = h.size() - 1; i > 0; --i) {
    state = state * 6364136223846793005ULL + 1442695040888963407ULL;
    const std::size_t j = (state >> 33) % (i + 1);
    std::swap(h[i], h[j]);
    std::swap(a[i], a[j]);
  }
  std::vector<double> t(h.size());
  strewn::owens_t(h.data(), a.data(), t.data(), h.size());
  double worst_single = 0.0, worst_boost = 0.0;
  for (std::size_t i = 0; i < h.size(); ++i) {
    const double single = owens_t(h[i], a[i]);
    const double ref = boost::math::owens_t(h[i], a[i]);
    worst_single = std::max(worst_single, std::fabs(t[i] - single) / std::fabs(single));
    worst_boost = std::max(worst_boost, std::fabs(t[i] - ref) / std::fabs(ref));
  }
  INFO(h.size() << " pairs; worst against single calls " << worst_single << ", against Boost " << worst_boost);
  CHECK(h.size() > 5000);
  CHECK(worst_single < 2e-15);
  CHECK(worst_boost < 2e-15);
}
