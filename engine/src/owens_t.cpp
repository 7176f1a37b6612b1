// Owen's T function after Patefield & Tandy (2000), "Fast and accurate calculation of Owen's T
// function", J. Stat. Softw. 5(5): the region table (hrange, arange, select), the method and
// order of each region, and the coefficients of T3 (Chebyshev-economised series) and T5
// (Gauss-Legendre on [0, 1] in x^2) as published for double precision. The same tables are
// used by boost::math::owens_t, the reference this file is tested against.
#include "strewn/owens_t.hpp"

#include "vector_math.hpp"

#include <cmath>
#include <limits>

namespace strewn {
namespace {

constexpr double kOneDivTwoPi = 0.15915494309189533577;
constexpr double kOneDivRootTwoPi = 0.39894228040143267794;
constexpr double kOneDivRootTwo = 0.70710678118654752440;

// 1/sqrt(2) as a double plus the double nearest to its rounding error.
constexpr double kOneDivRootTwoLo = -4.8336466567264567e-17;

// Phi(x) - 1/2, without cancellation near 0.
double centred_phi(double x) { return 0.5 * std::erf(x * kOneDivRootTwo); }

// Q(x) = erfc(x / sqrt 2) / 2 for x + x_lo given as an unevaluated sum. For large x the
// rounding of x / sqrt 2 alone would cost 2 x^2 / 2 ulps (1.5e-13 relative at x = 36), so its
// error term is carried and applied through erfc'(y) = -2/sqrt(pi) exp(-y^2).
double upper_q(double x, double x_lo = 0.0) {
  // Below x = 3 the rounding costs at most 2 x^2 / 2 = 9 ulps... of which erfc's own error
  // dominates; the compensation is only worth its exp beyond.
  if (x < 3.0) return 0.5 * std::erfc((x + x_lo) * kOneDivRootTwo);
  const double y = x * kOneDivRootTwo;
  const double y_lo = std::fma(x, kOneDivRootTwo, -y) + x * kOneDivRootTwoLo + x_lo * kOneDivRootTwo;
  // erfc(y + y_lo) = erfc(y) (1 - 2 m(y) y_lo) to first order, with the Mills-type ratio
  // m(y) = exp(-y^2) / (sqrt(pi) erfc(y)) = y + 1/(2y) + O(y^-3) (the asymptotic series of
  // erfc, Abramowitz & Stegun 7.1.23). The correction is at most a few ulps here (y_lo ~ eps y,
  // y >= 2.1), so the series' 3% error at y = 2.1 costs well under an ulp, and no second
  // exponential is needed.
  const double erfc_y = std::erfc(y);
  return 0.5 * erfc_y * (1.0 - 2.0 * (y + 0.5 / y) * y_lo);
}

// exp(-(x + x_lo)^2 / 2) with the square carried exactly (fma), for the same reason.
double exp_minus_half_square(double x, double x_lo = 0.0) {
  if (std::fabs(x) < 2.0) return std::exp(-0.5 * (x + x_lo) * (x + x_lo));  // error < 2 ulps
  const double s = x * x;
  const double s_lo = std::fma(x, x, -s) + 2.0 * x * x_lo;
  return std::exp(-0.5 * s) * (1.0 - 0.5 * s_lo);
}

int region_code(double h, double a) {
  static constexpr double hrange[14] = {0.02, 0.06, 0.09, 0.125, 0.26, 0.4, 0.6,
                                        1.6,  1.7,  2.33, 2.4,   3.36, 3.4, 4.8};
  static constexpr double arange[7] = {0.025, 0.09, 0.15, 0.36, 0.5, 0.9, 0.99999};
  // Paper's select table, 0-based codes.
  static constexpr unsigned char select[8][15] = {
      {0, 0, 1, 12, 12, 12, 12, 12, 12, 12, 12, 15, 15, 15, 8},
      {0, 1, 1, 2, 2, 4, 4, 13, 13, 14, 14, 15, 15, 15, 8},
      {1, 1, 2, 2, 2, 4, 4, 14, 14, 14, 14, 15, 15, 15, 9},
      {1, 1, 2, 4, 4, 4, 4, 6, 6, 15, 15, 15, 15, 15, 9},
      {1, 2, 2, 4, 4, 5, 5, 7, 7, 16, 16, 16, 11, 11, 10},
      {1, 2, 4, 4, 4, 5, 5, 7, 7, 16, 16, 16, 11, 11, 11},
      {1, 2, 3, 3, 5, 5, 7, 7, 16, 16, 16, 16, 16, 11, 11},
      {1, 2, 3, 3, 5, 5, 17, 17, 17, 17, 16, 16, 16, 11, 11}};
  int ih = 14;
  for (int i = 0; i < 14; ++i)
    if (h <= hrange[i]) {
      ih = i;
      break;
    }
  int ia = 7;
  for (int i = 0; i < 7; ++i)
    if (a <= arange[i]) {
      ia = i;
      break;
    }
  return select[ia][ih];
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

// T1: series in powers of a with incomplete exponential sums (small h and a).
double t1(double h, double a, int m) {
  const double hs = -0.5 * h * h;
  const double dhs = std::exp(hs);
  const double as = a * a;
  double aj = a * kOneDivTwoPi;
  double dj = std::expm1(hs);
  double gj = hs * dhs;
  double val = std::atan(a) * kOneDivTwoPi;
  for (int j = 1;; ++j) {
    val += dj * aj * kInverse.of[2 * j - 1];
    if (j >= m) break;
    aj *= as;
    dj = gj - dj;
    gj *= hs * kInverse.of[j + 1];
  }
  return val;
}

// T2: series in powers of h^-2 using Phi(ah) (large h, moderate a).
double t2(double h, double a, int m, double ah) {
  const int maxii = m + m + 1;
  const double hs = h * h;
  const double as = -a * a;
  const double y = 1.0 / hs;
  const double ah_lo = std::fma(a, h, -ah);
  double vi = a * exp_minus_half_square(ah, ah_lo) * kOneDivRootTwoPi;
  double z = centred_phi(ah) / h;
  double val = 0.0;
  for (int ii = 1;; ii += 2) {
    val += z;
    if (ii >= maxii) break;
    z = y * (vi - ii * z);
    vi *= as;
  }
  return val * exp_minus_half_square(h) * kOneDivRootTwoPi;
}

// T3: T2 with Chebyshev-economised coefficients (large h, a near 1).
double t3(double h, double a, double ah) {
  static constexpr double c2[21] = {
      0.99999999999999987510,      -0.99999999999988796462,     0.99999999998290743652,
      -0.99999999896282500134,     0.99999996660459362918,      -0.99999933986272476760,
      0.99999125611136965852,      -0.99991777624463387686,     0.99942835555870132569,
      -0.99697311720723000295,     0.98751448037275303682,      -0.95915857980572882813,
      0.89246305511006708555,      -0.76893425990463999675,     0.58893528468484693250,
      -0.38380345160440256652,     0.20317601701045299653,      -0.82813631607004984866E-01,
      0.24167984735759576523E-01,  -0.44676566663971825242E-02, 0.39141169402373836468E-03};
  const double as = a * a;
  const double hs = h * h;
  const double y = 1.0 / hs;
  const double ah_lo = std::fma(a, h, -ah);
  double vi = a * exp_minus_half_square(ah, ah_lo) * kOneDivRootTwoPi;
  double zi = centred_phi(ah) / h;
  double val = 0.0;
  double ii = 1.0;
  for (int i = 0;; ++i) {
    val += zi * c2[i];
    if (i >= 20) break;
    zi = y * (ii * zi - vi);
    vi *= as;
    ii += 2.0;
  }
  return val * exp_minus_half_square(h) * kOneDivRootTwoPi;
}

// T4: series in powers of a^2 with a recurrence in h (moderate h, a near 1).
double t4(double h, double a, int m) {
  const int maxii = m + m + 1;
  const double hs = h * h;
  const double as = -a * a;
  // exp(-h^2 (1 + a^2) / 2) with both squares carried exactly.
  const double ah = a * h;
  double ai = a * exp_minus_half_square(h) * exp_minus_half_square(ah, std::fma(a, h, -ah)) *
              kOneDivTwoPi;
  double yi = 1.0;
  double val = 0.0;
  for (int ii = 1;; ) {
    val += ai * yi;
    if (ii >= maxii) break;
    ii += 2;
    yi = (1.0 - hs * yi) * kInverse.of[ii];
    ai *= as;
  }
  return val;
}

// T5: 13-point Gauss-Legendre quadrature of the defining integral; pts are squared abscissae,
// wts include the factor 1/(2 pi).
double t5(double h, double a) {
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
  const double as = a * a;
  const double ahs = -0.5 * (a * h) * (a * h);
  double e[13];
  for (int i = 0; i < 13; ++i) e[i] = ahs * pts[i];
  detail::exp_in_place(e, 13);  // the 13 exponentials at once: most of T5's time
  double val = 0.0;
  for (int i = 0; i < 13; ++i) val += wts[i] * e[i] / (1.0 + as * pts[i]);
  // exp(-h^2 r / 2) = exp(-h^2 / 2) exp(-(ah)^2 x^2 / 2), the first factor carried exactly.
  return val * a * exp_minus_half_square(h);
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

// 0 <= h, 0 <= a <= 1.
double dispatch(double h, double a, double ah) {
  if (h == 0.0) return std::atan(a) * kOneDivTwoPi;
  if (a == 0.0) return 0.0;
  if (a == 1.0) return 0.5 * upper_q(-h) * upper_q(h);
  static constexpr unsigned char order[18] = {2, 3, 4, 5, 7, 10, 12, 18, 10,
                                              20, 30, 0, 4, 7, 8, 20, 0, 0};
  static constexpr unsigned char method[18] = {1, 1, 1, 1, 1, 1, 1, 1, 2,
                                               2, 2, 3, 4, 4, 4, 4, 5, 6};
  const int code = region_code(h, a);
  const int m = order[code];
  switch (method[code]) {
    case 1: return t1(h, a, m);
    case 2: return t2(h, a, m, ah);
    case 3: return t3(h, a, ah);
    case 4: return t4(h, a, m);
    case 5: return t5(h, a);
    default: return t6(h, a);
  }
}

}  // namespace

double normal_upper_tail(double x) noexcept { return upper_q(x); }

double owens_t(double h, double a) noexcept {
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

}  // namespace strewn
