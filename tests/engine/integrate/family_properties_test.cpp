// Invariants for every scatter family (normal, Student-t, uniform, profile, part-circle
// profile): the plane cut into four quadrants sums to 1, and moving spread and zone together
// (a rotation and a translation) leaves p unchanged. Sources: additivity of a probability over
// a partition, and the invariance of an integral under a rigid change of variables.
#include <catch2/catch.hpp>
#include <cmath>
#include <functional>
#include <cstdlib>
#include <iomanip>
#include <iostream>
#include <optional>
#include <random>
#include <vector>

#include "strewn/constants.hpp"
#include "strewn/error.hpp"
#include "strewn/integrate.hpp"
#include "strewn/profile_spread.hpp"
#include "strewn/region_builders.hpp"
#include "strewn/scatter_family.hpp"
#include "test_support.hpp"

using namespace strewn;
using namespace strewn::test;

namespace {

// A family's component at a mean, with major axis angle `deg`, placed by a rigid motion
// (rotation rot_deg about the origin, then shift t), so that the moved copy is built from
// moved parameters rather than by moving the engine's own matrices.
struct Member {
  std::string name;
  std::function<Gaussian(const Vec2& mean, double rot_deg, const Vec2& t)> make;
};

Vec2 moved(const Vec2& p, double rot_deg, const Vec2& t) { return rotation(rot_deg * kPi / 180.0) * p + t; }

std::vector<Member> members() {
  const RadialProfile leg({0.5, 2.0, 4.0, 6.0, 8.0, 9.0}, {9.0, 12.0, 11.0, 7.0, 2.0, 0.0});
  const auto elliptic = [](ScatterFamily f) {
    return [f](const Vec2& m, double rot, const Vec2& t) {
      return Gaussian::from_axes(moved(m, rot, t), 1.7, 0.6, 25.0 + rot).with_family(f);
    };
  };
  return {
      {"normal", elliptic(ScatterFamily::normal())},
      {"student_t nu = 3", elliptic(ScatterFamily::student_t(3.0))},
      {"uniform", elliptic(ScatterFamily::uniform())},
      {"profile with wind",
       [leg](const Vec2& m, double rot, const Vec2& t) {
         return profile_spread(moved(m, rot, t), leg, ProfileWind{1.3, 0.0, 40.0 + rot});
       }},
      {"part-circle profile with wind",
       [leg](const Vec2& m, double rot, const Vec2& t) {
         return profile_spread(moved(m, rot, t), leg, ProfileWind{1.2, 0.0, 10.0 + rot}, ProfileArc{30.0 + rot, 250.0 + rot});
       }},
  };
}

}  // namespace

TEST_CASE("four quadrants around any point partition the plane under every family", "[property][family]") {
  std::mt19937_64 rng(20261203);
  const auto uniform = [&rng](double a, double b) { return std::uniform_real_distribution<double>(a, b)(rng); };
  for (const Member& m : members()) {
    for (int i = 0; i < 12; ++i) {
      const Gaussian g = m.make({uniform(-2, 2), uniform(-2, 2)}, 0.0, {0.0, 0.0});
      const Vec2 c(uniform(-4, 4), uniform(-4, 4));
      const Mat2 R = rotation(uniform(0, 2 * kPi));
      const double far = 1e5;
      double total = 0, err = 0;
      for (int k = 0; k < 4; ++k) {
        const Estimate e = integrate(g, transformed(rectangle({0, 0}, {far, far}), R * rotation(k * kPi / 2), c));
        total += e.p;
        err += e.abs_err;
      }
      // The mass beyond the quadrants' reach (the t's tail), bounded by the family's survival.
      const double beyond = g.family().survival((far - (c - g.mean()).norm()) / 10.0);
      // Separately rounded rotations leave slivers of a few ulps of `far` along the shared edges.
      const double sliver = 4 * 4e-16 * far * 4 * g.peak_density();
      INFO(m.name << " case " << i << std::setprecision(17) << " total " << total << " err " << err);
      CHECK(std::fabs(total - 1.0) <= err + beyond + sliver + 1e-13);
    }
  }
}

TEST_CASE("rigid motions of spread and zone together leave p unchanged under every family", "[property][family]") {
  std::mt19937_64 rng(20261204);
  const auto uniform = [&rng](double a, double b) { return std::uniform_real_distribution<double>(a, b)(rng); };
  for (const Member& m : members()) {
    for (int i = 0; i < 12; ++i) {
      const Vec2 mean(uniform(-2, 2), uniform(-2, 2));
      const double rot = uniform(0, 360);
      const Vec2 t(uniform(-100, 100), uniform(-100, 100));
      std::vector<Vec2> pts;
      const Vec2 centre(uniform(-4, 4), uniform(-4, 4));
      for (int k = 0; k < 7; ++k) {
        const double a = 2 * kPi * k / 7 + uniform(0, 0.5), r = uniform(0.8, 3.0);
        pts.push_back(centre + r * Vec2(std::cos(a), std::sin(a)));
      }
      std::vector<Vec2> moved_pts;
      for (const Vec2& p : pts) moved_pts.push_back(moved(p, rot, t));
      const Estimate a = integrate(m.make(mean, 0.0, {0, 0}), polygon(pts));
      const Estimate b = integrate(m.make(mean, rot, t), polygon(moved_pts));
      const double displacement = 4e-16 * (t.norm() + 10.0) * 40.0 * m.make(mean, 0.0, {0, 0}).peak_density();
      INFO(m.name << " case " << i << std::setprecision(17) << " p " << a.p << " +- " << a.abs_err << " moved " << b.p
                  << " +- " << b.abs_err);
      CHECK(std::fabs(a.p - b.p) <= a.abs_err + b.abs_err + 1e-14 * std::max(a.p, b.p) + displacement);
    }
  }
}

TEST_CASE("exact and cubature agree within their bounds on random uniforms and profiles, with arcs, near and far",
          "[exact][cubature][family][profile][arc]") {
  // Common practice: two independent methods (a boundary form and an iterated rule over the
  // density) must agree within the sum of their bounds. Uniforms, profiles ending at 0 or
  // stepping down, part circles, wind; polygons (the head on a vertex in a fifth) and disks;
  // at the origin and at national-grid coordinates. This comparison found an arc's farthest
  // distance understated (1.1e-10 off, bound 6e-15) and cubature's rule straddling a part
  // circle's jumps (2.2e-7 off, estimate 1.4e-10).
  // STREWN_FAMILY_SEED and STREWN_FAMILY_TRIALS run other seeds and counts by hand (the ctest
  // runs seed 1, 400 trials); STREWN_FAMILY_LIST=1 prints every case's figures.
  const auto env = [](const char* name, long fallback) {
    const char* v = std::getenv(name);
    return v ? std::atol(v) : fallback;
  };
  const long seed = env("STREWN_FAMILY_SEED", 1), trials = env("STREWN_FAMILY_TRIALS", 400);
  const bool list = env("STREWN_FAMILY_LIST", 0) != 0;
  std::mt19937_64 rng(static_cast<std::uint64_t>(seed));
  std::uniform_real_distribution<double> u(0.0, 1.0);
  int compared = 0;
  for (int trial = 0; trial < trials; ++trial) {
    const double scale = std::pow(10.0, -2 + 4 * u(rng));
    const Vec2 at = (trial / 4) % 2 ? Vec2(5e5 + 1e4 * u(rng), 5e6 + 1e4 * u(rng)) : Vec2(u(rng), u(rng));
    const int kind = trial % 4;
    std::optional<Gaussian> g;
    if (kind == 0) {
      g = Gaussian::from_axes(at, scale * (0.5 + u(rng)), scale * (0.2 + 0.3 * u(rng)), 180 * u(rng))
              .with_family(ScatterFamily::uniform());
    } else {
      const RadialProfile leg({0.0, 2.0 * scale, 4.0 * scale, 6.0 * scale}, {5.0, 7.0, 4.0, kind == 1 ? 0.0 : 2.0});
      std::optional<ProfileArc> arc;
      if (kind >= 2) {
        const double from = 360 * u(rng);
        arc = ProfileArc{from, from + 30 + 300 * u(rng)};
      }
      const double stretch = 1.0 + 0.5 * u(rng), shift = scale * u(rng), downwind = 360 * u(rng);
      g = profile_spread(at, leg, ProfileWind{stretch, shift, downwind}, arc);
    }
    std::vector<Vec2> pts;
    const int n = 3 + trial % 6;
    const Vec2 c = at + scale * Vec2(-6 + 12 * u(rng), -6 + 12 * u(rng));
    for (int i = 0; i < n; ++i) {
      const double a = 2 * kPi * i / n, r = scale * (0.5 + 3 * u(rng));
      pts.emplace_back(c.x() + r * std::cos(a), c.y() + r * std::sin(a));
    }
    if (trial % 5 == 0) pts[0] = at;
    Region zone;
    try {
      zone = trial % 7 == 0 ? disk(c, scale * 2.0) : polygon(pts);
    } catch (const input_error&) {
      continue;  // the head on a vertex can fold a polygon, which polygon() refuses
    }
    IntegrateOptions o;
    o.rel_tolerance = 1e-9;
    const Estimate exact = integrate(*g, zone, o);
    o.method = Method::cubature;
    o.rel_tolerance = 1e-8;
    const Estimate cub = integrate(*g, zone, o);
    const char* family = kind == 0   ? "uniform"
                         : kind == 1 ? "profile to 0"
                         : kind == 2 ? "part circle to 0"
                                     : "part circle stepping";
    const char* shape = trial % 7 == 0 ? "disk" : "polygon";
    const char* placement = (trial / 4) % 2 ? "far" : "near";
    const double off = std::fabs(exact.p - cub.p);
    if (list)
      std::cout << std::setprecision(17) << "seed " << seed << " trial " << trial << " " << family << " " << shape << " "
                << (trial % 7 == 0 ? 0 : n) << (trial % 5 == 0 && trial % 7 ? " head on vertex" : "") << " " << placement
                << " scale " << scale << " p " << exact.p << " exact_err " << exact.abs_err << " off " << off
                << " cub_err " << cub.abs_err << " evals " << cub.evaluations << " ratio " << off / cub.abs_err << "\n";
    INFO("seed " << seed << " trial " << trial << " (" << family << ", " << shape << ", " << placement << ")"
                 << std::setprecision(17) << ": exact " << exact.p << " +- " << exact.abs_err << ", cubature " << cub.p
                 << " +- " << cub.abs_err);
    CHECK(off <= exact.abs_err + cub.abs_err + 1e-15);
    ++compared;
  }
  CHECK(compared >= trials * 7 / 8);
}

TEST_CASE("cubature's estimate covers the kinks its rule could straddle: jumps across a box's side, a profile's cone",
          "[cubature][family][profile][arc]") {
  // Cases of the comparison above under other seeds (STREWN_FAMILY_SEED), where cubature's
  // reported error fell short of its true error, with their causes. References: 30-digit mpmath
  // (the uniform: the area of the whitened polygon inside the disk of radius 2, segment by
  // segment; the profiles: the boundary form, G(rho) dtheta / (2 pi) along each edge's part in
  // the wedge, by tanh-sinh between the rows' crossings), which the exact method matches within
  // its bound on each (tests/reference/cubature_kink_references.py, run by hand).
  struct Case {
    const char* what;
    std::function<Gaussian()> spread;
    std::vector<Vec2> pts;
    double reference;
    double before_off, before_estimate;  // on 2026-12-04, before the cuts (for the record)
  };
  const auto leg = [](double scale, double last) {
    return RadialProfile({0.0, 2.0 * scale, 4.0 * scale, 6.0 * scale}, {5.0, 7.0, 4.0, last});
  };
  const std::vector<Case> cases = {
      {"uniform at national-grid coordinates: a cap of its disk reaching into a box through its side (seed 2, "
       "trial 1604)",
       [] {
         Mat2 c;
         c << 2.5636801013835817e-05, -6.5424715381497236e-06, -6.5424715381497236e-06, 0.00020063691353184389;
         return Gaussian::from_covariance({508747.09962773439, 5000992.2042788556}, c)
             .with_family(ScatterFamily::uniform());
       },
       {{508747.12329856644, 5000992.1741277669},
        {508747.11600643548, 5000992.2380118687},
        {508747.06859813846, 5000992.1934909206},
        {508747.08208924654, 5000992.1645664778},
        {508747.10915155348, 5000992.1313408231}},
       0.85654683542678865505, 3.9e-7, 5.7e-8},
      {"uniform with the mean on a vertex: its disk's edge across a box's side (seed 2, trial 1640)",
       [] {
         Mat2 c;
         c << 4.9699435683607547, -6.3410983690021823, -6.3410983690021823, 10.110384847046252;
         return Gaussian::from_covariance({0.13227533205225683, 0.18646817217470885}, c)
             .with_family(ScatterFamily::uniform());
       },
       {{0.13227533205225683, 0.18646817217470885},
        {-8.9658540464926162, 13.296664186099054},
        {-17.374136825374674, 10.521574737600655},
        {-18.385696471394638, 0.96209425359499523},
        {-8.9522338955207132, -1.1199726068759244}},
       0.22315629352579404911, 6.9e-10, 4.5e-11},
      {"profile over a hexagon about its mean: the cone at the mean between the outer rule's nodes (seed 8, "
       "trial 369)",
       [&leg] {
         return profile_spread({0.61684441721043526, 0.13048358788214401}, leg(3.9896748607372898, 0.0),
                               ProfileWind{1.1552597604912922, 2.2726213254197307, 112.8727251274143});
       },
       {{14.261154232367293, 5.1828739372185142},
        {4.003327046173613, 10.31459956940764},
        {-1.8523207346081199, 10.193427772571294},
        {-1.6158805148713906, 5.1828739372185142},
        {-4.5557087020496105, -4.5100852103132683},
        {5.4340049280240228, -2.4268584756005458}},
       0.13572894526944901829, 4.0e-10, 1.3e-10},
      {"part circle whose head is 1e-3 from the cones' apex: every ray passes close to the cone at the mean (seed 11, "
       "trial 1835)",
       [&leg] {
         return profile_spread({0.66339233856543911, 0.41838798635898344}, leg(0.025426184675330313, 2.0),
                               ProfileWind{1.4371880456045074, 0.00020888639720138781, 234.41576835386721},
                               ProfileArc{44.905389949394632, 323.95518127813233});
       },
       {{0.66339233856543911, 0.41838798635898344},
        {0.63934579471698882, 0.33082441233475779},
        {0.59805383809146551, 0.32872574759484258},
        {0.56185034241998566, 0.32573595138071432},
        {0.56234069720785773, 0.28953245570923447},
        {0.54255635149866432, 0.23403496911643326},
        {0.59805383809146551, 0.26333064705597897},
        {0.65362202673075831, 0.23396426706994164}},
       0.11026450158369106845, 8.8e-12, 2.9e-12},
  };
  for (const Case& c : cases) {
    const Gaussian g = c.spread();
    const Region zone = polygon(c.pts);
    IntegrateOptions o;
    o.rel_tolerance = 1e-9;
    const Estimate exact = integrate(g, zone, o);
    o.method = Method::cubature;
    o.rel_tolerance = 1e-8;
    const Estimate cub = integrate(g, zone, o);
    INFO(c.what << std::setprecision(17) << ": mpmath " << c.reference << ", exact " << exact.p << " +- "
                << exact.abs_err << ", cubature " << cub.p << " +- " << cub.abs_err << " (before the cuts: "
                << c.before_off << " off, estimate " << c.before_estimate << ")");
    CHECK(std::fabs(exact.p - c.reference) <= exact.abs_err);  // the reference is the right one
    CHECK(std::fabs(cub.p - c.reference) <= cub.abs_err);
  }
}

TEST_CASE("the exact bound holds with the mean a hair from a vertex, under every family", "[property][family]") {
  // Next to a mean almost on a vertex the two edges that meet there each place the vertex on
  // their own line: before each edge's line was taken from its ends themselves and integrated
  // from its nearer end, the t, the uniform and the profiles came out about eps |z| / d off
  // (4e-10 at d = 1e-8 sigma) under bounds of 5e-15, and the uniform's quadrature missed a layer
  // of width d (4.7e-9 off at d = 1e-7 under 5e-13). Two checks, common practice:
  // (1) p is a smooth function of the mean's position, so (p(d) - p(0)) / d is the same at
  //     d = 1e-9, 1e-7 and 1e-5 (to the bounds over d, and the curvature's O(d));
  // (2) two methods that share nothing (the boundary form and cubature of the density) agree
  //     within their two bounds (under the part circle cubature fanned its cones from the
  //     vertex next to the wedge's apex and came out 1.5e-12 off at d = 1e-9, estimate 6e-14).
  const std::vector<Vec2> ring = {{3.1, 0.4}, {2.0, 2.6}, {-0.3, 3.2}, {-2.4, 1.9},
                                  {-2.9, -0.6}, {-1.2, -2.7}, {1.1, -2.9}, {2.8, -1.6}};
  const Region zone = polygon(ring);
  for (const Member& m : members()) {
    for (const double bearing : {20.0, 200.0}) {  // just inside and just outside
      const auto at = [&](double d) {
        const Vec2 mean = ring[0] + d * Vec2(std::cos(bearing * kPi / 180.0), std::sin(bearing * kPi / 180.0));
        IntegrateOptions o;
        o.rel_tolerance = 1e-11;
        return integrate(m.make(mean, 0.0, Vec2::Zero()), zone, o);
      };
      const Estimate at0 = at(0.0), far = at(1e-5);
      const double slope = (far.p - at0.p) / 1e-5;
      for (const double d : {1e-9, 1e-7, 1e-5}) {
        const Vec2 mean = ring[0] + d * Vec2(std::cos(bearing * kPi / 180.0), std::sin(bearing * kPi / 180.0));
        const Gaussian g = m.make(mean, 0.0, Vec2::Zero());
        const Estimate exact = at(d);
        INFO(m.name << ", d " << d << ", bearing " << bearing << std::setprecision(17) << ": exact " << exact.p
                    << " +- " << exact.abs_err << ", at 0 " << at0.p << ", slope at 1e-5 " << slope);
        CHECK(std::fabs((exact.p - at0.p) / d - slope) <=
              (exact.abs_err + at0.abs_err) / d + (far.abs_err + at0.abs_err) / 1e-5 + 1e-3 * std::fabs(slope) + 1e-9);
        IntegrateOptions o;
        o.method = Method::cubature;
        o.rel_tolerance = 1e-10;
        const Estimate cub = integrate(g, zone, o);
        INFO("cubature " << cub.p << " +- " << cub.abs_err);
        CHECK(std::fabs(exact.p - cub.p) <= exact.abs_err + cub.abs_err + 1e-16);
      }
    }
  }
}
