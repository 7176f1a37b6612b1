#ifndef STREWN_SRC_SHORT_EDGE_RULE_HPP
#define STREWN_SRC_SHORT_EDGE_RULE_HPP

// A Gauss-Legendre rule with a rigorous error bound for the tail integral of a straight edge,
// chosen per edge where it is cheaper than the edge's two Owen's T values (segment_tail.cpp).
//
// In whitened coordinates an edge on the line at distance h > 0 from the mean, parametrised by
// t along it (t = 0 at the foot of the perpendicular, t1 < t2), contributes (edge_tail.hpp)
//   I = T(h, t2/h) - T(h, t1/h) = h / (2 pi) * integral_{t1}^{t2} f(t) dt,
//   f(t) = exp(-(h^2 + t^2) / 2) / (h^2 + t^2)          (Owen 1956; dT(h, t/h)/dt = h f(t) / (2 pi)),
// f analytic except for poles at t = +-i h. With t = c + L s (centre c, half-length L), the
// n-point Gauss-Legendre rule G_n on s in [-1, 1] has, for g(s) = f(c + L s) analytic in the
// open Bernstein ellipse E_rho (foci -1 and 1, semi-axes a = (rho + 1/rho)/2 and
// b = (rho - 1/rho)/2) with |g| <= M there,
//   |integral - G_n| <= (64/15) M rho^(-2n) / (1 - rho^(-2))
// (L. N. Trefethen, "Is Gauss quadrature better than Clenshaw-Curtis?", SIAM Review 50(1), 2008,
// Theorem 4.5, and "Approximation Theory and Approximation Practice" (ATAP), ch. 19), written
// here for n nodes as its proof gives it: Chebyshev coefficients |a_k| <= 2 M rho^(-k) (ATAP,
// Theorem 8.1), the rule exact to degree 2n - 1, odd k integrating to 0 both ways, and
// |I(T_k)| + |G_n(T_k)| <= 2 + 2/15 for even k >= 4, summed over even k >= 2n. That is the
// theorem's rho^(-2m) / (rho^2 - 1) with m + 1 = n nodes: the safer of the two readings of its
// index, a factor rho^2 above the other.
//
// M in closed form: E_rho lies in the rectangle |Re s| <= a, |Im s| <= b, whose image has
// z = x + i y with |y| <= beta = L b and |x| >= x_min = max(0, |c| - L a). There
// |exp(-(h^2 + z^2) / 2)| = exp(-(h^2 + x^2 - y^2) / 2) <= exp(-D / 2) and
// |h^2 + z^2| >= Re(h^2 + z^2) >= D, with D = h^2 + x_min^2 - beta^2; when D > 0 the rectangle
// holds no pole and M = exp(-D / 2) / D. The bound is taken relative to the integral itself:
// on [t1, t2] f >= f_min = exp(-r_max^2 / 2) / r_max^2 (r_max^2 = h^2 + max(t1^2, t2^2)), so
//   |I - (h L / 2 pi) G_n| / I <= (32/15) (r_max^2 / D) exp((t_max^2 - x_min^2 + beta^2) / 2)
//                                 * rho^(-2n) / (1 - rho^(-2)),
// needing no exponential to evaluate (log(r_max^2 / D) <= r_max^2 / D - 1). Per edge the rule
// tries two powers of two for rho (near the optimum, short_edge_rule.cpp) and takes the
// smallest n that brings this under kShortEdgeTarget
// (2^-54, a quarter of the spacing of doubles: small next to the rounding of the sum, so the
// result keeps the closed form's 1e-16 level at any requested tolerance). An edge that would
// need more than kShortEdgeMaxNodes nodes (long edges, edges passing close to the mean, far
// edges whose density falls steeply), or whose rounding allowance would exceed
// kShortEdgeMaxRounding units of 2^-53 (edges beyond about 4 sigma, where rounding r^2 alone
// costs that), is left to Owen's T.
//
// Cost: n exponentials (one batch of libmvec's exp for a block of edges) and a few flops per
// node, against two Owen's T values and their Q values. A 200-gon around the mean, each edge
// about 1/60 of its distance from the mean long, needs 5 to 7 nodes.
//
// The series. A group of four edges each no longer than a quarter of its centre's distance
// from the mean (|L| <= r_c / 4, r_c^2 = h^2 + c^2) is taken first by the Taylor series of the
// integrand about the centre instead, which needs one exponential an edge (at the centre)
// where the rule needs one a node: with t = c + s,
//   f(c + s) = exp(-r_c^2 / 2) g(s),  g(s) = E(s) / (r_c^2 + 2 c s + s^2),  E(s) = exp(-c s - s^2/2),
// E's coefficients by e_0 = 1, e_1 = -c, e_(n+1) = -(c e_n + e_(n-1)) / (n + 1) (from
// E' = -(c + s) E), g's by r_c^2 g_n = e_n - 2 c g_(n-1) - g_(n-2), and
//   integral_{-L}^{L} g = 2 sum over even n of g_n L^(n+1) / (n + 1).
// Its truncation after n = N is bounded through the poles a, conj(a) = -c +- i h of g (both at
// distance r_c): g = Im(E(s) / (s - a)) / h on the reals, and E(s) / (s - a) has the
// coefficients -sum_(j <= n) e_j a^(j - n - 1), of modulus at most r_c^(-n-1) sum_j |e_j| r_c^j
// <= r_c^(-n-1) exp(|c| r_c + r_c^2 / 2) (exp(|c| s + s^2 / 2) majorises E term by term); against
// the integral's least value 2 |L| exp(-|c| |L| - L^2 / 2) / r_max^2 the tail is at most
//   exp(|c| (r_c + |L|) + (r_c^2 + L^2) / 2) (r_max^2 / (h r_c)) rho^(N+1) / (1 - rho),  rho = |L| / r_c,
// brought under kShortEdgeTarget as the rule's bound is (logarithms from the exponent's bits,
// from the safe side, short_edge_rule.cpp). Rounding: the recurrences' errors are those of the
// same recurrences on absolute values, which are the coefficients of exp(|c| s + s^2 / 2) /
// (r_c^2 - 2 |c| s - s^2) (positive, convergent beyond |L| where 2 |c| |L| + L^2 <= r_c^2 / 2);
// a term n carries at most about 11 n + 12 units of them and the sum a unit a term, which
// against the integral gives K (12 + m + 11 |L| (|c| + |L|) (1 + 2 / D')) units, D' = r_c^2 -
// 2 |c| |L| - L^2, K = r_max^2 exp(2 |c| |L| + L^2) / D', besides the rule's own allowance for
// the inputs' rounding. A group the series cannot serve whole goes to the rule. On the 200-gon
// every group takes the series, 8 to 14 terms (the rule took 5 to 7 nodes).

#include <cstdint>

namespace strewn::detail {

inline constexpr int kShortEdgeMaxNodes = 16;
inline constexpr int kShortEdgeBlock = 32;  // edges per call of short_edge_rule at most
inline constexpr double kShortEdgeTarget = 0x1p-54;
inline constexpr double kShortEdgeMaxRounding = 128.0;  // in units of 2^-53 (short_edge_rule.cpp)

// Edges i < n (n <= kShortEdgeBlock) given by h[i] > 0 and t1[i] < t2[i] (should rounding
// have swapped a tiny edge's ends, its value comes out negative, its bound still holding), the
// arrays (served too) readable up to the next multiple of four (lanes past n are ignored). On input served[i]
// says whether the caller allows the rule for edge i; on output, whether it served it. For a
// served edge: value[i] ~ T(h, t2/h) - T(h, t1/h), abs_err[i] its bound (the rule's plus
// the rounding of its arithmetic, libmvec's exp taken within 4 ulp), nodes[i] the rule's n
// (the largest that the served edges of its group of four need).
// Four edges a time on four-lane vectors (x86-64-v3 and plain builds, fma_clones.hpp).
// With `density`, also for each edge the series served an upper bound on exp(-d^2 / 2), d the
// edge's least distance from the mean (from the exponential the series takes at the edge's
// centre, so that the caller's bound on moved ends needs none of its own there), and a
// negative number for every other edge.
void short_edge_rule(const double* h, const double* t1, const double* t2, int n, bool* served, double* value,
                     double* abs_err, int* nodes, double* density = nullptr);

// Pieces, for tests: the n-point Gauss-Legendre nodes and weights on [-1, 1] (2 <= n <=
// kShortEdgeMaxNodes; ascending; computed once by Newton's method on the Legendre recurrence
// in long double, Abramowitz and Stegun 25.4.29 for the weights), the rule's value for one edge,
// and Trefethen's bound above for given n and rho, absolute (infinite where D <= 0).
const double* gauss_legendre_nodes(int n);
const double* gauss_legendre_weights(int n);
double short_edge_value(double h, double t1, double t2, int n);
double short_edge_bound(double h, double t1, double t2, int n, double rho);
// The series (below): the terms N after which its truncation is within kShortEdgeTarget of the
// edge's value (+infinity where it is not offered), and its value with the even terms up to m.
double short_edge_series_terms(double h, double t1, double t2);
double short_edge_series_value(double h, double t1, double t2, int m);

}  // namespace strewn::detail

#endif
