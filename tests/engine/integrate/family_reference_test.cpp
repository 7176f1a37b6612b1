// The Student-t and uniform families in every method, against references from outside the
// engine: closed forms (CHECKS.md, "Elliptical families"), exact areas, and 30-digit mpmath
// quadrature computed at test time (reference/make_family_references.py names the source of
// every case: the t's conditional decomposition, and areas of intersection for the uniform).
#include <catch2/catch.hpp>
#include <cmath>
#include <iomanip>
#include <cstdlib>
#include <fstream>
#include <sstream>

#include "strewn/error.hpp"
#include "strewn/integrate.hpp"
#include "strewn/scatter_family.hpp"
#include "test_support.hpp"

using namespace strewn;
using namespace strewn::test;

namespace {

struct Case {
  std::string name, source, family, shape;
  double nu = 0.0;
  Vec2 mean;
  Mat2 cov;
  std::vector<double> numbers;
  double p = 0.0, q = 0.0;
};

const auto to_double = reference_number;

std::vector<Case> load_cases() {
  std::vector<Case> cases;
  for (const std::vector<std::string>& f : reference_rows(STREWN_TEST_BINARY_DIR "/family_references.csv")) {
    REQUIRE(f.size() == 13);
    Case c;
    c.name = f[0];
    c.source = f[1];
    c.family = f[2];
    c.nu = to_double(f[3]);
    c.mean = Vec2(to_double(f[4]), to_double(f[5]));
    c.cov << to_double(f[6]), to_double(f[7]), to_double(f[7]), to_double(f[8]);
    c.shape = f[9];
    std::stringstream nums(f[10]);
    double v;
    while (nums >> v) c.numbers.push_back(v);
    c.p = to_double(f[11]);
    c.q = to_double(f[12]);
    cases.push_back(c);
  }
  REQUIRE(cases.size() == 40);
  return cases;
}

Region region_of(const Case& c) {
  if (c.shape == "disk") return disk({c.numbers[0], c.numbers[1]}, c.numbers[2]);
  std::vector<Vec2> pts;
  for (std::size_t i = 0; i + 1 < c.numbers.size(); i += 2) pts.emplace_back(c.numbers[i], c.numbers[i + 1]);
  return polygon(pts);
}

Gaussian component_of(const Case& c) {
  return Gaussian::from_covariance(c.mean, c.cov).with_family(ScatterFamily::from_name(c.family, c.nu));
}

IntegrateOptions with(Method m, double rel) {
  IntegrateOptions o;
  o.method = m;
  o.rel_tolerance = rel;
  return o;
}

}  // namespace

TEST_CASE("exact under the t and uniform families meets the mpmath references within its bound and 1e-9 relative",
          "[exact][family][reference]") {
  for (const Case& c : load_cases()) {
    INFO(c.name << " (" << c.source << ")");
    const Estimate e = integrate(component_of(c), region_of(c), with(Method::exact, 1e-10));
    CHECK(e.converged);
    // The bound covers the true error ...
    CHECK(std::fabs(e.p - c.p) <= e.p_abs_err() + 1e-300);
    CHECK(std::fabs(e.q - c.q) <= e.q_abs_err());
    // ... and the request is met, relative to the smaller of p and q.
    CHECK(std::fabs(e.p - c.p) <= 1e-9 * std::min(c.p, c.q) + 1e-15);
  }
}

TEST_CASE("exact under the t family at the default tolerance stays within 1e-8 relative", "[exact][family][reference]") {
  for (const Case& c : load_cases()) {
    if (c.family != "student_t") continue;
    INFO(c.name);
    const Estimate e = integrate(component_of(c), region_of(c), with(Method::exact, 1e-8));
    CHECK(std::fabs(e.p - c.p) <= e.p_abs_err());
    CHECK(std::fabs(e.p - c.p) <= 1e-8 * std::min(c.p, c.q) + 1e-15);
  }
}

TEST_CASE("exact under the t family over rectangles meets the mpmath references to 1e-12 relative down to p = 1e-13",
          "[exact][family][reference]") {
  // make_family_references.py, "Student-t over rectangles": 30-digit mpmath quadrature of the
  // t's conditional form at test time, nu = 1, 2.5, 4, 6.5 and 30, p from 0.1 to 5e-14.
  int checked = 0;
  for (const Case& c : load_cases()) {
    if (c.name.rfind("t_rectangle_", 0) != 0) continue;
    INFO(c.name << ", nu = " << c.nu << ", p = " << c.p);
    const Estimate e = integrate(component_of(c), region_of(c), with(Method::exact, 1e-12));
    CHECK(e.converged);
    CHECK(std::fabs(e.p - c.p) <= e.p_abs_err());
    CHECK(std::fabs(e.p - c.p) <= 1e-12 * std::min(c.p, c.q));
    ++checked;
  }
  CHECK(checked == 6);
}

TEST_CASE("cubature under the t family meets the mpmath references within its error estimate",
          "[cubature][family][reference]") {
  for (const Case& c : load_cases()) {
    if (c.family != "student_t" || c.p < 1e-12) continue;
    INFO(c.name);
    const Estimate e = integrate(component_of(c), region_of(c), with(Method::cubature, 1e-8));
    CHECK(e.converged);
    CHECK(std::fabs(e.p - c.p) <= e.abs_err);
  }
}

TEST_CASE("cubature under the uniform family meets the areas of intersection within its error estimate",
          "[cubature][family][reference]") {
  // make_family_references.py, "uniform_area": area(region & support disk) / (4 pi), computed
  // by mpmath over strips cut where an edge crosses the circle. The uniform's density jumps at
  // the circle, so cubature cuts its rays there (cubature_integrator.cpp).
  int checked = 0;
  for (const Case& c : load_cases()) {
    if (c.family != "uniform") continue;
    INFO(c.name << ", p = " << c.p);
    const Estimate e = integrate(component_of(c), region_of(c), with(Method::cubature, 1e-8));
    INFO(std::setprecision(17) << "cubature p = " << e.p << " +- " << e.abs_err);
    CHECK(e.converged);
    CHECK(std::fabs(e.p - c.p) <= e.abs_err);
    CHECK(std::fabs(e.p - c.p) <= 1e-7 * std::max(c.p, 1e-12));
    ++checked;
  }
  CHECK(checked >= 4);
}

TEST_CASE("cubature under the uniform: a disk straddling the support's edge gets its lens area", "[cubature][family]") {
  // Elementary geometry (the circle-circle lens): whitened support disk radius R = 2, a zone disk
  // of radius r at distance d: area = r^2 acos((d^2 + r^2 - R^2) / (2 d r))
  //   + R^2 acos((d^2 + R^2 - r^2) / (2 d R)) - sqrt((-d + r + R)(d + r - R)(d - r + R)(d + r + R)) / 2,
  // and P = area / (4 pi) under the unit circular uniform.
  const Gaussian u = Gaussian::from_axes({0, 0}, 1.0, 1.0, 0.0).with_family(ScatterFamily::uniform());
  const double R = 2.0;
  for (double d : {0.5, 1.5, 2.0, 2.9})
    for (double r : {1.0, 1.7}) {
      if (d + r <= R || d >= R + r) continue;
      const double area = r * r * std::acos((d * d + r * r - R * R) / (2 * d * r)) +
                          R * R * std::acos((d * d + R * R - r * r) / (2 * d * R)) -
                          0.5 * std::sqrt((-d + r + R) * (d + r - R) * (d - r + R) * (d + r + R));
      const double p = area / (4 * kPi);
      const Estimate e = integrate(u, disk({d, 0.0}, r), with(Method::cubature, 1e-9));
      INFO("d " << d << " r " << r << std::setprecision(17) << " p " << e.p << " +- " << e.abs_err << " ref " << p);
      CHECK(e.converged);
      CHECK(std::fabs(e.p - p) <= e.abs_err + 1e-15);
      CHECK(std::fabs(e.p - p) <= 1e-8 * p);
    }
}

TEST_CASE("cubature under the uniform: a disk or ellipse centred on the support's edge", "[cubature][family]") {
  // Fanned from its centre on the circle where the density jumps, a zone's rays turn tangent to
  // the circle at their own start, a double root that no sign change brackets: the kink lay
  // inside a box (an adversarial trial: 1.1205e-4 +- 5e-16 "converged" for 1.1214e-4; the
  // ellipse below 6.7e-6 off with a bound of 2.4e-15). References: the circle-circle lens area
  // (elementary geometry, as above) for the disks; for the ellipse, the exact method (its
  // value 0.005611842430082621 met mpmath's area of intersection, 0.005611842430082614, split
  // at the kinks, 30 digits).
  const Gaussian u = Gaussian::from_axes({0, 0}, 1.0, 1.0, 0.0).with_family(ScatterFamily::uniform());
  const double R = 2.0;
  for (double angle : {75.0, 10.0, 200.0})
    for (double r : {0.03, 0.3}) {
      const double d = R;
      const double area = r * r * std::acos((d * d + r * r - R * R) / (2 * d * r)) +
                          R * R * std::acos((d * d + R * R - r * r) / (2 * d * R)) -
                          0.5 * std::sqrt((-d + r + R) * (d + r - R) * (d - r + R) * (d + r + R));
      const double p = area / (4 * kPi);
      const double t = angle * kPi / 180.0;
      const Estimate e = integrate(u, disk({R * std::cos(t), R * std::sin(t)}, r), with(Method::cubature, 1e-9));
      INFO("angle " << angle << " r " << r << std::setprecision(17) << " p " << e.p << " +- " << e.abs_err << " ref " << p);
      CHECK(std::fabs(e.p - p) <= e.abs_err + 1e-15);
    }
  const Region zone = ellipse({2.0, 0.0}, rotation(60.0 * kPi / 180.0) * Vec2(0.9, 0.05).asDiagonal());
  const Estimate x = integrate(u, zone, with(Method::exact, 1e-12));
  const Estimate e = integrate(u, zone, with(Method::cubature, 1e-8));
  INFO(std::setprecision(17) << "ellipse: cubature " << e.p << " +- " << e.abs_err << ", exact " << x.p << " +- " << x.abs_err);
  CHECK(std::fabs(x.p - 0.005611842430082614) <= x.abs_err + 1e-17);
  CHECK(std::fabs(e.p - x.p) <= e.abs_err + x.abs_err);
}

TEST_CASE("exact and cubature under the uniform: a disk grazing the support's edge keeps its sliver", "[exact][cubature][family]") {
  // A disk inside the support poking out by h, or outside it overlapping by h: the arc crosses
  // the edge twice between two samples, and the sliver between was lost by both methods (0.25
  // +- 2.8e-15 for 0.2499999933 at h = 1e-5, 37 degrees; an adversarial trial). Reference: the
  // circle-circle lens (elementary geometry, as above), in long double; the sliver's own size,
  // h^(3/2), is far above the difference of the two lenses' roundings.
  const Gaussian u = Gaussian::from_axes({0, 0}, 1.0, 1.0, 0.0).with_family(ScatterFamily::uniform());
  const long double R = 2.0L;
  const auto lens = [&](long double d, long double r) {
    return r * r * std::acos((d * d + r * r - R * R) / (2 * d * r)) + R * R * std::acos((d * d + R * R - r * r) / (2 * d * R)) -
           0.5L * std::sqrt((-d + r + R) * (d + r - R) * (d - r + R) * (d + r + R));
  };
  for (double angle : {37.0, 200.0})
    for (double h : {1e-9, 1e-7, 1e-5})
      for (double side : {1.0, -1.0}) {
        // side 1: a disk inside the support poking out by h; -1: a disk outside it overlapping by h.
        const double r = 1.0, t = angle * kPi / 180.0;
        const double d = side > 0 ? 2.0 - r + h : 2.0 + r - h;
        const Vec2 centre(d * std::cos(t), d * std::sin(t));
        const long double exact_d = std::hypot(static_cast<long double>(centre.x()), static_cast<long double>(centre.y()));
        const double p = static_cast<double>(lens(exact_d, r) / (4.0L * static_cast<long double>(kPi)));
        for (Method m : {Method::exact, Method::cubature}) {
          const Estimate e = integrate(u, disk(centre, r), with(m, 1e-10));
          INFO((m == Method::exact ? "exact" : "cubature") << " angle " << angle << " h " << h << (side > 0 ? " inside" : " outside")
                                                           << std::setprecision(17) << ": p " << e.p << " +- " << e.abs_err
                                                           << ", lens " << p);
          CHECK(std::fabs(e.p - p) <= e.abs_err + 1e-15 * p + 1e-300);
        }
      }
}

TEST_CASE("Monte Carlo samples the t and uniform families: the references fall in its interval",
          "[monte_carlo][family][reference]") {
  int checked = 0;
  for (const Case& c : load_cases()) {
    if (c.p < 1e-3 || checked >= 6) continue;
    INFO(c.name);
    IntegrateOptions o = with(Method::monte_carlo, 1e-8);
    o.samples = 200000;
    const Estimate e = integrate(component_of(c), region_of(c), o);
    // A 99.9% Clopper-Pearson interval: six cases, each failing by chance once in a thousand seeds.
    CHECK(e.interval_low <= c.p);
    CHECK(c.p <= e.interval_high);
    ++checked;
  }
  CHECK(checked == 6);
}

TEST_CASE("t over its centred Mahalanobis ellipse: 1 - (1 + R^2/nu)^(-nu/2)", "[exact][family]") {
  // CHECKS.md, "Elliptical families": the t's radial CDF; nu = 3, R = 1 gives 0.350480947161671.
  const Mat2 rot = rotation(0.7);
  for (double nu : {0.5, 1.0, 3.0, 7.5, 100.0})
    for (double R : {0.01, 0.3, 1.0, 4.0, 50.0}) {
      INFO("nu = " << nu << ", R = " << R);
      const double a = 2.0, b = 0.25;
      const Gaussian t = Gaussian::from_axes({3.0, -1.0}, a, b, 0.7 * 180.0 / kPi).with_family(ScatterFamily::student_t(nu));
      Mat2 axes = rot * Vec2(R * a, R * b).asDiagonal();
      const Estimate e = integrate(t, ellipse({3.0, -1.0}, axes), with(Method::exact, 1e-12));
      // Through log1p: pow(1 + R^2/nu, -nu/2) would carry the rounding of 1 + R^2/nu times nu/2.
      const double q = std::exp(-nu / 2 * std::log1p(R * R / nu)), p = -std::expm1(-nu / 2 * std::log1p(R * R / nu));
      CHECK(std::fabs(e.p - p) <= 1e-11 * std::min(p, q));
      CHECK(std::fabs(e.q - q) <= 1e-11 * std::min(p, q) + 2e-16);  // q's own rounding near 1
      CHECK(std::fabs(e.p - p) <= e.p_abs_err());
    }
  const Gaussian t3 = Gaussian::from_axes({0, 0}, 1.0, 1.0, 0.0).with_family(ScatterFamily::student_t(3.0));
  CHECK(integrate(t3, disk({0, 0}, 1.0)).p == Approx(0.350480947161671).epsilon(1e-13));
}

TEST_CASE("uniform: a zone inside the support ellipse gets its area over the ellipse's, one holding it gets 1",
          "[exact][family]") {
  // Exact areas: the uniform over the ellipse of semi-axes 2 sigma_major, 2 sigma_minor has
  // density 1 / (4 pi sigma_major sigma_minor) inside it.
  const double a = 1.5, b = 0.4;
  const Gaussian u = Gaussian::from_axes({10.0, 20.0}, a, b, 30.0).with_family(ScatterFamily::uniform());
  const double density = 1.0 / (4 * kPi * a * b);
  // A small square and triangle well inside (the ellipse reaches 0.8 m along its minor axis).
  const Estimate square = integrate(u, rectangle({10.1, 20.0}, {10.3, 20.2}), with(Method::exact, 1e-12));
  CHECK(square.p == Approx(0.04 * density).epsilon(1e-12));
  const Estimate tri = integrate(u, polygon({{9.8, 19.9}, {10.2, 19.95}, {10.0, 20.25}}), with(Method::exact, 1e-12));
  const double tri_area = 0.5 * std::fabs(0.4 * 0.35 - 0.05 * 0.2);
  CHECK(tri.p == Approx(tri_area * density).epsilon(1e-12));
  // A disk inside: pi r^2 times the density.
  const Estimate d = integrate(u, disk({10.05, 20.05}, 0.3), with(Method::exact, 1e-12));
  CHECK(d.p == Approx(kPi * 0.09 * density).epsilon(1e-12));
  // A zone holding the whole support, and one wholly outside it.
  const Estimate all = integrate(u, rectangle({5.0, 15.0}, {15.0, 25.0}), with(Method::exact, 1e-12));
  CHECK(all.p == 1.0);
  CHECK(all.q <= all.q_abs_err());
  const Estimate none = integrate(u, rectangle({14.0, 20.0}, {15.0, 21.0}), with(Method::exact, 1e-12));
  CHECK(none.p <= none.abs_err + 1e-300);
}

TEST_CASE("every family: pieces of a partition add up, and moving or turning everything changes nothing",
          "[exact][family][property]") {
  const Vec2 m(2.0, -1.0);
  for (const ScatterFamily& f : {ScatterFamily::student_t(1.0), ScatterFamily::student_t(5.0), ScatterFamily::uniform()}) {
    INFO(f.describe());
    const Gaussian g = Gaussian::from_axes(m, 1.2, 0.5, 25.0).with_family(f);
    const IntegrateOptions o = with(Method::exact, 1e-12);
    // A square cut into four at a point near (not at) the mean, and into two through the mean.
    const Vec2 lo(-1.0, -4.0), hi(5.0, 2.5), cut(2.3, -0.6);
    const double whole = integrate(g, rectangle(lo, hi), o).p;
    const double quarters = integrate(g, rectangle(lo, cut), o).p + integrate(g, rectangle({cut.x(), lo.y()}, {hi.x(), cut.y()}), o).p +
                            integrate(g, rectangle({lo.x(), cut.y()}, {cut.x(), hi.y()}), o).p + integrate(g, rectangle(cut, hi), o).p;
    CHECK(quarters == Approx(whole).epsilon(1e-11));
    const Estimate left = integrate(g, rectangle(lo, {m.x(), hi.y()}), o), right = integrate(g, rectangle({m.x(), lo.y()}, hi), o);
    CHECK(left.p + right.p == Approx(whole).epsilon(1e-11));
    // A disk and the ring around it, against the disk they make (an arc through nothing).
    const double inner = integrate(g, disk({2.5, -0.8}, 0.7), o).p;
    const double ring = integrate(g, ring_sector({2.5, -0.8}, 0.7, 2.0, 0.0, 2 * kPi), o).p;
    CHECK(inner + ring == Approx(integrate(g, disk({2.5, -0.8}, 2.0), o).p).epsilon(1e-11));
    // Translation and rotation of the spread and the region together.
    const Region zone = polygon({{0.0, -2.0}, {3.5, -1.5}, {2.0, 0.5}, {1.2, -0.5}});
    const double p0 = integrate(g, zone, o).p;
    const Vec2 shift(1234.5, -678.25);
    const Region moved = polygon({{0.0 + shift.x(), -2.0 + shift.y()}, {3.5 + shift.x(), -1.5 + shift.y()},
                                  {2.0 + shift.x(), 0.5 + shift.y()}, {1.2 + shift.x(), -0.5 + shift.y()}});
    CHECK(integrate(g.moved_to(m + shift), moved, o).p == Approx(p0).epsilon(1e-10));
    const Mat2 r = rotation(1.1);
    std::vector<Vec2> turned;
    for (const Vec2& v : std::vector<Vec2>{{0.0, -2.0}, {3.5, -1.5}, {2.0, 0.5}, {1.2, -0.5}}) turned.push_back(m + r * (v - m));
    const Gaussian gt = Gaussian::from_axes(m, 1.2, 0.5, 25.0 + 1.1 * 180.0 / kPi).with_family(f);
    CHECK(integrate(gt, polygon(turned), o).p == Approx(p0).epsilon(1e-10));
  }
}

TEST_CASE("t: a disk through the mean and a near pass agree with cubature within the combined bounds",
          "[exact][cubature][family]") {
  const Gaussian t = Gaussian::from_axes({0.0, 0.0}, 3.0, 0.2, 40.0).with_family(ScatterFamily::student_t(2.5));
  for (const Region& zone : {disk({1.0, 0.0}, 1.0), disk({1.0, 1e-9}, 1.0), disk({0.0, 3.0}, 2.999999),
                             polygon({{0.0, 0.0}, {2.0, 0.5}, {1.0, 2.0}})}) {
    const Estimate e = integrate(t, zone, with(Method::exact, 1e-10));
    const Estimate c = integrate(t, zone, with(Method::cubature, 1e-10));
    CHECK(e.converged);
    CHECK(std::fabs(e.p - c.p) <= e.abs_err + c.abs_err);
  }
}

TEST_CASE("a t of very many degrees of freedom is the normal", "[exact][family]") {
  // (1 + r^2/nu)^(-nu/2) -> exp(-r^2/2) as nu -> infinity (CHECKS.md): at nu = 1e6 within 1e-5
  // relative over 3 sigma.
  const Gaussian n = Gaussian::from_axes({0.0, 0.0}, 1.0, 0.5, 10.0);
  const Region zone = polygon({{0.5, 0.2}, {2.0, 0.1}, {1.5, 1.5}});
  const double pn = integrate(n, zone).p, pt = integrate(n.with_family(ScatterFamily::student_t(1e6)), zone).p;
  CHECK(pt == Approx(pn).epsilon(1e-5));
}
