// Owen's T function after Patefield & Tandy (2000), "Fast and accurate calculation of Owen's T
// function", J. Stat. Softw. 5(5): the region table (hrange, arange, select), the method and
// order of each region, and the coefficients of T3 (Chebyshev-economised series) and T5
// (Gauss-Legendre on [0, 1] in x^2) as published for double precision. The same tables are
// used by boost::math::owens_t, the reference this file is tested against.
#include "strewn/owens_t.hpp"

#include "special/fma_clones.hpp"
#include "special/four_lanes.hpp"
#include "special/owens_t_batch.hpp"
#include "special/vector_math.hpp"
#include "strewn/constants.hpp"

#include <algorithm>
#include <cmath>
#include <limits>


namespace strewn {
namespace {


// 1/sqrt(2) as a double plus the double nearest to its rounding error.
constexpr double kOneDivRootTwoLo = -4.8336466567264567e-17;

// Phi(x) - 1/2, without cancellation near 0.
double centred_phi(double x) { return 0.5 * std::erf(x * kOneDivRootTwo); }

// Q(x) = erfc(x / sqrt 2) / 2 for x + x_lo given as an unevaluated sum. For large x the
// rounding of x / sqrt 2 alone would cost 2 x^2 / 2 ulps (1.5e-13 relative at x = 36), so its
// error term is carried and applied through erfc'(y) = -2/sqrt(pi) exp(-y^2):
// erfc(y + y_lo) = erfc(y) (1 - 2 m(y) y_lo) to first order, with the Mills-type ratio
// m(y) = exp(-y^2) / (sqrt(pi) erfc(y)) = y + 1/(2y) + O(y^-3) (the asymptotic series of erfc,
// Abramowitz & Stegun 7.1.23). The correction is at most a few ulps (y_lo ~ eps y, y >= 2.1),
// so the series' 3% error at y = 2.1 costs well under an ulp, and no exponential is needed.
// Below x = 3 the rounding costs at most 9 ulps, of which erfc's own error dominates.
// Returns erfc's argument and sets the factor that turns erfc(argument) into Q(x).
double q_argument(double x, double x_lo, double& factor) {
  if (x < 3.0) {
    factor = 0.5;
    return (x + x_lo) * kOneDivRootTwo;
  }
  const double y = x * kOneDivRootTwo;
  const double y_lo = std::fma(x, kOneDivRootTwo, -y) + x * kOneDivRootTwoLo + x_lo * kOneDivRootTwo;
  factor = 0.5 * (1.0 - 2.0 * (y + 0.5 / y) * y_lo);
  return y;
}

double upper_q(double x, double x_lo = 0.0) {
  double factor;
  const double y = q_argument(x, x_lo, factor);
  return factor * std::erfc(y);
}

// The paper's range ends, padded with infinities to 16 and 8 entries for the search below.
constexpr double kInf = std::numeric_limits<double>::infinity();
constexpr double kHRange[16] = {0.02, 0.06, 0.09, 0.125, 0.26, 0.4, 0.6, 1.6,
                                1.7,  2.33, 2.4,  3.36,  3.4,  4.8, kInf, kInf};
constexpr double kARange[8] = {0.025, 0.09, 0.15, 0.36, 0.5, 0.9, 0.99999, kInf};
// Paper's select table, 0-based codes.
constexpr unsigned char kSelect[8][15] = {
    {0, 0, 1, 12, 12, 12, 12, 12, 12, 12, 12, 15, 15, 15, 8},
    {0, 1, 1, 2, 2, 4, 4, 13, 13, 14, 14, 15, 15, 15, 8},
    {1, 1, 2, 2, 2, 4, 4, 14, 14, 14, 14, 15, 15, 15, 9},
    {1, 1, 2, 4, 4, 4, 4, 6, 6, 15, 15, 15, 15, 15, 9},
    {1, 2, 2, 4, 4, 5, 5, 7, 7, 16, 16, 16, 11, 11, 10},
    {1, 2, 4, 4, 4, 5, 5, 7, 7, 16, 16, 16, 11, 11, 11},
    {1, 2, 3, 3, 5, 5, 7, 7, 16, 16, 16, 16, 16, 11, 11},
    {1, 2, 3, 3, 5, 5, 17, 17, 17, 17, 16, 16, 16, 11, 11}};

int region_code(double h, double a) {
  // The first range holding h (and a): how many range ends lie below it, by a binary search
  // whose steps are conditional moves rather than branches.
  int ih = h > kHRange[7] ? 8 : 0;
  ih += h > kHRange[ih + 3] ? 4 : 0;
  ih += h > kHRange[ih + 1] ? 2 : 0;
  ih += h > kHRange[ih] ? 1 : 0;
  int ia = a > kARange[3] ? 4 : 0;
  ia += a > kARange[ia + 1] ? 2 : 0;
  ia += a > kARange[ia] ? 1 : 0;
  return kSelect[ia][ih];
}

// 1/k for k = 0 .. 41 (entry 0 unused): the series below divide by small integers on their
// critical path, and a multiplication by a stored reciprocal is several times faster than a
// division (at the cost of half an ulp per term, within the 2e-15 that owens_t_test holds).
struct Reciprocals {
  double of[42];
  constexpr Reciprocals() : of() {
    for (int k = 1; k < 42; ++k) of[k] = 1.0 / k;
  }
};
constexpr Reciprocals kInverse;

// The batch's long series (T1, T2, T4) run on four-lane vectors (special/four_lanes.hpp), each
// lane to its own region's order (a lane past its order adds masked-out terms), so that one
// chunk can hold pairs of different regions of the same method.
using detail::abs4;
using detail::blend;
using detail::fma4;
using detail::load4;
using detail::M4;
using detail::masked;
using detail::splat;
using detail::store4;
using detail::V4;

// The methods T1..T5 evaluate N pairs (h, a) at once, N = 1 for a single T and N = 2 for the
// two ends of an edge: the direct piece's T(h, t1/h) and T(h, t2/h) share h, the reflected
// piece's T(t1, h/t1) and T(t2, h/t2) do not. The lanes' chains are independent, so they
// overlap in the processor's pipeline; the terms that depend on h alone are computed once
// when the lanes share it. Each lane does exactly the arithmetic of a single call, so a pair
// equals two single calls (to the bit but for T5's exponentials, which may land in other lanes
// of the vector exp: an ulp or two).
template <int N>
bool same_h(const double* h) {
  return N == 2 && h[0] == h[N - 1];
}

// T1: series in powers of a with incomplete exponential sums (small h and a).
template <int N>
void t1(const double* h, const double* a, int m, double* out) {
  double hs[N], dj[N], gj[N], as[N], aj[N], val[N];
  for (int k = 0; k < N; ++k) {
    hs[k] = -0.5 * h[k] * h[k];
    dj[k] = hs[k];
    val[k] = a[k];
  }
  // The lanes' expm1 and atan in batches.
  detail::expm1_in_place(dj, N);
  detail::atan_in_place(val, N);
  for (int k = 0; k < N; ++k) {
    // exp(hs) = 1 + expm1(hs): hs >= -1.28 in T1's regions, so the sum loses under 2 ulps.
    gj[k] = hs[k] * (1.0 + dj[k]);
    as[k] = a[k] * a[k];
    aj[k] = a[k] * kOneDivTwoPi;
    val[k] *= kOneDivTwoPi;
  }
  for (int j = 1;; ++j) {
    for (int k = 0; k < N; ++k) val[k] += dj[k] * aj[k] * kInverse.of[2 * j - 1];
    if (j >= m) break;
    for (int k = 0; k < N; ++k) {
      aj[k] *= as[k];
      dj[k] = gj[k] - dj[k];
      gj[k] *= hs[k] * kInverse.of[j + 1];
    }
  }
  for (int k = 0; k < N; ++k) out[k] = val[k];
}

// exp(-(x + x_lo)^2 / 2) = exp(arg) * factor with the square carried exactly (fma), for the
// same reason as in Q: below |x| = 2 the plain square errs by under 2 ulps.
void half_square_argument(double x, double x_lo, double& arg, double& factor) {
  factor = 1.0;
  if (std::fabs(x) < 2.0) {
    arg = -0.5 * (x + x_lo) * (x + x_lo);
    return;
  }
  const double sq = x * x;
  const double sq_lo = std::fma(x, x, -sq) + 2.0 * x * x_lo;
  arg = -0.5 * sq;
  factor = 1.0 - 0.5 * sq_lo;
}

// out[k] = exp(-h[k]^2 / 2) and, with ah given, out[N + k] = exp(-(ah[k] + ah_lo[k])^2 / 2),
// ah_lo[k] = a[k] h[k] - ah[k] (fma): the lanes' exponentials in one batch.
template <int N>
void lane_exps(const double* h, const double* a, const double* ah, double* out) {
  const int n = ah ? 2 * N : N;
  double factor[2 * N];
  for (int k = 0; k < N; ++k) {
    half_square_argument(h[k], 0.0, out[k], factor[k]);
    if (ah) half_square_argument(ah[k], std::fma(a[k], h[k], -ah[k]), out[N + k], factor[N + k]);
  }
  detail::exp_in_place(out, n);
  for (int i = 0; i < n; ++i) out[i] *= factor[i];
}

// T2: series in powers of h^-2 using Phi(ah) (large h, moderate a).
template <int N>
void t2(const double* h, const double* a, int m, const double* ah, double* out) {
  const int maxii = m + m + 1;
  double y[N], as[N], vi[N], z[N], val[N], ex[2 * N];
  lane_exps<N>(h, a, ah, ex);
  for (int k = 0; k < N; ++k) z[k] = ah[k] * kOneDivRootTwo;
  detail::erf_in_place(z, N);  // Phi(ah) - 1/2 = erf(ah / sqrt 2) / 2, the lanes at once
  for (int k = 0; k < N; ++k) {
    y[k] = 1.0 / (h[k] * h[k]);
    as[k] = -a[k] * a[k];
    vi[k] = a[k] * ex[N + k] * kOneDivRootTwoPi;
    z[k] = 0.5 * z[k] / h[k];
    val[k] = 0.0;
  }
  // z <- y (vi - ii z) as one fma on the chain, z <- (-y ii) z + y vi: the series is bound by
  // the latency of this recurrence, and the factors come off the critical path.
  for (int ii = 1;; ii += 2) {
    for (int k = 0; k < N; ++k) val[k] += z[k];
    if (ii >= maxii) break;
    for (int k = 0; k < N; ++k) {
      z[k] = std::fma(-y[k] * ii, z[k], y[k] * vi[k]);
      vi[k] *= as[k];
    }
  }
  for (int k = 0; k < N; ++k) out[k] = val[k] * ex[k] * kOneDivRootTwoPi;
}

// T3: T2 with Chebyshev-economised coefficients (large h, a near 1).
template <int N>
void t3(const double* h, const double* a, const double* ah, double* out) {
  static constexpr double c2[21] = {
      0.99999999999999987510,      -0.99999999999988796462,     0.99999999998290743652,
      -0.99999999896282500134,     0.99999996660459362918,      -0.99999933986272476760,
      0.99999125611136965852,      -0.99991777624463387686,     0.99942835555870132569,
      -0.99697311720723000295,     0.98751448037275303682,      -0.95915857980572882813,
      0.89246305511006708555,      -0.76893425990463999675,     0.58893528468484693250,
      -0.38380345160440256652,     0.20317601701045299653,      -0.82813631607004984866E-01,
      0.24167984735759576523E-01,  -0.44676566663971825242E-02, 0.39141169402373836468E-03};
  double y[N], as[N], vi[N], zi[N], val[N], ex[2 * N];
  lane_exps<N>(h, a, ah, ex);
  for (int k = 0; k < N; ++k) zi[k] = ah[k] * kOneDivRootTwo;
  detail::erf_in_place(zi, N);  // as in T2
  for (int k = 0; k < N; ++k) {
    y[k] = 1.0 / (h[k] * h[k]);
    as[k] = a[k] * a[k];
    vi[k] = a[k] * ex[N + k] * kOneDivRootTwoPi;
    zi[k] = 0.5 * zi[k] / h[k];
    val[k] = 0.0;
  }
  double ii = 1.0;
  for (int i = 0;; ++i) {
    for (int k = 0; k < N; ++k) val[k] += zi[k] * c2[i];
    if (i >= 20) break;
    for (int k = 0; k < N; ++k) {
      zi[k] = std::fma(y[k] * ii, zi[k], -y[k] * vi[k]);  // y (ii zi - vi), as in T2
      vi[k] *= as[k];
    }
    ii += 2.0;
  }
  for (int k = 0; k < N; ++k) out[k] = val[k] * ex[k] * kOneDivRootTwoPi;
}

// T4: series in powers of a^2 with a recurrence in h (moderate h, a near 1).
template <int N>
void t4(const double* h, const double* a, int m, double* out) {
  const int maxii = m + m + 1;
  double ex[2 * N], hs[N], yi[N], as[N], ai[N], val[N], ah[N];
  for (int k = 0; k < N; ++k) ah[k] = a[k] * h[k];
  lane_exps<N>(h, a, ah, ex);
  for (int k = 0; k < N; ++k) {
    hs[k] = h[k] * h[k];
    yi[k] = 1.0;
    as[k] = -a[k] * a[k];
    // exp(-h^2 (1 + a^2) / 2) with both squares carried exactly.
    ai[k] = a[k] * ex[k] * ex[N + k] * kOneDivTwoPi;
    val[k] = 0.0;
  }
  for (int ii = 1;;) {
    for (int k = 0; k < N; ++k) val[k] += ai[k] * yi[k];
    if (ii >= maxii) break;
    ii += 2;
    for (int k = 0; k < N; ++k) {
      yi[k] = std::fma(-hs[k] * kInverse.of[ii], yi[k], kInverse.of[ii]);  // (1 - hs yi) / ii, as in T2
      ai[k] *= as[k];
    }
  }
  for (int k = 0; k < N; ++k) out[k] = val[k];
}

// T5: 13-point Gauss-Legendre quadrature of the defining integral; pts are squared abscissae,
// wts include the factor 1/(2 pi).
template <int N>
void t5(const double* h, const double* a, double* out) {
  static constexpr double pts[13] = {
      0.35082039676451715489E-02, 0.31279042338030753740E-01, 0.85266826283219451090E-01,
      0.16245071730812277011,     0.25851196049125434828,     0.36807553840697533536,
      0.48501092905604697475,     0.60277514152618576821,     0.71477884217753226516,
      0.81475510988760098605,     0.89711029755948965867,     0.95723808085944261843,
      0.99178832974629703586};
  static constexpr double wts[13] = {
      0.18831438115323502887E-01, 0.18567086243977649478E-01, 0.18042093461223385584E-01,
      0.17263829606398753364E-01, 0.16243219975989856730E-01, 0.14994592034116704829E-01,
      0.13535474469662088392E-01, 0.11886351605820165233E-01, 0.10070377242777431897E-01,
      0.81130545742299586629E-02, 0.60419009528470238773E-02, 0.38862217010742057883E-02,
      0.16793031084546090448E-02};
  // exp(-h^2 r / 2) = exp(-h^2 / 2) exp(-(ah)^2 x^2 / 2), the first factor carried exactly;
  // all the lanes' exponentials at once (most of T5's time), padded to whole vectors.
  // Node-major (e[N i + k]: node i of lane k), so that the lanes' terms form vectors.
  constexpr int kExps = (14 * N + 3) / 4 * 4;
  double e[kExps], eh_factor[N], ahs[N], as[N];
  for (int k = 0; k < N; ++k) {
    ahs[k] = -0.5 * (a[k] * h[k]) * (a[k] * h[k]);
    as[k] = a[k] * a[k];
    half_square_argument(h[k], 0.0, e[13 * N + k], eh_factor[k]);
  }
  for (int i = 0; i < 13; ++i)
    for (int k = 0; k < N; ++k) e[N * i + k] = ahs[k] * pts[i];
  for (int i = 14 * N; i < kExps; ++i) e[i] = 0.0;
  detail::exp_in_place(e, kExps);
  // The sum in two halves, even and odd nodes, to shorten the chain of additions.
  double even[N], odd[N];
  for (int k = 0; k < N; ++k) even[k] = odd[k] = 0.0;
  for (int i = 0; i < 13; i += 2)
    for (int k = 0; k < N; ++k) even[k] += wts[i] * e[N * i + k] / (1.0 + as[k] * pts[i]);
  for (int i = 1; i < 13; i += 2)
    for (int k = 0; k < N; ++k) odd[k] += wts[i] * e[N * i + k] / (1.0 + as[k] * pts[i]);
  for (int k = 0; k < N; ++k) out[k] = (even[k] + odd[k]) * a[k] * (e[13 * N + k] * eh_factor[k]);
}

// T6: expansion about a = 1 (a very close to 1).
double t6(double h, double a) {
  const double normh = upper_q(h);
  const double y = 1.0 - a;
  const double r = std::atan2(y, 1.0 + a);
  double val = 0.5 * normh * (1.0 - normh);
  if (r != 0.0) val -= r * std::exp(-y * h * h * 0.5 / r) * kOneDivTwoPi;
  return val;
}

// lane_exps<4> on vectors: half_square_argument() for both branches, the lanes choosing.
void lane_exps4(V4 h, V4 a, V4 ah, V4& ex_h, V4& ex_ah) {
  double arg[8];
  V4 factor[2];
  const V4 x_of[2] = {h, ah}, x_lo_of[2] = {splat(0.0), fma4(a, h, -ah)};
  for (int j = 0; j < 2; ++j) {
    const V4 x = x_of[j], x_lo = x_lo_of[j], xs = x + x_lo, sq = x * x;
    const V4 sq_lo = fma4(x, x, -sq) + 2.0 * x * x_lo;
    const M4 small = abs4(x) < splat(2.0);
    store4(arg + 4 * j, blend(small, -0.5 * xs * xs, -0.5 * sq));
    factor[j] = blend(small, splat(1.0), 1.0 - 0.5 * sq_lo);
  }
  detail::exp_in_place(arg, 8);
  ex_h = load4(arg) * factor[0];
  ex_ah = load4(arg + 4) * factor[1];
}

// T1 on four lanes, lane k to order m[k] (as t1<1> with m[k]).
void t1_lanes(const double* h, const double* a, const int* m, double* out) {
  double dj0[4], at[4];
  const V4 hv = load4(h), av = load4(a);
  const V4 hs = -0.5 * hv * hv;
  store4(dj0, hs);
  store4(at, av);
  detail::expm1_in_place(dj0, 4);
  detail::atan_in_place(at, 4);
  V4 dj = load4(dj0);
  V4 gj = hs * (1.0 + dj);
  const V4 as = av * av;
  V4 aj = av * kOneDivTwoPi, val = load4(at) * kOneDivTwoPi;
  const V4 order{double(m[0]), double(m[1]), double(m[2]), double(m[3])};
  const int most = std::max(std::max(m[0], m[1]), std::max(m[2], m[3]));
  V4 term = splat(1.0);  // j as a vector, for the masks
  for (int j = 1;; ++j, term += 1.0) {
    val += masked(dj * aj * kInverse.of[2 * j - 1], term <= order);
    if (j >= most) break;
    aj *= as;
    dj = gj - dj;
    gj *= hs * kInverse.of[j + 1];
  }
  store4(out, val);
}

// T2 on four lanes, lane k to order m[k] (as t2<1>).
void t2_lanes(const double* h, const double* a, const int* m, const double* ah, double* out) {
  double zi[4];
  const V4 hv = load4(h), av = load4(a), ahv = load4(ah);
  V4 ex_h, ex_ah;
  lane_exps4(hv, av, ahv, ex_h, ex_ah);
  store4(zi, ahv * kOneDivRootTwo);
  detail::erf_in_place(zi, 4);
  const V4 y = 1.0 / (hv * hv), as = -av * av;
  V4 vi = av * ex_ah * kOneDivRootTwoPi;
  V4 z = 0.5 * load4(zi) / hv, val = splat(0.0);
  const V4 last{double(2 * m[0] + 1), double(2 * m[1] + 1), double(2 * m[2] + 1), double(2 * m[3] + 1)};
  const int most = 2 * std::max(std::max(m[0], m[1]), std::max(m[2], m[3])) + 1;
  V4 term = splat(1.0);  // ii as a vector, for the masks
  for (int ii = 1;; ii += 2, term += 2.0) {
    val += masked(z, term <= last);
    if (ii >= most) break;
    z = fma4(-y * double(ii), z, y * vi);
    vi *= as;
  }
  store4(out, val * ex_h * kOneDivRootTwoPi);
}

// T4 on four lanes, lane k to order m[k] (as t4<1>).
void t4_lanes(const double* h, const double* a, const int* m, double* out) {
  const V4 hv = load4(h), av = load4(a);
  V4 ex_h, ex_ah;
  lane_exps4(hv, av, av * hv, ex_h, ex_ah);
  const V4 hs = hv * hv, as = -av * av;
  V4 yi = splat(1.0), ai = av * ex_h * ex_ah * kOneDivTwoPi, val = splat(0.0);
  const V4 last{double(2 * m[0] + 1), double(2 * m[1] + 1), double(2 * m[2] + 1), double(2 * m[3] + 1)};
  const int most = 2 * std::max(std::max(m[0], m[1]), std::max(m[2], m[3])) + 1;
  V4 term = splat(1.0);  // ii as a vector, for the masks
  for (int ii = 1;;) {
    val += masked(ai * yi, term <= last);
    if (ii >= most) break;
    ii += 2;
    term += 2.0;
    yi = fma4(-hs * kInverse.of[ii], yi, splat(kInverse.of[ii]));
    ai *= as;
  }
  store4(out, val);
}

constexpr unsigned char kOrder[18] = {2, 3, 4, 5, 7, 10, 12, 18, 10, 20, 30, 0, 4, 7, 8, 20, 0, 0};
constexpr unsigned char kMethod[18] = {1, 1, 1, 1, 1, 1, 1, 1, 2, 2, 2, 3, 4, 4, 4, 4, 5, 6};

// Method T1..T5 of region `code` for N values of a (T6 is the caller's).
template <int N>
void by_method(int code, const double* h, const double* a, const double* ah, double* out) {
  const int m = kOrder[code];
  switch (kMethod[code]) {
    case 1: t1<N>(h, a, m, out); return;
    case 2: t2<N>(h, a, m, ah, out); return;
    case 3: t3<N>(h, a, ah, out); return;
    case 4: t4<N>(h, a, m, out); return;
    default: t5<N>(h, a, out); return;
  }
}

// region_code() of four pairs at once, the range ends below each h and a counted by vector
// comparisons; 255 for a pair that goes through owens_t() singly (NaN, |a| > 1, the special
// values, T6).
void region_codes(const double* h, const double* a, unsigned char* code) {
  const V4 g = abs4(load4(h)), b = abs4(load4(a));
  M4 ih = {0, 0, 0, 0}, ia = {0, 0, 0, 0};
  for (int j = 0; j < 14; ++j) ih -= g > splat(kHRange[j]);  // a true comparison is -1
  for (int j = 0; j < 7; ++j) ia -= b > splat(kARange[j]);
  const M4 single = ~(b <= splat(1.0)) | (g != g) | (g == splat(0.0)) | (b == splat(0.0)) | (b == splat(1.0));
  for (int k = 0; k < 4; ++k) {
    const int c = kSelect[ia[k]][ih[k]];
    code[k] = single[k] || kMethod[c] == 6 ? 255 : static_cast<unsigned char>(c);
  }
}

// Method `method` on four lanes whose regions (code[k]) share it.
void by_method_lanes(int method, const int* code, const double* h, const double* a, const double* ah, double* out) {
  const int m[4] = {kOrder[code[0]], kOrder[code[1]], kOrder[code[2]], kOrder[code[3]]};
  switch (method) {
    case 1: t1_lanes(h, a, m, out); return;
    case 2: t2_lanes(h, a, m, ah, out); return;
    case 3: t3<4>(h, a, ah, out); return;
    case 4: t4_lanes(h, a, m, out); return;
    default: t5<4>(h, a, out); return;
  }
}

bool special(double h, double a) { return h == 0.0 || a == 0.0 || a == 1.0; }

// 0 <= h, 0 <= a <= 1.
double dispatch(double h, double a, double ah) {
  if (h == 0.0) return std::atan(a) * kOneDivTwoPi;
  if (a == 0.0) return 0.0;
  if (a == 1.0) return 0.5 * upper_q(-h) * upper_q(h);
  const int code = region_code(h, a);
  if (kMethod[code] == 6) return t6(h, a);
  double out;
  by_method<1>(code, &h, &a, &ah, &out);
  return out;
}

}  // namespace

STREWN_FMA_CLONES double normal_upper_tail(double x) noexcept { return upper_q(x); }

STREWN_FMA_CLONES double owens_t(double h, double a) noexcept {
  if (std::isnan(h) || std::isnan(a)) return std::numeric_limits<double>::quiet_NaN();
  h = std::fabs(h);
  const double abs_a = std::fabs(a);
  double val;
  if (std::isinf(abs_a)) {
    val = 0.5 * upper_q(h);  // Owen (1956): T(h, inf) = Q(|h|) / 2
  } else if (abs_a <= 1.0) {
    val = dispatch(h, abs_a, abs_a * h);
  } else {
    // Owen (1956), eq. (2.3): T(h, a) = [Phi(h) + Phi(ah)]/2 - Phi(h) Phi(ah) - T(ah, 1/a),
    // written on the side of the normal distribution that avoids cancellation.
    const double ah = abs_a * h;
    if (h <= 0.67) {
      val = 0.25 - centred_phi(h) * centred_phi(ah) - dispatch(ah, 1.0 / abs_a, h);
    } else {
      const double qh = upper_q(h);
      const double qah = upper_q(ah, std::fma(abs_a, h, -ah));
      val = 0.5 * (qh + qah) - qh * qah - dispatch(ah, 1.0 / abs_a, h);
    }
  }
  return a < 0.0 ? -val : val;
}

void owens_t(const double* h, const double* a, double* t, std::size_t n) noexcept {
  constexpr std::size_t kChunk = std::size_t{1} << 20;
  for (std::size_t start = 0; start < n; start += kChunk)
    detail::owens_t_many(h + start, a + start, t + start, static_cast<int>(std::min(kChunk, n - start)));
}

namespace detail {

STREWN_FMA_CLONES void normal_upper_tails(double* x, int n) noexcept {
  constexpr int kBatch = 16;
  double factor[kBatch];
  for (int start = 0; start < n; start += kBatch) {
    const int m = std::min(kBatch, n - start);
    double* chunk = x + start;
    for (int i = 0; i < m; ++i) chunk[i] = q_argument(chunk[i], 0.0, factor[i]);
    erfc_in_place(chunk, m);
    for (int i = 0; i < m; ++i) chunk[i] *= factor[i];
  }
}

STREWN_FMA_CLONES void owens_t_two(double h1, double a1, double h2, double a2, double& t1, double& t2) noexcept {
  const double g[2] = {std::fabs(h1), std::fabs(h2)};
  const double b[2] = {std::fabs(a1), std::fabs(a2)};
  int code = -1;
  if (!(b[0] <= 1.0 && b[1] <= 1.0) || special(g[0], b[0]) || special(g[1], b[1]) ||
      (code = region_code(g[0], b[0])) != region_code(g[1], b[1]) || kMethod[code] == 6) {
    t1 = owens_t(h1, a1);
    t2 = owens_t(h2, a2);
    return;
  }
  const double ah[2] = {b[0] * g[0], b[1] * g[1]};
  double out[2];
  by_method<2>(code, g, b, ah, out);
  t1 = a1 < 0.0 ? -out[0] : out[0];
  t2 = a2 < 0.0 ? -out[1] : out[1];
}

STREWN_FMA_CLONES void owens_t_many(const double* h, const double* a, double* t, int n) noexcept {
  constexpr int kBlock = 64, kLanes = 4;
  for (int start = 0; start < n; start += kBlock) {
    const int m = std::min(kBlock, n - start);
    // Pairs by region code (counting sort); NaN, |a| > 1, the special values and T6 singly.
    unsigned char code[kBlock];
    int count[18] = {}, first[19], order[kBlock];
    for (int i = 0; i < m; i += kLanes) {
      double g[kLanes] = {}, b[kLanes] = {};  // a short last group padded with h = a = 0 (single)
      for (int k = 0; k < kLanes && i + k < m; ++k) {
        g[k] = h[start + i + k];
        b[k] = a[start + i + k];
      }
      region_codes(g, b, code + i);
    }
    for (int i = 0; i < m; ++i)
      if (code[i] != 255) ++count[code[i]];
    first[0] = 0;
    for (int c = 0; c < 18; ++c) first[c + 1] = first[c] + count[c];
    int fill[18];
    std::copy(first, first + 18, fill);
    for (int i = 0; i < m; ++i) {
      if (code[i] == 255) {
        t[start + i] = owens_t(h[start + i], a[start + i]);
      } else {
        order[fill[code[i]]++] = i;
      }
    }
    // Each method's pairs in chunks of four lanes, its regions one after the other (a chunk may
    // span two), each lane running its own region's order; the last chunk is padded by
    // repeating its last pair.
    for (int c = 0; c < 17;) {
      int end = c + 1;
      while (end < 17 && kMethod[end] == kMethod[c]) ++end;
      for (int j = first[c]; j < first[end]; j += kLanes) {
        const int lanes = std::min(kLanes, first[end] - j);
        double g[kLanes], b[kLanes], gb[kLanes], out[kLanes];
        int lane_code[kLanes];
        for (int k = 0; k < kLanes; ++k) {
          const int o = order[j + std::min(k, lanes - 1)];
          g[k] = std::fabs(h[start + o]);
          b[k] = std::fabs(a[start + o]);
          gb[k] = g[k] * b[k];
          lane_code[k] = code[o];
        }
        by_method_lanes(kMethod[c], lane_code, g, b, gb, out);
        for (int k = 0; k < lanes; ++k) {
          const int i = start + order[j + k];
          t[i] = a[i] < 0.0 ? -out[k] : out[k];
        }
      }
      c = end;
    }
  }
}

}  // namespace detail
}  // namespace strewn
