// The radial profiles of the scatter families (strewn/scatter_family.hpp) against closed forms
// (CHECKS.md, "Elliptical families") and Boost.Math's univariate Student t.
#include <boost/math/distributions/students_t.hpp>
#include <catch2/catch.hpp>
#include <cmath>

#include "strewn/constants.hpp"
#include "strewn/error.hpp"
#include "strewn/scatter_family.hpp"
#include "strewn/scatter_model.hpp"

using namespace strewn;

TEST_CASE("the t's radial CDF is 1 - (1 + r^2/nu)^(-nu/2): nu = 3, r = 1 gives 0.350480947161671", "[family]") {
  // CHECKS.md, "Elliptical families".
  const ScatterFamily t3 = ScatterFamily::student_t(3.0);
  CHECK(t3.cdf(1.0) == Approx(0.350480947161671).epsilon(1e-14));
  CHECK(t3.survival(1.0) == Approx(1.0 - 0.350480947161671).epsilon(1e-14));
  // Far in the tail the survival keeps its digits: (1 + 1e8/3)^(-3/2) = 5.196152...e-12.
  CHECK(t3.survival(1e4) == Approx(std::pow(1.0 + 1e8 / 3.0, -1.5)).epsilon(1e-14));
  // Near the centre the CDF keeps its digits: G(r) ~ r^2/2 for small r.
  CHECK(t3.cdf(1e-8) == Approx(0.5e-16).epsilon(1e-7));
}

TEST_CASE("a t of very many degrees of freedom has the normal's radial CDF", "[family]") {
  const ScatterFamily t = ScatterFamily::student_t(1e6), n = ScatterFamily::normal();
  for (double r : {0.1, 1.0, 2.0, 4.0}) CHECK(t.cdf(r) == Approx(n.cdf(r)).epsilon(1e-4));
  CHECK(n.cdf(1.0) == Approx(-std::expm1(-0.5)).epsilon(1e-15));
}

TEST_CASE("the uniform family is flat over the disk of radius 2 in whitened units", "[family]") {
  const ScatterFamily u = ScatterFamily::uniform();
  CHECK(u.cdf(1.0) == 0.25);
  CHECK(u.cdf(2.0) == 1.0);
  CHECK(u.cdf(3.0) == 1.0);
  CHECK(u.survival(2.0) == 0.0);
  CHECK(u.density(0.5) == Approx(1.0 / (4 * kPi)).epsilon(1e-15));
  CHECK(u.density(2.5) == 0.0);
  // Its covariance is the identity: E r^2 = integral of r^2 dG = 2 (each axis variance 1).
  CHECK(u.kinks() == std::vector<double>{2.0});
}

TEST_CASE("radius quantiles invert the radial CDF; CEP and R95 of the normal are the Rayleigh ones", "[family]") {
  // CHECKS.md: CEP = 1.1774100 sigma, R95 = 2.4477468 sigma for the normal.
  CHECK(ScatterFamily::normal().radius_quantile(0.5) == Approx(1.1774100).epsilon(1e-7));
  CHECK(ScatterFamily::normal().radius_quantile(0.95) == Approx(2.4477468).epsilon(1e-7));
  for (const ScatterFamily& f : {ScatterFamily::student_t(0.5), ScatterFamily::student_t(4.0), ScatterFamily::uniform()})
    for (double p : {1e-6, 0.1, 0.5, 0.95, 0.999999}) {
      INFO(f.describe() << " p = " << p);
      CHECK(f.cdf(f.radius_quantile(p)) == Approx(p).epsilon(1e-12));
    }
}

TEST_CASE("the t's line density is the univariate t density of the same nu (its marginal)", "[family]") {
  // Boost.Math's students_t pdf, an independent implementation.
  for (double nu : {0.5, 1.0, 3.0, 30.0}) {
    const boost::math::students_t_distribution<double> t(nu);
    for (double d : {0.0, 0.7, 3.0, 40.0})
      CHECK(ScatterFamily::student_t(nu).line_density(d) == Approx(boost::math::pdf(t, d)).epsilon(1e-12));
  }
  // The uniform's: a chord 2 sqrt(4 - d^2) long at density 1/(4 pi).
  CHECK(ScatterFamily::uniform().line_density(1.0) == Approx(2 * std::sqrt(3.0) / (4 * kPi)).epsilon(1e-15));
}

TEST_CASE("families are named, parsed and carried by a component's scaled and moved copies", "[family]") {
  CHECK(ScatterFamily::from_name("student_t", 4.0) == ScatterFamily::student_t(4.0));
  CHECK(ScatterFamily::from_name("uniform").kind() == FamilyKind::uniform);
  CHECK(ScatterFamily::student_t(4.0).describe() == "student_t (nu = 4)");
  CHECK_THROWS_WITH(ScatterFamily::from_name("studnet_t", 4.0), Catch::Contains("did you mean 'student_t'"));
  CHECK_THROWS_AS(ScatterFamily::student_t(0.0), input_error);
  CHECK_THROWS_AS(ScatterFamily::student_t(2e6), input_error);
  const Gaussian g = Gaussian::from_axes({1, 2}, 2.0, 1.0, 30.0).with_family(ScatterFamily::student_t(3.0));
  CHECK(g.scaled(2.0).family() == ScatterFamily::student_t(3.0));
  CHECK(g.moved_to({5, 5}).family() == ScatterFamily::student_t(3.0));
  CHECK(Gaussian::from_axes({1, 2}, 2.0, 1.0, 30.0).family().is_normal());
  // The peak density: f(0) / (sigma_major sigma_minor); 1/(2 pi) for the t as for the normal.
  CHECK(g.peak_density() == Approx(1.0 / (2 * kPi * 2.0)).epsilon(1e-14));
  CHECK(g.with_family(ScatterFamily::uniform()).peak_density() == Approx(1.0 / (4 * kPi * 2.0)).epsilon(1e-14));
}
