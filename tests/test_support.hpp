#ifndef STREWN_TESTS_TEST_SUPPORT_HPP
#define STREWN_TESTS_TEST_SUPPORT_HPP

// Small helpers shared by the tests: regions built directly (without plugins) and the
// one-dimensional normal probabilities that closed-form references are made of.

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include "strewn/constants.hpp"
#include "strewn/region.hpp"
#include "strewn/region_builders.hpp"
#include "strewn/scatter_model.hpp"

namespace strewn::test {

using strewn::kPi;
// The public builders (strewn/region_builders.hpp): polygon, rectangle, ellipse, disk, ring_sector.
using strewn::disk;
using strewn::ellipse;
using strewn::polygon;
using strewn::rectangle;
using strewn::ring_sector;

// A polygon with one polygonal hole.
inline Region with_hole(const std::vector<Vec2>& outer, const std::vector<Vec2>& hole) {
  Region r;
  for (const auto* pts : {&outer, &hole}) {
    Loop loop;
    for (std::size_t i = 0; i < pts->size(); ++i)
      loop.push_back(Edge::segment((*pts)[i], (*pts)[(i + 1) % pts->size()]));
    r.loops.push_back(loop);
  }
  return normalised(r);
}

// n sorted angles in [0, 2 pi) with no gap (around the circle) of max_gap or more, drawn from
// r.uniform(a, b): the vertices of a star-shaped polygon that winds once around its centre.
template <class Random>
std::vector<double> gap_limited_angles(Random& r, int n, double max_gap) {
  std::vector<double> angles;
  for (;;) {
    angles.clear();
    for (int i = 0; i < n; ++i) angles.push_back(r.uniform(0, 2 * kPi));
    std::sort(angles.begin(), angles.end());
    double gap = angles.front() + 2 * kPi - angles.back();
    for (int i = 1; i < n; ++i) gap = std::max(gap, angles[i] - angles[i - 1]);
    if (gap < max_gap) return angles;
  }
}

// The rows of a reference file written at test time (tests/reference/*.py): each non-empty
// line split at ';'. Empty when the file cannot be read.
inline std::vector<std::vector<std::string>> reference_rows(const std::string& path) {
  std::ifstream in(path);
  std::vector<std::vector<std::string>> rows;
  std::string line;
  while (std::getline(in, line)) {
    if (line.empty()) continue;
    std::vector<std::string> fields;
    std::stringstream ss(line);
    std::string item;
    while (std::getline(ss, item, ';')) fields.push_back(item);
    rows.push_back(fields);
  }
  return rows;
}

// strtod, unlike stod, returns subnormal and underflowing values instead of throwing.
inline double reference_number(const std::string& s) { return std::strtod(s.c_str(), nullptr); }

inline Mat2 rotation(double rad) {
  Mat2 R;
  R << std::cos(rad), -std::sin(rad), std::sin(rad), std::cos(rad);
  return R;
}

// Q(x) = 1 - Phi(x), the standard normal upper tail. For large x the rounding of x / sqrt 2
// alone would cost about x^2 ulps, so the rounding error y_lo of y = x / sqrt 2 is carried and
// applied through d erfc(y)/dy = -2/sqrt(pi) exp(-y^2) (first-order Taylor term).
inline double upper_tail(double x) {
  const double c = 0.70710678118654752440, c_lo = -4.8336466567264567e-17;
  const double y = x * c;
  const double y_lo = std::fma(x, c, -y) + x * c_lo;
  return 0.5 * (std::erfc(y) - 1.12837916709551257390 * std::exp(-y * y) * y_lo);
}

// P(a < Z < b) for a standard normal: erf differences near the centre, erfc differences in
// the tails, so neither side cancels.
inline double normal_interval(double a, double b) {
  const double c = 0.70710678118654752440;
  if (b <= 0) return normal_interval(-b, -a);
  if (a < 1.0 && b <= 1.0) return 0.5 * (std::erf(b * c) - std::erf(a * c));
  if (a < 0) return 1.0 - upper_tail(-a) - upper_tail(b);
  if (a < 1.0) return 0.5 * std::erf(c) - 0.5 * std::erf(a * c) + (upper_tail(1.0) - upper_tail(b));
  return upper_tail(a) - upper_tail(b);
}

// Relative difference, with an absolute floor for values near zero.
inline double rel_diff(double a, double b) {
  return std::fabs(a - b) / std::max(std::fabs(b), 1e-300);
}

}  // namespace strewn::test

#endif
