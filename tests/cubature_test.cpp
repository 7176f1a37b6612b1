// The cubature method against closed forms: it meets the tolerance it was asked for and its
// error estimate covers the true error.
#include <catch2/catch.hpp>
#include <cmath>

#include "strewn/integrate.hpp"
#include "test_support.hpp"

using namespace strewn;
using namespace strewn::test;

namespace {
IntegrateOptions cubature(double rel) {
  IntegrateOptions o;
  o.method = Method::cubature;
  o.rel_tolerance = rel;
  o.abs_tolerance = 1e-300;
  return o;
}
}  // namespace

TEST_CASE("cubature meets its tolerance on closed-form cases", "[cubature]") {
  const auto g = Gaussian::from_axes({0, 0}, 1.0, 1.0, 0.0);
  struct Case { const char* name; Region region; double ref; };
  const std::vector<Case> cases = {
      // Rayleigh closed form for a centred annular sector.
      {"sector", annular_sector({0, 0}, 0.5, 2.0, 0.3, 2.0),
       (2.0 - 0.3) / (2 * kPi) * (std::exp(-0.125) - std::exp(-2.0))},
      // chi-square 2 d.o.f.: centred disk of radius k.
      {"disk", disk({0, 0}, 1.5), -std::expm1(-1.125)},
      // product of 1-D probabilities for axis-aligned rectangles.
      {"rectangle", rect(0.5, 2.0, -1.0, 0.3), normal_interval(0.5, 2.0) * normal_interval(-1.0, 0.3)},
      {"far rectangle", rect(5, 6, 5, 6), normal_interval(5, 6) * normal_interval(5, 6)},
      {"rectangle with hole", with_hole({{-3, -3}, {3, -3}, {3, 3}, {-3, 3}}, {{-1, -1}, {1, -1}, {1, 1}, {-1, 1}}),
       normal_interval(-3, 3) * normal_interval(-3, 3) - normal_interval(-1, 1) * normal_interval(-1, 1)}};
  for (double rel : {1e-6, 1e-8, 1e-10}) {
    for (const Case& c : cases) {
      const Estimate e = integrate(g, c.region, cubature(rel));
      INFO(c.name << " rel " << rel << ": p = " << e.p << " ref " << c.ref << " err " << e.abs_err);
      CHECK(e.converged);
      CHECK(std::fabs(e.p - c.ref) <= e.abs_err + 1e-15 * c.ref);
      CHECK(std::fabs(e.p - c.ref) <= rel * c.ref * 10);
      CHECK(e.method == Method::cubature);
    }
  }
}

TEST_CASE("cubature says so when its evaluation budget is too small", "[cubature]") {
  const auto g = Gaussian::from_axes({0, 0}, 1.0, 1.0, 0.0);
  IntegrateOptions o = cubature(1e-12);
  o.max_evaluations = 20;
  const Estimate e = integrate(g, rect(-5, 5, 0.1, 4), o);
  CHECK_FALSE(e.converged);
  CHECK_THAT(e.message, Catch::Contains("evaluation limit"));
}

TEST_CASE("verify reports agreement of exact and cubature, and flags a disagreement",
          "[cubature][verify]") {
  const auto g = Gaussian::from_axes({0.3, -0.2}, 1.2, 0.6, 40.0);
  const Verification v = verify(g, rect(0, 2, 0, 1), {});
  CHECK(v.agree);
  CHECK(v.secondary.method == Method::cubature);
  // With a starved cubature the methods differ by more than their (honest) bounds may not
  // claim; a disagreement is reported, not hidden.
  IntegrateOptions o;
  o.max_evaluations = 17;
  o.rel_tolerance = 1e-14;
  const Verification w = verify(g, disk({0.5, 0.2}, 1.0), o);
  CHECK_FALSE(w.secondary.converged);
}
