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

// strtod, unlike stod, returns subnormal and underflowing values instead of throwing.
double to_double(const std::string& s) { return std::strtod(s.c_str(), nullptr); }

std::vector<Case> load_cases() {
  std::ifstream in(STREWN_TEST_BINARY_DIR "/references.csv");
  REQUIRE(in.good());
  std::vector<Case> cases;
  std::string line;
  while (std::getline(in, line)) {
    if (line.empty()) continue;
    std::vector<std::string> f;
    std::stringstream ss(line);
    std::string item;
    while (std::getline(ss, item, ';')) f.push_back(item);
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
  return cases;
}

Region region_of(const Case& c) {
  if (c.shape == "disk") return disk({c.numbers[0], c.numbers[1]}, c.numbers[2]);
  if (c.shape == "rect") return rect(c.numbers[0], c.numbers[1], c.numbers[2], c.numbers[3]);
  std::vector<Vec2> pts;
  for (std::size_t i = 0; i + 1 < c.numbers.size(); i += 2) pts.emplace_back(c.numbers[i], c.numbers[i + 1]);
  return polygon(pts);
}

}  // namespace

TEST_CASE("exact agrees with scipy and mpmath references to 1e-12 absolute and 1e-8 relative",
          "[exact][reference]") {
  const auto cases = load_cases();
  REQUIRE(cases.size() >= 80);
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
  for (const Case& c : load_cases()) {
    if (c.source.rfind("mpmath", 0) != 0 && c.p < 1e-12) continue;  // scipy's absolute accuracy
    const auto g = Gaussian::from_covariance(c.mean, c.cov);
    const Estimate e = integrate(g, region_of(c), o);
    INFO(c.name << ": p = " << e.p << " ref " << c.p << ", abs_err " << e.abs_err << " "
                << e.message);
    CHECK(std::fabs(e.p - c.p) <= e.abs_err + 1e-14 * c.p + (c.source.rfind("mpmath", 0) == 0 ? 0 : 1e-13));
    CHECK(rel_diff(e.p, c.p) <= 1e-7);
  }
}
