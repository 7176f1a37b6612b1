// containment_radius: the radius about a point that holds a given share of the impacts.
#include <boost/math/quadrature/gauss_kronrod.hpp>
#include <boost/math/tools/toms748_solve.hpp>
#include <cmath>

#include "strewn/constants.hpp"
#include "strewn/error.hpp"
#include "strewn/fit.hpp"
#include "strewn/integrate.hpp"
#include "strewn/region_builders.hpp"
#include "strewn/solve.hpp"

namespace strewn {
namespace {

// P(a^2 U^2 + b^2 V^2 <= r^2) for independent standard normals U, V (a >= b > 0): with
// U = (r / a) sin t, the share of V allowed is erf(r cos t / (b sqrt 2)), so
// P = 2 int_0^{pi/2} phi((r / a) sin t) erf(r cos t / (b sqrt 2)) (r / a) cos t dt,
// a smooth one-dimensional integral (adaptive Gauss-Kronrod) at any axis ratio.
double centred_disk_probability(double a, double b, double r) {
  const double k = r / a;
  const auto f = [&](double t) {
    const double u = k * std::sin(t);
    return std::exp(-0.5 * u * u) * std::erf(r * std::cos(t) / (b * M_SQRT2)) * k * std::cos(t);
  };
  double error = 0.0;
  const double integral =
      boost::math::quadrature::gauss_kronrod<double, 31>::integrate(f, 0.0, kPi / 2, 40, 1e-14, &error);
  return 2.0 * integral / std::sqrt(2.0 * kPi);
}

// The same for an elliptical family with radial CDF G about its centre, semi-axes a, b of the
// spread: in whitened polar coordinates (r, phi) the site radius is r sqrt(a^2 cos^2 phi +
// b^2 sin^2 phi) and phi is uniform, so P = (2 / pi) int_0^{pi/2} G(R / sqrt(...)) dphi.
double centred_family_disk_probability(const ScatterFamily& family, double a, double b, double r) {
  const auto f = [&](double phi) {
    const double c = std::cos(phi), s = std::sin(phi);
    return family.cdf(r / std::sqrt(a * a * c * c + b * b * s * s));
  };
  double error = 0.0;
  const double integral =
      boost::math::quadrature::gauss_kronrod<double, 31>::integrate(f, 0.0, kPi / 2, 40, 1e-14, &error);
  return 2.0 * integral / kPi;
}

}  // namespace

double containment_radius(const ScatterModel& model, const Vec2& centre, double fraction) {
  if (!(fraction > 0.0 && fraction < 1.0)) throw input_error("the contained fraction must be in (0, 1)");
  const auto& parts = model.components();
  const SpreadAxes a = parts.front().gaussian.axes();
  const ScatterFamily& family = parts.front().gaussian.family();
  // One component of another family, centred: its radial quantile on a circular spread.
  if (parts.size() == 1 && !family.is_normal() && a.sigma_major == a.sigma_minor && parts.front().gaussian.mean() == centre)
    return a.sigma_major * family.radius_quantile(fraction);
  // A Student-t, elliptical and centred (a fitted t's CEP and R95, also in its bootstrap): the
  // root of the one-dimensional integral, between the circular radii of the two axes.
  if (parts.size() == 1 && family.kind() == FamilyKind::student_t && parts.front().gaussian.mean() == centre) {
    const double k = family.radius_quantile(fraction);
    const auto g = [&](double r) {
      return centred_family_disk_probability(family, a.sigma_major, a.sigma_minor, r) - fraction;
    };
    const auto tol = [](double x, double y) { return std::fabs(y - x) <= 1e-12 * std::fabs(x); };
    std::uintmax_t iterations = 200;
    const auto root = boost::math::tools::toms748_solve(g, a.sigma_minor * k * (1 - 1e-9),
                                                        a.sigma_major * k * (1 + 1e-9), tol, iterations);
    return (root.first + root.second) / 2;
  }
  bool all_normal = true;
  for (const WeightedGaussian& c : parts) all_normal = all_normal && c.gaussian.family().is_normal();
  // Circular and centred: P(r <= R) = 1 - exp(-R^2 / (2 sigma^2)) (Rayleigh distribution).
  if (all_normal && parts.size() == 1 && a.sigma_major == a.sigma_minor && parts.front().gaussian.mean() == centre)
    return a.sigma_major * std::sqrt(-2.0 * std::log1p(-fraction));
  // Elliptical and centred: the radius lies between the circular ones of the minor and the
  // major axis; root of the one-dimensional integral (the general path below, disk
  // integrations at up to 1e6:1, took seconds at the axis ratios a gross outlier gives).
  if (all_normal && parts.size() == 1 && parts.front().gaussian.mean() == centre) {
    const double k = std::sqrt(-2.0 * std::log1p(-fraction));
    const auto g = [&](double r) { return centred_disk_probability(a.sigma_major, a.sigma_minor, r) - fraction; };
    const auto tol = [](double x, double y) { return std::fabs(y - x) <= 1e-13 * std::fabs(x); };
    std::uintmax_t iterations = 200;
    const auto root = boost::math::tools::toms748_solve(g, a.sigma_minor * k, a.sigma_major * k, tol, iterations);
    return (root.first + root.second) / 2;
  }
  // A reach: the larger of the distance to each mean plus its spread, the spread taken out to
  // the family's own radius for the fraction (a heavy-tailed t holds 95% only far out).
  double reach = 0.0;
  for (const WeightedGaussian& c : parts) {
    const ScatterFamily& f = c.gaussian.family();
    const double k = f.is_normal() ? 1.0 : std::max(1.0, f.radius_quantile(fraction) / ScatterFamily::normal().radius_quantile(fraction));
    reach = std::max(reach, k * c.gaussian.axes().sigma_major + (c.gaussian.mean() - centre).norm());
  }
  IntegrateOptions options;
  options.rel_tolerance = 1e-12;
  const Margin short_of = [&](double r) {
    return fraction - integrate(model, disk(centre, r), options).p;
  };
  // P(within r) grows with r; 40 radii up to 12 reaches always pass any fraction below 1 - 1e-30.
  const Crossing c = first_holding(short_of, 1e-12 * reach, 12.0 * reach, 40, 1e-10 * reach);
  if (!c.found) throw input_error("containment radius not found within 12 spreads of the centre");
  return c.x;
}

}  // namespace strewn
