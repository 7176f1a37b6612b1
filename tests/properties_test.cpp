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
    std::vector<double> angles;
    for (;;) {
      angles.clear();
      for (int i = 0; i < n; ++i) angles.push_back(uniform(0, 2 * kPi));
      std::sort(angles.begin(), angles.end());
      double gap = angles.front() + 2 * kPi - angles.back();
      for (int i = 1; i < n; ++i) gap = std::max(gap, angles[i] - angles[i - 1]);
      if (gap < max_gap) break;
    }
    std::vector<Vec2> pts;
    for (double a : angles) {
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
      const Region q = transformed(rect(0, far, 0, far), Rk, c);
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
    const Estimate whole = integrate(g, rect(x0, x0 + w, y0, y0 + h));
    const Estimate left = integrate(g, rect(x0, x0 + cut, y0, y0 + h));
    const Estimate right = integrate(g, rect(x0 + cut, x0 + w, y0, y0 + h));
    Estimate sum = left;
    sum.p += right.p;
    sum.abs_err += right.abs_err;
    INFO("case " << i);
    check_close(whole, sum);
  }
}

TEST_CASE("exact and cubature agree within their bounds on random shapes", "[property][cubature]") {
  Random r;
  IntegrateOptions cub;
  cub.method = Method::cubature;
  cub.rel_tolerance = 1e-8;
  cub.abs_tolerance = 1e-300;
  int met = 0;
  for (int i = 0; i < 1000; ++i) {
    const Gaussian g = r.spread({r.uniform(-1, 1), r.uniform(-1, 1)});
    const Vec2 c(r.uniform(-6, 6), r.uniform(-6, 6));
    Region region;
    switch (i % 4) {
      case 0: region = polygon(r.star(c, 0.3, 2.0)); break;
      case 1: region = with_hole(r.star(c, 1.5, 3.0, kPi / 2), r.star(c, 0.2, 1.0)); break;
      case 2: region = disk(c, r.uniform(0.1, 3)); break;
      default: {
        const double r1 = r.uniform(0.0, 1.0), t1 = r.uniform(0, 2 * kPi);
        region = annular_sector(c, r1, r1 + r.uniform(0.2, 2), t1, t1 + r.uniform(0.1, 6));
      }
    }
    const Estimate a = integrate(g, region);
    INFO("case " << i << " kind " << i % 4 << ": p = " << a.p << " +- " << a.abs_err << " " << a.message);
    // The default request (1e-8 relative) is met unless rounding in the inputs themselves
    // allows no better: a whitened ellipse hundreds of sigma across passing near the mean is
    // a difference of large numbers, and abs_err honestly says so.
    if (a.converged) ++met;
    // Cubature is an independent check down to 1e-20; beyond that its heuristic error estimate
    // can be optimistic (README, "Accuracy"), and the exact method alone is used.
    if (a.p < 1e-20) continue;
    const Estimate b = integrate(g, region, cub);
    check_close(a, b);
  }
  // 988 of 1000 since the bounds count the rounding of the input coordinates (eps |mean| /
  // sigma_minor) and bound an arc's distance from the mean through the Frobenius norm of its
  // axes (the larger column's norm understated it for whitened ellipses).
  CHECK(met >= 985);
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
