// The Gauss-Legendre rule for short straight edges, with Trefethen's bound (short_edge_rule.hpp).
#include "integrate/exact/short_edge_rule.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "special/fma_clones.hpp"
#include "special/four_lanes.hpp"
#include "special/vector_math.hpp"
#include "strewn/constants.hpp"

#define STREWN_LANES_INLINE inline __attribute__((always_inline))

namespace strewn::detail {
namespace {

// Nodes and weights for n = 2 .. kShortEdgeMaxNodes, row n, ascending nodes.
struct GaussLegendreTable {
  double x[kShortEdgeMaxNodes + 1][kShortEdgeMaxNodes];
  double w[kShortEdgeMaxNodes + 1][kShortEdgeMaxNodes];
  GaussLegendreTable() {
    for (int n = 2; n <= kShortEdgeMaxNodes; ++n) {
      for (int i = 0; i < (n + 1) / 2; ++i) {
        // Newton from Tricomi's first guess (A&S 22.16.6), on P_n by its three-term recurrence.
        long double z = std::cos(kPi * (i + 0.75) / (n + 0.5)), derivative = 1.0L;
        for (int iteration = 0; iteration < 100; ++iteration) {
          long double p1 = 1.0L, p2 = 0.0L;
          for (int j = 1; j <= n; ++j) {
            const long double p3 = p2;
            p2 = p1;
            p1 = ((2 * j - 1) * z * p2 - (j - 1) * p3) / j;
          }
          derivative = n * (z * p1 - p2) / (z * z - 1.0L);
          const long double step = p1 / derivative;
          z -= step;
          if (std::fabs(step) <= 1e-19L) break;
        }
        const long double weight = 2.0L / ((1.0L - z * z) * derivative * derivative);  // A&S 25.4.29
        x[n][i] = -static_cast<double>(z);
        x[n][n - 1 - i] = static_cast<double>(z);
        w[n][i] = w[n][n - 1 - i] = static_cast<double>(weight);
      }
      if (n % 2 == 1) x[n][n / 2] = 0.0;
    }
  }
};

const GaussLegendreTable& table() {
  static const GaussLegendreTable t;
  return t;
}

// The rule's rho, per edge: the bound's rho^(-2n) asks for a large rho, its
// exp(beta^2 / 2) / D (beta about rho L / 2) for a small one; the optimum keeps beta about half
// the edge's least distance from the mean r_near (measured on the 200-gon's and the 8-vertex
// polygon's edges against the best of rho = 2^2 ... 2^9: the same n for 0.5 to 0.6). So rho0
// is the power of two at or below 1.1 r_near / L, at least 2, and the rule tries rho0 and 2 rho0.
// For each, with x = rho^-2 <= 1/4 and -log(1 - x) <= x / (1 - x) <= 4x/3,
//   n >= (log(32/15) + 4x/3 - 1 - log(target) + 0.05 + r_max^2 / D
//         + (t_max^2 - x_min^2 + beta^2) / 2) / (2 log rho),
// the 0.05 for the rounding of this arithmetic (a factor 1.05 on the bound).
const double kConstant = std::log(32.0 / 15.0) - 1.0 - std::log(kShortEdgeTarget) + 0.05;
constexpr double kLog2 = 0.69314718055994530942;

// Relative rounding of the rule's arithmetic, in units u = 2^-53: the nodes t = c + L s within
// 4 u t_max, so r^2 = h^2 + t^2 within 3 u r^2 + 8 u |t| t_max <= 11 u r_max^2 (the exponent
// within half that: 6 u r_max^2) and 1/r^2 relatively within 4 u + 4 u t_max / h (as
// |t| / (h^2 + t^2) <= 1 / (2 h)); libmvec's exp within 4 ulp (8 u), the weighted sum of n
// positive terms within n u, the weights, the scalings and 1/(2 pi) within 9 u: in all
// 21 + n + 6 r_max^2 + 4 t_max / h units, taken with n = kShortEdgeMaxNodes.
// The exponent's part is the rounding of r^2 itself, which grows with the distance: an edge
// whose allowance would pass kShortEdgeMaxRounding units (about 1.4e-14 relative) is left to
// Owen's T, so that what the rule serves stays at the closed form's accuracy.
constexpr double kUnit = 0x1p-53;

}  // namespace

const double* gauss_legendre_nodes(int n) { return table().x[n]; }
const double* gauss_legendre_weights(int n) { return table().w[n]; }

double short_edge_value(double h, double t1, double t2, int n) {
  const double c = 0.5 * (t1 + t2), L = 0.5 * (t2 - t1);
  const double* x = gauss_legendre_nodes(n);
  const double* w = gauss_legendre_weights(n);
  double sum = 0.0;
  for (int i = 0; i < n; ++i) {
    const double t = c + L * x[i];
    const double r2 = h * h + t * t;
    sum += w[i] * std::exp(-0.5 * r2) / r2;
  }
  return h * L * kOneDivTwoPi * sum;
}

double short_edge_bound(double h, double t1, double t2, int n, double rho) {
  const double c = 0.5 * (t1 + t2), L = std::fabs(0.5 * (t2 - t1));
  const double a = 0.5 * (rho + 1.0 / rho), beta = L * 0.5 * (rho - 1.0 / rho);
  const double x_min = std::max(std::fabs(c) - L * a, 0.0);
  const double D = h * h + x_min * x_min - beta * beta;
  if (!(D > 0.0)) return std::numeric_limits<double>::infinity();
  const double M = std::exp(-0.5 * D) / D;
  return h * L * kOneDivTwoPi * (64.0 / 15.0) * M * std::pow(rho, -2.0 * n) / (1.0 - 1.0 / (rho * rho));
}

// n needed with this rho (a power of two >= 2, lane by lane), +inf where D is not clear of 0.
STREWN_LANES_INLINE V4 nodes_needed(V4 rho, V4 h2, V4 L, V4 abs_c, V4 t_max2, V4 r_max2) {
  const V4 inverse = 1.0 / rho;
  const V4 a = 0.5 * (rho + inverse), b = 0.5 * (rho - inverse);
  // log rho from the exponent's bits (rho a power of two): the biased exponent as a double by
  // the 2^52 trick, less the bias.
  const V4 biased = (V4)(((M4)rho >> 52) | M4{0x4330000000000000LL, 0x4330000000000000LL, 0x4330000000000000LL,
                                               0x4330000000000000LL}) - 0x1p52;
  const V4 log_rho = (biased - 1023.0) * kLog2;
  const V4 beta = L * b;
  const V4 x_min = max4(abs_c - L * a, splat(0.0));
  const V4 x2 = x_min * x_min, beta2 = beta * beta;
  const V4 D = h2 + x2 - beta2;
  const V4 needed =
      (kConstant + (4.0 / 3.0) * inverse * inverse + r_max2 / D + 0.5 * (t_max2 - x2 + beta2)) / (2.0 * log_rho);
  // D well clear of zero, so that its rounding cannot hide a pole.
  return blend(D > 1e-6 * (h2 + x2 + beta2), needed, splat(std::numeric_limits<double>::infinity()));
}

STREWN_FMA_CLONES void short_edge_rule(const double* h, const double* t1, const double* t2, int n, bool* served,
                                       double* value, double* abs_err, int* nodes) {
  const GaussLegendreTable& gl = table();
  constexpr int kGroups = kShortEdgeBlock / 4;
  double arg[kShortEdgeBlock * kShortEdgeMaxNodes], r2s[kShortEdgeBlock * kShortEdgeMaxNodes];
  double scale[kShortEdgeBlock], rounding[kShortEdgeBlock];
  int group_nodes[kGroups], group_start[kGroups];
  int total = 0;
  for (int g = 0; 4 * g < n; ++g) {
    M4 wanted;
    for (int k = 0; k < 4; ++k) wanted[k] = 4 * g + k < n && served[4 * g + k] ? -1 : 0;
    group_nodes[g] = 0;
    if (!(wanted[0] | wanted[1] | wanted[2] | wanted[3])) continue;
    // Lanes not wanted compute a harmless edge.
    const V4 hv = blend(wanted, load4(h + 4 * g), splat(1.0));
    const V4 a1 = masked(load4(t1 + 4 * g), wanted), a2 = masked(load4(t2 + 4 * g), wanted);
    // L < 0 where rounding gave t2 < t1 on a tiny edge: the rule then integrates backwards,
    // its bound taken with |L|.
    const V4 c = 0.5 * (a1 + a2), L = 0.5 * (a2 - a1), abs_L = abs4(L);
    const V4 h2 = hv * hv, t_max2 = max4(a1 * a1, a2 * a2), r_max2 = h2 + t_max2, abs_c = abs4(c);
    const V4 off = max4(abs_c - abs_L, splat(0.0));
    const V4 target = 1.1 * sqrt4(h2 + off * off) / abs_L;  // +inf for L = 0
    const V4 rho0 = (V4)((M4)min4(max4(target, splat(2.0)), splat(0x1p30)) &
                         M4{0x7ff0000000000000LL, 0x7ff0000000000000LL, 0x7ff0000000000000LL, 0x7ff0000000000000LL});
    const V4 best = min4(nodes_needed(rho0, h2, abs_L, abs_c, t_max2, r_max2),
                         nodes_needed(2.0 * rho0, h2, abs_L, abs_c, t_max2, r_max2));
    const V4 t_max = max4(abs4(a1), abs4(a2));
    const V4 rounding_units = 21.0 + 6.0 * r_max2 + 4.0 * t_max / hv;  // + n
    const M4 ok = wanted & (best <= splat(kShortEdgeMaxNodes)) &
                  (rounding_units <= splat(kShortEdgeMaxRounding - kShortEdgeMaxNodes));
    double most = 0.0;
    for (int k = 0; k < 4; ++k) {
      if (4 * g + k < n) served[4 * g + k] = ok[k] != 0;
      if (ok[k]) most = std::max(most, best[k]);
    }
    if (!(ok[0] | ok[1] | ok[2] | ok[3])) continue;
    const int m = std::max(2, static_cast<int>(std::ceil(most)));
    group_nodes[g] = m;
    group_start[g] = total;
    store4(scale + 4 * g, hv * L * kOneDivTwoPi);
    store4(rounding + 4 * g, 1.01 * kShortEdgeTarget + kUnit * (rounding_units + m));
    const double* x = gl.x[m];
    for (int i = 0; i < m; ++i) {
      const V4 t = c + L * x[i];
      const V4 r2 = h2 + t * t;
      store4(r2s + total + 4 * i, r2);
      store4(arg + total + 4 * i, -0.5 * r2);
    }
    total += 4 * m;
  }
  exp_in_place(arg, total);
  for (int g = 0; 4 * g < n; ++g) {
    const int m = group_nodes[g];
    if (m == 0) continue;
    const double* w = gl.w[m];
    V4 sum = splat(0.0);
    for (int i = 0; i < m; ++i) {
      const int at = group_start[g] + 4 * i;
      sum += w[i] * load4(arg + at) / load4(r2s + at);
    }
    const V4 v = load4(scale + 4 * g) * sum;
    const V4 e = abs4(v) * load4(rounding + 4 * g);
    for (int k = 0; k < 4 && 4 * g + k < n; ++k) {
      value[4 * g + k] = v[k];
      abs_err[4 * g + k] = e[k];
      nodes[4 * g + k] = m;
    }
  }
}

}  // namespace strewn::detail
