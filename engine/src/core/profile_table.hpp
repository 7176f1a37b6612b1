#ifndef STREWN_SRC_CORE_PROFILE_TABLE_HPP
#define STREWN_SRC_CORE_PROFILE_TABLE_HPP

// The profile family's table (strewn/scatter_family.hpp), private to the engine: scatter_family.cpp
// evaluates G and S from it, and the exact method's straight edges integrate its cubic pieces in
// closed form (integrate/exact/family_segment.cpp).

#include <algorithm>
#include <cmath>
#include <vector>

#include "strewn/constants.hpp"
#include "strewn/error.hpp"
#include "strewn/radial_profile.hpp"

namespace strewn {

namespace detail {

// A profile in whitened radii r = 2 d / R (the wetted radius at r = 2), with the mass of each
// linear piece so that G and S both come from sums of positive terms: G(r) = below[i] + the
// piece's part up to r, S(r) = above[i + 1] + the piece's part beyond r, neither as 1 minus
// the other (a small S keeps its digits near the edge).
struct ProfileTable {
  RadialProfile source;
  double scale_m = 0.0;             // metres per whitened unit, R/2
  std::vector<double> r, v;         // rows, from r = 0 to r = 2, and their rates
  std::vector<double> below, above; // G(r_i), S(r_i)
  double z = 0.0;                   // integral of v over the whitened plane

  explicit ProfileTable(const RadialProfile& p) : source(p) {
    scale_m = 0.5 * p.wetted_radius();
    if (!(scale_m > 0.0)) throw input_error("a profile's last distance (its wetted radius) must be above 0");
    if (p.distance_m().front() > 0.0) {
      r.push_back(0.0);
      v.push_back(p.rate().front());
    }
    for (std::size_t i = 0; i < p.distance_m().size(); ++i) {
      r.push_back(p.distance_m()[i] / scale_m);
      v.push_back(p.rate()[i]);
    }
    r.back() = 2.0;
    const std::size_t n = r.size();
    std::vector<double> mass(n - 1);
    for (std::size_t i = 0; i + 1 < n; ++i) mass[i] = piece(i, 0.0, r[i + 1] - r[i]);
    below.assign(n, 0.0);
    above.assign(n, 0.0);
    for (std::size_t i = 0; i + 1 < n; ++i) below[i + 1] = below[i] + mass[i];
    for (std::size_t i = n - 1; i-- > 0;) above[i] = above[i + 1] + mass[i];
    z = below.back();
    for (double& b : below) b /= z;
    for (double& a : above) a /= z;
  }

  // 2 pi times the integral of (v_i + b u)(r_i + u) du from t0 to t1 within piece i (b its
  // slope), factored so that no difference of large terms appears.
  double piece(std::size_t i, double t0, double t1) const {
    const double b = (v[i + 1] - v[i]) / (r[i + 1] - r[i]);
    return kTwoPi * (t1 - t0) *
           (v[i] * r[i] + 0.5 * (v[i] + b * r[i]) * (t1 + t0) + b * (t1 * t1 + t1 * t0 + t0 * t0) / 3.0);
  }
  // On piece i, v(s) = a0 + b s with a0 = v_i - b r_i, so
  //     G(r) = G(r_i) + c2 (r^2 - r_i^2) + c3 (r^3 - r_i^3),  c2 = pi a0 / z,  c3 = 2 pi b / (3 z),
  // a cubic in r with no linear term (2 pi integral of (a0 s + b s^2) ds, divided by z).
  struct Cubic {
    double c2 = 0.0, c3 = 0.0;
  };
  Cubic cubic(std::size_t i) const {
    const double b = (v[i + 1] - v[i]) / (r[i + 1] - r[i]);
    return {kPi * (v[i] - b * r[i]) / z, 2.0 * kPi * b / (3.0 * z)};
  }
  std::size_t index(double x) const {
    const std::size_t i = static_cast<std::size_t>(std::upper_bound(r.begin(), r.end(), x) - r.begin()) - 1;
    return std::min(i, r.size() - 2);
  }
  double cdf(double x) const {
    if (!(x < 2.0)) return 1.0;
    if (!(x > 0.0)) return 0.0;
    const std::size_t i = index(x);
    return below[i] + piece(i, 0.0, x - r[i]) / z;
  }
  double survival(double x) const {
    if (!(x < 2.0)) return 0.0;
    if (!(x > 0.0)) return 1.0;
    const std::size_t i = index(x);
    return above[i + 1] + piece(i, x - r[i], r[i + 1] - r[i]) / z;
  }
  double rate(double x) const {
    if (!(x < 2.0)) return 0.0;
    if (!(x > 0.0)) return v.front();
    const std::size_t i = index(x);
    return v[i] + (x - r[i]) / (r[i + 1] - r[i]) * (v[i + 1] - v[i]);
  }
  double largest_rate_beyond(double x) const {
    if (!(x < 2.0)) return 0.0;
    double m = rate(std::max(x, 0.0));
    for (std::size_t i = 0; i < r.size(); ++i)
      if (r[i] > x) m = std::max(m, v[i]);
    return m;
  }
  double quantile(double p) const {
    // The piece holding p, then bisection on G within it: G is increasing, and 200 halvings
    // reach the spacing of doubles.
    std::size_t i = 0;
    while (i + 2 < r.size() && below[i + 1] <= p) ++i;
    double lo = r[i], hi = r[i + 1];
    for (int k = 0; k < 200; ++k) {
      const double mid = 0.5 * (lo + hi);
      if (!(mid > lo && mid < hi)) break;
      (cdf(mid) < p ? lo : hi) = mid;
    }
    return 0.5 * (lo + hi);
  }
};

}  // namespace detail

}  // namespace strewn

#endif
