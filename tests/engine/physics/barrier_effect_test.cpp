// Probabilities past barriers: the limiting cases that follow from the definition (a wall over the
// whole direction of a zone with catch 1 leaves 0; catch 0 leaves the unbarriered value; a barrier
// beside the path changes nothing), a property on random barriers (more catch, never more
// probability), an independent Monte Carlo (impacts sampled with std::mt19937_64 and
// std::normal_distribution, each path tested against each segment directly, each crossing
// stopping with its catch) and the half-plane case against the normal CDF (Abramowitz & Stegun
// 26.2: P(Y > a) = erfc((a - mu) / (sigma sqrt 2)) / 2).

#include <catch2/catch.hpp>

#include <cmath>
#include <random>

#include <Eigen/Cholesky>

#include "strewn/barrier_effect.hpp"
#include "strewn/error.hpp"
#include "strewn/region_builders.hpp"

using namespace strewn;

namespace {

Source thrower_at(const Vec2& at, const Vec2& toward, double angle_deg, double sigma_along) {
  Thrower t;
  t.position = at;
  t.toward = toward;
  t.spread_angle_deg = angle_deg;
  t.range_sigma = sigma_along;
  Source s;
  s.name = "thrower";
  s.thrower = t;
  s.model = thrower_model(t);
  s.positions = standing_points(t);
  s.aim = toward;
  return s;
}

double orient(const Vec2& a, const Vec2& b, const Vec2& c) {
  return (b.x() - a.x()) * (c.y() - a.y()) - (b.y() - a.y()) * (c.x() - a.x());
}
bool segments_cross(const Vec2& p, const Vec2& q, const Vec2& a, const Vec2& b) {
  return orient(p, q, a) * orient(p, q, b) < 0 && orient(a, b, p) * orient(a, b, q) < 0;
}
bool inside_polygon(const std::vector<Vec2>& poly, const Vec2& x) {  // even-odd ray casting
  bool in = false;
  for (std::size_t i = 0, j = poly.size() - 1; i < poly.size(); j = i++)
    if ((poly[i].y() > x.y()) != (poly[j].y() > x.y()) &&
        x.x() < (poly[j].x() - poly[i].x()) * (x.y() - poly[i].y()) / (poly[j].y() - poly[i].y()) + poly[i].x())
      in = !in;
  return in;
}

}  // namespace

TEST_CASE("a wall across the whole direction of a zone with catch 1 leaves 0, to the bound", "[barrier]") {
  Source s = thrower_at({0, 0}, {0, 10}, 3.0, 0.6);
  const Region bench = rectangle({-1, 9}, {1, 10.5});
  s.barriers = {{"wall", {{-30, 5}, {30, 5}}, 1.0, std::nullopt}};
  const Estimate e = integrate_source(s, bench, {});
  CHECK(e.p <= e.abs_err + 1e-15);
  CHECK(e.q == Approx(1.0));
}

TEST_CASE("catch 0 gives the unbarriered value and a barrier beside the path changes nothing", "[barrier]") {
  Source s = thrower_at({0, 0}, {0, 10}, 3.0, 0.6);
  const Region bench = rectangle({-1, 9}, {1, 10.5});
  const Estimate plain = integrate(s.model, bench, {});
  s.barriers = {{"open net", {{-30, 5}, {30, 5}}, 0.0, std::nullopt}};
  CHECK(integrate_source(s, bench, {}).p == plain.p);
  s.barriers = {{"side fence", {{20, 2}, {20, 40}}, 1.0, std::nullopt}};
  const Estimate beside = integrate_source(s, bench, {});
  CHECK(beside.p == Approx(plain.p).epsilon(1e-12));
  CHECK(std::fabs(beside.p - plain.p) <= beside.abs_err + plain.abs_err + 1e-16);
}

TEST_CASE("one barrier: P(outside the shadow) + (1 - catch) P(inside), the half-plane case by the normal CDF", "[barrier]") {
  // A circular spread of sigma 2 m about (0, 10), a wall along y = 5 far wider than the spread, a
  // zone that is the whole 100 m square about the aim: the shadow is (nearly) y > 5, so
  // P(zone, not stopped) = P(y < 5) + (1 - c) P(y > 5), P(y > 5) = erfc(-2.5 / sqrt 2) / 2.
  Source s;
  s.name = "nozzle";
  s.model = Gaussian::from_axes({0, 10}, 2.0, 2.0, 0.0);
  s.positions = {Vec2(0, 0)};
  s.barriers = {{"wall", {{-5000, 5}, {5000, 5}}, 0.7, std::nullopt}};
  const Region square = rectangle({-50, -40}, {50, 60});
  const double beyond = 0.5 * std::erfc(-2.5 / std::sqrt(2.0));
  const Estimate e = integrate_source(s, square, {});
  // The wedge misses y > 5 only beyond |x| = 1000 y: far below 1e-12 here.
  CHECK(e.p == Approx((1.0 - beyond) + 0.3 * beyond).epsilon(1e-9));
  Site site;
  site.sources = {s};
  site.barriers = s.barriers;
  const std::vector<BarrierStop> rows = barrier_stops(site);
  REQUIRE(rows.size() == 1);
  CHECK(rows[0].stopped.p == Approx(0.7 * beyond).epsilon(1e-9));
  CHECK(std::fabs(rows[0].stopped.p - 0.7 * beyond) <= rows[0].stopped.abs_err + 1e-9);
}

TEST_CASE("on random barriers the probability only falls as the catch rises", "[barrier][property]") {
  std::mt19937_64 rng(1818);
  std::uniform_real_distribution<double> u(-6.0, 6.0);
  const Region zone = polygon({{-2, 8}, {3, 9}, {2, 13}, {-1, 12}});
  for (int trial = 0; trial < 25; ++trial) {
    Source s = thrower_at({0, 0}, {0.5, 10}, 4.0, 1.0);
    const Vec2 a(u(rng), 5 + u(rng) / 2), b(u(rng), 5 + u(rng) / 2), c(u(rng), 7 + u(rng) / 2);
    double previous = 2.0, previous_err = 0.0;
    for (double k : {0.0, 0.25, 0.5, 0.9, 1.0}) {
      s.barriers = {{"one", {a, b}, k, std::nullopt}, {"two", {b, c}, std::min(1.0, k + 0.05), std::nullopt}};
      const Estimate e = integrate_source(s, zone, {});
      INFO("trial " << trial << ", catch " << k);
      CHECK(e.p >= 0.0);
      CHECK(e.p <= previous + e.abs_err + previous_err + 1e-15);
      previous = e.p;
      previous_err = e.abs_err;
    }
  }
}

TEST_CASE("two barriers agree with an independent Monte Carlo of paths and catches within its standard error", "[barrier][monte_carlo]") {
  Source s = thrower_at({0, 0}, {1, 10}, 5.0, 1.2);
  s.barriers = {{"net", {{-2, 6}, {1.5, 7}}, 0.9, std::nullopt}, {"screen", {{0, 8}, {4, 9}, {5, 12}}, 0.6, std::nullopt}};
  const std::vector<Vec2> zone_points{{-1, 9}, {3, 9.5}, {3.5, 12}, {0, 12.5}};
  const Estimate e = integrate_source(s, polygon(zone_points), {});
  const Gaussian& g = s.model.components()[0].gaussian;
  const Eigen::Matrix2d L = g.covariance().llt().matrixL();
  std::mt19937_64 rng(20261203);
  std::normal_distribution<double> z;
  std::uniform_real_distribution<double> u(0.0, 1.0);
  const int n = 400000;
  int hits = 0;
  for (int k = 0; k < n; ++k) {
    const Vec2 x = g.mean() + L * Vec2(z(rng), z(rng));
    if (!inside_polygon(zone_points, x)) continue;
    bool stopped = false;
    for (const Barrier& b : s.barriers)
      for (std::size_t j = 0; j + 1 < b.points.size(); ++j)
        if (segments_cross(Vec2(0, 0), x, b.points[j], b.points[j + 1]) && u(rng) < b.catch_share) stopped = true;
    hits += !stopped;
  }
  const double p = static_cast<double>(hits) / n, se = std::sqrt(p * (1 - p) / n);
  INFO("engine " << e.p << " +- " << e.abs_err << ", Monte Carlo " << p << " +- " << se);
  CHECK(p > 0.01);  // the case is not empty
  CHECK(std::fabs(e.p - p) <= 4.0 * se + e.abs_err);
  // and the barriers matter here: the plain probability is well above
  CHECK(integrate(s.model, polygon(zone_points), {}).p > e.p + 10 * se);
}

TEST_CASE("a throwing line agrees with a Monte Carlo over the continuous line within its error bound", "[thrower][monte_carlo]") {
  Thrower t;
  t.position = {-3, 0};
  t.line_end = Vec2(3, 0);
  t.toward = {0, 9};
  t.spread_angle_deg = 6;
  t.range_fraction = 0.05;
  t.line_components = 8;
  Source s;
  s.name = "line";
  s.thrower = t;
  s.model = thrower_model(t);
  s.positions = standing_points(t);
  s.barriers = {{"net", {{-4, 4}, {-0.5, 4.5}}, 1.0, std::nullopt}};
  const std::vector<Vec2> zone_points{{-3, 8}, {0, 8}, {0, 11}, {-3, 11}};
  const Estimate e = integrate_source(s, polygon(zone_points), {});
  // Independently: a standing point uniform on the line, the throw's spread from it (the same
  // geometry as thrower_test, by hand), the path from that point.
  std::mt19937_64 rng(7);
  std::uniform_real_distribution<double> u(0.0, 1.0);
  std::normal_distribution<double> z;
  const int n = 400000;
  int hits = 0;
  for (int k = 0; k < n; ++k) {
    const Vec2 at(-3 + 6 * u(rng), 0);
    const Vec2 d = t.toward - at;
    const double dist = d.norm();
    const Vec2 along = d / dist, across(-along.y(), along.x());
    const Vec2 x = t.toward + along * (0.05 * dist * z(rng)) + across * (dist * std::tan(6 * 3.14159265358979323846 / 180) * z(rng));
    if (!inside_polygon(zone_points, x)) continue;
    if (segments_cross(at, x, s.barriers[0].points[0], s.barriers[0].points[1])) continue;
    ++hits;
  }
  const double p = static_cast<double>(hits) / n, se = std::sqrt(p * (1 - p) / n);
  INFO("engine " << e.p << " +- " << e.abs_err << ", Monte Carlo " << p << " +- " << se);
  CHECK(std::fabs(e.p - p) <= 4.0 * se + e.abs_err);
  CHECK(e.abs_err > 0.0);  // the discretisation bound is in it
}

TEST_CASE("barriers on a source without a position are refused", "[barrier]") {
  Source s;
  s.model = Gaussian::from_axes({0, 10}, 1, 1, 0);
  s.barriers = {{"wall", {{-3, 5}, {3, 5}}, 1.0, std::nullopt}};
  CHECK_THROWS_AS(integrate_source(s, rectangle({-1, 9}, {1, 11}), {}), input_error);
}

// Issue 16's rule for every result: a site in a national grid (x ~ 5e5 m, y ~ 5.4e6 m) gives the
// probabilities of the same site near the origin. The coordinates here are multiples of 1/64 m, so
// both sites are exactly the same geometry moved (no input rounding); the shadows and their
// intersections with the zone are formed in the standing point's frame, so the answers agree to
// rounding and the bounds stay as small as near the origin.
TEST_CASE("barriers at national-grid coordinates give the probabilities and bounds of the site near the origin", "[barrier][far]") {
  const Vec2 far(512300.0, 5403740.0);
  const auto site_at = [](const Vec2& o) {
    Site site;
    Source s = thrower_at(o + Vec2(0, 0), o + Vec2(0, 6), 0.5, 0.0625);
    s.barriers = {{"net", {o + Vec2(-0.03125, 4), o + Vec2(0.046875, 4)}, 0.9, std::nullopt}};
    site.sources = {s};
    site.barriers = s.barriers;
    return site;
  };
  const auto zone_at = [](const Vec2& o) { return rectangle(o + Vec2(0.015625, 5.984375), o + Vec2(0.078125, 6.03125)); };
  const Site near_site = site_at(Vec2::Zero()), far_site = site_at(far);
  const Estimate near = integrate_source(near_site.sources[0], zone_at(Vec2::Zero()), {});
  const Estimate moved = integrate_source(far_site.sources[0], zone_at(far), {});
  REQUIRE(near.p > 1e-3);
  CHECK(std::fabs(moved.p - near.p) <= 1e-12 * near.p);
  CHECK(moved.abs_err <= 10.0 * near.abs_err + 1e-16);
  const std::vector<BarrierStop> a = barrier_stops(near_site), b = barrier_stops(far_site);
  REQUIRE(a.size() == 1);
  REQUIRE(b.size() == 1);
  CHECK(a[0].stopped.p > 0.1);
  CHECK(std::fabs(b[0].stopped.p - a[0].stopped.p) <= 1e-12 * a[0].stopped.p);
  CHECK(b[0].stopped.abs_err <= 10.0 * a[0].stopped.abs_err + 1e-16);
  CHECK(b[0].stopped.converged);
}
