// The mean on the boundary (issue 12, item 3): on every vertex, edge midpoint and arc point of
// random shapes, on holes and inner rings, under spreads elongated up to 1e6:1 at any rotation.
// The exact result must lie within its bound of an independent reference (cubature at a tight
// tolerance, itself checked against closed forms where they exist), with no exception.
//
// On the old code: a disk through the mean under a 1000:1 spread gave 0.1126 +- 0.0016 for
// 0.0147 and an ellipse's vertex 0.1117 +- 0.0073 for 0.0033 (a peak of dtheta/ds stepped over
// by the quadrature); the mean on a hole's edge or a ring's inner circle threw "probability must
// be in [0, 1]" (the hole's boundary counted +1/2 instead of -1/2); a rotated 1e6:1 spread was
// 1.2e-5 relative off with a 3.3e-9 bound (the covariance formed from the axes).
#include <catch2/catch.hpp>
#include <cmath>
#include <iomanip>
#include <random>

#include "strewn/integrate.hpp"
#include "strewn/region_ops.hpp"
#include "strewn/risk_map.hpp"
#include "test_support.hpp"

using namespace strewn;
using namespace strewn::test;

namespace {

struct Random {
  std::mt19937_64 rng{1212};
  double uniform(double a, double b) { return std::uniform_real_distribution<double>(a, b)(rng); }
  double log_uniform(double a, double b) { return std::exp(uniform(std::log(a), std::log(b))); }
};

std::vector<Vec2> star(Random& r, const Vec2& c, double r0, double r1, int n) {
  std::vector<Vec2> pts;
  for (double a : gap_limited_angles(r, n, 0.5 * kPi)) {
    const double rad = r.uniform(r0, r1);
    pts.emplace_back(c.x() + rad * std::cos(a), c.y() + rad * std::sin(a));
  }
  return pts;
}

// Points on the boundary of a normalised region: every vertex, every edge's midpoint (segment)
// or a random point (arc).
std::vector<Vec2> boundary_points(const Region& region, Random& r) {
  std::vector<Vec2> pts;
  for (const Loop& loop : region.loops)
    for (const Edge& e : loop) {
      if (e.kind == Edge::Kind::segment) {
        pts.push_back(e.from);
        pts.push_back(0.5 * (e.from + e.to));
      } else {
        if (loop.size() > 1) pts.push_back(e.from);
        pts.push_back(e.point(r.uniform(e.s_from, e.s_to)));
      }
    }
  return pts;
}

struct Tally {
  int compared = 0, skipped = 0;
};

void check_against_cubature(const Gaussian& g, const Region& region, Tally& t) {
  Estimate exact, reference;
  IntegrateOptions cub;
  cub.method = Method::cubature;
  cub.rel_tolerance = 1e-9;
  cub.abs_tolerance = 1e-13;
  const SpreadAxes a = g.axes();
  INFO(std::setprecision(17) << "mean (" << g.mean().x() << ", " << g.mean().y() << "), axes " << a.sigma_major
                             << " x " << a.sigma_minor << " at " << a.angle_deg);
  REQUIRE_NOTHROW(exact = integrate(g, region));
  REQUIRE_NOTHROW(reference = integrate(g, region, cub));
  INFO(std::setprecision(17) << "exact p = " << exact.p << " q = " << exact.q << " +- " << exact.abs_err
                             << " (" << exact.message << "); cubature p = " << reference.p << " +- "
                             << reference.abs_err << " (" << reference.message << ")");
  CHECK(exact.p >= 0.0);
  CHECK(exact.p <= 1.0);
  CHECK(std::fabs(exact.p + exact.q - 1.0) <= 2 * exact.abs_err + 1e-15);
  // A reference that stopped at its budget bounds nothing; one whose bound exceeds the
  // request only by the input's rounding (which cubature counts as the exact method does,
  // relative to the spread's elongation: about 1e-5 at 1e5:1 along an arc thousands of sigma
  // long) still bounds its distance to p, and the faults found here were 0.1 to 0.25 off.
  if (reference.status == Status::budget_exhausted || !(reference.abs_err <= 1e-4)) {
    ++t.skipped;  // no trustworthy reference here
    return;
  }
  CHECK(std::fabs(exact.p - reference.p) <= exact.abs_err + reference.abs_err + 1e-14);
  ++t.compared;
}

}  // namespace

TEST_CASE("the issue's degenerate cases", "[degenerate]") {
  // Disk of radius 1 through the mean, spread 1000:1 along the tangent:
  // P = integral of phi(x) [Phi((1 + sqrt(1 - x^2)) / 1e-3) - Phi((1 - sqrt(1 - x^2)) / 1e-3)] dx
  //   = 0.014659749313553040005 (mpmath quad, 20 digits, split at 0, +-0.01, +-0.1).
  IntegrateOptions cub;
  cub.method = Method::cubature;
  cub.rel_tolerance = 1e-9;
  const Gaussian along = Gaussian::from_axes({0, 0}, 1.0, 1e-3, 0.0);
  const Estimate d = integrate(along, disk({0, 1}, 1.0));
  INFO(std::setprecision(17) << "disk: " << d.p << " +- " << d.abs_err);
  CHECK(std::fabs(d.p - 0.014659749313553040005) <= d.abs_err + 1e-15);
  CHECK(d.abs_err <= 1e-8);
  // The vertex (2, 0) of the ellipse x^2 / 4 + y^2 / 0.25 = 1 on the mean, spread 1 along y and
  // 1e-3 along x: P = integral of phi(y) [Phi((2 sqrt(1 - 4 y^2) - 2) / 1e-3)
  // - Phi((-2 sqrt(1 - 4 y^2) - 2) / 1e-3)] dy over |y| < 0.5 = 0.0051852620821689529676 (mpmath).
  const Gaussian el = Gaussian::from_axes({2, 0}, 1.0, 1e-3, 90.0);
  const Estimate ev = integrate(el, ellipse({0, 0}, Vec2(2.0, 0.5).asDiagonal()));
  INFO(std::setprecision(17) << "ellipse: " << ev.p << " +- " << ev.abs_err);
  CHECK(std::fabs(ev.p - 0.0051852620821689529676) <= ev.abs_err + 1e-15);
  CHECK(ev.abs_err <= 1e-8);
  // The mean on a hole's edge and on a ring's inner circle: half of the neighbourhood is inside.
  const Gaussian round = Gaussian::from_axes({0, 1}, 0.5, 0.5, 0.0);
  const Region holed = with_hole({{-3, -3}, {3, -3}, {3, 3}, {-3, 3}}, {{-1, -1}, {1, -1}, {1, 1}, {-1, 1}});
  Estimate h;
  REQUIRE_NOTHROW(h = integrate(round, holed));
  const Estimate hc = integrate(round, holed, cub);
  CHECK(std::fabs(h.p - hc.p) <= h.abs_err + hc.abs_err);
  const Gaussian on_ring = Gaussian::from_axes({1, 0}, 0.5, 0.5, 0.0);
  Region ring;
  ring.loops.push_back({Edge::arc({0, 0}, 3.0 * Mat2::Identity(), 0, 2 * kPi)});
  ring.loops.push_back({Edge::arc({0, 0}, Mat2::Identity(), 0, 2 * kPi)});
  ring = normalised(ring);
  Estimate rr;
  REQUIRE_NOTHROW(rr = integrate(on_ring, ring));
  const Estimate rc = integrate(on_ring, ring, cub);
  CHECK(std::fabs(rr.p - rc.p) <= rr.abs_err + rc.abs_err);
  CHECK(rr.p < 1.0);
}

TEST_CASE("a rotated 1e6:1 spread keeps its accuracy", "[degenerate]") {
  // The half-plane y' > d in the spread's own frame: P = Q(d / sigma_minor) exactly, whatever
  // the rotation. A band 100 sigma_major long in the major direction and 1e6 sigma_minor wide
  // stands in for the half-plane (the rest is below 1e-300).
  for (double angle : {45.0, 30.0, 123.4}) {
    const double t = angle * kPi / 180;
    const Vec2 major(std::cos(t), std::sin(t)), minor(-std::sin(t), std::cos(t));
    const double sM = 1.0, sm = 1e-6;
    const Gaussian g = Gaussian::from_axes({0, 0}, sM, sm, angle);
    for (double k : {0.5, 2.0, 5.0}) {
      const double d = k * sm;
      std::vector<Vec2> pts;
      for (const auto& [a, b] : {std::pair<double, double>{-50, d}, {50, d}, {50, d + 1}, {-50, d + 1}})
        pts.push_back(a * major + b * minor);
      const Estimate e = integrate(g, polygon(pts));
      const double ref = upper_tail(k);
      INFO(std::setprecision(17) << angle << " deg, k = " << k << ": p = " << e.p << " +- " << e.abs_err
                                 << ", Q(k) = " << ref);
      CHECK(std::fabs(e.p - ref) <= e.abs_err + 1e-15);
    }
  }
}

TEST_CASE("the mean on every vertex, edge, arc, hole and inner ring of random shapes", "[degenerate][property]") {
  Random r;
  Tally t;
  for (int i = 0; i < 60; ++i) {
    Region region;
    const int kind = i % 6;
    switch (kind) {
      case 0: region = polygon(star(r, {0, 0}, 0.5, 2.0, 6)); break;
      case 1: region = with_hole(star(r, {0, 0}, 1.6, 2.5, 6), star(r, {0, 0}, 0.4, 1.0, 5)); break;
      case 2: region = disk({r.uniform(-1, 1), r.uniform(-1, 1)}, r.uniform(0.5, 2)); break;
      case 3: region = ellipse({0, 0}, rotation(r.uniform(0, kPi)) * Vec2(r.uniform(1, 2), r.uniform(0.2, 1)).asDiagonal()); break;
      case 4: {
        const double t1 = r.uniform(0, 2 * kPi);
        region = ring_sector({0, 0}, r.uniform(0.3, 1), r.uniform(1.3, 2.5), t1, t1 + r.uniform(0.5, 5.5));
        break;
      }
      default: {
        Region ring;
        const double big = r.uniform(1.5, 2.5);
        ring.loops.push_back({Edge::arc({0, 0}, big * Mat2::Identity(), 0, 2 * kPi)});
        ring.loops.push_back({Edge::arc({0.1, 0}, r.uniform(0.3, 1) * Mat2::Identity(), 0, 2 * kPi)});
        region = normalised(ring);
      }
    }
    INFO("shape " << i << " kind " << kind);
    for (const Vec2& m : boundary_points(region, r)) {
      const double ratio = r.log_uniform(1, 1e6);
      const double major = r.log_uniform(0.3, 3);
      const Gaussian g = Gaussian::from_axes(m, major, major / ratio, r.uniform(0, 180));
      check_against_cubature(g, region, t);
    }
  }
  WARN("compared " << t.compared << " placements with cubature, " << t.skipped << " without a converged reference");
  // Cubature does not converge for some placements under the most elongated spreads (1e5:1 and
  // beyond, where the whitened region is a sliver): those are counted apart, and the rest must
  // still be many.
  CHECK(t.compared >= 250);
  CHECK(t.compared + t.skipped >= 440);
}

TEST_CASE("the mean on a corner where an arc meets a straight edge, the spread along the edge", "[degenerate]") {
  // Ring sectors and pies with corners on the axes (where the arc's computed end, 2 cos(pi / 2),
  // is 1.2e-16 off the typed-in ray), the mean on each corner, spreads of 1000:1 to 1e5:1 along
  // the ray within a tenth of a degree. Whitened, the arc is thousands of sigma long and the
  // ray one or two: judged on its own scale the ray missed the mean by 1e-13 and swept a quarter
  // turn at full density (p 0.4207 +- 1.3e-9 for 0.1707, a keep-out limit of 0.35 reported as
  // holding for a true 0.394; other corners failed the last check, exit 1). Reference: cubature.
  // Deliberate fault that made it fail: find_boundary_hit's tolerance back to each edge's ends.
  Tally t;
  for (const double inner : {0.0, 1.0})
    for (const double from_deg : {-90.0, 0.0, 90.0, 180.0})
      for (const double to_deg : {from_deg + 90.0, from_deg + 180.0}) {
        const double t1 = from_deg * kPi / 180, t2 = to_deg * kPi / 180;
        Region region;
        if (inner > 0.0) {
          region = ring_sector({0, 0}, inner, 2.0, t1, t2);
        } else {
          const Edge arc = Edge::arc({0, 0}, 2.0 * Mat2::Identity(), t1, t2);
          region.loops.push_back({Edge::segment({0, 0}, arc.from), arc, Edge::segment(arc.to, {0, 0})});
        }
        for (const double corner_deg : {from_deg, to_deg})
          for (const double radius : {inner, 2.0}) {
            if (radius == 0.0) continue;
            const double c = corner_deg * kPi / 180;
            // Typed in as a user would: (0, 2), not (2 cos(pi / 2), 2 sin(pi / 2)).
            const Vec2 mean(std::round(radius * std::cos(c)), std::round(radius * std::sin(c)));
            for (const double tilt : {-0.1, 0.0, 0.1})
              for (const double ratio : {1e3, 1e5}) {
                INFO("sector " << inner << "-2 from " << from_deg << " to " << to_deg << " deg, corner at " << corner_deg
                               << " deg r " << radius << ", spread along the ray " << tilt << " deg, " << ratio << ":1");
                check_against_cubature(Gaussian::from_axes(mean, 1.0, 1.0 / ratio, corner_deg + tilt), region, t);
              }
          }
      }
  // 8 sectors x 2 corners x 1 or 2 radii x 3 tilts x 2 ratios; cubature settles most of them.
  CHECK(t.compared + t.skipped == 288);
  CHECK(t.compared >= 200);
}

// A mean a hair from a corner, not on it: found by an adversarial trial, 1e-13 m from a
// polygon's corner under a 5:1 spread gave p 0.345 for 0.429 under a bound of 7e-13 (both edges
// within the rounding allowance of the mean, the corner just outside it: each edge took its
// jump of pi), and a ring sector's inner corner 5e-13 sigma off gave 0.26107 for 0.26100 under
// a bound of 2.6e-7 (the arc's end a spike its quadrature had no node in).
// Reference: with both edges of the corner 1e4 sigma long, p is the wedge's whitened angle over
// 2 pi (the standard normal's rotational symmetry; beyond 1e4 sigma nothing a double holds),
// to within the offset's effect: moving the mean by d (whitened) changes p by at most d times
// the normal density's integral along each edge's line, 1 / sqrt(2 pi) at most.
// Deliberate faults that made it fail: sweep_deficit returning 0; kArcEndSpike 0.
TEST_CASE("a mean a hair from a corner: the wedge's whitened angle, and cubature at a sector's corners", "[degenerate]") {
  int checked = 0;
  for (const Vec2& origin : {Vec2(0, 0), Vec2(452317.0, 5300042.0)})
    for (const double ratio : {1.0, 5.0, 1e3})
      for (const double angle_deg : {0.0, 30.0, 75.0})
        for (const double turn_deg : {60.0, 90.0, 150.0, 250.0}) {
          const double sigma = 0.5, minor = sigma / ratio, reach = 1e4 * sigma;
          const double t = turn_deg * kPi / 180;
          const Vec2 a = origin + reach * Vec2(1, 0), b = origin + reach * Vec2(std::cos(t), std::sin(t));
          // The wedge origin -> a ... b closed far out (the far side beyond 1e4 sigma: 0 to double precision).
          std::vector<Vec2> pts = {origin, a};
          for (int k = 1; k < 8; ++k) pts.push_back(origin + 2 * reach * Vec2(std::cos(t * k / 8), std::sin(t * k / 8)));
          pts.push_back(b);
          const Region wedge = polygon(pts);
          for (const double offset : {0.0, 1e-16, 1e-14, 1e-13, 3e-13, 1e-12, 1e-10})
            for (const double direction_deg : {45.0, 200.0}) {
              const double d = direction_deg * kPi / 180;
              const Vec2 mean = origin + offset * sigma * Vec2(std::cos(d), std::sin(d));
              const Gaussian g = Gaussian::from_axes(mean, sigma, minor, angle_deg);
              // The whitened angle from the first edge to the second, counter-clockwise.
              const Mat2 w = g.whitening();
              const Vec2 u = w * Vec2(1, 0), v = w * Vec2(std::cos(t), std::sin(t));
              double whitened = std::atan2(u.x() * v.y() - u.y() * v.x(), u.dot(v));
              if (whitened < 0) whitened += 2 * kPi;
              const double truth = whitened / (2 * kPi);
              const Estimate e = integrate(g, wedge);
              // The mean's offset moves p by at most offset / sigma_minor (whitened) times the
              // density's line integral bound 1 / sqrt(2 pi) per edge.
              const double moved = 2 * offset * sigma / minor / std::sqrt(2 * kPi);
              INFO(std::setprecision(17) << "origin " << origin.x() << ", ratio " << ratio << " at " << angle_deg << " deg, turn "
                                         << turn_deg << " deg, offset " << offset << " sigma towards " << direction_deg
                                         << " deg: p " << e.p << " +- " << e.abs_err << " for " << truth);
              CHECK(std::fabs(e.p - truth) <= e.abs_err + moved + 1e-14);
              ++checked;
            }
        }
  CHECK(checked == 2 * 3 * 3 * 4 * 7 * 2);
  // A ring sector's four corners (arc meets ray, outer and inner), the mean 0 to 1e-11 of the
  // spread off each, at the origin and at national-grid coordinates; cubature as the reference.
  Tally tally;
  for (const Vec2& origin : {Vec2(0, 0), Vec2(452317.0, 5300042.0)})
    for (const double ratio : {1.0, 5.0}) {
      const double from = -0.5, to = 1.2, inner = 0.5, outer = 2.0;
      const Region sector = ring_sector(origin, inner, outer, from, to);
      for (const double r : {inner, outer})
        for (const double angle : {from, to})
          for (const double offset : {0.0, 1e-14, 1e-13, 1e-11}) {
            const Vec2 corner = origin + r * Vec2(std::cos(angle), std::sin(angle));
            const Vec2 mean = corner + offset * 0.5 * Vec2(std::cos(angle + 2.0), std::sin(angle + 2.0));
            INFO("corner r " << r << " at " << angle << " rad, origin " << origin.x() << ", offset " << offset);
            check_against_cubature(Gaussian::from_axes(mean, 0.5, 0.5 / ratio, 16.0), sector, tally);
          }
    }
  // The two placements the trial found, as it gave them (reference: cubature).
  check_against_cubature(Gaussian::from_axes({1e-13, 1e-13}, 0.5, 0.1, 30.0), polygon({{0, 0}, {2, 0}, {2, 1}, {0, 2}}),
                         tally);
  const Vec2 centre(0.21263160077225612, -0.05283843178744865);
  check_against_cubature(Gaussian::from_axes({0.10767184605926815, -0.08052847480920564}, 0.12061206352025138,
                                             0.2 * 0.12061206352025138, 16.094666250108244),
                         ring_sector(centre, 0.10855085716822623, 0.3618361905607541, -165.22118838275293 * kPi / 180,
                                     -101.04546182110835 * kPi / 180),
                         tally);
  // At national-grid coordinates the reference's own bound (the coordinates' rounding, 1e-9 of
  // the spread) is above its 1e-9 request: those are counted apart; at the origin all compare.
  CHECK(tally.compared + tally.skipped == 66);
  CHECK(tally.compared >= 34);
}

// Two squares touching at a corner, their union, the mean on that corner (an adversarial
// trial): only one loop's fraction of a turn was counted, p 0.25 for 0.5 under a bound of 1.6e-4.
// Reference: the squares 1e4 sigma across, p is the two quadrants' whitened angles over 2 pi
// (rotational symmetry of the standard normal), the same for quadrants I and III.
TEST_CASE("the mean where two loops touch takes both loops' share of the turn", "[degenerate]") {
  for (const Vec2& origin : {Vec2(0, 0), Vec2(452317.0, 5300042.0)})
    for (const double ratio : {1.0, 5.0})
      for (const double angle_deg : {0.0, 30.0}) {
        const double size = 1e4 * 0.5;
        const Region squares = combine(rectangle(origin - Vec2(size, size), origin), rectangle(origin, origin + Vec2(size / 2, size)),
                                       BooleanOp::unite, 1e-6);
        const Gaussian g = Gaussian::from_axes(origin, 0.5, 0.5 / ratio, angle_deg);
        const Vec2 u = g.whitening() * Vec2(1, 0), v = g.whitening() * Vec2(0, 1);
        double quadrant = std::atan2(u.x() * v.y() - u.y() * v.x(), u.dot(v));
        if (quadrant < 0) quadrant += 2 * kPi;
        const double truth = 2 * quadrant / (2 * kPi);
        const Estimate e = integrate(g, squares);
        INFO(std::setprecision(17) << "origin " << origin.x() << ", ratio " << ratio << " at " << angle_deg << " deg: p " << e.p
                                   << " +- " << e.abs_err << " for " << truth);
        CHECK(std::fabs(e.p - truth) <= e.abs_err + 1e-14);
        CHECK(e.abs_err < 1e-6);
      }
}

TEST_CASE("no negative zero leaves the engine", "[degenerate]") {
  // A source no cell can feel: per session, 1 - exp(0) was -0 ("largest risk -0" in the map,
  // p = -0 in JSON).
  const MapSource far{ScatterModel(Gaussian::from_axes({1e4, 0}, 0.5, 0.5, 0.0)), 10, 100};
  GridSpec grid;
  grid.columns = 3;
  grid.rows = 2;
  for (Period per : {Period::event, Period::session, Period::year}) {
    RiskMapOptions o;
    o.threads = 1;
    const RiskMap map = compute_risk_map({far}, disk({0, 0}, 0.3), grid, per, o);
    for (double v : map.value) {
      CHECK(v == 0.0);
      CHECK_FALSE(std::signbit(v));
    }
    const Estimate e = risk_at({far}, disk({0, 0}, 0.3), {1, 1}, per);
    CHECK_FALSE(std::signbit(e.p));
  }
  // A mean on a hole's vertex, on a hole's edge and at a ring's inner circle: p in [0, 1], no
  // exception (it was 'probability must be in [0, 1]').
  const Region holed = with_hole({{-3, -3}, {3, -3}, {3, 3}, {-3, 3}}, {{-1, -1}, {1, -1}, {1, 1}, {-1, 1}});
  for (const Vec2& m : {Vec2(1, 1), Vec2(-1, 0), Vec2(0.3, -1)}) {
    const Estimate e = integrate(Gaussian::from_axes(m, 0.7, 0.2, 30.0), holed);
    CHECK(e.p >= 0.0);
    CHECK(e.p <= 1.0);
    CHECK_FALSE(std::signbit(e.p));
    CHECK(probability_of_any(e.p, 10.0) >= 0.0);
  }
}

TEST_CASE("the last check refuses p and q outside [0, 1] or not summing to 1, and clamps within the bound",
          "[guard]") {
  // What every integrate() result passes (integrate.hpp, checked_estimate). Found in use: an arc
  // of a whole turn closed by a segment of 3e-17 m once came out p = 1.22, q = 0 with a bound
  // of 5e-15 (properties_test "arcs and ellipses ..."); the check refused it instead of
  // printing it. Deliberate fault that made this fail: the check returning e unchanged.
  Estimate e;
  e.method = Method::exact;
  e.p = 1.2225440682594064;
  e.q = 0.0;
  e.abs_err = 4.5e-15;
  CHECK_THROWS_WITH(checked_estimate(e), Catch::Contains("numerical check failed") && Catch::Contains("1.2225"));
  e.p = 0.3;
  e.q = 0.6;  // in range, but p + q = 0.9
  CHECK_THROWS(checked_estimate(e));
  e.q = std::nan("");
  CHECK_THROWS(checked_estimate(e));
  e.q = 0.7;
  e.abs_err = -1.0;  // a negative bound is no bound
  CHECK_THROWS(checked_estimate(e));
  // Within the bound: clamped, and -0 becomes +0.
  e.p = -1e-17;
  e.q = 1.0 + 1e-17;
  e.abs_err = 1e-16;
  const Estimate c = checked_estimate(e);
  CHECK(c.p == 0.0);
  CHECK(!std::signbit(c.p));
  CHECK(c.q == 1.0);
  e.p = -0.0;
  e.q = 1.0;
  CHECK(!std::signbit(checked_estimate(e).p));
}

TEST_CASE("the larger of p and q carries its rounding to double in its own bound", "[degenerate]") {
  // A 0.5 mm square 1 mm from the mean of a 0.1 mm spread: p = 3.15e-14 with abs_err ~1e-27,
  // and q = 1 - p is a double near 1, good to 5.6e-17 only (found 1.8e-17 off: abs_err did not
  // cover q). q_abs_err() does. Reference: the long-double sum p + q, which must be 1 within the
  // two stated bounds. Deliberate fault that made it fail: q_abs_err() returning abs_err.
  const Gaussian g = Gaussian::from_axes({0, 0}, 1e-4, 1e-4, 0);
  const Region square = rectangle({0.00075, -0.00025}, {0.00125, 0.00025});
  const Estimate e = integrate(g, square);
  CHECK(e.p == Approx(3.15e-14).epsilon(0.01));
  CHECK(e.abs_err < 1e-20);
  CHECK(e.q_abs_err() >= 0x1p-53);
  CHECK(e.p_abs_err() == e.abs_err);
  CHECK(std::fabs(static_cast<double>((static_cast<long double>(e.p) + e.q) - 1.0L)) <= e.p_abs_err() + e.q_abs_err());
  CHECK(std::fabs(static_cast<double>((static_cast<long double>(e.p) + e.q) - 1.0L)) > e.abs_err);  // the old bound fell short
}
