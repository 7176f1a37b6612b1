// How a request for accuracy is judged when p or q is 0 or nearly 0 (integrate.cpp): a compact
// support (the uniform, a profile, a part-circle head) wholly inside or outside a zone gives p
// and q exactly, with a bound of 0, which meets any request; a tiny q that is not exactly 0 is
// still judged relative to itself. References: elementary geometry (the areas of a circular
// sector, a circular segment and a square) and the normal's upper tail Q(x) = erfc(x / sqrt 2) / 2
// (Abramowitz & Stegun 26.2.29), computed here, never by the engine.
#include <catch2/catch.hpp>
#include <cmath>

#include "strewn/integrate.hpp"
#include "strewn/profile_spread.hpp"
#include "strewn/region_builders.hpp"
#include "test_support.hpp"

using namespace strewn;

namespace {

// A made-up rotor's profile (mm/h against metres), wetted radius 15 m.
const RadialProfile kRotor({0.5, 2.0, 4.0, 6.0, 8.0, 10.0, 12.0, 14.0, 15.0}, {9.0, 8.2, 8.6, 9.4, 8.8, 7.1, 4.6, 1.9, 0.0});
// A constant rate to 15 m: the uniform density over the wetted disk (or its wedge).
const RadialProfile kFlat({0.0, 15.0}, {1.0, 1.0});

Gaussian head(const Vec2& at, const RadialProfile& p, double from_deg, double to_deg) {
  return profile_spread(at, p, {}, ProfileArc{from_deg, to_deg});
}

// p and q exactly, with a bound (the slivers an edge within rounding of the support's rim or of
// a wedge's ray may cut) at the level of rounding, and the default request met.
void check_settled(const Estimate& e, double p) {
  INFO("p = " << e.p << ", q = " << e.q << ", bound " << e.abs_err);
  CHECK(e.p == p);
  CHECK(e.q == 1.0 - p);
  CHECK(e.abs_err <= 1e-13);
  CHECK(e.converged);
  CHECK(e.status == Status::converged);
}

}  // namespace

TEST_CASE("a part-circle head whose wedge lies wholly inside its zone has p = 1 and q = 0 exactly, request met",
          "[exact][arc][tolerance]") {
  // The corners and a side of a 60 m x 40 m pitch, heads throwing inward, radius 15 m: each
  // wedge is a sector inside the rectangle (geometry: its corner and rays lie on the pitch's
  // edges, its arc at most 15 m in).
  const Region pitch = rectangle({0.0, 0.0}, {60.0, 40.0});
  for (const RadialProfile& p : {kRotor, kFlat}) {
    check_settled(integrate(head({0.0, 0.0}, p, 0.0, 90.0), pitch), 1.0);
    check_settled(integrate(head({60.0, 0.0}, p, 90.0, 180.0), pitch), 1.0);
    check_settled(integrate(head({60.0, 40.0}, p, 180.0, 270.0), pitch), 1.0);
    check_settled(integrate(head({0.0, 40.0}, p, 270.0, 360.0), pitch), 1.0);
    check_settled(integrate(head({30.0, 0.0}, p, 0.0, 180.0), pitch), 1.0);
    check_settled(integrate(head({30.0, 40.0}, p, 180.0, 360.0), pitch), 1.0);
    // A full circle in the middle of the pitch (the disk of 15 m about (30, 20) is inside it).
    check_settled(integrate(profile_spread({30.0, 20.0}, p), pitch), 1.0);
  }
  // An inside corner: an L-shaped zone (the square of side 60 less its north-east quarter), a
  // head at the corner throwing over the 270 degrees from north round to east.
  const Region l_shape = polygon({{-30, -30}, {30, -30}, {30, 0}, {0, 0}, {0, 30}, {-30, 30}});
  check_settled(integrate(head({0.0, 0.0}, kRotor, 90.0, 360.0), l_shape), 1.0);
  // The uniform family on a whole ellipse (semi-axes 2 sigma) well inside a square.
  check_settled(integrate(Gaussian::from_axes({1.0, 2.0}, 3.0, 1.0, 30.0).with_family(ScatterFamily::uniform()),
                          rectangle({-10.0, -10.0}, {10.0, 10.0})),
                1.0);
}

TEST_CASE("a wedge wholly outside a zone has p = 0 and q = 1 exactly, even where its whole circle would reach it",
          "[exact][arc][tolerance]") {
  // The corner head throws north-east; the zones lie south-west of it and beyond its radius.
  const Gaussian corner = head({0.0, 0.0}, kRotor, 0.0, 90.0);
  check_settled(integrate(corner, rectangle({-10.0, -10.0}, {-1.0, -1.0})), 0.0);  // within 15 m, off the wedge
  check_settled(integrate(corner, rectangle({-60.0, -2.0}, {-0.5, 0.0})), 0.0);   // touching the wedge's apex side
  check_settled(integrate(corner, rectangle({20.0, 20.0}, {30.0, 30.0})), 0.0);    // in its direction, beyond 15 m
  check_settled(integrate(corner, disk({40.0, 0.0}, 10.0)), 0.0);                  // an arc 15 m away
  // A footpath below a side head throwing north (the pitch demo's).
  check_settled(integrate(head({30.0, 0.0}, kRotor, 0.0, 180.0), rectangle({-10.0, -2.5}, {70.0, -0.5})), 0.0);
}

TEST_CASE("a zone turned by 1e-9 rad off a corner head's rays is not settled: the wedge pokes out of it",
          "[exact][arc][tolerance]") {
  // The pitch's corner turned counter-clockwise about the head by 1e-9 rad: a sliver of the
  // quarter circle along its east ray, of angle 1e-9, lies outside the zone, so q > 0.
  const double t = 1e-9, c = std::cos(t), s = std::sin(t);
  const auto turned = [&](double x, double y) { return Vec2(c * x - s * y, s * x + c * y); };
  const Region zone = polygon({turned(0, 0), turned(60, 0), turned(60, 40), turned(0, 40)});
  const Estimate e = integrate(head({0.0, 0.0}, kRotor, 0.0, 90.0), zone);
  INFO("p = " << e.p << ", q = " << e.q << ", bound " << e.abs_err);
  CHECK(e.q > 0.0);
  CHECK(e.abs_err > 0.0);
  if (e.status == Status::converged) CHECK(e.abs_err <= 1e-8 * e.q);
}

TEST_CASE("a wedge that straddles a zone's edge is integrated and judged as before", "[exact][arc][tolerance]") {
  // The corner's quarter circle of radius 15 under a constant rate, cut by the strip y < 5:
  // the part of the quarter disk below y = 5 is the integral of sqrt(225 - y^2) from 0 to 5,
  // 2.5 sqrt(200) + 112.5 asin(1/3), over the quarter disk's area 225 pi / 4 (geometry).
  const double area = 2.5 * std::sqrt(200.0) + 112.5 * std::asin(1.0 / 3.0);
  const double want = area / (225.0 * kPi / 4.0);
  const Estimate e = integrate(head({0.0, 0.0}, kFlat, 0.0, 90.0), rectangle({0.0, 0.0}, {60.0, 5.0}));
  CHECK(e.status == Status::converged);
  CHECK(e.abs_err > 0.0);
  CHECK(std::fabs(e.p - want) <= e.abs_err + 1e-15);
  CHECK(std::fabs(e.q - (1.0 - want)) <= e.abs_err + 1e-15);
}

TEST_CASE("a support that pokes out of a zone by a hair is never settled: its tiny q is judged relative to itself",
          "[exact][tolerance]") {
  // The uniform family, identity spread: the disk of radius 2 about the origin. The square of
  // half-width 2 - h cuts four circular segments of height h off it, each of area
  // r^2 acos(d / r) - d sqrt(r^2 - d^2) with r = 2, d = 2 - h (geometry); q is their total over
  // the disk's area 4 pi; as r^2 (t - sin t) / 2 with t = 2 asin(c / r), c = sqrt(h (2r - h))
  // the half chord, and t - sin t by its series t^3/6 - t^5/120 + t^7/5040 (t ~ 2e-3: the next
  // term is below 1e-20 of the first).
  const Gaussian u = Gaussian::from_axes({0.0, 0.0}, 1.0, 1.0, 0.0).with_family(ScatterFamily::uniform());
  IntegrateOptions o;
  o.abs_tolerance = 1e-300;  // so that only the relative request counts
  for (const double h : {1e-6, 1e-13}) {
    const Estimate e = integrate(u, rectangle({-(2.0 - h), -(2.0 - h)}, {2.0 - h, 2.0 - h}), o);
    INFO("h = " << h << ": p = " << e.p << ", q = " << e.q << ", bound " << e.abs_err);
    CHECK(e.abs_err > 0.0);  // not settled: the zone's edges pass inside the support
    if (h == 1e-6) {
      const double r = 2.0, t = 2.0 * std::asin(std::sqrt(h * (2 * r - h)) / r);
      const double segment = r * r / 2.0 * (t * t * t / 6.0 - std::pow(t, 5) / 120.0 + std::pow(t, 7) / 5040.0);
      const double want = 4.0 * segment / (4.0 * kPi);
      CHECK(std::fabs(e.q - want) <= e.q_abs_err());
    }
    // Met only when the bound is within the relative request on q itself.
    if (e.status == Status::converged) CHECK(e.abs_err <= o.rel_tolerance * e.q);
    else CHECK(e.status == Status::tolerance_not_met);
  }
}

TEST_CASE("the normal's tail q of 1e-15 is judged relative to q, not settled", "[exact][tolerance]") {
  // Standard normal over the square of half-width a centred on the mean:
  // q = 1 - (1 - 2 Q(a))^2 = 4 Q(a) - 4 Q(a)^2 (independent coordinates).
  const double a = 8.1;
  const double tail = 0.5 * std::erfc(a / std::sqrt(2.0)), want = 4 * tail - 4 * tail * tail;
  IntegrateOptions o;
  o.abs_tolerance = 1e-300;
  const Estimate e = integrate(Gaussian::from_axes({0.0, 0.0}, 1.0, 1.0, 0.0), rectangle({-a, -a}, {a, a}), o);
  CHECK(want < 2e-15);
  CHECK(e.abs_err > 0.0);
  CHECK(std::fabs(e.q - want) <= e.q_abs_err() + 1e-12 * want);  // erfc to a few ulps
  REQUIRE(e.status == Status::converged);
  CHECK(e.abs_err <= o.rel_tolerance * e.q);
  // Asked for more than it has, it says "not met" rather than claiming q.
  o.rel_tolerance = 1e-300 / e.q;
  const Estimate strict = integrate(Gaussian::from_axes({0.0, 0.0}, 1.0, 1.0, 0.0), rectangle({-a, -a}, {a, a}), o);
  CHECK(strict.status == Status::tolerance_not_met);
}
