// Sprinkler heads and layouts (strewn/head.hpp, strewn/layout.hpp) through deposition, on sites
// built in code. Each expected value is worked by hand from the stated formula.
#include <catch2/catch.hpp>
#include <cmath>

#include "strewn/deposition.hpp"
#include "strewn/error.hpp"
#include "strewn/head.hpp"
#include "strewn/layout.hpp"
#include "strewn/region_builders.hpp"

namespace {

constexpr double kPi = 3.14159265358979323846;

strewn::Site site_with(const std::vector<strewn::Head>& heads, const strewn::Region& lawn, const strewn::CatchGrid& grid,
                       double hours) {
  strewn::Site s;
  s.heads = heads;
  for (const strewn::Head& h : heads) s.sources.push_back(strewn::head_source(h));
  strewn::Zone z;
  z.name = "lawn";
  z.role = strewn::Role::target;
  z.region = lawn;
  s.zones.push_back(z);
  strewn::DepositionSettings d;
  d.hours = hours;
  d.site_boundary = "lawn";
  d.grid = grid;
  s.deposition = d;
  return s;
}

strewn::CatchGrid cans(const strewn::Vec2& origin, double spacing, int columns, int rows, double diameter) {
  strewn::CatchGrid g;
  g.origin = origin;
  g.spacing = spacing;
  g.columns = columns;
  g.rows = rows;
  g.can_diameter = diameter;
  return g;
}

strewn::Head head_at(const strewn::Vec2& p, double radius, double flow, const std::string& shape) {
  strewn::Head h;
  h.name = "head";
  h.position = p;
  h.radius_m = radius;
  h.flow_l_per_min = flow;
  h.profile = strewn::generic_profile(shape, radius);
  return h;
}

}  // namespace

TEST_CASE("one full-circle head with a flat profile gives depth = flow x time / (pi r^2) inside", "[head][deposition]") {
  // 20 L/min for 1.5 h over a 6 m circle: 1800 L / (36 pi m^2) = 15.915... mm (volume conservation:
  // a flat profile spreads the flow evenly over the wetted disk).
  const strewn::Head h = head_at({0, 0}, 6.0, 20.0, "flat");
  const strewn::CatchGrid g = cans({-4, -4}, 2.0, 5, 5, 0.2);
  const strewn::Site s = site_with({h}, strewn::rectangle({-6, -6}, {6, 6}), g, 1.5);
  const strewn::Deposition d = strewn::compute_deposition(s);
  const double expected = 20.0 * 60.0 * 1.5 / (kPi * 36.0);
  CHECK(d.emitted == Approx(1800.0).epsilon(1e-14));
  for (const strewn::Can& c : d.cans) {
    if (c.centre.norm() + 0.1 > 6.0) continue;  // the can's opening wholly inside the wetted disk
    CHECK(c.depth == Approx(expected).epsilon(1e-9));
    CHECK(c.depth_err < 1e-6 * expected);
  }
  CHECK(strewn::depth_at(s, {{1.0, 2.0}, {-3.0, 0.5}})[1] == Approx(expected).epsilon(1e-12));
  CHECK(strewn::depth_at(s, {{6.5, 0.0}})[0] == 0.0);
  // The head's own precipitation rate: 60 x 20 / (36 pi) mm/h.
  REQUIRE(d.heads.size() == 1);
  CHECK(d.heads[0].own_rate_mm_per_h == Approx(1200.0 / (36.0 * kPi)).epsilon(1e-14));
}

TEST_CASE("a half-circle head puts its whole flow on its half: twice the depth there, none behind", "[head][deposition]") {
  strewn::Head h = head_at({0, 0}, 5.0, 10.0, "flat");
  h.arc = strewn::ProfileArc{0.0, 180.0};  // throws north
  const strewn::CatchGrid g = cans({-2, -2}, 2.0, 3, 3, 0.2);
  const strewn::Deposition d = strewn::compute_deposition(site_with({h}, strewn::rectangle({-5, -5}, {5, 5}), g, 1.0));
  const double expected = 600.0 / (kPi * 25.0 / 2.0);  // 600 L over half of a 5 m disk
  for (const strewn::Can& c : d.cans) {
    if (c.centre.y() > 0.5) CHECK(c.depth == Approx(expected).epsilon(1e-9));
    if (c.centre.y() < -0.5) CHECK(c.depth == Approx(0.0).margin(1e-9));
  }
  CHECK(d.heads[0].sweep_deg == 180.0);
  CHECK(d.heads[0].own_rate_mm_per_h == Approx(expected).epsilon(1e-14));
}

TEST_CASE("square-spaced heads with a triangular profile at head-to-head spacing water almost evenly",
          "[head][layout][deposition]") {
  // Triangular profile v = 1 - d/R: volume pi R^2 / 3, so a head adds 3 Q (1 - d/R) / (pi R^2)
  // per unit time at distance d < R. At head-to-head square spacing S = R, worked by hand: on a
  // head 1 (its neighbours are R away), midway between two heads 2 x 1/2 = 1, at the centre of
  // a square 4 (1 - 1/sqrt 2) = 1.172: the overlap is even to within 17 % (the textbook reason
  // for spacing triangular patterns at half their diameter; from memory, e.g. Christiansen 1942).
  const double R = 10.0, Q = 30.0;
  strewn::Layout l;
  l.name = "lawn";
  l.pattern = strewn::LayoutPattern::square;
  l.spacing_m = R;
  l.boundary_arcs = false;  // full circles everywhere: the interior square sees the infinite grid
  l.head = head_at({0, 0}, R, Q, "triangular");
  const std::vector<strewn::Head> heads = strewn::layout_heads(l, strewn::rectangle({0, 0}, {40, 40}));
  REQUIRE(heads.size() == 25);
  // Cans over the central square [10, 30]^2, which every head within R of it reaches.
  const strewn::CatchGrid g = cans({11.25, 11.25}, 2.5, 8, 8, 0.1);
  const strewn::Site s = site_with(heads, strewn::rectangle({0, 0}, {40, 40}), g, 1.0);
  const strewn::Deposition d = strewn::compute_deposition(s);
  const double unit = 3.0 * Q * 60.0 / (kPi * R * R);  // mm per hour for v = 1
  for (const strewn::Can& c : d.cans) {
    double hand = 0.0;  // the overlap summed directly from the formula
    for (const strewn::Head& h : heads) hand += std::max(0.0, 1.0 - (c.centre - h.position).norm() / R);
    CHECK(c.depth == Approx(unit * hand).epsilon(2e-4));  // the can's 5 cm opening averages the cones' kinks
    CHECK(c.depth >= unit * 1.0 * (1 - 1e-3));
    CHECK(c.depth <= unit * 4.0 * (1.0 - 1.0 / std::sqrt(2.0)) * (1 + 1e-3));
  }
  CHECK(d.cu > 94.0);
  CHECK(d.du > 90.0);
  // The layout's mean precipitation rate: 60 x 25 x 30 L/min over 1600 m^2.
  CHECK(d.rate_mm_per_h == Approx(60.0 * 25 * Q / 1600.0).epsilon(1e-14));
}

TEST_CASE("run time: the target depth over the cans' mean rate, and over DU/100 with the allowance", "[head][deposition]") {
  const strewn::Head h = head_at({0, 0}, 6.0, 20.0, "triangular");
  const strewn::CatchGrid g = cans({-3, -3}, 2.0, 4, 4, 0.2);
  strewn::Site s = site_with({h}, strewn::rectangle({-6, -6}, {6, 6}), g, 0.5);
  s.deposition->target_depth_mm = 12.0;
  const strewn::Deposition d = strewn::compute_deposition(s);
  REQUIRE(d.run_time);
  CHECK(d.run_time->basis == "catch cans");
  CHECK(d.run_time->hours == Approx(12.0 / (d.mean_depth / 0.5)).epsilon(1e-14));
  REQUIRE(d.run_time->with_allowance_hours);
  CHECK(*d.run_time->with_allowance_hours == Approx(d.run_time->hours * 100.0 / d.du).epsilon(1e-14));
  // Without cans: from the nominal rate, flow over the 144 m^2 lawn.
  s.deposition->grid.reset();
  const strewn::Deposition n = strewn::compute_deposition(s);
  REQUIRE(n.run_time);
  CHECK(n.run_time->basis == "flow over area");
  CHECK(n.run_time->hours == Approx(12.0 / (1200.0 / 144.0)).epsilon(1e-14));
  CHECK(!n.run_time->with_allowance_hours);
}

TEST_CASE("a layout over a rectangle: corners throw a quarter, sides a half, flows matched", "[layout]") {
  strewn::Layout l;
  l.name = "pitch";
  l.pattern = strewn::LayoutPattern::square;
  l.spacing_m = 12.0;  // 40 m in four 10 m steps, 30 m in three
  l.head = head_at({0, 0}, 12.0, 40.0, "doughnut");
  const std::vector<strewn::Head> heads = strewn::layout_heads(l, strewn::rectangle({0, 0}, {40, 30}));
  REQUIRE(heads.size() == 20);
  int corners = 0, sides = 0, inside = 0;
  for (const strewn::Head& h : heads) {
    const double sweep = strewn::head_sweep_deg(h);
    CHECK(h.flow_l_per_min == Approx(40.0 * sweep / 360.0).epsilon(1e-14));
    CHECK(strewn::head_rate_mm_per_h(h) == Approx(60.0 * 40.0 / (kPi * 144.0)).epsilon(1e-12));  // matched
    if (sweep == Approx(90.0)) ++corners;
    else if (sweep == Approx(180.0)) ++sides;
    else if (sweep == 360.0) ++inside;
  }
  CHECK(corners == 4);
  CHECK(sides == 2 * 3 + 2 * 2);
  CHECK(inside == 3 * 2);
  // The south-west corner throws from east (0 deg) round to north (90 deg).
  CHECK(heads[0].position.isApprox(strewn::Vec2(0, 0)));
  REQUIRE(heads[0].arc);
  CHECK(heads[0].arc->from_deg == Approx(0.0).margin(1e-12));
  CHECK(heads[0].arc->to_deg == Approx(90.0));
  CHECK(heads[1].position.isApprox(strewn::Vec2(10, 0)));
}

TEST_CASE("triangular, rectangular and perimeter layouts place the heads their spacing says", "[layout]") {
  strewn::Layout l;
  l.name = "lawn";
  l.head = head_at({0, 0}, 10.0, 20.0, "triangular");
  l.spacing_m = 10.0;
  l.pattern = strewn::LayoutPattern::triangular;
  // Rows at most 8.66 m apart: 30 m in four 7.5 m steps (five rows); even rows 4 steps of 10 m
  // (five heads), odd rows four heads shifted by 5 m: 3 x 5 + 2 x 4.
  CHECK(strewn::layout_heads(l, strewn::rectangle({0, 0}, {40, 30})).size() == 23);
  l.pattern = strewn::LayoutPattern::rectangular;
  l.row_spacing_m = 15.0;  // 5 columns x 3 rows
  CHECK(strewn::layout_heads(l, strewn::rectangle({0, 0}, {40, 30})).size() == 15);
  l.pattern = strewn::LayoutPattern::perimeter;  // 4 corners, 3 + 3 inside the long sides, 2 + 2 on the short
  const std::vector<strewn::Head> ring = strewn::layout_heads(l, strewn::rectangle({0, 0}, {40, 30}));
  CHECK(ring.size() == 14);
  for (const strewn::Head& h : ring) CHECK(strewn::head_sweep_deg(h) < 360.0);
  // An L-shaped zone: the inside corner at (20, 20) throws over 270 degrees.
  l.pattern = strewn::LayoutPattern::square;
  const std::vector<strewn::Head> ell =
      strewn::layout_heads(l, strewn::polygon({{0, 0}, {40, 0}, {40, 20}, {20, 20}, {20, 40}, {0, 40}}));
  bool reflex = false;
  for (const strewn::Head& h : ell)
    if (h.position.isApprox(strewn::Vec2(20, 20))) reflex = strewn::head_sweep_deg(h) == Approx(270.0);
  CHECK(reflex);
  // Refused: a disk (arcs), a spacing of 0, a spacing that would place too many heads.
  CHECK_THROWS_AS(strewn::layout_heads(l, strewn::disk({0, 0}, 10)), strewn::input_error);
  l.spacing_m = 0.0;
  CHECK_THROWS_AS(strewn::layout_heads(l, strewn::rectangle({0, 0}, {40, 30})), strewn::input_error);
  l.spacing_m = 0.01;
  CHECK_THROWS_WITH(strewn::layout_heads(l, strewn::rectangle({0, 0}, {40, 30})), Catch::Contains("check the spacing"));
}

TEST_CASE("generic profiles: the documented formulas, and a leg test stretched to the head's radius", "[head]") {
  const strewn::RadialProfile d = strewn::generic_profile("doughnut", 12.0);
  CHECK(d.rate_at(0.0) == Approx(0.3));
  CHECK(d.rate_at(3.0) == Approx(0.3 + 1.4 * 0.25));
  CHECK(d.rate_at(6.0) == Approx(1.0));
  CHECK(d.rate_at(9.0) == Approx(0.5));
  CHECK(d.rate_at(12.5) == 0.0);
  CHECK(strewn::generic_profile("triangular", 4.0).rate_at(1.0) == Approx(0.75));
  CHECK_THROWS_WITH(strewn::generic_profile("triangle", 4.0), Catch::Contains("(did you mean 'triangular'?)"));
  const strewn::RadialProfile leg({0, 3, 6}, {5, 4, 0});
  const strewn::RadialProfile far = strewn::profile_to_radius(leg, 9.0);
  CHECK(far.wetted_radius() == 9.0);
  CHECK(far.rate_at(4.5) == Approx(4.0));
}
