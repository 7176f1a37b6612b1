// Deposition (strewn/deposition.hpp) on a site built in code: one head, sigma 1 m, at the origin,
// 0.5 L per event, 120 events an hour, for 2 hours (120 L emitted).
#include <catch2/catch.hpp>
#include <cmath>

#include "strewn/deposition.hpp"
#include "strewn/error.hpp"
#include "test_support.hpp"

namespace {

strewn::Site lawn(int columns, int rows) {
  strewn::Site site;
  strewn::Source head;
  head.name = "head";
  head.model = strewn::Gaussian::from_axes({0, 0}, 1.0, 1.0, 0.0);
  head.amount_per_event = 0.5;
  head.events_per_hour = 120;
  site.sources.push_back(head);
  strewn::Zone lawn_zone;
  lawn_zone.name = "lawn";
  lawn_zone.role = strewn::Role::target;
  lawn_zone.region = strewn::test::disk({0, 0}, 2.0);
  site.zones.push_back(lawn_zone);
  strewn::DepositionSettings d;
  d.hours = 2;
  d.site_boundary = "lawn";
  strewn::CatchGrid g;
  g.origin = strewn::Vec2(0, 0);
  g.spacing = 0.5;
  g.columns = columns;
  g.rows = rows;
  g.can_diameter = 0.2;
  d.grid = g;
  site.deposition = d;
  return site;
}

}  // namespace

TEST_CASE("a can on the mean: depth = emitted x P(opening) / area, by hand", "[site][deposition]") {
  const strewn::Deposition d = strewn::compute_deposition(lawn(1, 1));
  CHECK(d.emitted == Approx(120.0).epsilon(1e-15));
  CHECK(d.unit == "L");
  CHECK(d.depth_unit == "mm");
  // Source: Rayleigh, P(r <= a) = 1 - exp(-a^2 / 2) for a = 0.1 m; 1 L/m^2 = 1 mm.
  const double a = 0.1, p = -std::expm1(-a * a / 2);
  REQUIRE(d.cans.size() == 1);
  CHECK(d.cans[0].depth == Approx(120.0 * p / (M_PI * a * a)).epsilon(1e-9));
  // The can's cell is the 0.5 m square about it: P = (2 Phi(0.25) - 1)^2, erf form.
  const double side = std::erf(0.25 / std::sqrt(2.0));
  CHECK(d.cans[0].cell_amount == Approx(120.0 * side * side).epsilon(1e-9));
}

TEST_CASE("amounts add up: cells plus off grid is what was emitted; the site zone's share", "[site][deposition]") {
  const strewn::Deposition d = strewn::compute_deposition(lawn(5, 5));
  CHECK(d.cans.size() == 25);
  CHECK(d.on_grid + d.off_grid == Approx(d.emitted).epsilon(1e-9));
  REQUIRE(d.has_site);
  // Source: Rayleigh, P(r <= 2) = 1 - exp(-2).
  CHECK(d.zones[0].fraction == Approx(-std::expm1(-2.0)).epsilon(1e-9));
  CHECK(d.off_site == Approx(120.0 * std::exp(-2.0)).epsilon(1e-9));
  CHECK(d.cu > 0.0);
  CHECK(d.cu < 100.0);
}

TEST_CASE("a source without amounts is bad input naming it", "[site][deposition]") {
  strewn::Site site = lawn(1, 1);
  site.sources[0].amount_per_event.reset();
  CHECK_THROWS_AS(strewn::compute_deposition(site), strewn::input_error);
}

TEST_CASE("depth at a point is the emitted amount times the normal density there", "[site][deposition]") {
  // Source: the bivariate normal density, exp(-(x^2 + y^2) / 2 s^2) / (2 pi s^2) for a circular
  // spread s = 1 m; 120 L emitted, 1 L/m^2 = 1 mm.
  const std::vector<strewn::Vec2> points = {{0, 0}, {1, 0}, {1.5, -2}};
  const std::vector<double> depth = strewn::depth_at(lawn(1, 1), points);
  REQUIRE(depth.size() == 3);
  for (std::size_t k = 0; k < points.size(); ++k)
    CHECK(depth[k] == Approx(120.0 * std::exp(-points[k].squaredNorm() / 2) / (2 * M_PI)).epsilon(1e-14));
  // An elongated, biased spread: scipy.stats.multivariate_normal([1, 2], [[4, 1.2], [1.2, 1]]).pdf([2, 1.5])
  // = 0.0532434388720166 (scipy 1.10), the density formula by hand: det 2.56, quadratic form 1.25.
  strewn::Site site = lawn(1, 1);
  site.sources[0].model = strewn::Gaussian::from_covariance({1, 2}, (strewn::Mat2() << 4, 1.2, 1.2, 1).finished());
  const double q = (1 * 1 * 1 - 2 * 1.2 * 1 * -0.5 + 4 * 0.25) / 2.56;  // (dx, dy) = (1, -0.5)
  CHECK(strewn::depth_at(site, {{2, 1.5}})[0] == Approx(120.0 * std::exp(-q / 2) / (2 * M_PI * std::sqrt(2.56))).epsilon(1e-13));
  CHECK(strewn::depth_at(site, {{2, 1.5}})[0] == Approx(120.0 * 0.0532434388720166).epsilon(1e-13));
}

// Barriers count in deposition as in assess (strewn/barrier_effect.hpp). The head's paths start
// at (0, -3) and its spread is centred at the origin; a wall along y = -2.5 from x = -40 to 40
// casts a shadow (seen from (0, -3)) that holds the whole lawn (the disk of radius 2 about the
// origin) and the can, so by the definition P(zone, not stopped) = (1 - catch) P(zone).
TEST_CASE("deposition past a wall: catch 1 leaves the lawn only what passes, catch 0 the open value, catch c scales", "[site][deposition][barrier]") {
  strewn::Site site = lawn(1, 1);
  site.sources[0].positions = {strewn::Vec2(0, -3)};
  const strewn::Deposition open = strewn::compute_deposition(site);
  strewn::Barrier wall{"wall", {{-40, -2.5}, {40, -2.5}}, 1.0, std::nullopt};
  site.sources[0].barriers = {wall};
  const strewn::Deposition walled = strewn::compute_deposition(site);
  // The lawn lies wholly in the wall's shadow: with catch 1 nothing of it is left, to the bound.
  REQUIRE(walled.zones.size() == 1);
  CHECK(walled.zones[0].amount <= walled.zones[0].amount_err + 1e-12);
  CHECK(walled.cans[0].depth <= walled.cans[0].depth_err + 1e-12);
  // Catch c: (1 - c) of the open value (the shadow holds the whole zone: the formula's second term).
  site.sources[0].barriers[0].catch_share = 0.75;
  const strewn::Deposition net = strewn::compute_deposition(site);
  CHECK(net.zones[0].amount == Approx(0.25 * open.zones[0].amount).epsilon(1e-9));
  CHECK(net.cans[0].depth == Approx(0.25 * open.cans[0].depth).epsilon(1e-9));
  // The depth at a point (depth_at) passes the same share.
  const std::vector<double> at_open = [&] {
    strewn::Site s = site;
    s.sources[0].barriers.clear();
    return strewn::depth_at(s, {strewn::Vec2(0.3, 0.4)});
  }();
  CHECK(strewn::depth_at(site, {strewn::Vec2(0.3, 0.4)})[0] == Approx(0.25 * at_open[0]).epsilon(1e-12));
}
