// The Gauss-Legendre rule for short straight edges, with Trefethen's bound (short_edge_rule.hpp).
#include "integrate/exact/short_edge_rule.hpp"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <cstring>
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
const double kSeriesConstant = -std::log(kShortEdgeTarget) + 0.05;  // (series_terms_needed)

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

// log x from below, within 0.0597, for x > 0 finite and normal: E log 2 + log m with
// x = m 2^E, m in [1, 2), and log m >= (m - 1) log 2 (the chord of the concave log; its largest
// gap, at m = 1 / log 2, is 0.0597). From the bits: no library call, no division.
STREWN_LANES_INLINE V4 log_chord(V4 x) {
  const V4 e = (V4)(((M4)x >> 52) | M4{0x4330000000000000LL, 0x4330000000000000LL, 0x4330000000000000LL,
                                       0x4330000000000000LL}) -
               (0x1p52 + 1023.0);
  const V4 m = (V4)(((M4)x & M4{0x000fffffffffffffLL, 0x000fffffffffffffLL, 0x000fffffffffffffLL,
                                 0x000fffffffffffffLL}) |
                    M4{0x3ff0000000000000LL, 0x3ff0000000000000LL, 0x3ff0000000000000LL, 0x3ff0000000000000LL});
  return (e + m - 1.0) * kLog2;
}
constexpr double kLogChordGap = 0.0597;

// The series' terms needed (short_edge_rule.hpp, "The series"): with the poles a, conj(a) =
// -c +- i h of g at distance r_c, g = Im(E(s) / (s - a)) / h and E(s) / (s - a) has
// coefficients -sum_j e_j a^(j - n - 1), at most r_c^(-n-1) E^(r_c) in modulus, E^(x) =
// exp(|c| x + x^2 / 2) majorising E's series term by term; so the tail after n = N, against the
// integral's least value 2 |L| exp(-|c| |L| - L^2 / 2) / r_max^2, is at most
//     exp(|c| (r_c + |L|) + (r_c^2 + L^2) / 2) (r_max^2 / (h r_c)) rho^(N+1) / (1 - rho),
// rho = |L| / r_c <= 1/2 (-log(1 - rho) <= 2 rho). N + 1 from its logarithm over log(1 / rho),
// the logarithms by log_chord from the right side.
STREWN_LANES_INLINE V4 series_terms_needed(V4 hv, V4 L, V4 abs_c, V4 rc, V4 r_max2) {
  const V4 log_inv_rho = log_chord(rc) - log_chord(L) - kLogChordGap;
  const V4 log_ratio = log_chord(r_max2) + kLogChordGap - log_chord(hv) - log_chord(rc);
  return (kSeriesConstant + abs_c * (rc + L) + 0.5 * (rc * rc + L * L) + log_ratio + 2.0 * L / rc) / log_inv_rho - 1.0;
}

// The series' sums for N groups of four edges (N = 1 or 2): sum over even n <= m of
// g_n L^n / (n + 1), g_n the Taylor coefficients of g(s) = E(s) / (r_c^2 + 2 c s + s^2) about
// the edge's centre, E(s) = exp(-c s - s^2 / 2) = sum of e_n s^n: e_(n+1) = -(c e_n + e_(n-1)) /
// (n + 1) (from E' = -(c + s) E) and r_c^2 g_n = e_n - 2 c g_(n-1) - g_(n-2). Both recurrences
// are chains: written as g_n = k g_(n-1) + (e_n - g_(n-2)) / r_c^2 with k = -2 c / r_c^2, and
// e_(n+1) = (-c / (n + 1)) e_n - e_(n-1) / (n + 1), each step's chain is one multiply-add, the
// rest computed beside it, and N groups' chains side by side keep the multiplier busy while
// each waits. (Every coefficient's contributions pass through at most four roundings a step,
// as before the rewriting: the rounding allowance of short_edge_rule.hpp holds as it is.)
// 1 / r_c^2 comes from the caller's group stage (one division a group fewer). Lanes not wanted
// compute junk that nothing reads.
template <int N>
STREWN_LANES_INLINE void series_sums(const double* t1, const double* t2, const double* inverse_rc2, const int* groups,
                                     int m, V4* out) {
  static constexpr double kInverse[] = {1.0,        1.0,        1.0 / 2,  1.0 / 3,  1.0 / 4,  1.0 / 5,
                                        1.0 / 6,    1.0 / 7,    1.0 / 8,  1.0 / 9,  1.0 / 10, 1.0 / 11,
                                        1.0 / 12,   1.0 / 13,   1.0 / 14, 1.0 / 15, 1.0 / 16, 1.0 / 17,
                                        1.0 / 18,   1.0 / 19};
  static_assert(sizeof kInverse / sizeof kInverse[0] >= kShortEdgeMaxNodes + 3, "1/(n+1) for every term");
  V4 c[N], inv_rc2[N], k_g[N], L2[N], g_2[N], g_1[N], sum[N], power[N], e[N], e_1[N];
  for (int j = 0; j < N; ++j) {
    const int at = 4 * groups[j];
    const V4 a1 = load4(t1 + at), a2 = load4(t2 + at);
    c[j] = 0.5 * (a1 + a2);
    const V4 L = 0.5 * (a2 - a1);
    inv_rc2[j] = load4(inverse_rc2 + at);  // 1 / (h^2 + c^2), the caller's
    k_g[j] = -2.0 * c[j] * inv_rc2[j];
    L2[j] = L * L;
    g_2[j] = splat(0.0);
    g_1[j] = inv_rc2[j];  // g_(n-2), g_(n-1)
    sum[j] = g_1[j];
    power[j] = splat(1.0);
    e[j] = -c[j];
    e_1[j] = splat(1.0);  // e_n, e_(n-1)
  }
  for (int k = 1; k < m; k += 2) {
    for (int j = 0; j < N; ++j) {
      const V4 g = k_g[j] * g_1[j] + (e[j] - g_2[j]) * inv_rc2[j];  // odd n = k
      g_2[j] = g_1[j];
      g_1[j] = g;
      const V4 next = (-kInverse[k + 1] * c[j]) * e[j] - kInverse[k + 1] * e_1[j];
      e_1[j] = e[j];
      e[j] = next;
    }
    for (int j = 0; j < N; ++j) {
      const V4 g = k_g[j] * g_1[j] + (e[j] - g_2[j]) * inv_rc2[j];  // even n = k + 1
      g_2[j] = g_1[j];
      g_1[j] = g;
      power[j] *= L2[j];
      sum[j] += g * power[j] * kInverse[k + 2];
      const V4 next = (-kInverse[k + 2] * c[j]) * e[j] - kInverse[k + 2] * e_1[j];
      e_1[j] = e[j];
      e[j] = next;
    }
  }
  for (int j = 0; j < N; ++j) out[j] = sum[j];
}

double short_edge_series_terms(double h, double t1, double t2) {
  const V4 a1 = splat(t1), a2 = splat(t2), hv = splat(h);
  const V4 c = 0.5 * (a1 + a2), abs_L = abs4(0.5 * (a2 - a1)), abs_c = abs4(c);
  const V4 rc2 = hv * hv + c * c, r_max2 = hv * hv + max4(a1 * a1, a2 * a2);
  if (!(16.0 * abs_L[0] * abs_L[0] <= rc2[0]) || !(h > 0.0)) return std::numeric_limits<double>::infinity();
  return series_terms_needed(hv, abs_L, abs_c, sqrt4(rc2), r_max2)[0];
}

double short_edge_series_value(double h, double t1, double t2, int m) {
  const double c = 0.5 * (t1 + t2), L = 0.5 * (t2 - t1);
  const double a1[4] = {t1, t1, t1, t1}, a2[4] = {t2, t2, t2, t2};
  const double inverse = 1.0 / (h * h + c * c);
  const double inverse_rc2[4] = {inverse, inverse, inverse, inverse};
  const int group = 0;
  V4 sum;
  series_sums<1>(a1, a2, inverse_rc2, &group, m, &sum);
  return h * L * (2.0 * kOneDivTwoPi) * std::exp(-0.5 * (h * h + c * c)) * sum[0];
}

STREWN_FMA_CLONES void short_edge_rule(const double* h, const double* t1, const double* t2, int n, bool* served,
                                       double* value, double* abs_err, int* nodes, double* density) {
  const GaussLegendreTable& gl = table();
  constexpr int kGroups = kShortEdgeBlock / 4;
  double arg[kShortEdgeBlock * kShortEdgeMaxNodes], r2s[kShortEdgeBlock * kShortEdgeMaxNodes];
  double scale[kShortEdgeBlock], rounding[kShortEdgeBlock], centre_exp[kShortEdgeBlock], inverse_rc2[kShortEdgeBlock];
  // For `density`: exp(-d^2 / 2) <= exp(-r_c^2 / 2) exp(x / 2), as r_c^2 - d^2 <= x = 2 |c| |L| +
  // L^2 (d^2 = h^2 + (|c| - |L|)^2 where the foot is off the edge, h^2 = r_c^2 - c^2 with c^2
  // < L^2 where it is on it); with x <= 1/2 (the series' condition) exp(y) <= 1 + y + y^2 for
  // y = x / 2 <= 1 (e^y - 1 - y <= (e - 2) y^2 there); a factor 1 + 1e-14 + 1e-15 r_c^2 for the
  // rounding (r_c^2's few ulps move its exponential by a few eps r_c^2 relative).
  double growth[kShortEdgeBlock];
  int group_nodes[kGroups];
  bool group_series[kGroups];
  bool any_series = false;
  // The edges the rule serves (not the series): their index, n and rounding units; the packs'
  // scale h L / (2 pi).
  int packed[kShortEdgeBlock], packed_nodes[kShortEdgeBlock], packed_count = 0;
  double rule_units[kShortEdgeBlock], pack_scale[kShortEdgeBlock];
  for (int g = 0; 4 * g < n; ++g) {
    // The group's served flags as a mask, four bytes at once (readable to a multiple of four).
    std::uint32_t flags = 0;
    std::memcpy(&flags, served + 4 * g, sizeof flags);
    const M4 lane = M4{0, 1, 2, 3} + 4 * g;
    const M4 wanted = (((M4{flags, flags, flags, flags} >> M4{0, 8, 16, 24}) & 0xff) != 0) & (lane < n);
    group_nodes[g] = 0;
    group_series[g] = false;
    store4(centre_exp + 4 * g, splat(0.0));
    if (!(wanted[0] | wanted[1] | wanted[2] | wanted[3])) continue;
    // Lanes not wanted compute a harmless edge.
    const V4 hv = blend(wanted, load4(h + 4 * g), splat(1.0));
    const V4 a1 = masked(load4(t1 + 4 * g), wanted), a2 = masked(load4(t2 + 4 * g), wanted);
    // L < 0 where rounding gave t2 < t1 on a tiny edge: the rule then integrates backwards,
    // its bound taken with |L|.
    const V4 c = 0.5 * (a1 + a2), L = 0.5 * (a2 - a1), abs_L = abs4(L);
    const V4 h2 = hv * hv, t_max2 = max4(a1 * a1, a2 * a2), r_max2 = h2 + t_max2, abs_c = abs4(c);
    const V4 t_max = max4(abs4(a1), abs4(a2));
    const V4 base_units = 21.0 + 6.0 * r_max2 + 4.0 * t_max / hv;
    // The series first, where every wanted edge of the group has |L| <= r_c / 4 (rho <= 1/4:
    // log(1 / rho) >= 1.3); a group with a longer edge (next to the mean) goes straight on.
    const V4 rc2 = h2 + c * c;
    const M4 short_enough = wanted & (16.0 * abs_L * abs_L <= rc2) & (hv > splat(0.0));
    if (((short_enough[0] ^ wanted[0]) | (short_enough[1] ^ wanted[1]) | (short_enough[2] ^ wanted[2]) |
         (short_enough[3] ^ wanted[3])) == 0) {
      const V4 rc = sqrt4(rc2), inv_rc2 = 1.0 / rc2;
      const V4 terms = series_terms_needed(hv, abs_L, abs_c, rc, r_max2);
      // Rounding (short_edge_rule.hpp): K (12 + m + 11 |L| (|c| + |L|) (1 + 2 / D')), with
      // D' = r_c^2 - x >= r_c^2 / 2 and K = r_max^2 / (D' (1 - x)) >= r_max^2 e^x / D',
      // x = 2 |c| |L| + L^2 <= 1/2 (e^x <= 1 / (1 - x)); 1 / (1 - y) <= 1 + 2y for y <= 1/2
      // takes the divisions out: K <= (r_max^2 / r_c^2)(1 + 2 x / r_c^2)(1 + 2x), 2 / D' <= 4 / r_c^2.
      const V4 x = 2.0 * abs_c * abs_L + abs_L * abs_L;
      const V4 k_factor = r_max2 * inv_rc2 * (1.0 + 2.0 * x * inv_rc2) * (1.0 + 2.0 * x);
      const V4 series_units =
          base_units + k_factor * (12.0 + kShortEdgeMaxNodes + 11.0 * abs_L * (abs_c + abs_L) * (1.0 + 4.0 * inv_rc2));
      const M4 series_ok = short_enough & (terms <= splat(kShortEdgeMaxNodes)) & (x <= 0.5 * rc2) &
                           (x <= splat(0.5)) & (series_units <= splat(kShortEdgeMaxRounding));
      if (((series_ok[0] ^ wanted[0]) | (series_ok[1] ^ wanted[1]) | (series_ok[2] ^ wanted[2]) |
           (series_ok[3] ^ wanted[3])) == 0) {
        // (served stays as it is: every wanted lane is served)
        const V4 t = masked(terms, series_ok);
        const double most = std::max(std::max(t[0], t[1]), std::max(t[2], t[3]));
        int m = std::max(2, static_cast<int>(std::ceil(most)));
        m += m & 1;  // whole pairs of terms
        group_nodes[g] = m;
        group_series[g] = true;
        any_series = true;
        store4(scale + 4 * g, hv * L * (2.0 * kOneDivTwoPi));
        store4(rounding + 4 * g, 1.01 * kShortEdgeTarget + kUnit * series_units);
        store4(centre_exp + 4 * g, -0.5 * rc2);
        store4(inverse_rc2 + 4 * g, inv_rc2);
        store4(growth + 4 * g, blend(wanted, (1.0 + 1e-14 + 1e-15 * rc2) * (1.0 + 0.5 * x + 0.25 * x * x), splat(-1.0)));
        continue;
      }
    }
    const V4 off = max4(abs_c - abs_L, splat(0.0));
    const V4 target = 1.1 * sqrt4(h2 + off * off) / abs_L;  // +inf for L = 0
    const V4 rho0 = (V4)((M4)min4(max4(target, splat(2.0)), splat(0x1p30)) &
                         M4{0x7ff0000000000000LL, 0x7ff0000000000000LL, 0x7ff0000000000000LL, 0x7ff0000000000000LL});
    const V4 best = min4(nodes_needed(rho0, h2, abs_L, abs_c, t_max2, r_max2),
                         nodes_needed(2.0 * rho0, h2, abs_L, abs_c, t_max2, r_max2));
    const V4 rounding_units = base_units;  // + n
    const M4 ok = wanted & (best <= splat(kShortEdgeMaxNodes)) &
                  (rounding_units <= splat(kShortEdgeMaxRounding - kShortEdgeMaxNodes));
    // The served lanes join a list, packed four to a vector below whatever their group: a group
    // with one served edge no longer takes four lanes' exponentials.
    for (int k = 0; k < 4; ++k) {
      if (4 * g + k < n) served[4 * g + k] = ok[k] != 0;
      if (!ok[k]) continue;
      packed[packed_count] = 4 * g + k;
      packed_nodes[packed_count++] = std::max(2, static_cast<int>(std::ceil(best[k])));
      rule_units[4 * g + k] = rounding_units[k];
    }
  }
  // The rule's edges, most nodes first (insertion sort: at most kShortEdgeBlock of them), four
  // lanes a pack at the pack's largest n; a short last pack repeats its last edge.
  for (int i = 1; i < packed_count; ++i)
    for (int j = i; j > 0 && packed_nodes[j] > packed_nodes[j - 1]; --j) {
      std::swap(packed_nodes[j], packed_nodes[j - 1]);
      std::swap(packed[j], packed[j - 1]);
    }
  int total = 0;
  for (int p = 0; 4 * p < packed_count; ++p) {
    const int m = packed_nodes[4 * p];
    double h_lane[4], a_lane[4], b_lane[4];
    for (int k = 0; k < 4; ++k) {
      const int e = packed[std::min(4 * p + k, packed_count - 1)];
      h_lane[k] = h[e];
      a_lane[k] = t1[e];
      b_lane[k] = t2[e];
    }
    const V4 hv = load4(h_lane), a1 = load4(a_lane), a2 = load4(b_lane);
    const V4 c = 0.5 * (a1 + a2), L = 0.5 * (a2 - a1), h2 = hv * hv;
    store4(pack_scale + 4 * p, hv * L * kOneDivTwoPi);
    const double* xs = gl.x[m];
    for (int i = 0; i < m; ++i) {
      const V4 t = c + L * xs[i];
      const V4 r2 = h2 + t * t;
      store4(r2s + total + 4 * i, r2);
      store4(arg + total + 4 * i, -0.5 * r2);
    }
    total += 4 * m;
  }
  exp_in_place(arg, total);
  if (any_series) exp_in_place(centre_exp, (n + 3) & ~3);
  // The series' sums first, two groups at a time where there are two (series_sums).
  int pending = -1;  // a series group waiting for a partner
  V4 series_value[kGroups];
  for (int g = 0; 4 * g < n; ++g) {
    if (!group_series[g]) continue;
    if (pending < 0) {
      pending = g;
      continue;
    }
    // Two groups side by side, to the more terms of the two (more only shrink the truncation).
    const int pair[2] = {pending, g};
    V4 sums[2];
    series_sums<2>(t1, t2, inverse_rc2, pair, std::max(group_nodes[pending], group_nodes[g]), sums);
    series_value[pending] = sums[0];
    series_value[g] = sums[1];
    pending = -1;
  }
  if (pending >= 0) series_sums<1>(t1, t2, inverse_rc2, &pending, group_nodes[pending], &series_value[pending]);
  for (int g = 0; 4 * g < n; ++g) {
    const int m = group_nodes[g];
    if (density) store4(density + 4 * g, group_series[g] ? load4(centre_exp + 4 * g) * load4(growth + 4 * g) : splat(-1.0));
    if (m == 0) {
      store4(value + 4 * g, splat(0.0));
      store4(abs_err + 4 * g, splat(0.0));
      continue;
    }
    const V4 v = load4(scale + 4 * g) * load4(centre_exp + 4 * g) * series_value[g];
    store4(value + 4 * g, v);
    store4(abs_err + 4 * g, abs4(v) * load4(rounding + 4 * g));
    for (int k = 0; k < 4; ++k) nodes[4 * g + k] = m;
  }
  // The packs' sums, each lane back to its edge.
  int at = 0;
  for (int p = 0; 4 * p < packed_count; ++p) {
    const int m = packed_nodes[4 * p];
    const double* w = gl.w[m];
    V4 sum = splat(0.0);
    for (int i = 0; i < m; ++i, at += 4) sum += w[i] * load4(arg + at) / load4(r2s + at);
    const V4 v = load4(pack_scale + 4 * p) * sum;
    for (int k = 0; k < 4 && 4 * p + k < packed_count; ++k) {
      const int e = packed[4 * p + k];
      value[e] = v[k];
      abs_err[e] = std::fabs(v[k]) * (1.01 * kShortEdgeTarget + kUnit * (rule_units[e] + m));
      nodes[e] = m;
    }
  }
}

}  // namespace strewn::detail
