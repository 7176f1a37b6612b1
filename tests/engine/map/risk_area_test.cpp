// The area at or above a level of a risk map (strewn/risk_area.hpp) against closed forms: the
// level sets of a circular normal density are circles (area pi r^2 with r^2 = -2 s^2 ln level,
// from the density exp(-r^2 / 2 s^2)), a ring-shaped field gives an annulus pi (r2^2 - r1^2),
// and the hull of the nodes is a rectangle. Validity by the engine's OGC check and the
// orientation by the shoelace formula.
#include <catch2/catch.hpp>
#include <cmath>
#include <functional>

#include "strewn/constants.hpp"
#include "strewn/contours.hpp"
#include "strewn/region_ops.hpp"
#include "strewn/risk_area.hpp"

using namespace strewn;

namespace {

RiskMap field(int n, double half_width, const std::function<double(const Vec2&)>& f) {
  RiskMap m;
  m.grid.spacing = 2 * half_width / (n - 1);
  m.grid.origin = Vec2(-half_width, -half_width);
  m.grid.columns = m.grid.rows = n;
  for (int j = 0; j < n; ++j)
    for (int i = 0; i < n; ++i) m.value.push_back(f(m.grid.centre(i, j)));
  m.abs_err.assign(m.value.size(), 0.0);
  return m;
}

int count_loops(const Region& r, bool counter_clockwise) {
  int n = 0;
  for (const Loop& l : r.loops) n += (signed_area(l) > 0) == counter_clockwise ? 1 : 0;
  return n;
}

}  // namespace

TEST_CASE("the area above a level of a circular normal density is its circle", "[map][risk_area]") {
  const double s = 1.5;
  const RiskMap m = field(161, 6.0, [&](const Vec2& x) { return std::exp(-x.squaredNorm() / (2 * s * s)); });
  for (double level : {0.5, 1e-1, 1e-2}) {
    const Region a = area_at_or_above(m, level);
    const double r2 = -2 * s * s * std::log(level);  // level set of exp(-r^2 / 2 s^2)
    INFO("level " << level);
    REQUIRE(a.loops.size() == 1);
    CHECK(signed_area(a.loops[0]) > 0);  // outer loop counter-clockwise
    // An inscribed polygon of a circle with vertices about h apart: relative area defect about
    // (h / r)^2 / 6; here h / r < 0.06.
    CHECK(area(a) == Approx(kPi * r2).epsilon(2e-3));
    CHECK(check_validity(a).valid);
  }
}

TEST_CASE("a ring-shaped field gives an annulus: one outer loop and one hole", "[map][risk_area]") {
  // exp(-(r - 3)^2 / 2) >= e^{-1/2} exactly for 2 <= r <= 4.
  const RiskMap m = field(201, 6.0, [](const Vec2& x) { return std::exp(-std::pow(x.norm() - 3.0, 2) / 2); });
  const Region a = area_at_or_above(m, std::exp(-0.5));
  REQUIRE(a.loops.size() == 2);
  CHECK(count_loops(a, true) == 1);
  CHECK(count_loops(a, false) == 1);  // the hole runs clockwise
  CHECK(area(a) == Approx(kPi * (16.0 - 4.0)).epsilon(5e-3));
  CHECK(check_validity(a).valid);
  CHECK(winding_number(a, Vec2(0, 0)) == 0);
  CHECK(winding_number(a, Vec2(3, 0)) == 1);
}

TEST_CASE("separate peaks give separate loops, also at a saddle between them", "[map][risk_area]") {
  // Two equal bumps 3 apart: the field at the midpoint is exp(-9/8) = 0.3247; a level just
  // above it separates them, one below joins them.
  const auto two = [](const Vec2& x) {
    return std::max(std::exp(-(x - Vec2(-1.5, 0)).squaredNorm() / 2), std::exp(-(x - Vec2(1.5, 0)).squaredNorm() / 2));
  };
  const RiskMap m = field(121, 6.0, two);
  const Region apart = area_at_or_above(m, 0.34), joined = area_at_or_above(m, 0.31);
  CHECK(apart.loops.size() == 2);
  CHECK(count_loops(apart, true) == 2);
  CHECK(joined.loops.size() == 1);
  CHECK(check_validity(apart).valid);
  CHECK(check_validity(joined).valid);
}

TEST_CASE("a level reached everywhere gives the hull of the nodes, one nowhere gives nothing", "[map][risk_area]") {
  const RiskMap m = field(11, 5.0, [](const Vec2& x) { return 0.5 + 0.01 * x.x(); });
  const Region all = area_at_or_above(m, 0.1);
  REQUIRE(all.loops.size() == 1);
  CHECK(all.loops[0].size() == 4);  // straight runs along the map's edge are one edge each
  CHECK(area(all) == Approx(100.0).epsilon(1e-12));
  CHECK(area_at_or_above(m, 0.9).empty());
}

TEST_CASE("the area's boundary inside the map is the contour line at the same level", "[map][risk_area]") {
  const double s = 1.0;
  const RiskMap m = field(81, 4.0, [&](const Vec2& x) { return std::exp(-(x - Vec2(0.3, -0.2)).squaredNorm() / (2 * s * s)); });
  const Region a = area_at_or_above(m, 1e-2);
  const ContourSet c = contour(m, 1e-2);
  REQUIRE(!c.lines.empty());
  for (const ContourLine& line : c.lines)
    for (const Vec2& p : line.points) {
      double nearest = 1e300;
      for (const Loop& l : a.loops)
        for (const Edge& e : l) nearest = std::min(nearest, (e.from - p).norm());
      CHECK(nearest < 1e-9);
    }
}

TEST_CASE("a node exactly at the level counts as at or above it, one a hair below does not", "[map][risk_area]") {
  // "At or above" by definition (strewn/risk_area.hpp): a single node at the level gives a tiny
  // diamond around it (from its four neighbouring squares), a node 1e-12 below it (inside the 1e-9 band where log10 decides) gives nothing,
  // and so does the field elsewhere, at a tenth of the level.
  const double level = 3e-7;
  for (const double at_node : {level, level * (1 - 1e-12), level * (1 + 1e-12)}) {
    const RiskMap m = field(9, 4.0, [&](const Vec2& x) { return x.squaredNorm() == 0.0 ? at_node : 0.1 * level; });
    const Region a = area_at_or_above(m, level);
    INFO("node value " << at_node);
    if (at_node >= level) {
      REQUIRE(a.loops.size() == 1);
      CHECK(a.loops[0].size() == 4);
      // The level is met at the node itself, so each crossing sits the 1e-6 of a cell (spacing
      // 1) it is kept off the corner: a diamond of diagonals 2e-6, area d1 d2 / 2 = 2e-12.
      CHECK(area(a) == Approx(2e-12).epsilon(1e-6));
      const ContourSet c = contour(m, level);
      CHECK(c.lines.size() == 1);
    } else {
      CHECK(a.empty());
      CHECK(contour(m, level).lines.empty());
    }
  }
}
