// The one-panel Gauss-Legendre rule with a proven bound (engine/src/integrate/exact/bounded_gauss.hpp).
#include "integrate/exact/bounded_gauss.hpp"
#include "integrate/exact/periodic_ellipse_tail.hpp"

#include <boost/math/quadrature/gauss.hpp>
#include <catch2/catch.hpp>
#include <algorithm>
#include <cmath>
#include <limits>

using namespace strewn::detail;

namespace {

// Boost's tabulated rule (its abscissae are the non-negative nodes) against ours.
template <int N>
void check_against_boost() {
  using Rule = boost::math::quadrature::gauss<double, N>;
  const GaussLegendre& g = gauss_legendre(N);
  for (std::size_t k = 0; k < Rule::abscissa().size(); ++k) {
    const double x = Rule::abscissa()[k], w = Rule::weights()[k];
    bool found = false;
    for (int i = 0; i < N; ++i)
      if (std::fabs(g.x[i] - x) <= 4e-16) {
        CHECK(g.w[i] == Approx(w).epsilon(1e-14));
        found = true;
      }
    CHECK(found);
  }
}

// f = x -> T_k(x) as a batch integrand.
struct Chebyshev {
  int k;
  void operator()(const double* s, double* v, int n) const {
    for (int i = 0; i < n; ++i) v[i] = std::cos(k * std::acos(s[i]));
  }
};

}  // namespace

TEST_CASE("the Gauss-Legendre nodes and weights match Boost's tables", "[exact][bounded_gauss]") {
  // Boost.Math's gauss<double, N> tables (computed by Boost with multiprecision).
  check_against_boost<7>();
  check_against_boost<10>();
  check_against_boost<15>();
  check_against_boost<20>();
  check_against_boost<30>();
}

TEST_CASE("an n-point panel integrates polynomials of degree 2n - 1 exactly and not 2n", "[exact][bounded_gauss]") {
  // Integral of T_k over [-1, 1]: 2 / (1 - k^2) for even k, 0 for odd k (Abramowitz & Stegun 22.13).
  for (int n : {2, 5, 12, 31, 48}) {
    for (int k : {2 * n - 2, 2 * n - 1}) {
      Chebyshev f{k};
      const double exact = k % 2 == 0 ? 2.0 / (1.0 - double(k) * k) : 0.0;
      CHECK(gauss_panel(f, -1.0, 1.0, n).value == Approx(exact).margin(1e-13));
    }
    Chebyshev f{2 * n};
    CHECK(std::fabs(gauss_panel(f, -1.0, 1.0, n).value - 2.0 / (1.0 - 4.0 * n * n)) > 0.5);
  }
}

TEST_CASE("the error bound covers the error of T_2n and would not if it were halved", "[exact][bounded_gauss]") {
  // T_2n is the first Chebyshev polynomial an n-point rule misses. On the Bernstein ellipse
  // E_rho, |T_k((w + 1/w) / 2)| = |w^k + w^-k| / 2 <= (rho^k + rho^-k) / 2, attained at w = rho
  // (Trefethen, ATAP ch. 8), so that is M; at rho = 50 Trefethen's bound is within a factor 1.5
  // of the true error (checked with numpy's leggauss while writing this test).
  for (int n : {2, 3, 4, 8, 16}) {
    Chebyshev f{2 * n};
    const double rho = 50.0;
    const double m = 0.5 * (std::pow(rho, 2 * n) + std::pow(rho, -2 * n));
    const double error = std::fabs(gauss_panel(f, -1.0, 1.0, n).value - 2.0 / (1.0 - 4.0 * n * n));
    const double bound = gauss_error_bound(n, rho, m, 1.0);
    CHECK(error <= bound);
    CHECK(error > 0.5 * bound);
  }
}

// M on the scaled Bernstein ellipse of [a, b] for f(s) = 1 / (c - s), c > b: the ellipse's
// nearest point to c is m + h (rho + 1/rho) / 2, so M = 1 / (c - that), infinite once it reaches c.
static auto pole_bound(double c, double a, double b) {
  const double mid = 0.5 * (a + b), half = 0.5 * (b - a);
  return [=](double rho) {
    const double reach = mid + half * bernstein_axes(rho).along;
    return reach < c ? 1.0 / (c - reach) : std::numeric_limits<double>::infinity();
  };
}

TEST_CASE("the chosen panel meets its target on a function with a pole near the piece", "[exact][bounded_gauss]") {
  // f(s) = 1 / (c - s) over [a, b], c > b: integral log((c - a) / (c - b)). On the scaled
  // ellipse its nearest point to c is m + h (rho + 1/rho) / 2, so M = 1 / (c - that).
  for (double c : {1.05, 1.5, 3.0})
    for (double target : {1e-6, 1e-10, 1e-14}) {
      const double a = -0.3, b = 0.9, half = 0.5 * (b - a);
      const auto m_of_rho = pole_bound(c, a, b);
      const GaussChoice choice = choose_gauss_rule(half, target, m_of_rho);
      auto f = [c](const double* s, double* v, int n) {
        for (int i = 0; i < n; ++i) v[i] = 1.0 / (c - s[i]);
      };
      const double exact = std::log((c - a) / (c - b));
      if (choice.n == 0) {
        CHECK(c == 1.05);  // only the pole at 0.15 beyond the piece's end may need more than 48 nodes
        continue;
      }
      CHECK(choice.bound <= target);
      CHECK(std::fabs(gauss_panel(f, a, b, choice.n).value - exact) <= choice.bound + 1e-15 * exact);
      // The panel reversed is the negated value (the adaptive driver's convention).
      CHECK(gauss_panel(f, b, a, choice.n).value == Approx(-gauss_panel(f, a, b, choice.n).value).epsilon(1e-15));
    }
}

TEST_CASE("no rule is chosen where the bound is infinite on every ellipse", "[exact][bounded_gauss]") {
  const GaussChoice choice = choose_gauss_rule(1.0, 1e-10, [](double) { return std::numeric_limits<double>::infinity(); });
  CHECK(choice.n == 0);
  // A function that vanishes needs one node and no error.
  const GaussChoice zero = choose_gauss_rule(1.0, 1e-10, [](double) { return 0.0; });
  CHECK(zero.n == 1);
  CHECK(zero.bound == 0.0);
}

TEST_CASE("chord_range bounds the distance of every point of an arc, its first point included", "[exact][arc]") {
  // Common practice: a bound must hold at every sampled point. Arcs z(s) = c + A (cos s, sin s)
  // over random pieces; the first point matters where the radius falls from it (left out, a
  // piece of a unit circle about (1.6, 0) from s = 0 had its farthest distance 2.37 for 2.4).
  std::uint64_t state = 20261204;
  const auto uniform = [&state] {
    state = state * 6364136223846793005ULL + 1442695040888963407ULL;
    return static_cast<double>(state >> 11) * 0x1.0p-53;
  };
  for (int trial = 0; trial < 2000; ++trial) {
    const strewn::Vec2 c(4 * uniform() - 2, 4 * uniform() - 2);
    strewn::Mat2 a;
    a << 2 * uniform() - 1, 2 * uniform() - 1, 2 * uniform() - 1, 2 * uniform() - 1;
    const double s0 = 6.3 * uniform(), s1 = s0 + 3.0 * uniform() + 1e-3;
    const auto point = [&](double s) { return strewn::Vec2(c + a * strewn::Vec2(std::cos(s), std::sin(s))); };
    const int chords = 8;
    const double ds = (s1 - s0) / chords;
    const RadiusRange r = chord_range([&](int k) { return point(s0 + k * ds); }, chords,
                                      a.norm() * (1.0 - std::cos(0.5 * ds)) + 1e-15);
    double lo = 1e300, hi = 0.0;
    for (int k = 0; k <= 4000; ++k) {
      const double d = point(s0 + (s1 - s0) * k / 4000).norm();
      lo = std::min(lo, d);
      hi = std::max(hi, d);
    }
    INFO("trial " << trial << ": sampled " << lo << ".." << hi << ", bounds " << r.closest << ".." << r.farthest);
    CHECK(r.closest <= lo * (1 + 1e-12));
    CHECK(r.farthest >= hi * (1 - 1e-12));
  }
}

TEST_CASE("the series bounds of log, cosh and sin enclose long double libm's values, tightly", "[exact][bounded_gauss]") {
  // Reference: glibc's logl, coshl and sinl in 64-bit long double (11 more bits than double),
  // on dense grids; each bound must hold and lie within 1e-7 relative (1e-7 absolute for log).
  double worst_log = 0.0, worst_cosh = 0.0, worst_sin = 0.0;
  for (double e = -300.0; e <= 300.0; e += 0.0137) {
    const double x = std::pow(10.0, e);
    const long double want = std::log(static_cast<long double>(x));
    INFO("x = " << x);
    CHECK(static_cast<long double>(log_upper(x)) >= want);
    CHECK(static_cast<long double>(log_lower(x)) <= want);
    worst_log = std::max(worst_log, log_upper(x) - log_lower(x));
  }
  for (double x : {1.0, 0.70710678118654752, 0.7071067811865476, 1.4142135623730951, 1.0 + 2.2e-16, 1.0 - 1.1e-16, 5e-324})
    CHECK((static_cast<long double>(log_lower(x)) <= std::log(static_cast<long double>(x)) &&
           std::log(static_cast<long double>(x)) <= static_cast<long double>(log_upper(x))));
  CHECK(log_upper(0.0) == -std::numeric_limits<double>::infinity());
  CHECK(log_upper(std::nan("")) == std::numeric_limits<double>::infinity());
  CHECK(log_lower(std::nan("")) == -std::numeric_limits<double>::infinity());
  for (double t = 0.0; t <= 30.0; t += 0.00731) {
    const long double want = std::cosh(static_cast<long double>(t));
    INFO("t = " << t);
    CHECK(static_cast<long double>(cosh_upper(t)) >= want);
    worst_cosh = std::max(worst_cosh, static_cast<double>((cosh_upper(t) - want) / want));
  }
  for (double x = 0.0; x <= 1.5707963267948966; x += 0.000731) {
    const long double want = std::sin(static_cast<long double>(x));
    INFO("x = " << x);
    CHECK(static_cast<long double>(sin_lower(x)) <= want);
    CHECK(static_cast<long double>(sin_upper(x)) >= want);
    if (x > 0.0) worst_sin = std::max(worst_sin, (sin_upper(x) - sin_lower(x)) / static_cast<double>(want));
  }
  INFO("log " << worst_log << " cosh " << worst_cosh << " sin " << worst_sin);
  CHECK(worst_log <= 1e-7);
  CHECK(worst_cosh <= 1e-2);  // t just under 2: the remainder's cosh t factor; beyond, exp's
  CHECK(worst_sin <= 2e-4);   // x = pi/2: x^9 / 9! = 1.6e-4
}

TEST_CASE("the log-domain choice meets its target and agrees with the direct choice", "[exact][bounded_gauss]") {
  // The same function with a pole as above (f = 1 / (c - s)), its M by log_upper; the rule it
  // picks meets the target against the closed-form integral, and is the direct choice's or at
  // most one node more (the log bounds are within 1e-7).
  for (double c : {1.05, 1.5, 3.0})
    for (double target : {1e-6, 1e-10, 1e-14}) {
      const double a = -0.3, b = 0.9, half = 0.5 * (b - a);
      const auto m_of_rho = pole_bound(c, a, b);
      const auto log_m = [&](int rung) { return log_upper(m_of_rho(kGaussLadder[rung])); };
      const GaussChoice direct = choose_gauss_rule(half, target, m_of_rho);
      const GaussChoice logged = choose_gauss_rule_log(half, target, log_m);
      INFO("c " << c << " target " << target << " n " << direct.n << " / " << logged.n);
      CHECK(logged.n >= direct.n);
      CHECK(logged.n <= direct.n + 1);
      if (logged.n == 0) continue;
      auto f = [c](const double* s, double* v, int n) {
        for (int i = 0; i < n; ++i) v[i] = 1.0 / (c - s[i]);
      };
      const double exact = std::log((c - a) / (c - b));
      CHECK(logged.bound <= target * (1.0 + 1e-11));
      CHECK(logged.bound >= gauss_error_bound(logged.n, logged.rho, m_of_rho(logged.rho), half));
      CHECK(std::fabs(gauss_panel(f, a, b, logged.n).value - exact) <= logged.bound + 1e-15 * exact);
    }
  const GaussChoice none =
      choose_gauss_rule_log(1.0, 1e-10, [](int) { return std::numeric_limits<double>::infinity(); });
  CHECK(none.n == 0);
  const GaussChoice zero =
      choose_gauss_rule_log(1.0, 1e-10, [](int) { return -std::numeric_limits<double>::infinity(); });
  CHECK(zero.n == 1);
  CHECK(zero.bound == 0.0);
}
