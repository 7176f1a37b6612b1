// A mean on or next to an arc (engine/src/integrate/exact: exact_integrator.cpp's boundary test,
// edge_near.cpp's near form, arc_tail.cpp's principal value), against references outside the
// engine. Found by a hostile trial; each case gave p far outside its bound, "converged".
#include <boost/math/distributions/non_central_chi_squared.hpp>
#include <catch2/catch.hpp>
#include <cmath>
#include <iomanip>

#include "strewn/integrate.hpp"
#include "strewn/region_builders.hpp"
#include "test_support.hpp"

using namespace strewn;

namespace {
IntegrateOptions request(Method method = Method::exact) {
  IntegrateOptions o;
  o.method = method;
  return o;
}
}  // namespace

TEST_CASE("a disk at a national-grid site with the mean 1e-9 m outside its arc meets the noncentral chi-square",
          "[exact][arc]") {
  // Reference: P(|X - c| <= R) for X ~ N(m, s^2 I) is the noncentral chi-square CDF with 2
  // degrees of freedom, noncentrality |m - c|^2 / s^2, at R^2 / s^2 (Boost.Math), the distance
  // taken in long double from the very doubles given. The mean lies within the boundary
  // allowance (6e-9 sigma at these coordinates), so the near form was taken, and a whole
  // ellipse's trapezoid, converging against itself on half its nodes, missed the few sigma
  // where the density lies: 0.49999999994 for 0.49891.
  const Vec2 c(452933.73, 5300452.0);
  const double radius = 139.9485354857714, variance = 0.5871116135648997, s = std::sqrt(variance);
  for (double angle : {0.3, 0.3 + 0.5 * kPi, 0.3 + kPi, 2.0})
    for (double off : {1e-9, -1e-9, 3e-9}) {
      const Vec2 m(c.x() + (radius + off) * std::cos(angle), c.y() + (radius + off) * std::sin(angle));
      const long double dx = static_cast<long double>(m.x()) - c.x(), dy = static_cast<long double>(m.y()) - c.y();
      const double nc = static_cast<double>((dx * dx + dy * dy) / variance);
      const double reference =
          boost::math::cdf(boost::math::non_central_chi_squared_distribution<double>(2.0, nc), radius * radius / variance);
      const Estimate e = integrate(Gaussian::from_axes(m, s, s, 0.0), disk(c, radius), request());
      INFO("angle " << angle << " offset " << off << std::setprecision(17) << ": p " << e.p << " +- " << e.abs_err
                    << ", reference " << reference);
      CHECK(std::fabs(e.p - reference) <= e.abs_err + 1e-12);
    }
}

TEST_CASE("a thin ellipse passing a few ulps from the mean is on it", "[exact][arc][family]") {
  // A 60:1 ellipse whose arc passes 1e-15 from the mean: the nearest point was taken where the
  // mean's preimage points (exact only on a circle), 4e-14 away, beyond the allowance, and the
  // tail form's near pass took the other side from the winding number: p 0.5054 for 0.0054
  // under every family. Reference: the cubature method (independent: it integrates the density),
  // within both bounds, and the trial's 45-digit mpmath boundary integral, 0.00541540418040162.
  const double a = 51.925907200382916 * kPi / 180.0;
  Mat2 axes;
  axes << 0.8891573117790568 * std::cos(a), -0.014477576358808811 * std::sin(a), 0.8891573117790568 * std::sin(a),
      0.014477576358808811 * std::cos(a);
  const Region ellipse_zone = ellipse({0.0, 0.0}, axes);
  const double s = std::sqrt(0.5088241062838669);
  const Gaussian t2 = Gaussian::from_axes({-0.5158880305425977, -0.6660569539752373}, s, s, 0.0)
                          .with_family(ScatterFamily::student_t(2.0));
  const Estimate e = integrate(t2, ellipse_zone, request());
  const Estimate c = integrate(t2, ellipse_zone, request(Method::cubature));
  INFO(std::setprecision(17) << "exact " << e.p << " +- " << e.abs_err << ", cubature " << c.p << " +- " << c.abs_err);
  CHECK(std::fabs(e.p - c.p) <= e.abs_err + c.abs_err);
  CHECK(std::fabs(e.p - 0.00541540418040162) <= e.abs_err + 1e-16);
}

TEST_CASE("a uniform spread with its mean on a disk's arc covers the lens of the two circles", "[exact][arc][family]") {
  // The uniform over the disk of radius 2 sigma about the mean: p is the area of the lens
  // where it meets the zone over its own area. Lens of circles of radii r1, r2 at distance d
  // (the circle-circle intersection area, e.g. Weisstein, MathWorld "Circle-Circle
  // Intersection"): r1^2 acos((d^2 + r1^2 - r2^2) / (2 d r1)) + r2^2 acos((d^2 + r2^2 - r1^2) /
  // (2 d r2)) - sqrt((-d + r1 + r2)(d + r1 - r2)(d - r1 + r2)(d + r1 + r2)) / 2. The arc's
  // principal value had no cut where the support's edge crosses the arc: 1.58e-9 off under a
  // bound of 2.9e-14.
  const double r_zone = 0.19690549512662905, variance = 0.0023738325842165217, s = std::sqrt(variance);
  const Vec2 m(0.010309863188791511, -0.19663540050583805);
  const long double d = std::hypot(static_cast<long double>(m.x()), static_cast<long double>(m.y()));
  const long double r1 = r_zone, r2 = 2.0L * std::sqrt(static_cast<long double>(variance));
  const long double lens = r1 * r1 * std::acos((d * d + r1 * r1 - r2 * r2) / (2 * d * r1)) +
                           r2 * r2 * std::acos((d * d + r2 * r2 - r1 * r1) / (2 * d * r2)) -
                           0.5L * std::sqrt((-d + r1 + r2) * (d + r1 - r2) * (d - r1 + r2) * (d + r1 + r2));
  const double reference = static_cast<double>(lens / (3.14159265358979323846264338327950288L * r2 * r2));
  const Estimate e =
      integrate(Gaussian::from_axes(m, s, s, 0.0).with_family(ScatterFamily::uniform()), disk({0.0, 0.0}, r_zone), request());
  INFO(std::setprecision(17) << "p " << e.p << " +- " << e.abs_err << ", reference " << reference);
  CHECK(std::fabs(e.p - reference) <= e.abs_err + 1e-15);
  CHECK(e.converged);
}
