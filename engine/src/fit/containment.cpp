// containment_radius: the radius about a point that holds a given share of the impacts.
#include <boost/math/quadrature/gauss_kronrod.hpp>
#include <boost/math/distributions/students_t.hpp>
#include <boost/math/special_functions/beta.hpp>
#include <boost/math/tools/toms748_solve.hpp>
#include <cmath>
#include <vector>

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

// The centred elliptical t at any axis ratio (a >= b > 0), nu degrees of freedom: the share
// inside radius r (outside = false) or outside it (outside = true), each without the other's
// cancellation. In whitened coordinates Z1 is a t with nu degrees of freedom and, given
// Z1 = z, Z2 / s(z) is a t with nu + 1, s(z)^2 = (nu + z^2) / (nu + 1) (the conditional of the
// multivariate t: P. Ding, "On the conditional distribution of the multivariate t
// distribution", The American Statistician 70(3), 2016, eq. 1). So with z = (r / a) sin t, as
// centred_disk_probability() does for the normal,
//   P(r) = 2 int_0^{pi/2} f_nu(z) P(|T_(nu+1)| <= y) (r / a) cos t dt,  y = r cos t / (b s(z)),
//   Q(r) = P(|T_nu| > r / a) + 2 int_0^{pi/2} f_nu(z) P(|T_(nu+1)| > y) (r / a) cos t dt,
// with P(|T_m| <= y) = I_(y^2 / (m + y^2))(1/2, m/2) and P(|T_m| > y) = I_(m / (m + y^2))(m/2, 1/2)
// (Abramowitz and Stegun 26.7.1 with 26.5.27; Boost's regularised incomplete beta). The
// integrand is smooth; at an extreme ratio it falls from its plateau within b / r of t = pi/2,
// a layer adaptive Gauss-Kronrod finds by bisection (the periodic trapezoidal rule in the
// angle of the whitened plane would need a / b nodes).
// Boost's incomplete beta in double precision throughout (its default promotes to long double:
// five times slower here, for digits the quadrature does not keep).
constexpr boost::math::policies::policy<boost::math::policies::promote_double<false>> kDoublePolicy{};

double t_ellipse_share(double a, double b, double nu, double r, bool outside) {
  const double k = r / a, m = nu + 1.0;
  const double c = std::exp(std::lgamma(0.5 * m) - std::lgamma(0.5 * nu)) / std::sqrt(nu * kPi);
  const auto f = [&](double t) {
    const double z = k * std::sin(t), density = c * std::pow(1.0 + z * z / nu, -0.5 * m);
    const double y2 = r * r * std::cos(t) * std::cos(t) * m / (b * b * (nu + z * z));
    const double tail = outside ? boost::math::ibeta(0.5 * m, 0.5, m / (m + y2), kDoublePolicy)
                                : boost::math::ibeta(0.5, 0.5 * m, y2 / (m + y2), kDoublePolicy);
    return density * tail * k * std::cos(t);
  };
  // The layer lies within about b / r of pi/2 (where y is near 1): the range is cut at
  // pi/2 - 4^j b / r, j = 0 .. 5, so that each piece sees the integrand change on its own
  // scale and one Gauss-Kronrod 31 rule settles it; a piece whose estimate is above 1e-15 of
  // the whole share is refined adaptively to that (a tolerance relative to each piece would ask
  // a piece that holds 1e-4 of the integral for digits its rounding does not have, and the
  // recursion would run to its depth).
  const double e = b / r;
  double cuts[8];
  int n = 0;
  cuts[n++] = 0.0;
  for (double c = 1024.0; c >= 1.0; c /= 4.0)
    if (c * e < 0.5 * kPi) cuts[n++] = 0.5 * kPi - c * e;
  cuts[n++] = 0.5 * kPi;
  using Rule = boost::math::quadrature::gauss_kronrod<double, 31>;
  // Q's first term, P(|T_nu| > r / a), counts in the whole the pieces are judged against.
  const double head = outside ? boost::math::ibeta(0.5 * nu, 0.5, nu / (nu + k * k), kDoublePolicy) : 0.0;
  double value[8], error[8], l1[8], total = head;
  for (int i = 0; i + 1 < n; ++i) {
    value[i] = Rule::integrate(f, cuts[i], cuts[i + 1], 0, 0.0, &error[i], &l1[i]);
    total += 2.0 * l1[i];
  }
  double integral = 0.0;
  for (int i = 0; i + 1 < n; ++i) {
    if (2.0 * error[i] > 1e-15 * total)
      value[i] = Rule::integrate(f, cuts[i], cuts[i + 1], 10, 1e-15 * total / (2.0 * l1[i]), &error[i]);
    integral += value[i];
  }
  return 2.0 * integral + head;
}

// The centred elliptical t's radius by Newton's method on its share inside radius r, semi-axes
// a > b of the scale, k the circular radius quantile (r lies in [b k, a k]). In whitened polar
// coordinates (rho, phi) the angle is uniform and the site radius is rho s(phi),
// s^2 = a^2 cos^2 phi + b^2 sin^2 phi, so the share outside is
// Q(r) = (1 / 2 pi) int_0^{2 pi} S(r / s(phi)) dphi, S(rho) = (1 + rho^2 / nu)^(-nu / 2) the t's
// radial survival, and the share inside P(r) the same integral of 1 - S. Newton works on P for
// a fraction below 1/2 and on Q above (1 - S by expm1 and S by exp: neither is the small
// difference of two numbers near 1, so R95 and a radius for 1e-6 or 1 - 1e-9 keep full
// accuracy). The integrand is periodic and analytic, where the periodic trapezoidal rule
// converges exponentially (Trefethen & Weideman, "The exponentially convergent trapezoidal
// rule", SIAM Review 56(3), 2014, Theorem 3.2): its error falls like exp(-alpha N) for N nodes
// per period of 2 phi, alpha = 2 atanh(b / a) the half-width of the strip where s^2 has no zero.
// As the integrand is even and pi-periodic in phi, N = 2 m nodes are the trapezoid on [0, pi/2]
// with m panels, and s^2 is tabled once for every Newton step. The root is checked on the rule
// with twice the nodes (its error the square of the first's): 0 is returned when Newton does not
// converge, the axes are too unequal for 2048 panels (about 200:1), or the check moves the root
// by more than 1e-13 of itself, and the caller finds the root on t_ellipse_share instead.
double t_ellipse_radius(double a, double b, double nu, double fraction, double k) {
  const bool inside = fraction < 0.5;
  const double target = inside ? fraction : 1.0 - fraction;  // 1 - fraction is exact here (Sterbenz)
  const auto nodes = [&](int m) {
    std::vector<double> c(static_cast<std::size_t>(m) + 1);  // 1 / s^2 at phi_j = j pi / (2 m)
    for (int j = 0; j <= m; ++j) {
      const double phi = kPi / 2 * j / m, cs = std::cos(phi), sn = std::sin(phi);
      c[static_cast<std::size_t>(j)] = 1.0 / (a * a * cs * cs + b * b * sn * sn);
    }
    return c;
  };
  // P or Q at r by the rule (ends weighted 1/2), and its slope: dQ/dr = -dP/dr =
  // -(r / m) sum' c_j S_j / (1 + u_j), u_j = r^2 c_j / nu.
  const auto share = [&](const std::vector<double>& c, double r, double& slope) {
    const std::size_t m = c.size() - 1;
    double sum = 0.0, dsum = 0.0;
    for (std::size_t j = 0; j <= m; ++j) {
      const double u = r * r * c[j] / nu, e = -0.5 * nu * std::log1p(u), s = std::exp(e);
      const double w = j == 0 || j == m ? 0.5 : 1.0;
      sum += w * (inside ? -std::expm1(e) : s);
      dsum += w * s * c[j] / (1.0 + u);
    }
    slope = (inside ? r : -r) * dsum / static_cast<double>(m);
    return sum / static_cast<double>(m);
  };
  // exp(-2 atanh(b / a) * 2 m) <= 1e-17.
  const double alpha = 2.0 * std::atanh(b / a);
  const double panels = std::ceil(39.2 / (2.0 * alpha));
  if (!(panels <= 2048.0)) return 0.0;  // beyond about 200:1: t_ellipse_share, faster there
  const std::vector<double> coarse = nodes(std::max(8, static_cast<int>(panels)));
  double lo = b * k, hi = a * k, r = 0.5 * (lo + hi);
  bool converged = false;
  for (int it = 0; it < 60 && !converged; ++it) {
    double slope = 0.0;
    const double excess = share(coarse, r, slope) - target;
    if (excess == 0.0) {
      converged = true;
      break;
    }
    if ((excess < 0.0) == inside) lo = r; else hi = r;  // P grows with r, Q falls
    double next = r - excess / slope;
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);  // safeguard: bisect the bracket
    converged = std::fabs(next - r) <= 1e-14 * r;
    r = next;
  }
  if (!converged) return 0.0;
  double slope = 0.0;
  const double correction = (share(nodes(2 * static_cast<int>(coarse.size() - 1)), r, slope) - target) / slope;
  if (!(std::fabs(correction) <= 1e-13 * r)) return 0.0;
  return r - correction;
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
  // root of the one-dimensional integral, between the circular radii of the two axes; by Newton
  // on the periodic trapezoidal rule (t_ellipse_radius), else by toms748 on t_ellipse_share.
  if (parts.size() == 1 && family.kind() == FamilyKind::student_t && parts.front().gaussian.mean() == centre) {
    const double k = family.radius_quantile(fraction);
    // A minor axis lost to rounding: the major axis's own t (its marginal), r = a t^-1((1 + p) / 2).
    if (!(a.sigma_minor > 0.0))
      return a.sigma_major * boost::math::quantile(boost::math::students_t_distribution<double>(family.nu()),
                                                   0.5 + 0.5 * fraction);
    const double newton = t_ellipse_radius(a.sigma_major, a.sigma_minor, family.nu(), fraction, k);
    if (newton > 0.0) return newton;
    // P below a share of 1/2, Q above (1 - fraction exact there, by Sterbenz's lemma).
    const bool outside = fraction >= 0.5;
    const double target = outside ? 1.0 - fraction : fraction;
    const auto g = [&](double r) {
      const double share = t_ellipse_share(a.sigma_major, a.sigma_minor, family.nu(), r, outside);
      return outside ? target - share : share - target;
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
