// The exact and cubature methods against references computed at test time by Debian's
// python3-scipy (scipy.stats.ncx2, scipy.stats.multivariate_normal) and python3-mpmath (40-digit
// quadrature); see reference/make_references.py, which names the source of every case.
#include <catch2/catch.hpp>
#include <cmath>
#include <cstdlib>
#include <fstream>
#include <sstream>

#include "strewn/integrate.hpp"
#include "test_support.hpp"

using namespace strewn;
using namespace strewn::test;

namespace {

struct Case {
  std::string name, source, shape;
  Vec2 mean;
  Mat2 cov;
  std::vector<double> numbers;
  double p, q;
};

const auto to_double = reference_number;

std::vector<Case> load_cases() {
  std::vector<Case> cases;
  for (const std::vector<std::string>& f : reference_rows(STREWN_TEST_BINARY_DIR "/references.csv")) {
    REQUIRE(f.size() == 11);
    Case c;
    c.name = f[0];
    c.source = f[1];
    c.mean = Vec2(to_double(f[2]), to_double(f[3]));
    c.cov << to_double(f[4]), to_double(f[5]), to_double(f[5]), to_double(f[6]);
    c.shape = f[7];
    std::stringstream nums(f[8]);
    double v;
    while (nums >> v) c.numbers.push_back(v);
    c.p = to_double(f[9]);
    c.q = to_double(f[10]);
    cases.push_back(c);
  }
  REQUIRE(!cases.empty());  // the fixture wrote the file
  return cases;
}

Region region_of(const Case& c) {
  if (c.shape == "disk") return disk({c.numbers[0], c.numbers[1]}, c.numbers[2]);
  if (c.shape == "rect") return rectangle({c.numbers[0], c.numbers[2]}, {c.numbers[1], c.numbers[3]});
  std::vector<Vec2> pts;
  for (std::size_t i = 0; i + 1 < c.numbers.size(); i += 2) pts.emplace_back(c.numbers[i], c.numbers[i + 1]);
  return polygon(pts);
}

}  // namespace

TEST_CASE("exact agrees with scipy and mpmath references to 1e-12 absolute and 1e-8 relative",
          "[exact][reference]") {
  const auto cases = load_cases();
  // The generator asserts its exact case list (30 ncx2, 30 mvn, 29 mpmath); so does this.
  REQUIRE(cases.size() == 89);
  for (const Case& c : cases) {
    const auto g = Gaussian::from_covariance(c.mean, c.cov);
    const Estimate e = integrate(g, region_of(c));
    INFO(c.name << " (" << c.source << "): p = " << e.p << " ref " << c.p << ", q = " << e.q
                << " ref " << c.q << ", abs_err " << e.abs_err);
    CHECK(std::fabs(e.p - c.p) <= 1e-12);
    // scipy's ncx2 and bivariate normal are accurate to about 1e-12 relative at best; mpmath's
    // 40-digit values are exact for our purpose and also test the honesty of abs_err.
    if (c.source.rfind("mpmath", 0) == 0) {
      CHECK(rel_diff(e.p, c.p) <= 1e-8);
      CHECK(rel_diff(e.q, c.q) <= 1e-8);
      CHECK(std::fabs(e.p - c.p) <= e.abs_err);
    } else if (c.source == "scipy.stats.ncx2") {
      if (c.p > 1e-200) CHECK(rel_diff(e.p, c.p) <= 1e-8);
      if (c.q > 1e-200) CHECK(rel_diff(e.q, c.q) <= 1e-8);
    }
  }
}

TEST_CASE("cubature agrees with the same references within its error estimate",
          "[cubature][reference]") {
  IntegrateOptions o;
  o.method = Method::cubature;
  o.rel_tolerance = 1e-9;
  o.abs_tolerance = 1e-300;
  int compared = 0;
  for (const Case& c : load_cases()) {
    if (c.source.rfind("mpmath", 0) != 0 && c.p < 1e-12) continue;  // scipy's absolute accuracy
    ++compared;
    const auto g = Gaussian::from_covariance(c.mean, c.cov);
    const Estimate e = integrate(g, region_of(c), o);
    INFO(c.name << ": p = " << e.p << " ref " << c.p << ", abs_err " << e.abs_err << " "
                << e.message);
    CHECK(std::fabs(e.p - c.p) <= e.abs_err + 1e-14 * c.p + (c.source.rfind("mpmath", 0) == 0 ? 0 : 1e-13));
    CHECK(rel_diff(e.p, c.p) <= 1e-7);
  }
  // All 29 mpmath cases and the scipy cases with p >= 1e-12 (counted when written).
  CHECK(compared == 86);
}

TEST_CASE("exact at a 1e-14 request meets the mpmath references to 1e-13 relative", "[exact][reference]") {
  // The README's claim, relative accuracy down to one in 10^15, at its measured level: asked for
  // 1e-14 relative (no absolute floor), the exact method agrees with each of the 29 40-digit
  // mpmath references in p and in q to 1e-13 relative (measured: 2 ulps typically, at most 7.5e-14;
  // one named exception, the 2e-4 m strip pointing at the mean, 3.2e-13 with a bound of 6e-10),
  // to 4e-15 in 22 of them (the other seven, since the engine works in the frame of the mean:
  // mp_star_4, 9 and 15, mp_tail_4, mp_axis_ratio_50, mp_p_near_one's q, 4.1e-15 to 7.5e-14,
  // and the strip), and its bound covers the true error. The bounds themselves
  // are 1e-14 to 2e-10 of p, so the 1e-14 request is reported as not met: the claim is about
  // the errors, which the bounds cover. Deliberate fault that made it fail: the exact method's p
  // scaled by 1 + 2e-13 in integrate().
  IntegrateOptions o;
  o.rel_tolerance = 1e-14;
  o.abs_tolerance = 1e-300;
  int compared = 0, within_4e15 = 0;
  double worst_p = 0, worst_q = 0;
  for (const Case& c : load_cases()) {
    if (c.source.rfind("mpmath", 0) != 0) continue;
    const auto g = Gaussian::from_covariance(c.mean, c.cov);
    const Estimate e = integrate(g, region_of(c), o);
    INFO(c.name << ": p = " << e.p << " ref " << c.p << ", q = " << e.q << " ref " << c.q << ", abs_err "
                << e.abs_err << " " << e.message);
    const double allowed = c.name == "mp_thin_strip_pointing_at_mean" ? 5e-13 : 1e-13;
    CHECK(rel_diff(e.p, c.p) <= allowed);
    CHECK(rel_diff(e.q, c.q) <= allowed);
    CHECK(std::fabs(e.p - c.p) <= e.abs_err);
    CHECK(std::fabs(e.q - c.q) <= e.abs_err);
    CHECK(e.abs_err <= 1e-9 * std::min(e.p, e.q));
    if (std::max(rel_diff(e.p, c.p), rel_diff(e.q, c.q)) <= 4e-15) ++within_4e15;
    worst_p = std::max(worst_p, rel_diff(e.p, c.p));
    worst_q = std::max(worst_q, rel_diff(e.q, c.q));
    ++compared;
  }
  INFO("largest relative error: p " << worst_p << ", q " << worst_q);
  CHECK(compared == 29);
  CHECK(within_4e15 == 22);
}
