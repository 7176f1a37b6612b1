// A part-circle profile in the exact method (ScatterFamily::with_arc; DESIGN.md, "Scatter
// families"). In whitened coordinates the 1-form G(r) dtheta / (2 pi) has exterior derivative
// f dA and vanishes at the centre (G(0) = 0), so for the wedge W of directions between two rays
// from the centre,
//     P(zone & W) = (1/2 pi) * integral over the boundary of (zone & W) of G(r) dtheta
//                 = (1/2 pi) * integral over (boundary of zone) & W of G(r) dtheta,
// the rays adding nothing: dtheta = 0 along a ray through the centre, and G = 0 at the apex.
// No winding number and no polygon clipping: each edge is cut where it crosses a ray (in closed
// form, for segments and elliptic arcs alike) and its pieces inside W are integrated in the near
// form (G dtheta), by the same adaptive Gauss-Kronrod as a whole edge, cut at the profile's rows.
// The near form's cancellation is absolute, a few ulps of the swept angle: negligible next to
// the bound for a profile, whose support is bounded (no far tail whose digits it would lose).
#include <algorithm>
#include <cmath>
#include <vector>

#include "integrate/exact/edge_tail.hpp"
#include "integrate/integrators.hpp"
#include "strewn/constants.hpp"

namespace strewn::detail {

namespace {

// Is the direction of z within the wedge from `from` sweeping `sweep` counter-clockwise?
bool in_wedge(const Vec2& z, double from, double sweep) {
  double a = std::atan2(z.y(), z.x()) - from;
  a -= kTwoPi * std::floor(a / kTwoPi);
  return a <= sweep;
}

// Parameters in (lo, hi) where an edge meets one of the wedge's rays (not the opposite ray).
std::vector<double> ray_crossings(const Edge& e, double lo, double hi, const Vec2 rays[2]) {
  std::vector<double> out;
  for (int k = 0; k < 2; ++k) {
    const Vec2& u = rays[k];
    const auto cross_u = [&u](const Vec2& v) { return u.x() * v.y() - u.y() * v.x(); };
    if (e.kind == Edge::Kind::segment) {
      const Vec2 d = e.to - e.from;
      const double den = cross_u(d);
      if (den == 0.0) continue;
      const double t = -cross_u(e.from) / den;
      if (t > lo && t < hi && u.dot(e.from + t * d) > 0.0) out.push_back(t);
    } else {
      // cross(u, c + M (cos s, sin s)) = A + B cos s + C sin s = 0.
      const double A = cross_u(e.centre), B = cross_u(e.axes.col(0)), C = cross_u(e.axes.col(1));
      const double amp = std::hypot(B, C);
      if (!(amp > 0.0) || std::fabs(A) > amp) continue;
      const double base = std::atan2(C, B), off = std::acos(std::clamp(-A / amp, -1.0, 1.0));
      for (double s0 : {base + off, base - off})
        for (int m = -3; m <= 3; ++m) {
          const double s = s0 + kTwoPi * m;
          if (s > lo && s < hi && u.dot(e.centre + e.axes * Vec2(std::cos(s), std::sin(s))) > 0.0) out.push_back(s);
        }
    }
  }
  return out;
}

}  // namespace

Estimate integrate_exact_wedge(const Region& z, const IntegrateOptions& options, const WhiteningNoise& noise,
                               const ScatterFamily& family, double from, double sweep) {
  Estimate est;
  est.method = Method::exact;
  const Vec2 rays[2] = {Vec2(std::cos(from), std::sin(from)), Vec2(std::cos(from + sweep), std::sin(from + sweep))};
  const double tol = options.rel_tolerance * 0.01;
  double sum = 0.0, mag = 0.0;
  // Arcs are integrated between their parametric ends, segments between their stored ends: where
  // these differ (an arc's ends rounded in site coordinates, a loop closed only to rounding) the
  // segment across the gap closes the loop, as in the whole-circle method (exact_integrator.cpp).
  const auto start_of = [](const Edge& e) { return e.kind == Edge::Kind::arc ? e.point(e.s_from) : e.from; };
  const auto end_of = [](const Edge& e) { return e.kind == Edge::Kind::arc ? e.point(e.s_to) : e.to; };
  for (const Loop& given : z.loops) {
    Loop loop;
    loop.reserve(2 * given.size());
    for (std::size_t k = 0; k < given.size(); ++k) {
      const Vec2 previous = end_of(given[(k + given.size() - 1) % given.size()]), start = start_of(given[k]);
      if (previous != start) loop.push_back(Edge::segment(previous, start));
      loop.push_back(given[k]);
    }
    for (const Edge& e : loop) {
      const bool arc = e.kind == Edge::Kind::arc;
      const double lo = arc ? std::min(e.s_from, e.s_to) : 0.0, hi = arc ? std::max(e.s_from, e.s_to) : 1.0;
      std::vector<double> cuts = ray_crossings(e, lo, hi, rays);
      cuts.push_back(lo);
      cuts.push_back(hi);
      std::sort(cuts.begin(), cuts.end());
      const auto at = [&](double t) {
        return arc ? Vec2(e.centre + e.axes * Vec2(std::cos(t), std::sin(t))) : Vec2(e.from + t * (e.to - e.from));
      };
      for (std::size_t i = 0; i + 1 < cuts.size(); ++i) {
        const double a = cuts[i], b = cuts[i + 1];
        if (!(b > a) || !in_wedge(at(0.5 * (a + b)), from, sweep)) continue;
        // The piece keeps the edge's direction of travel.
        Contribution c;
        if (arc) {
          const Edge piece = e.s_to > e.s_from ? Edge::arc(e.centre, e.axes, a, b) : Edge::arc(e.centre, e.axes, b, a);
          c = family_arc(piece, family, true, tol, false);
        } else {
          // Ends exactly at the edge's own vertices where the piece reaches them.
          const Vec2 p = a == 0.0 ? e.from : at(a), q = b == 1.0 ? e.to : at(b);
          c = family_segment(p, q, family, true, tol);
        }
        sum += c.value;
        mag += std::fabs(c.value);
        est.abs_err += c.abs_err;
        est.evaluations += c.evaluations;
        est.converged = est.converged && c.converged;
      }
    }
  }
  est.p = std::clamp(sum, 0.0, 1.0);
  est.q = 1.0 - est.p;
  // Rounding of the sum, and of the cut points: a cut moved along its edge by a few ulps of its
  // distance moves the piece's end across at most that much of a ray, where G dtheta = 0, so
  // only the sum's rounding counts.
  est.abs_err += 4 * kEps * mag + whitening_error(z, noise, nullptr, &family);
  return est;
}

}  // namespace strewn::detail
