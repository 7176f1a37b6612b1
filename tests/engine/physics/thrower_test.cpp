// The spread a thrower's dispersion becomes at a distance, against the geometry worked by hand
// (sigma_across = D tan(angle) across the throw, sigma_along = D * fraction along it; rotation
// of a diagonal covariance into the throw's direction, Sigma = R diag R^T).

#include <catch2/catch.hpp>

#include <cmath>

#include "strewn/constants.hpp"
#include "strewn/error.hpp"
#include "strewn/thrower.hpp"

using namespace strewn;

TEST_CASE("a throw due north gets D tan(angle) across (x) and D * fraction along (y)", "[thrower]") {
  Thrower t;
  t.position = {0, 0};
  t.toward = {0, 6};
  t.spread_angle_deg = 2;
  t.range_fraction = 0.03;
  const ThrowerSpread s = thrower_spread(t, t.position);
  // By hand: tan(2 deg) = 0.03492076949174773 (tables), 6 * that = 0.2095246169504864; 6 * 0.03 = 0.18.
  CHECK(s.distance == Approx(6.0).epsilon(1e-15));
  CHECK(s.sigma_across == Approx(0.2095246169504864).epsilon(1e-13));
  CHECK(s.sigma_along == Approx(0.18).epsilon(1e-13));
  CHECK(s.gaussian.covariance()(0, 0) == Approx(0.2095246169504864 * 0.2095246169504864).epsilon(1e-12));
  CHECK(s.gaussian.covariance()(1, 1) == Approx(0.18 * 0.18).epsilon(1e-12));
  CHECK(std::fabs(s.gaussian.covariance()(0, 1)) < 1e-15);
  CHECK(s.gaussian.mean().isApprox(Vec2(0, 6)));
}

TEST_CASE("an oblique throw rotates the spread into the throw's direction, and the bias moves the mean", "[thrower]") {
  // A 3-4-5 triangle: from (1, 1) to (4, 5) is D = 5 along u = (0.6, 0.8); v = (-0.8, 0.6) across.
  // tan(angle) = 0.04 gives 0.2 m across; range_sigma 0.5 m along. By hand,
  // Sigma = 0.25 u u^T + 0.04 v v^T = [[0.1156, 0.1008], [0.1008, 0.1744]].
  Thrower t;
  t.position = {1, 1};
  t.toward = {4, 5};
  t.bias = {0.1, -0.2};
  t.spread_angle_deg = std::atan(0.04) * 180.0 / kPi;
  t.range_sigma = 0.5;
  const ThrowerSpread s = thrower_spread(t, t.position);
  CHECK(s.distance == Approx(5.0));
  CHECK(s.direction_deg == Approx(std::atan2(0.8, 0.6) * 180.0 / kPi));
  CHECK(s.sigma_across == Approx(0.2).epsilon(1e-12));
  CHECK(s.sigma_along == Approx(0.5).epsilon(1e-12));
  CHECK(s.gaussian.covariance()(0, 0) == Approx(0.1156).epsilon(1e-12));
  CHECK(s.gaussian.covariance()(0, 1) == Approx(0.1008).epsilon(1e-12));
  CHECK(s.gaussian.covariance()(1, 1) == Approx(0.1744).epsilon(1e-12));
  CHECK(s.gaussian.mean().isApprox(Vec2(4.1, 4.8)));
}

TEST_CASE("a wide angle makes the across axis the major one", "[thrower]") {
  Thrower t;
  t.toward = {10, 0};
  t.spread_angle_deg = 10;
  t.range_fraction = 0.01;
  const ThrowerSpread s = thrower_spread(t, t.position);
  // 10 tan(10 deg) = 1.763269807 m across (y), 0.1 m along (x).
  CHECK(s.gaussian.axes().sigma_major == Approx(1.7632698070846498).epsilon(1e-12));
  CHECK(s.gaussian.axes().sigma_minor == Approx(0.1).epsilon(1e-12));
  CHECK(s.gaussian.covariance()(1, 1) == Approx(1.7632698070846498 * 1.7632698070846498).epsilon(1e-12));
}

TEST_CASE("a throwing line stands at the midpoints of equal pieces with equal weights, each aiming at toward", "[thrower]") {
  Thrower t;
  t.position = {-1, 0};
  t.line_end = Vec2(1, 0);
  t.toward = {0, 8};
  t.spread_angle_deg = 1.5;
  t.range_fraction = 0.04;
  t.line_components = 4;
  const std::vector<Vec2> at = standing_points(t);
  REQUIRE(at.size() == 4);
  CHECK(at[0].isApprox(Vec2(-0.75, 0)));
  CHECK(at[3].isApprox(Vec2(0.75, 0)));
  const ScatterModel m = thrower_model(t);
  REQUIRE(m.components().size() == 4);
  for (std::size_t k = 0; k < 4; ++k) {
    CHECK(m.components()[k].weight == 0.25);
    CHECK(m.components()[k].gaussian.mean().isApprox(Vec2(0, 8)));
    // From (x, 0) the distance is sqrt(x^2 + 64), and the spread along scales with it.
    const double d = std::hypot(at[k].x(), 8.0);
    CHECK(m.components()[k].gaussian.axes().sigma_major == Approx(d * 0.04).epsilon(1e-12));
  }
}

TEST_CASE("a thrower that is not well formed is refused in one line", "[thrower]") {
  Thrower t;
  t.toward = {0, 5};
  t.spread_angle_deg = 2;
  CHECK_THROWS_AS(check_thrower(t), input_error);  // neither range key
  t.range_fraction = 0.02;
  CHECK_NOTHROW(check_thrower(t));
  t.range_sigma = 0.1;
  CHECK_THROWS_AS(check_thrower(t), input_error);  // both
  t.range_sigma.reset();
  t.spread_angle_deg = 60;
  CHECK_THROWS_AS(check_thrower(t), input_error);
  t.spread_angle_deg = 2;
  t.toward = t.position;
  CHECK_THROWS_AS(check_thrower(t), input_error);
}

TEST_CASE("a throwing line through its own aim is refused, one whose extension passes the aim is not", "[thrower]") {
  // Through the aim someone stands on it, where the spread is 0 and the line's discretisation
  // bound (1 / D^2) has no value: every zone of the source had a NaN bound (a hostile trial on
  // the netted-lanes demo, line x = -1.8 from y = 0 to 12 through toward (-1.8, 6)).
  Thrower t;
  t.position = {-1.8, 0.0};
  t.line_end = Vec2(-1.8, 12.0);
  t.toward = {-1.8, 6.0};
  t.spread_angle_deg = 2.5;
  t.range_fraction = 0.04;
  t.line_components = 16;
  CHECK_THROWS_WITH(check_thrower(t), Catch::Contains("the aim (toward) lies on the throwing line"));
  t.toward = {-1.8, 12.0};  // on an end
  CHECK_THROWS_AS(check_thrower(t), input_error);
  t.toward = {-1.8, 13.0};  // beyond the end, on the line's extension: a throw from every point
  CHECK_NOTHROW(check_thrower(t));
  // 1e-11 m beside the line: throws from its nearest points would have spreads of 4e-13 m
  // (tan 2.5 degrees of it), below the 1e-12 m every spread keeps; they failed later without a
  // place (a second hostile trial).
  t.toward = {-1.8 + 1e-11, 6.0};
  CHECK_THROWS_WITH(check_thrower(t), Catch::Contains("the throwing line passes 1e-11 m from its aim"));
  t.toward = {-1.8 + 1e-9, 6.0};
  CHECK_NOTHROW(check_thrower(t));
}
