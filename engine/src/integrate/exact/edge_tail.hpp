#ifndef STREWN_SRC_EDGE_TAIL_HPP
#define STREWN_SRC_EDGE_TAIL_HPP

// Contributions of single edges to the boundary integrals of the exact method, in whitened
// coordinates (standard normal, mean at the origin):
//   tail  I_e = 1/(2 pi) * integral along e of exp(-r^2/2) dtheta
//   near  J_e = 1/(2 pi) * integral along e of (1 - exp(-r^2/2)) dtheta
// so that P(region) = sum of J_e = winding(origin) - sum of I_e  (Green's theorem with the
// 1-form (1 - exp(-r^2/2))/(2 pi) dtheta, whose exterior derivative is the standard density).

#include <cmath>
#include <cstdint>

#include "strewn/region.hpp"
#include "strewn/scatter_family.hpp"

namespace strewn::detail {

// exp(-r^2/2) / 2 for r^2 = kNegligibleR2 bounds the tail contribution of an edge that stays
// at least that far from the mean: below kNegligible, which is what such an edge reports.
inline constexpr double kNegligibleR2 = 1400.0;
inline constexpr double kNegligible = 1e-304;
// The exact method's near form serves regions within this many sigma of the mean.
inline constexpr double kNearRadius = 1.0;

struct Contribution {
  double value = 0.0;
  double abs_err = 0.0;
  std::uint64_t evaluations = 0;
  bool converged = true;
};

// Bounds on the distance from the origin to the points of an edge.
struct RadiusRange {
  double closest = 0.0;   // lower bound
  double farthest = 0.0;  // upper bound
};
// Arcs are bounded through `chords` chords (more: tighter, slower).
RadiusRange radius_range(const Edge& edge, int chords = 32);
double min_radius(const Edge& edge);
// Bound on the error a polygonisation can cause: each approximation patch's area times the
// largest density over its box, plus the rest of region.approximation_area (within
// approximation_width of the boundary) times the largest density there.
double approximation_error(const Region& whitened, const ScatterFamily* family = nullptr);

// x1 y2 - y1 x2 with one rounding (Kahan's fma trick), so that a line passing through the
// origin gives an exact zero.
inline double accurate_cross(const Vec2& a, const Vec2& b) {
  const double w = b.x() * a.y();
  const double e = std::fma(-b.x(), a.y(), w);
  const double f = std::fma(a.x(), b.y(), -w);
  return f + e;
}

// I_e of a straight segment: F(t2) - F(t1) with one Owen's T per end, each end in the form
// that does not cancel (direct for |t| <= h, Owen's reflection for |t| > h); where the two ends
// cancel, the edge is split at |t| = h into pieces, each with an adaptive Gauss-Kronrod fallback.
Contribution segment_tail(const Vec2& z1, const Vec2& z2, double rel_tol);
// The sum of segment_tail over n segments from[i] -> to[i], the Owen's T and Q values of all
// of them evaluated together (owens_t's batch form and one batch of erfc).
// With moved_absolute and moved_relative, also the bound on what moving each end z by
// moved_absolute + moved_relative * |z| can change (the exact method's whitening_error()).
struct ContributionSum : Contribution {
  double magnitude = 0.0;   // sum of |value| over the segments
  bool quadrature = false;  // some segment needed adaptive quadrature
  double moved = 0.0;       // the bound on the effect of moved ends
};
// What the one-pass polygon path (integrate_exact_polygon) needs besides the sum, taken in the
// same pass over the whitened edges: the winding number about the mean by loop_winding()'s
// half-open crossing rule, whether an edge passes within the rounding allowance `near_tolerance`
// of the mean (find_boundary_hit()'s test, with its margin of 2; the sum then stops where it is
// and the caller takes the general path), and twice the polygon's signed area with a bound on
// its error (the cross products' and the sum's rounding, and what moving each end z by
// moved_absolute + moved_relative * |z| can change).
struct PolygonChecks {
  double near_tolerance = -1.0;  // below 0: the mean is clearly outside; no winding, no test
  int winding = 0;
  bool near = false;
  double twice_area = 0.0, twice_area_error = 0.0;
};
ContributionSum segment_tails(const Vec2* from, const Vec2* to, int n, double rel_tol,
                              double moved_absolute = 0.0, double moved_relative = 0.0,
                              PolygonChecks* checks = nullptr);
// An arc over one whole period (to 1e-14 relative).
bool is_whole_ellipse(const Edge& edge);
// I_e of an elliptic arc: the periodic trapezoidal rule for a whole ellipse when it settles,
// else adaptive Gauss-Kronrod.
// `through_origin`: the arc passes through the origin (to rounding); its integral is then the
// principal value, the jump of theta there being the caller's to count.
Contribution arc_tail(const Edge& arc, double rel_tol, bool through_origin = false);
// J_e of any edge, adaptive Gauss-Kronrod on the smooth expm1 form (bounded at the origin);
// a whole ellipse within a few sigma of the mean by the periodic trapezoidal rule first.
Contribution edge_near(const Edge& edge, double rel_tol);
// J_e of an arc by adaptive Gauss-Kronrod on pieces cut about its closest approaches (arc_cuts,
// as for I_e): the near form of an arc far larger than the spread passing next to the mean.
Contribution arc_near(const Edge& arc, double rel_tol);

// The same integrals under another family (DESIGN.md, "Scatter families"), whitened: with S the
// family's survival and G = 1 - S its radial CDF, the tail form 1/(2 pi) integral of S(r) dtheta
// (near = false) or the near form 1/(2 pi) integral of G(r) dtheta (near = true) along the edge,
// in closed form for straight edges of the t with a whole nu and of the profile, else by
// adaptive Gauss-Kronrod (family_segment.cpp, arc_tail.cpp).
Contribution family_segment(const Vec2& z1, const Vec2& z2, const ScatterFamily& family, bool near, double rel_tol);
// `range`, when given, is radius_range(arc, 8), which the caller has (whitening_error needs it too).
Contribution family_arc(const Edge& arc, const ScatterFamily& family, bool near, double rel_tol, bool through_origin,
                        const RadiusRange* range = nullptr);
// The squared radius that batch_quadrature's noise floor takes for a family's S at r_min.
double family_noise_r2(const ScatterFamily& family, double r_min);
// The t's S = (1 + r^2/nu)^(-nu/2) (near: G = 1 - S) at n squared radii at once, in place, as
// exp(-nu/2 log1p(r^2/nu)) (scatter_family.cpp's form) through libmvec's log and exp
// (special/vector_math.hpp; each within a few ulps, which the callers' noise allowance of
// 16 eps (1 + nu/2 log1p(r^2/nu)) relative covers); a whole nu up to 8 by products, as
// scatter_family.cpp takes it (core/t_power.hpp: within 6 eps).
void t_kernel_in_place(double* r2, int n, double nu, bool near);

}  // namespace strewn::detail

#endif
