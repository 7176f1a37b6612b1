// Invariants over many random cases: partitions sum to 1, rigid motions of spread and region
// together leave p unchanged, disjoint zones add up, the three methods agree within their
// bounds, and scale (millimetres to kilometres) does not matter.
#include <catch2/catch.hpp>
#include <cmath>
#include <iomanip>
#include <random>

#include "strewn/integrate.hpp"
#include "test_support.hpp"

using namespace strewn;
using namespace strewn::test;

namespace {

struct Random {
  std::mt19937_64 rng{20261201};
  double uniform(double a, double b) { return std::uniform_real_distribution<double>(a, b)(rng); }
  double log_uniform(double a, double b) { return std::exp(uniform(std::log(a), std::log(b))); }

  Gaussian spread(const Vec2& mean) {
    const double major = log_uniform(0.2, 3.0);
    return Gaussian::from_axes(mean, major, major / log_uniform(1.0, 50.0), uniform(0, 180));
  }

  // A simple, usually non-convex polygon: vertices at sorted angles around a centre with no
  // angular gap above max_gap (< pi), at random radii. With max_gap = pi/2 every edge stays
  // farther than r0 cos(pi/4) from the centre, so a star of radii below that fits inside as a hole.
  std::vector<Vec2> star(const Vec2& centre, double r0, double r1, double max_gap = 0.9 * kPi) {
    const int n = static_cast<int>(uniform(5, 12));
    std::vector<Vec2> pts;
    for (double a : gap_limited_angles(*this, n, max_gap)) {
      const double r = uniform(r0, r1);
      pts.emplace_back(centre.x() + r * std::cos(a), centre.y() + r * std::sin(a));
    }
    return pts;
  }
};

void check_close(const Estimate& a, const Estimate& b, double slack = 0.0) {
  INFO(std::setprecision(17) << "p1 = " << a.p << " +- " << a.abs_err << ", p2 = " << b.p << " +- " << b.abs_err);
  CHECK(std::fabs(a.p - b.p) <= a.abs_err + b.abs_err + 4e-15 * std::max(a.p, b.p) + slack);
}

}  // namespace

TEST_CASE("four quadrants around any point partition the plane", "[property]") {
  Random r;
  for (int i = 0; i < 300; ++i) {
    const Gaussian g = r.spread({r.uniform(-2, 2), r.uniform(-2, 2)});
    const Vec2 c(r.uniform(-4, 4), r.uniform(-4, 4));
    const Mat2 R = rotation(r.uniform(0, 2 * kPi));
    const double far = 400;  // 100+ sigma: the mass beyond is below 1e-300
    double total = 0, err = 0;
    for (int k = 0; k < 4; ++k) {
      const Mat2 Rk = R * rotation(k * kPi / 2);
      const Region q = transformed(rectangle({0, 0}, {far, far}), Rk, c);
      const Estimate e = integrate(g, q);
      total += e.p;
      err += e.abs_err;
    }
    // The four quadrants are placed by separately rounded rotations, so their shared edges
    // differ by a few ulps of 400 m: slack for that sliver, at most 1/sqrt(2 pi) per unit
    // length in whitened units, on four edges.
    const double sliver = 4 * 4e-16 * (far + c.norm()) / g.axes().sigma_minor * 0.4;
    INFO("case " << i << " total " << std::setprecision(17) << total << " err " << err);
    CHECK(std::fabs(total - 1.0) <= err + 1e-14 + sliver);
  }
}

TEST_CASE("a polygon with a hole plus the hole equals the outer polygon", "[property]") {
  Random r;
  for (int i = 0; i < 300; ++i) {
    const Gaussian g = r.spread({0, 0});
    const Vec2 c(r.uniform(-5, 5), r.uniform(-5, 5));
    const auto outer = r.star(c, 1.5, 3.0, kPi / 2);
    const auto hole = r.star(c, 0.3, 1.0);
    const Estimate whole = integrate(g, polygon(outer));
    const Estimate holed = integrate(g, with_hole(outer, hole));
    const Estimate inner = integrate(g, polygon(hole));
    Estimate sum = holed;
    sum.p += inner.p;
    sum.abs_err += inner.abs_err;
    INFO("case " << i);
    check_close(whole, sum);
  }
}

TEST_CASE("rigid motions of spread and region together leave p unchanged", "[property]") {
  Random r;
  for (int i = 0; i < 300; ++i) {
    const Gaussian g = r.spread({r.uniform(-3, 3), r.uniform(-3, 3)});
    const Region region = polygon(r.star({r.uniform(-4, 4), r.uniform(-4, 4)}, 0.5, 2.5));
    const Mat2 R = rotation(r.uniform(0, 2 * kPi));
    const Vec2 t(r.uniform(-100, 100), r.uniform(-100, 100));
    const Gaussian moved =
        Gaussian::from_covariance(R * g.mean() + t, R * g.covariance() * R.transpose());
    const Estimate a = integrate(g, region);
    const Estimate b = integrate(moved, transformed(region, R, t));
    // Moving the vertices rounds them by a few ulps of |t| + |x|: that much change in p is the
    // test's own input perturbation (density bound x perimeter x displacement).
    const BoundingBox box = bounds(region);
    const double displacement = 4e-16 * (t.norm() + box.max.cwiseAbs().maxCoeff() + box.min.cwiseAbs().maxCoeff());
    INFO("case " << i);
    check_close(a, b, displacement * perimeter(region) * g.peak_density());
  }
}

TEST_CASE("disjoint zones add up", "[property]") {
  Random r;
  for (int i = 0; i < 200; ++i) {
    const Gaussian g = r.spread({0, 0});
    const double x0 = r.uniform(-4, 2), y0 = r.uniform(-4, 2);
    const double w = r.uniform(0.5, 3), h = r.uniform(0.5, 3), cut = r.uniform(0.1, 0.9) * w;
    const Estimate whole = integrate(g, rectangle({x0, y0}, {x0 + w, y0 + h}));
    const Estimate left = integrate(g, rectangle({x0, y0}, {x0 + cut, y0 + h}));
    const Estimate right = integrate(g, rectangle({x0 + cut, y0}, {x0 + w, y0 + h}));
    Estimate sum = left;
    sum.p += right.p;
    sum.abs_err += right.abs_err;
    INFO("case " << i);
    check_close(whole, sum);
  }
}

TEST_CASE("exact and cubature agree within their bounds on random shapes", "[property][cubature]") {
  // Every case is compared (none skipped): the mean is placed within 4 whitened sigma of a point
  // on the region's boundary, so p stays far above 1e-20, below which cubature's error estimate
  // is heuristic (README, "Accuracy"); the test requires it. The exact method is asked for
  // 1e-8 relative with no absolute floor, and its bound is capped relative to p. (Before, 516
  // of 1000 cases had p < 1e-20 and were skipped, two compared cases had bounds above 1e-2 p,
  // and `met >= 990` equalled that day's count of 10 failures.) Deliberate fault that made it
  // fail: the exact method's abs_err scaled by 200 after its convergence test (98 failures of
  // the caps). Halving abs_err is not caught here: the exact bounds are conservative.
  Random r;
  IntegrateOptions exact;
  exact.abs_tolerance = 1e-300;
  IntegrateOptions cub;
  cub.method = Method::cubature;
  cub.rel_tolerance = 1e-8;
  cub.abs_tolerance = 1e-300;
  int compared = 0, met = 0, tight_references = 0;
  std::vector<int> unmet;
  double worst_rel_bound = 0.0;
  for (int i = 0; i < 1000; ++i) {
    const Gaussian shape = r.spread({0, 0});
    const Vec2 c(r.uniform(-6, 6), r.uniform(-6, 6));
    Region region;
    Vec2 anchor;
    switch (i % 4) {
      case 0: {
        const auto pts = r.star(c, 0.3, 2.0);
        region = polygon(pts);
        anchor = pts[0];
        break;
      }
      case 1: {
        const auto outer = r.star(c, 1.5, 3.0, kPi / 2), hole = r.star(c, 0.2, 1.0);
        region = with_hole(outer, hole);
        anchor = (i / 4) % 2 ? outer[0] : hole[0];
        break;
      }
      case 2: {
        const double radius = r.uniform(0.1, 3);
        region = disk(c, radius);
        anchor = c + Vec2(radius, 0.0);
        break;
      }
      default: {
        const double r1 = r.uniform(0.0, 1.0), t1 = r.uniform(0, 2 * kPi);
        const double r2 = r1 + r.uniform(0.2, 2);
        region = ring_sector(c, r1, r2, t1, t1 + r.uniform(0.1, 6));
        anchor = c + r2 * Vec2(std::cos(t1), std::sin(t1));
      }
    }
    const double rho = r.uniform(0.0, 4.0), phi = r.uniform(0, 2 * kPi);
    const Gaussian g = Gaussian::from_covariance(anchor + shape.cholesky() * Vec2(rho * std::cos(phi), rho * std::sin(phi)),
                                                 shape.covariance());
    const Estimate a = integrate(g, region, exact);
    INFO("case " << i << " kind " << i % 4 << ": p = " << a.p << " +- " << a.abs_err << " " << a.message);
    REQUIRE(a.p >= 1e-20);
    const Estimate b = integrate(g, region, cub);
    check_close(a, b);
    ++compared;
    const double rel_bound = a.abs_err / std::min(a.p, a.q);
    worst_rel_bound = std::max(worst_rel_bound, rel_bound);
    if (a.converged) {
      ++met;
      CHECK(rel_bound <= 1e-8);
    } else {
      unmet.push_back(i);
      // Pinned against cubature at 1e-12 relative: the bound must cover the distance to it.
      IntegrateOptions tight = cub;
      tight.rel_tolerance = 1e-12;
      const Estimate ref = integrate(g, region, tight);
      INFO("axes " << shape.axes().sigma_major << " / " << shape.axes().sigma_minor << ", mean " << rho
                   << " whitened sigma from the boundary; cubature " << ref.p << " +- " << ref.abs_err);
      // A reference far tighter than the bound it checks, unless both bounds are mostly the
      // input's rounding (cubature counts it as the exact method does): then the check is
      // the weaker one of the two bounds together, and such cases are counted apart.
      if (ref.abs_err <= 0.05 * a.abs_err) ++tight_references;
      CHECK(std::fabs(a.p - ref.p) <= a.abs_err + ref.abs_err);
    }
    // Nothing passes on a vacuous bound: every bound, met or not, is within 2e-6 of p and q
    // (at most 1.1e-6, case 583, since the bounds count the rounding of the input coordinates).
    CHECK(rel_bound <= 2e-6);
  }
  CHECK(compared == 1000);
  INFO("worst abs_err / min(p, q): " << worst_rel_bound);
  // Unmet requests, by case: 26 and 250 (disks) and 583, 735, 959 (annular sectors), all an arc
  // within 2-4 sigma of the mean of a spread of axis ratio 24 to 47 (sigma_minor 6 to 25 mm):
  // whitened, the arc is an ellipse hundreds of sigma across passing near the mean, a difference
  // of large numbers whose rounding abs_err honestly reports (1.5e-12 to 8e-12, at most 9.3e-7
  // of p), above the 1e-8 request. Each is pinned above against cubature at 1e-12.
  CHECK(unmet == std::vector<int>{26, 250, 583, 735, 959});
  CHECK(met == compared - static_cast<int>(unmet.size()));
  WARN(tight_references << " of the " << unmet.size() << " unmet cases had a reference 20 times tighter");
}

TEST_CASE("Monte Carlo intervals cover the exact value", "[property][monte_carlo]") {
  Random r;
  IntegrateOptions mc;
  mc.method = Method::monte_carlo;
  mc.samples = 20000;
  mc.confidence = 0.999;
  int covered = 0;
  const int n = 60;
  for (int i = 0; i < n; ++i) {
    const Gaussian g = r.spread({0, 0});
    const Region region = polygon(r.star({r.uniform(-1.5, 1.5), r.uniform(-1.5, 1.5)}, 0.3, 2.0));
    mc.seed = 77 + i;
    const Estimate exact = integrate(g, region);
    const Estimate e = integrate(g, region, mc);
    if (e.interval_low <= exact.p && exact.p <= e.interval_high) ++covered;
  }
  CHECK(covered >= n - 2);  // 99.9% intervals: a miss in 60 is already unlikely
}

TEST_CASE("results do not depend on the unit of length (millimetres to kilometres)",
          "[property]") {
  Random r;
  for (int i = 0; i < 100; ++i) {
    const Gaussian g = r.spread({r.uniform(-1, 1), r.uniform(-1, 1)});
    const Region region = polygon(r.star({r.uniform(-4, 4), r.uniform(-4, 4)}, 0.3, 2.0));
    const Estimate base = integrate(g, region);
    for (double scale : {1e-3, 1e3}) {
      const Gaussian s = Gaussian::from_covariance(scale * g.mean(), scale * scale * g.covariance());
      const Estimate e = integrate(s, transformed(region, scale * Mat2::Identity(), Vec2::Zero()));
      INFO("case " << i << " scale " << scale);
      check_close(base, e);
    }
  }
}

TEST_CASE("arcs and ellipses passing near the mean of a long spread: the bound covers cubature", "[property][arc]") {
  // Disks, ellipses and their sectors (arc plus chord) placed with the mean a few sigma_minor
  // from the rim, inside or outside, under spreads of axis ratio 1 to 1000: whitened, the arc is
  // an ellipse up to thousands of sigma long whose integrand has a narrow peak where it passes
  // the mean. Reference: the cubature method at 1e-13 (an independent algorithm, README
  // "Methods"). Deliberate fault that made it fail: arc_tail's pieces back to four equal
  // quarters without the cuts around each closest approach (11 of 3000 cases uncovered, up to
  // 2.8e-7 off with bounds of 1e-9; the risk-map test's six cells were 6e-9 off with 5e-12).
  std::mt19937_64 rng(2);
  std::uniform_real_distribution<double> u(0, 1);
  int compared = 0;
  for (int i = 0; i < 3000; ++i) {
    const double ratio = std::pow(10.0, 3 * u(rng)), major = std::pow(10.0, 2 * u(rng) - 1);
    const Gaussian g = Gaussian::from_axes({0, 0}, major, major / ratio, 360 * u(rng));
    const double radius = major * std::pow(10.0, 2 * u(rng) - 1), direction = 2 * kPi * u(rng);
    const double near = u(rng) < 0.5 ? 1.0 : ratio * u(rng);
    const double off = radius + (major / ratio) * (8 * u(rng) - 4) * near;
    const Vec2 c = -off * Vec2(std::cos(direction), std::sin(direction));
    const double a0 = 2 * kPi * u(rng), a1 = a0 + 2 * kPi * (u(rng) < 0.5 ? 1.0 : u(rng));
    const double flattening = u(rng) < 0.5 ? 1.0 : 0.2 + u(rng);
    Mat2 axes;
    axes << radius, 0, 0, radius * flattening;
    Region region;
    if (a1 - a0 == 2 * kPi)
      region.loops.push_back({Edge::arc(c, axes, 0, 2 * kPi)});
    else
      region.loops.push_back({Edge::arc(c, axes, a0, a1), Edge::segment(c + axes * Vec2(std::cos(a1), std::sin(a1)),
                                                                         c + axes * Vec2(std::cos(a0), std::sin(a0)))});
    IntegrateOptions exact;
    exact.rel_tolerance = 1e-9;
    const Estimate a = integrate(g, region, exact);
    IntegrateOptions cub;
    cub.method = Method::cubature;
    cub.rel_tolerance = 1e-13;
    cub.abs_tolerance = 1e-300;
    const Estimate b = integrate(g, region, cub);
    INFO("case " << i << ": axis ratio " << ratio << ", radius " << radius << ", mean " << off << " from the centre");
    check_close(a, b);
    ++compared;
  }
  CHECK(compared == 3000);
}

// A probability lies in [0, 1], so |p_true - p| <= max(p, 1 - p) whatever p is: a bound above
// that says nothing more (issue 16's trial saw bounds of 14 and 140,000 on a DXF zone's p, its
// arcs' slivers times a density bound). Every method reports at most that, and the message of
// a bound from a region's polygonisation says where it comes from.
TEST_CASE("an error bound never exceeds max(p, 1 - p), what a probability allows", "[property][bound]") {
  Region square = polygon({{0, 0}, {100, 0}, {100, 100}, {0, 100}});
  square.approximation_area = 1e6;  // a sliver area far above the zone's own: a useless bound
  square.approximation_width = 0.01;
  const Gaussian on_edge = Gaussian::from_axes({0.3, 50.0}, 1.0, 0.5, 0.0);
  for (const Method m : {Method::exact, Method::cubature, Method::monte_carlo}) {
    INFO(to_string(m));
    IntegrateOptions o;
    o.method = m;
    o.samples = 100000;
    const Estimate e = integrate(on_edge, square, o);
    CHECK(e.abs_err <= std::max(e.p, 1.0 - e.p));
    if (m != Method::monte_carlo) {
      CHECK(e.abs_err == std::max(e.p, 1.0 - e.p));  // capped: the raw bound is ~1e5
      CHECK(e.message.find("it includes the area by which the region's polygons may differ from its curves") !=
            std::string::npos);
    }
  }
}
