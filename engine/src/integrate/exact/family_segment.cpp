// Straight edges under a family other than the normal (DESIGN.md, "Scatter families").
//
// On the line of a segment, at distance h from the mean and tangential coordinate t,
// dtheta = (z x u) / r^2 dt = +-h / (h^2 + t^2) dt, the sign that of z x u (u the direction of
// travel). On a piece of the line where t keeps its sign, the angle alpha = atan2(h, |t|)
// between the radius and the line takes the pole away:
//     integral from a to b of K(r) h / (h^2 + t^2) dt = integral from alpha(b) to alpha(a) of
//     K(h / sin alpha) dalpha,   0 <= a < b,
// with r = h / sin alpha, whose integrand is bounded by max |K| however close the line passes
// (a line 1e-12 from the mean sweeps pi within a few 1e-12 of it: in t a peak no rule sees,
// in alpha a flat stretch). sin alpha keeps its relative accuracy both for far pieces (small
// alpha) and near ones (alpha near pi/2), where cos of the polar angle would not. For the
// normal, K = exp(-r^2/2) gives Owen's T (segment_tail.cpp), which keeps its closed form.
// The line is cut at its foot (t = 0) and where r crosses 1 and each radius at which the
// family's density has a kink (the uniform's edge at r = 2), so that every piece is smooth.
#include <algorithm>
#include <cmath>
#include <vector>

#include "integrate/exact/edge_tail.hpp"
#include "integrate/exact/gauss_kronrod.hpp"
#include "strewn/constants.hpp"

namespace strewn::detail {

Contribution family_segment(const Vec2& z1, const Vec2& z2, const ScatterFamily& family, bool near, double rel_tol) {
  Contribution total;
  const Vec2 d = z2 - z1;
  const double length = d.norm();
  if (!(length > 0.0)) return total;
  const Vec2 u = d / length;
  const double signed_h = accurate_cross(z1, d) / length;
  const double h = std::fabs(signed_h);
  // A line through the mean: dtheta = 0 along it (the caller counts a jump at the mean).
  if (h == 0.0) return total;
  const double t1 = z1.dot(u), t2 = t1 + length;
  std::vector<double> cuts{t1, t2, 0.0};
  std::vector<double> radii = family.kinks();
  radii.push_back(1.0);
  for (double radius : radii)
    if (radius > h) {
      const double t = std::sqrt((radius - h) * (radius + h));
      cuts.push_back(t);
      cuts.push_back(-t);
    }
  std::sort(cuts.begin(), cuts.end());
  const auto integrand = [&family, h, near](double alpha) {
    const double r = h / std::sin(alpha);
    return near ? family.cdf(r) : family.survival(r);
  };
  for (std::size_t i = 0; i + 1 < cuts.size(); ++i) {
    const double a = cuts[i], b = cuts[i + 1];
    if (a < t1 || b > t2 || !(b > a)) continue;
    // By symmetry a piece at t < 0 is the mirror piece at -t.
    const double lo = a >= 0.0 ? a : -b, hi = a >= 0.0 ? b : -a;
    const double alpha_lo = std::atan2(h, hi), alpha_hi = std::atan2(h, lo);
    const double r_min = h / std::sin(alpha_hi);
    const Contribution c = quadrature(integrand, alpha_lo, alpha_hi, rel_tol, near ? 0.0 : family_noise_r2(family, r_min));
    add(total, c, 1.0);
  }
  const double scale = (signed_h > 0.0 ? 1.0 : -1.0) * kOneDivTwoPi;
  total.value *= scale;
  total.abs_err *= kOneDivTwoPi;
  return total;
}

}  // namespace strewn::detail
