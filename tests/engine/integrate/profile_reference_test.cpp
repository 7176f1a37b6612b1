// The profile family (a measured radial rate, strewn/profile_spread.hpp) in every method, against
// references from outside the engine: elementary geometry (a constant rate over a zone inside the
// wetted disk gives rate x area / volume), the cone's closed form over a centred disk, and
// 20-digit mpmath quadrature in polar coordinates (tests/data/profile_references.csv, written by
// tests/reference/make_profile_references.py at test-writing time: it takes minutes, too long
// for every run; the script states its source and reruns to the same digits).
#include <catch2/catch.hpp>
#include <cmath>
#include <iomanip>
#include <sstream>

#include "strewn/constants.hpp"
#include "strewn/integrate.hpp"
#include "strewn/profile_spread.hpp"
#include "strewn/region_builders.hpp"
#include "test_support.hpp"

using namespace strewn;
using namespace strewn::test;

namespace {

IntegrateOptions with(Method m, double rel) {
  IntegrateOptions o;
  o.method = m;
  o.rel_tolerance = rel;
  return o;
}

std::vector<double> numbers(const std::string& s) {
  std::stringstream in(s);
  std::vector<double> v;
  double x;
  while (in >> x) v.push_back(x);
  return v;
}

struct Case {
  std::string name;
  Gaussian g = Gaussian::from_axes({0, 0}, 1, 1, 0);
  Region zone;
  double p = 0.0;
};

std::vector<Case> load_cases() {
  std::vector<Case> cases;
  for (const std::vector<std::string>& f : reference_rows(STREWN_TEST_DATA_DIR "/profile_references.csv")) {
    REQUIRE(f.size() == 8);
    Case c;
    c.name = f[0];
    const std::vector<double> rows = numbers(f[2]), head = numbers(f[3]), wind = numbers(f[4]), pts = numbers(f[6]);
    std::vector<double> d, v;
    for (std::size_t i = 0; i + 1 < rows.size(); i += 2) {
      d.push_back(rows[i]);
      v.push_back(rows[i + 1]);
    }
    std::optional<ProfileArc> arc;
    if (f[5] != "none") {
      const std::vector<double> a = numbers(f[5]);
      arc = ProfileArc{a[0], a[1]};
    }
    c.g = profile_spread({head[0], head[1]}, RadialProfile(d, v), ProfileWind{wind[0], wind[1], wind[2]}, arc);
    std::vector<Vec2> poly;
    for (std::size_t i = 0; i + 1 < pts.size(); i += 2) poly.emplace_back(pts[i], pts[i + 1]);
    c.zone = polygon(poly);
    c.p = reference_number(f[7]);
    cases.push_back(c);
  }
  REQUIRE(cases.size() == 11);
  return cases;
}

}  // namespace

TEST_CASE("a constant profile gives rate x area / volume for zones inside the wetted disk, in every method",
          "[profile][exact][cubature]") {
  // Source: elementary geometry. A rate c to radius R puts c pi R^2 over the disk, so a zone
  // inside it of area A (shoelace formula) gets A / (pi R^2); a stretch s of the wind makes the
  // wetted disk an ellipse of area pi R^2 s. (A constant profile ends with a step, so cubature,
  // which needs a continuous density, is not asked; Monte Carlo is, below.)
  const RadialProfile flat({0.0, 6.0}, {4.0, 4.0});
  const std::vector<Vec2> tri = {{-1.0, -2.0}, {3.5, 0.5}, {0.0, 3.0}};
  const double tri_area = 0.5 * std::fabs((tri[1] - tri[0]).x() * (tri[2] - tri[0]).y() - (tri[1] - tri[0]).y() * (tri[2] - tri[0]).x());
  for (const ProfileWind& wind : {ProfileWind{}, ProfileWind{1.4, 0.3, 70.0}, ProfileWind{0.9, 0.2, 190.0}}) {
    const Gaussian g = profile_spread({0.2, -0.1}, flat, wind);
    const double wetted = kPi * 36.0 * wind.stretch;
    INFO("stretch " << wind.stretch);
    const Estimate e = integrate(g, polygon(tri), with(Method::exact, 1e-10));
    CHECK(e.converged);
    CHECK(std::fabs(e.p - tri_area / wetted) <= e.abs_err + 1e-12 * tri_area / wetted);
    // A disk of radius 1 inside the wetted area, off the centre.
    const Estimate d = integrate(g, disk({1.5, 1.0}, 1.0), with(Method::exact, 1e-10));
    CHECK(std::fabs(d.p - kPi / wetted) <= d.abs_err + 1e-10 * kPi / wetted);
    const Estimate m = integrate(g, polygon(tri), with(Method::monte_carlo, 1e-3));
    CHECK(std::fabs(m.p - tri_area / wetted) <= m.abs_err);
  }
}

TEST_CASE("a linear (cone) profile over a centred disk meets its closed form in every method", "[profile][exact][cubature]") {
  // Source: v(r) = 1 - r/R integrates to V(a) = 2 pi (a^2/2 - a^3/(3R)), V(R) = pi R^2 / 3, so
  // P(|x| <= a) = 3 (a/R)^2 - 2 (a/R)^3 (elementary calculus).
  const RadialProfile cone({0.0, 10.0}, {1.0, 0.0});
  const Gaussian g = profile_spread({3.0, -2.0}, cone);
  for (double a : {0.01, 1.0, 2.5, 5.0, 9.0, 9.5}) {
    const double x = a / 10.0, closed = 3 * x * x - 2 * x * x * x;
    INFO("a = " << a);
    for (Method m : {Method::exact, Method::cubature}) {
      const Estimate e = integrate(g, disk({3.0, -2.0}, a), with(m, 1e-10));
      INFO(to_string(m) << std::setprecision(17) << " p = " << e.p << " +- " << e.abs_err << " closed " << closed);
      CHECK(e.converged);
      CHECK(std::fabs(e.p - closed) <= e.abs_err + 1e-12 * closed);
      CHECK(std::fabs(e.p - closed) <= 1e-9 * closed);
    }
  }
}

TEST_CASE("profiles with wind and arcs meet the mpmath polar quadrature within the bound", "[profile][exact][reference]") {
  for (const Case& c : load_cases()) {
    INFO(c.name << " (polar_quadrature, make_profile_references.py)");
    const Estimate e = integrate(c.g, c.zone, with(Method::exact, 1e-10));
    INFO(std::setprecision(17) << "exact p = " << e.p << " +- " << e.abs_err << ", reference " << c.p);
    CHECK(e.converged);
    CHECK(std::fabs(e.p - c.p) <= e.abs_err + 1e-15);
    CHECK(std::fabs(e.p - c.p) <= 1e-9 * c.p);
  }
}

TEST_CASE("straight edges in closed form meet mpmath's polar integral where they pass the head, graze a row or cross steep pieces",
          "[profile][exact][reference]") {
  // Source: tests/reference/make_profile_edge_references.py, run at test time (30-digit
  // mpmath.quad over the angle, the radial integral of the piecewise linear rate done exactly),
  // never the engine. These edges go through the closed form of family_segment.cpp (or its
  // quadrature fallback where the closed form would cancel); the bound must hold either way.
  // Cubature, a separate path, is held to the same references where it applies (a continuous
  // rate: not the steep profile's nor the step's).
  const auto rows = reference_rows(STREWN_TEST_BINARY_DIR "/profile_edge_references.csv");
  REQUIRE(rows.size() == 10);
  for (const std::vector<std::string>& f : rows) {
    REQUIRE(f.size() == 7);
    const std::vector<double> table = numbers(f[2]), head = numbers(f[3]), wind = numbers(f[4]), pts = numbers(f[5]);
    std::vector<double> d, v;
    for (std::size_t i = 0; i + 1 < table.size(); i += 2) {
      d.push_back(table[i]);
      v.push_back(table[i + 1]);
    }
    const Gaussian g = profile_spread({head[0], head[1]}, RadialProfile(d, v), ProfileWind{wind[0], wind[1], wind[2]});
    std::vector<Vec2> poly;
    for (std::size_t i = 0; i + 1 < pts.size(); i += 2) poly.emplace_back(pts[i], pts[i + 1]);
    const double p = reference_number(f[6]);
    INFO(f[0] << " (" << f[1] << ", make_profile_edge_references.py)");
    for (double rel : {1e-10, 1e-6}) {
      const Estimate e = integrate(g, polygon(poly), with(Method::exact, rel));
      INFO(std::setprecision(17) << "rel " << rel << ": exact p = " << e.p << " +- " << e.abs_err << ", reference " << p);
      CHECK(e.converged);
      CHECK(std::fabs(e.p - p) <= e.abs_err + 1e-15 * p);
      CHECK(e.abs_err <= rel * p);
    }
    if (v.back() == 0.0 && f[0].rfind("steep", 0) != 0) {
      const Estimate cub = integrate(g, polygon(poly), with(Method::cubature, 1e-8));
      INFO(std::setprecision(17) << "cubature p = " << cub.p << " +- " << cub.abs_err);
      CHECK(std::fabs(cub.p - p) <= cub.abs_err + 1e-15);
    }
  }
}

TEST_CASE("cubature and Monte Carlo meet the same references", "[profile][cubature][monte_carlo]") {
  for (const Case& c : load_cases()) {
    INFO(c.name);
    {  // part circles too: cubature cuts its rays at the wedge's rays
      const Estimate cub = integrate(c.g, c.zone, with(Method::cubature, 1e-8));
      INFO(std::setprecision(17) << "cubature p = " << cub.p << " +- " << cub.abs_err << ", reference " << c.p);
      CHECK(cub.converged);
      CHECK(std::fabs(cub.p - c.p) <= cub.abs_err + 1e-15);
    }
    IntegrateOptions mc = with(Method::monte_carlo, 1e-3);
    mc.samples = 200000;
    const Estimate m = integrate(c.g, c.zone, mc);
    CHECK(std::fabs(m.p - c.p) <= m.abs_err);
  }
}

TEST_CASE("a constant part-circle profile gives area share in every method, the head on a vertex, an edge or inside",
          "[profile][arc][cubature]") {
  // Elementary geometry: a constant rate to R = 10 m on the quarter circle 0-90 degrees (no
  // wind) puts area(zone & quarter) / (pi R^2 / 4) in a zone within the wetted disk. Squares of
  // side 3 with the head on their corner, on their lower edge, and at their centre each meet the
  // quarter in a 3 x 3, 3 x 3 and 1.5 x 1.5 square. The rate steps from 3 to 0 at R, so the
  // density jumps there and along the wedge's rays: cubature cuts its rays at both.
  const RadialProfile flat({0.0, 10.0}, {3.0, 3.0});
  for (const Vec2& at : {Vec2(0.0, 0.0), Vec2(5e5, 5e6)}) {
    const Gaussian g = profile_spread(at, flat, ProfileWind{1.0, 0.0, 0.0}, ProfileArc{0.0, 90.0});
    const std::pair<Region, double> cases[] = {
        {polygon({at, at + Vec2(3, 0), at + Vec2(3, 3), at + Vec2(0, 3)}), 9.0},
        {polygon({at + Vec2(-3, 0), at + Vec2(3, 0), at + Vec2(3, 3), at + Vec2(-3, 3)}), 9.0},
        {polygon({at + Vec2(-1.5, -1.5), at + Vec2(1.5, -1.5), at + Vec2(1.5, 1.5), at + Vec2(-1.5, 1.5)}), 2.25},
        // Arcs, whose ends are rounded in site coordinates: a disk inside the quarter, and a ring
        // sector about the head from 10 to 80 degrees, radii 2 to 6 (area 70/360 pi (36 - 4)).
        {disk(at + Vec2(4.0, 4.0), 2.0), 4.0 * kPi},
        // A disk cut in half by the wedge's first ray: cubature's cones from its centre change
        // from all inside to all outside at two parameters of the arc, cut there.
        {disk(at + Vec2(4.0, 0.0), 2.0), 2.0 * kPi},
        {ring_sector(at, 2.0, 6.0, 10.0 * kPi / 180.0, 80.0 * kPi / 180.0), 70.0 / 360.0 * kPi * 32.0}};
    for (const auto& [zone, area] : cases) {
      const double share = area / (kPi * 100.0 / 4.0);
      for (Method m : {Method::exact, Method::cubature}) {
        const Estimate e = integrate(g, zone, with(m, 1e-9));
        INFO("at " << at.x() << ", method " << static_cast<int>(m) << std::setprecision(17) << ": p = " << e.p << " +- "
                   << e.abs_err << ", share " << share);
        CHECK(std::fabs(e.p - share) <= e.abs_err + 1e-15);
        // Far from the origin the input's rounding (an ulp of 5e6 m, 1e-9 m) is in the bound.
        CHECK(std::fabs(e.p - share) <= (at.norm() == 0.0 ? 1e-9 : 1e-7) * share);
      }
    }
  }
}

TEST_CASE("a whole-circle arc and no arc agree; wedges that tile the circle sum to the whole", "[profile][arc]") {
  // Source: additivity of the integral over the wedges' disjoint union (each wedge is
  // renormalised by its share, so share-weighted sums give the whole-circle value).
  const RadialProfile leg({0.5, 2.0, 4.0, 6.0, 8.0}, {9.0, 12.0, 11.0, 7.0, 0.0});
  const Region zone = polygon({{-3.0, -1.0}, {4.0, -2.0}, {5.0, 3.0}, {-1.0, 4.0}});
  const ProfileWind wind{1.2, 0.4, 35.0};
  const Estimate whole = integrate(profile_spread({0.3, 0.2}, leg, wind), zone, with(Method::exact, 1e-11));
  double sum = 0.0, err = 0.0;
  const double cuts[] = {10.0, 100.0, 215.0, 250.0, 370.0};
  for (int k = 0; k + 1 < 5; ++k) {
    const Gaussian g = profile_spread({0.3, 0.2}, leg, wind, ProfileArc{cuts[k], cuts[k + 1]});
    // The share of each wedge: its angle in the calm frame, which the wind's map carries.
    const double share = (cuts[k + 1] - cuts[k]) / 360.0;
    const Estimate e = integrate(g, zone, with(Method::exact, 1e-11));
    sum += share * e.p;
    err += share * e.abs_err;
  }
  INFO(std::setprecision(17) << sum << " vs " << whole.p);
  CHECK(std::fabs(sum - whole.p) <= err + whole.abs_err + 1e-14);
}
