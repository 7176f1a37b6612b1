// The Gauss-Legendre rule for short straight edges (engine/src/integrate/exact/short_edge_rule.hpp)
// against references from outside the project: Boost.Math's Owen's T in long double (the edge
// is T(h, t2/h) - T(h, t1/h), Owen 1956) and Boost.Math's adaptive Gauss-Kronrod in long double
// on the edge's integrand; the Gauss-Legendre nodes against the closed forms of Abramowitz and
// Stegun, table 25.4, and the rule's defining exactness on polynomials.
#include <boost/math/quadrature/gauss_kronrod.hpp>
#include <boost/math/special_functions/owens_t.hpp>
#include <catch2/catch.hpp>
#include <algorithm>
#include <cmath>
#include <vector>

#include "integrate/exact/short_edge_rule.hpp"

using namespace strewn::detail;

namespace {

constexpr long double kTwoPiL = 6.283185307179586476925286766559L;

// h / (2 pi) * integral_{t1}^{t2} exp(-(h^2 + t^2)/2) / (h^2 + t^2) dt in long double, by
// Boost's adaptive Gauss-Kronrod (61 points) to 1e-18 relative: the integrand is positive, so
// nothing cancels.
long double reference_by_quadrature(double h, double t1, double t2) {
  const long double hl = h;
  const auto f = [hl](long double t) {
    const long double r2 = hl * hl + t * t;
    return std::exp(-0.5L * r2) / r2;
  };
  const long double integral =
      boost::math::quadrature::gauss_kronrod<long double, 61>::integrate(f, t1, t2, 8, 1e-18L);
  return hl / kTwoPiL * integral;
}

// The same as T(h, t2/h) - T(h, t1/h) in long double (Owen 1956); exact enough where the two
// T values do not cancel much.
long double reference_by_owens_t(double h, double t1, double t2) {
  const long double hl = h;
  return boost::math::owens_t(hl, t2 / hl) - boost::math::owens_t(hl, t1 / hl);
}

struct EdgeCase {
  double h, t1, t2;
};

// Distances from close to the mean to far out; edges from short to long, centred at the foot
// of the perpendicular, beside it, across it and far along the line (tails).
std::vector<EdgeCase> edge_grid() {
  std::vector<EdgeCase> cases;
  for (double h : {0.02, 0.1, 0.3, 0.7, 1.0, 1.5, 2.3, 3.5, 5.0, 8.0, 12.0}) {
    for (double length : {0.001, 0.01, 0.03, 0.1, 0.3, 1.0, 3.0}) {
      for (double start : {-6.0, -2.0, -0.5, -0.01, 0.0, 0.4, 1.3, 3.0, 7.0, 15.0}) {
        const double t1 = start * std::max(h, 0.5), t2 = t1 + length * std::max(h, 0.5);
        if (h * h + std::min(t1 * t1, t2 * t2) > 1400.0) continue;  // beyond the engine's negligible range
        cases.push_back({h, t1, t2});
      }
    }
  }
  return cases;
}

// One block of the grid as segment_tails() hands it to short_edge_rule(): the edges from
// `start`, zero past the last, every lane offered but those with i % every == skip (lanes the
// caller keeps for itself); the outputs as short_edge_rule() leaves them.
struct Block {
  int n = 0;
  double h[kShortEdgeBlock] = {}, t1[kShortEdgeBlock] = {}, t2[kShortEdgeBlock] = {};
  double value[kShortEdgeBlock], err[kShortEdgeBlock], density[kShortEdgeBlock];
  bool served[kShortEdgeBlock];
  int nodes[kShortEdgeBlock];
};

Block block_of(const std::vector<EdgeCase>& cases, std::size_t start, int every, int skip) {
  Block b;
  b.n = static_cast<int>(std::min<std::size_t>(kShortEdgeBlock, cases.size() - start));
  for (int i = 0; i < b.n; ++i) {
    b.h[i] = cases[start + i].h;
    b.t1[i] = cases[start + i].t1;
    b.t2[i] = cases[start + i].t2;
    b.served[i] = i % every != skip;
  }
  return b;
}

}  // namespace

TEST_CASE("Gauss-Legendre nodes and weights match Abramowitz and Stegun's closed forms", "[exact][short_edge]") {
  // A&S table 25.4: n = 2: +-1/sqrt(3), weights 1; n = 3: 0, +-sqrt(3/5), weights 8/9, 5/9.
  CHECK(gauss_legendre_nodes(2)[1] == Approx(1.0 / std::sqrt(3.0)).epsilon(1e-16));
  CHECK(gauss_legendre_weights(2)[0] == Approx(1.0).epsilon(1e-16));
  CHECK(gauss_legendre_nodes(3)[1] == 0.0);
  CHECK(gauss_legendre_nodes(3)[2] == Approx(std::sqrt(0.6)).epsilon(1e-16));
  CHECK(gauss_legendre_weights(3)[1] == Approx(8.0 / 9.0).epsilon(1e-16));
  CHECK(gauss_legendre_weights(3)[0] == Approx(5.0 / 9.0).epsilon(1e-16));
}

TEST_CASE("The n-point Gauss-Legendre rule integrates polynomials of degree 2n - 1 exactly", "[exact][short_edge]") {
  // The rule's definition (A&S 25.4.29): integral_{-1}^{1} x^k dx = 2 / (k + 1) for even k, 0 for odd.
  for (int n = 2; n <= kShortEdgeMaxNodes; ++n) {
    const double* x = gauss_legendre_nodes(n);
    const double* w = gauss_legendre_weights(n);
    for (int k = 0; k <= 2 * n - 1; ++k) {
      long double sum = 0.0L;
      for (int i = 0; i < n; ++i) sum += w[i] * std::pow(static_cast<long double>(x[i]), k);
      const double exact = k % 2 == 0 ? 2.0 / (k + 1) : 0.0;
      INFO("n = " << n << ", k = " << k);
      CHECK(std::fabs(static_cast<double>(sum) - exact) <= 4e-16 * n);
    }
    for (int i = 1; i < n; ++i) CHECK(x[i - 1] < x[i]);
  }
}

TEST_CASE("The two long-double references agree where Owen's T does not cancel", "[exact][short_edge]") {
  // Sanity of the references themselves: the closed form (Owen 1956) and quadrature.
  for (const EdgeCase& e : edge_grid()) {
    const long double q = reference_by_quadrature(e.h, e.t1, e.t2);
    const long double t = reference_by_owens_t(e.h, e.t1, e.t2);
    const long double terms = std::fabs(boost::math::owens_t<long double>(e.h, e.t2 / e.h)) +
                              std::fabs(boost::math::owens_t<long double>(e.h, e.t1 / e.h));
    if (terms > 1e3L * std::fabs(q)) continue;
    INFO("h = " << e.h << ", t1 = " << e.t1 << ", t2 = " << e.t2);
    CHECK(static_cast<double>(std::fabs(q - t)) <= 1e-17 * static_cast<double>(terms));
  }
}

TEST_CASE("Trefethen's bound covers the rule's true error for every n and rho", "[exact][short_edge]") {
  // Trefethen (SIAM Review 2008, Theorem 4.5) with the closed-form M of short_edge_rule.hpp:
  // the rule's error against the long-double reference never exceeds it (beyond an allowance
  // for rounding); where the error is above that allowance, the bound's margin is measured.
  int measured = 0;
  double tightest = 1e300;
  for (const EdgeCase& e : edge_grid()) {
    const long double ref = reference_by_quadrature(e.h, e.t1, e.t2);
    if (ref < 1e-290L) continue;
    for (int n = 2; n <= kShortEdgeMaxNodes; ++n) {
      const double err = static_cast<double>(std::fabs(short_edge_value(e.h, e.t1, e.t2, n) - ref));
      const double rounding = 64 * 0x1p-53 * (1.0 + e.h * e.h + e.t2 * e.t2 + e.t1 * e.t1) * static_cast<double>(ref);
      for (double rho = 1.1; rho < 5000.0; rho *= 1.25) {
        const double bound = short_edge_bound(e.h, e.t1, e.t2, n, rho);
        INFO("h = " << e.h << ", t1 = " << e.t1 << ", t2 = " << e.t2 << ", n = " << n << ", rho = " << rho);
        CHECK(err <= bound + rounding);
        if (err > rounding && std::isfinite(bound)) {
          ++measured;
          tightest = std::min(tightest, bound / err);
        }
      }
    }
  }
  INFO("cases with a measurable error " << measured << ", smallest bound / error " << tightest);
  CHECK(measured > 1000);
  // The bound is not vacuous: at its tightest it is within 8x of the true error (measured 5.6x,
  // so a bound made twice as loose fails here; one halved fails the covering check above only
  // where the margin is under 2x, which this grid does not reach).
  CHECK(tightest < 8.0);
}

TEST_CASE("The rule's value lies within its bound over a dense grid of edges", "[exact][short_edge]") {
  // short_edge_rule() as segment_tails() calls it, blocks of up to 32 edges on four lanes;
  // every edge it serves must be within abs_err of the long-double reference.
  const std::vector<EdgeCase> cases = edge_grid();
  int served_count = 0;
  double worst = 0.0;
  for (std::size_t start = 0; start < cases.size(); start += kShortEdgeBlock) {
    Block b = block_of(cases, start, 7, 3);  // some lanes the caller keeps for itself
    const int n = b.n;
    const double *h = b.h, *t1 = b.t1, *t2 = b.t2, *value = b.value, *err = b.err;
    const bool* served = b.served;
    const int* nodes = b.nodes;
    short_edge_rule(b.h, b.t1, b.t2, n, b.served, b.value, b.err, b.nodes);
    for (int i = 0; i < n; ++i) {
      if (i % 7 == 3) CHECK_FALSE(served[i]);
      if (!served[i]) continue;
      ++served_count;
      const long double ref = reference_by_quadrature(h[i], t1[i], t2[i]);
      const double e = static_cast<double>(std::fabs(value[i] - ref));
      INFO("h = " << h[i] << ", t1 = " << t1[i] << ", t2 = " << t2[i] << ", nodes " << nodes[i]);
      CHECK(e <= err[i]);
      CHECK(nodes[i] >= 2);
      CHECK(nodes[i] <= kShortEdgeMaxNodes);
      // At the closed form's level (kShortEdgeMaxRounding), whatever the integrator's tolerance.
      CHECK(err[i] <= 1.5e-14 * value[i]);
      worst = std::max(worst, e / static_cast<double>(ref));
    }
  }
  INFO("served " << served_count << " of " << cases.size() << ", worst relative error " << worst);
  CHECK(served_count > static_cast<int>(cases.size() / 4));
  CHECK(worst < 4e-15);
}

TEST_CASE("Where the series serves an edge, its density bound covers the density at the edge's nearest point", "[exact][short_edge]") {
  // segment_tails() takes exp(-d^2 / 2) for its bound on moved ends from short_edge_rule()'s
  // `density` where the series served the edge (short_edge_rule.hpp); against the exponential at
  // the nearest point in long double (d^2 = h^2 + t_near^2, t_near the point of [t1, t2] nearest
  // the foot of the perpendicular) it must never be below, and at most 1 + x/2 + x^2/4 <= 1.3125
  // times it above (x <= 1/2), with the rounding's allowance; every other edge reads a
  // negative number.
  const std::vector<EdgeCase> cases = edge_grid();
  int by_series = 0, others = 0;
  for (std::size_t start = 0; start < cases.size(); start += kShortEdgeBlock) {
    Block b = block_of(cases, start, 5, 2);
    const int n = b.n;
    const double *h = b.h, *t1 = b.t1, *t2 = b.t2, *density = b.density;
    const bool* served = b.served;
    short_edge_rule(b.h, b.t1, b.t2, n, b.served, b.value, b.err, b.nodes, b.density);
    for (int i = 0; i < n; ++i) {
      if (!(density[i] >= 0.0)) {
        CHECK(density[i] < 0.0);
        ++others;
        continue;
      }
      REQUIRE(served[i]);
      ++by_series;
      const long double t_near = t1[i] > 0.0 ? t1[i] : (t2[i] < 0.0 ? t2[i] : 0.0);
      const long double hl = h[i];
      const long double ref = std::exp(-0.5L * (hl * hl + t_near * t_near));
      INFO("h = " << h[i] << ", t1 = " << t1[i] << ", t2 = " << t2[i]);
      CHECK(density[i] >= ref);
      CHECK(density[i] <= 1.32L * ref);
    }
  }
  INFO("by the series " << by_series << ", others " << others);
  CHECK(by_series > 50);
  CHECK(others > 50);
}

TEST_CASE("Short edges far from the mean take few nodes; long or near edges are left to Owen's T", "[exact][short_edge]") {
  // A 200-gon's edge at 2.3 sigma, 0.06 sigma long; a long edge; an edge passing 0.02 sigma from the mean.
  // Arrays readable to a multiple of four (short_edge_rule.hpp).
  double h[4] = {2.3, 1.0, 0.02, 0.0}, t1[4] = {0.5, -3.0, -0.5, 0.0}, t2[4] = {0.56, 3.0, 0.5, 0.0}, value[4], err[4];
  bool served[4] = {true, true, true, false};
  int nodes[4] = {0, 0, 0, 0};
  short_edge_rule(h, t1, t2, 3, served, value, err, nodes);
  CHECK(served[0]);
  CHECK(nodes[0] <= 7);
  CHECK_FALSE(served[1]);
  CHECK_FALSE(served[2]);
  const double ref = static_cast<double>(reference_by_owens_t(h[0], t1[0], t2[0]));
  CHECK(std::fabs(value[0] - ref) <= 1e-15 * ref);
  CHECK(err[0] <= 8e-15 * value[0]);
}

TEST_CASE("A tiny edge whose ends rounding swapped integrates backwards within its bound", "[exact][short_edge]") {
  // t2 < t1 by 1e-12: the value is -(T(h, t1/h) - T(h, t2/h)) (Owen 1956), the bound non-negative.
  double h[4] = {2.0, 0.0, 0.0, 0.0}, t1[4] = {0.5, 0.0, 0.0, 0.0}, t2[4] = {0.5 - 1e-12, 0.0, 0.0, 0.0}, value[4], err[4];
  bool served[4] = {true, false, false, false};
  int nodes[4] = {0, 0, 0, 0};
  short_edge_rule(h, t1, t2, 1, served, value, err, nodes);
  REQUIRE(served[0]);
  const double ref = -static_cast<double>(reference_by_quadrature(h[0], t2[0], t1[0]));
  CHECK(value[0] < 0.0);
  CHECK(err[0] >= 0.0);
  CHECK(std::fabs(value[0] - ref) <= err[0]);
}

TEST_CASE("The series' truncation bound covers its error at every number of terms", "[exact][short_edge]") {
  // short_edge_series_terms() says after how many terms the Taylor series about the edge's
  // centre is within 2^-54 of the edge's value (short_edge_rule.hpp, "The series"); at that many
  // terms or more, against Boost.Math's quadrature in long double, the error is that plus the
  // rounding (64 units of 2^-53 for the sum, and the rule's own 6 r_max^2 + 4 t_max / h for the
  // exponent's argument and the inputs), at every even m up to 16.
  int checked = 0, offered = 0;
  for (const EdgeCase& e : edge_grid()) {
    const double needed = short_edge_series_terms(e.h, e.t1, e.t2);
    if (!(needed <= 16.0)) continue;
    ++offered;
    const long double ref = reference_by_quadrature(e.h, e.t1, e.t2);
    for (int m = 2; m <= 16; m += 2) {
      if (m < needed) continue;
      const double v = short_edge_series_value(e.h, e.t1, e.t2, m);
      INFO("h = " << e.h << ", t1 = " << e.t1 << ", t2 = " << e.t2 << ", m = " << m << ", needed " << needed);
      const double t_max = std::max(std::fabs(e.t1), std::fabs(e.t2)), r_max2 = e.h * e.h + t_max * t_max;
      CHECK(std::fabs(v - ref) <= (kShortEdgeTarget + (64 + 6 * r_max2 + 4 * t_max / e.h) * 0x1p-53) * ref);
      ++checked;
    }
  }
  INFO("offered " << offered << ", checked " << checked);
  CHECK(offered > 50);
}

TEST_CASE("A 200-gon's edges go to the series, a long edge to the rule or Owen's T", "[exact][short_edge]") {
  // An edge 0.06 sigma long at 2.3 sigma (the 200-gon's kind) takes the series: its value at the
  // 2^-54 level with at most 14 terms; the 8-vertex polygon's long edge (1.5 sigma at 1 sigma) does not.
  double h[4] = {2.3, 1.0, 0.0, 0.0}, t1[4] = {0.5, -0.2, 0.0, 0.0}, t2[4] = {0.56, 1.3, 0.0, 0.0}, value[4], err[4];
  bool served[4] = {true, false, false, false};
  int nodes[4] = {0, 0, 0, 0};
  CHECK(short_edge_series_terms(h[0], t1[0], t2[0]) <= 14.0);
  CHECK_FALSE(short_edge_series_terms(h[1], t1[1], t2[1]) <= 16.0);
  short_edge_rule(h, t1, t2, 1, served, value, err, nodes);
  REQUIRE(served[0]);
  const double ref = static_cast<double>(reference_by_owens_t(h[0], t1[0], t2[0]));
  CHECK(std::fabs(value[0] - ref) <= 1e-15 * ref);
  CHECK(std::fabs(value[0] - ref) <= err[0]);
}
