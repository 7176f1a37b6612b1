#ifndef STREWN_PHYSICS_LINE_BOUND_HPP
#define STREWN_PHYSICS_LINE_BOUND_HPP

// Private: proven bounds for the midpoint rule over a throwing line (strewn/barrier_effect.hpp).
//
// Standing at s(u) = position + u (line_end - position), u in [0, 1], the impact is normal with
// the fixed mean mu = toward + bias and the covariance Sigma(u) = A e e^T + B e' e'^T (e the
// throw's direction, e' across it; A = sigma_along^2, B = sigma_across^2). The line's
// probability is the integral over u of p(u) = P_u(zone, not stopped). On a piece of width h
// with midpoint c, the midpoint rule's error splits in two parts:
//
// 1. Smooth part. q(u) = integral over the zone of phi_u(x) T(c, x) dx, the transmission T
//    frozen at the midpoint, is smooth in u and q(c) = p(c), so |mean of q - q(c)| <=
//    h^2 / 24 sup |q''| (the midpoint rule's Peano kernel). With l = log phi_u,
//    d^2 phi / du^2 = phi (l'' + l'^2), and l', l'' are bounded through the matrix
//    derivatives of Sigma (P = Sigma^-1, P' = -P Sigma' P, P'' = 2 P Sigma' P Sigma' P - P Sigma'' P):
//    with m <= lambda_min(Sigma), M >= lambda_max(Sigma), det Sigma >= delta, ||Sigma'|| <= g1,
//    ||Sigma''|| <= g2 on the piece and t = |x - mu|^2,
//      |l''| + l'^2 <= c0 + c1 t + c2 t^2,  c0 = g2/m + 2 g1^2/m^2,
//      c1 = 2 g1^2/m^3 + g2/(2 m^2),  c2 = g1^2/(4 m^4),
//    and phi_u(x) <= exp(-t / (2 M)) / (2 pi sqrt(delta)). For any S^2 > M the product is at
//    most delta^-1/2 G S^2 phi_env(x), phi_env the density of N(mu, S^2 I) and
//    G = max over t >= 0 of (c0 + c1 t + c2 t^2) exp(-(1/M - 1/S^2) t / 2); so
//    sup |q''| <= delta^-1/2 G S^2 P_env(zone): one extra probability per zone.
//    Sigma' and Sigma'' follow from Sigma = (A + B)/2 I + (A - B)/2 R(2 theta) (R a reflection,
//    norm 1): ||Sigma'|| <= max(|A'|, |B'|) + |A - B| |theta'|, ||Sigma''|| <= max(|A''|, |B''|)
//    + 2 |A' - B'| |theta'| + |A - B| (|theta''| + 2 theta'^2), with D^2 = |toward - s(u)|^2
//    quadratic in u, |theta'| = |d0 x L| / D^2 and |theta''| <= |d0 x L| |(D^2)'| / D^4.
// 2. Barrier part. |p(u) - q(u)| <= integral of phi_u over the zone where T(u, .) and T(c, .)
//    differ, which lies in the union of shadow_changes() below, so it is at most
//    delta^-1/2 S^2 P_env(zone n changes) (first order in h: the wedges narrow as h).
// A zone that no change region reaches pays only the smooth part.

#include <vector>

#include "strewn/barrier.hpp"
#include "strewn/thrower.hpp"

namespace strewn::detail {

/// The largest principal variance of Sigma(u) on [0, 1] (an upper bound).
double line_max_variance(const Thrower& thrower);

/// On the piece [ua, ub]: sup |q''| as a multiple of P_env(zone) (the smooth part's constant),
/// and delta^-1/2 S^2 (the barrier part's constant); S^2 the envelope variance, > the piece's
/// largest principal variance. Infinite when the aim lies on the piece.
struct LinePieceBound {
  double second_derivative = 0.0;
  double density = 0.0;
};
LinePieceBound line_piece_bound(const Thrower& thrower, double ua, double ub, double envelope_variance);

/// Where a path from a standing point of [sa, sb] and one from another such point may be
/// treated differently by the barrier: for each vertex v the wedge behind v seen from the
/// piece ({v + l (v - s) : s in the piece, l >= 0}, cut off beyond every point of `zone`), and with the
/// height rule the parallelograms swept by the shadow's far edge. Convex polygons. `touches`
/// is set when the barrier meets the piece itself (then anything may change).
struct ShadowChanges {
  std::vector<std::vector<Vec2>> polygons;
  bool touches = false;
};
ShadowChanges shadow_changes(const Barrier& barrier, const Vec2& sa, const Vec2& sb, const BoundingBox& zone,
                             std::optional<double> release_height);

}  // namespace strewn::detail

#endif
