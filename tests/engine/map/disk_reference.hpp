#ifndef STREWN_TESTS_DISK_REFERENCE_HPP
#define STREWN_TESTS_DISK_REFERENCE_HPP

// An independent reference for a disk footprint under an elliptical normal spread, shared by the
// map's tests: one-dimensional Gauss-Kronrod quadrature (Boost.Math) of a density times a normal
// interval, not the engine's boundary integral or cubature.
#include <boost/math/quadrature/gauss_kronrod.hpp>
#include <cmath>

#include "strewn/region.hpp"
#include "test_support.hpp"

namespace strewn::test {

struct Quadrature {
  double p, err;
};

// P(|Y - x| <= R) for Y ~ N(mu, Q diag(s1^2, s2^2) Q^T), Q the rotation by angle_deg: an
// independent reference by one-dimensional quadrature (not the engine's boundary integral or
// cubature). In the spread's principal frame the disk is centred at d = Q^T (x - mu); with
// u = d1 + R sin t, P = int_{-pi/2}^{pi/2} phi(u / s1) / s1 P(d2 - h < s2 Z < d2 + h) R cos t dt,
// h = R cos t, the normal interval by erfc differences in the tails (test_support.hpp).
// The 61-point Kronrod rule (Boost.Math) on 256 and on 512 equal pieces: the difference of the
// two is its error estimate.
inline Quadrature disk_by_quadrature(const Vec2& x, const Vec2& mu, double s1, double s2, double angle_deg, double R) {
  const double a = angle_deg * M_PI / 180, c = std::cos(a), s = std::sin(a);
  const Vec2 v = x - mu;
  const double d1 = c * v.x() + s * v.y(), d2 = -s * v.x() + c * v.y();
  const auto f = [&](double t) {
    const double u = d1 + R * std::sin(t), h = R * std::cos(t);
    const double density = std::exp(-0.5 * (u / s1) * (u / s1)) / (s1 * std::sqrt(2 * M_PI));
    return density * strewn::test::normal_interval((d2 - h) / s2, (d2 + h) / s2) * R * std::cos(t);
  };
  const auto sum = [&](int pieces) {
    double total = 0;
    for (int k = 0; k < pieces; ++k) {
      const double lo = -M_PI / 2 + M_PI * k / pieces, hi = -M_PI / 2 + M_PI * (k + 1) / pieces;
      total += boost::math::quadrature::gauss_kronrod<double, 61>::integrate(f, lo, hi, 0, 0.0);
    }
    return total;
  };
  const double coarse = sum(256), fine = sum(512);
  return {fine, std::fabs(fine - coarse) + 1e-14 * fine};
}

}  // namespace strewn::test

#endif
