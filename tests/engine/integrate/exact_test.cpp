// The exact method against closed forms and published identities. Each check names its source.
#include <boost/math/distributions/non_central_chi_squared.hpp>
#include <catch2/catch.hpp>
#include <cmath>
#include <random>

#include "strewn/integrate.hpp"
#include "test_support.hpp"

using namespace strewn;
using namespace strewn::test;

namespace {

Gaussian standard() { return Gaussian::from_axes({0, 0}, 1.0, 1.0, 0.0); }

// Checks p and q against references with the accuracy the engine promises (1e-12 absolute,
// 1e-8 relative for both p and q) and that abs_err covers the true error.
void check_against(const Estimate& e, double p_ref, double q_ref, double ref_rel_err = 1e-15) {
  INFO("p = " << e.p << " ref " << p_ref << ", q = " << e.q << " ref " << q_ref << ", abs_err "
              << e.abs_err << ", message: " << e.message);
  CHECK(std::fabs(e.p - p_ref) <= 1e-12);
  CHECK(rel_diff(e.p, p_ref) <= 1e-8);
  CHECK(rel_diff(e.q, q_ref) <= 1e-8);
  const double ref_err = ref_rel_err * std::max(p_ref, 1e-300);
  CHECK(std::fabs(e.p - p_ref) <= e.abs_err + ref_err);
  CHECK(e.converged);
}

}  // namespace

TEST_CASE("quadrant probability matches Sheppard's formula for correlated normals", "[exact]") {
  // Sheppard (1899); Abramowitz & Stegun 26.3: P(X > 0, Y > 0) = 1/4 + asin(rho) / (2 pi).
  // The quadrant is truncated at 12 sigma, where the missing mass is below 1e-32.
  for (double rho : {-0.999, -0.9, -0.5, 0.0, 0.3, 0.7, 0.95, 0.999}) {
    Mat2 cov;
    cov << 1.0, rho, rho, 1.0;
    const auto g = Gaussian::from_covariance({0, 0}, cov);
    const Estimate e = integrate(g, rectangle({0, 0}, {12, 12}));
    const double ref = 0.25 + std::asin(rho) / (2 * kPi);
    INFO("rho = " << rho);
    check_against(e, ref, 1 - ref);
  }
}

TEST_CASE("centred annular sector matches the Rayleigh closed form", "[exact]") {
  // Rayleigh distribution: (t2 - t1)/(2 pi) * (exp(-r1^2/(2 s^2)) - exp(-r2^2/(2 s^2))).
  struct Case { double s, r1, r2, t1, t2; };
  for (const Case c : {Case{1.0, 0.5, 2.0, 0.3, 1.9}, Case{2.5, 1.0, 7.0, -1.0, 2.0},
                       Case{0.3, 0.01, 0.4, 0.0, 6.0}, Case{1.0, 6.0, 8.0, 1.0, 1.5}}) {
    const auto g = Gaussian::from_axes({0, 0}, c.s, c.s, 0.0);
    const Estimate e = integrate(g, ring_sector({0, 0}, c.r1, c.r2, c.t1, c.t2));
    const double a = std::exp(-c.r1 * c.r1 / (2 * c.s * c.s));
    const double b = std::exp(-c.r2 * c.r2 / (2 * c.s * c.s));
    const double ref = (c.t2 - c.t1) / (2 * kPi) * (a - b);
    INFO("sector r " << c.r1 << ".." << c.r2);
    check_against(e, ref, 1 - ref, 1e-14);
  }
}

TEST_CASE("Mahalanobis ellipse holds 1 - exp(-k^2/2), chi-square with 2 d.o.f.", "[exact]") {
  // P(inside the ellipse of Mahalanobis radius k) = 1 - exp(-k^2/2); q = exp(-k^2/2) down to
  // 1e-15 and below must keep its relative accuracy.
  const auto g = Gaussian::from_axes({3.0, -2.0}, 2.0, 0.5, 33.0);
  const Mat2 axes = g.cholesky();
  for (double k : {0.001, 0.5, 1.0, 2.0, 4.0, 6.0, 8.0, 8.3}) {
    const Estimate e = integrate(g, ellipse(g.mean(), k * axes));
    INFO("k = " << k);
    check_against(e, -std::expm1(-k * k / 2), std::exp(-k * k / 2), 1e-15);
  }
}

TEST_CASE("whole disks from the mean's edge to the far tail match the noncentral chi-square", "[exact][periodic]") {
  // P(|Y - c| <= R) = F_ncx2(R^2; 2, |c|^2) for Y standard normal (Boost.Math as the reference
  // library): whole circles take the periodic trapezoidal path, or fall back to Gauss-Kronrod
  // when the mean sits almost on the circle; both are checked here, also run backwards (a hole).
  const double R = 0.7;
  for (double d : {0.0, 0.3, 0.7 - 1e-6, 0.7 + 1e-9, 0.7 + 1e-3, 1.5, 4.0, 9.0, 15.0}) {
    INFO("distance " << d);
    const boost::math::non_central_chi_squared ncx2(2.0, d * d);
    const double p = boost::math::cdf(ncx2, R * R), q = boost::math::cdf(boost::math::complement(ncx2, R * R));
    Region circle;
    circle.loops.push_back({Edge::arc(Vec2(d, 0.0), R * Mat2::Identity(), 0.3, 0.3 + 2 * M_PI)});
    check_against(integrate(standard(), circle), p, q, 1e-13);
    // The same circle as a hole in a square of side 40: P = P(square) - p.
    Region holed = rectangle({-20, -20}, {20, 20});
    holed.loops.push_back({Edge::arc(Vec2(d, 0.0), R * Mat2::Identity(), 0.3 + 2 * M_PI, 0.3)});
    const double square_p = std::pow(std::erf(20 / std::sqrt(2.0)), 2);
    const Estimate h = integrate(standard(), normalised(holed));
    CHECK(std::fabs(h.p - (square_p - p)) <= h.abs_err + 1e-15);
  }
}

TEST_CASE("small whole disks within one sigma of the mean match the noncentral chi-square", "[exact][periodic]") {
  // The near form (the region within radius 1 of the mean) on whole circles takes the periodic
  // trapezoidal rule; Boost.Math's noncentral chi-square is the reference library. Includes the
  // mean at the centre, inside, exactly on the circle and just outside it.
  for (double R : {1e-4, 0.01, 0.2, 0.45}) {
    for (double f : {0.0, 0.5, 1.0, 1.0 + 1e-9, 1.2}) {
      const double d = f * R;
      INFO("R = " << R << ", distance " << d);
      const boost::math::non_central_chi_squared ncx2(2.0, d * d);
      const double p = boost::math::cdf(ncx2, R * R), q = boost::math::cdf(boost::math::complement(ncx2, R * R));
      Region circle;
      circle.loops.push_back({Edge::arc(Vec2(0.0, d), R * Mat2::Identity(), 1.1, 1.1 + 2 * M_PI)});
      check_against(integrate(standard(), circle), p, q, 1e-12);
    }
  }
}

TEST_CASE("the mean on an arc or at an arc's end counts half the turn there", "[exact][boundary]") {
  // A disk of radius R with the mean on its rim: F_ncx2(R^2; 2, R^2) (Boost.Math). The upper
  // half of that disk (an arc and a diameter meeting at the mean) holds half of it by the
  // reflection y -> -y, wherever on the x axis the mean is. Also the rim and the corner a hair
  // away on either side (1e-13 to 1e-6 relative).
  for (double R : {0.45, 2.0, 7.0}) {
    for (double f : {1.0, 1.0 - 1e-13, 1.0 + 1e-13, 1.0 + 1e-9}) {
      const double d = f * R;
      INFO("R = " << R << ", distance R * (1 + " << f - 1.0 << ")");
      const boost::math::non_central_chi_squared ncx2(2.0, d * d);
      const double p = boost::math::cdf(ncx2, R * R), q = boost::math::cdf(boost::math::complement(ncx2, R * R));
      Region circle;
      circle.loops.push_back({Edge::arc(Vec2(d, 0.0), R * Mat2::Identity(), 2.0, 2.0 + 2 * M_PI)});
      check_against(integrate(standard(), circle), p, q, 1e-12);
    }
    for (double f : {1.0, 1.0 - 1e-13, 1.0 + 1e-13, 1.0 + 1e-9, 1.0 + 1e-6}) {
      // The half disk's corner (an arc meeting a diameter) at or near the mean.
      const double d = f * R;
      const double full = boost::math::cdf(boost::math::non_central_chi_squared(2.0, d * d), R * R);
      Region half;
      half.loops.push_back({Edge::segment(Vec2(d - R, 0), Vec2(d + R, 0)),
                            Edge::arc(Vec2(d, 0.0), R * Mat2::Identity(), 0.0, M_PI)});
      INFO("half disk, R = " << R << ", centre at R * (1 + " << f - 1.0 << ")");
      check_against(integrate(standard(), half), full / 2, 1 - full / 2, 1e-12);
    }
  }
}

TEST_CASE("independent normals over a far square give the product of 1-D tails", "[exact]") {
  // ../shared/CHECKS.md: mean 0, unit variances, [10, 11] x [0, 1]:
  // (Q(10) - Q(11)) (Phi(1) - 1/2) = 2.600932e-24 (exact identity).
  const Estimate e = integrate(standard(), rectangle({10, 0}, {11, 1}));
  const double ref = normal_interval(10, 11) * normal_interval(0, 1);
  CHECK(ref == Approx(2.600932e-24).epsilon(1e-6));
  check_against(e, ref, 1 - ref, 1e-14);
}

TEST_CASE("long thin strips far out, reaching thousands of sigma, keep their mass", "[exact][tail]") {
  // Independent normals: the 1-D product is exact (Q differences by erfc). A strip 20 sigma out
  // reaching to 7,000 sigma and beyond put its edge's mass within 1/26 sigma of the near end,
  // where the cancelling edge's first Gauss-Kronrod rule had no node: it came out 36% low under
  // a bound of 1e-7 of it (p ~ 1e-243, found by an adversarial test). Also a piece within |t| <= h
  // of its foot (the direct form's quadrature), and the strips turned by 90 degrees.
  struct Box {
    double x0, x1, y0, y1;
  };
  const Box boxes[] = {{26.53, 30.0, -20.169, -19.976}, {26.53, 7000.0, -20.169, -19.976},
                       {26.53, 20031.0, -20.169, -19.976}, {26.53, 8000.0, -21.0, -19.976},
                       {10.0, 29.0, 30.0, 31.0}, {3.0, 5000.0, 9.0, 9.5}};
  for (const Box& b : boxes)
    for (int turned = 0; turned < 2; ++turned) {
      const Region r = turned ? rectangle({-b.y1, b.x0}, {-b.y0, b.x1}) : rectangle({b.x0, b.y0}, {b.x1, b.y1});
      IntegrateOptions o;
      o.rel_tolerance = 1e-10;
      o.abs_tolerance = 1e-300;
      const Estimate e = integrate(standard(), r, o);
      const double ref = normal_interval(b.x0, b.x1) * normal_interval(b.y0, b.y1);
      INFO("box " << b.x0 << ".." << b.x1 << " x " << b.y0 << ".." << b.y1 << " turned " << turned << " p " << e.p
                  << " +- " << e.abs_err << " ref " << ref);
      CHECK(std::fabs(e.p - ref) <= e.abs_err + 1e-13 * ref);
      CHECK(std::fabs(e.p - ref) <= 1e-9 * ref);
    }
}

TEST_CASE("tail probabilities from 1e-6 to 1e-15 keep relative accuracy", "[exact][tail]") {
  // A rectangle [a, a + 1] x [-0.5, 0.5] under a circular spread, turned by 27 degrees with
  // the spread centred: rotation invariance makes the 1-D product exact.
  const Mat2 R = rotation(27 * kPi / 180);
  for (double a : {4.5, 5.7, 6.9, 7.9}) {  // p ~ 1e-6, 1e-9, 1e-12, 1e-15
    const Region r = transformed(rectangle({a, -0.5}, {a + 1, 0.5}), R, Vec2::Zero());
    const Estimate e = integrate(standard(), r);
    const double ref = normal_interval(a, a + 1) * normal_interval(-0.5, 0.5);
    INFO("a = " << a << " p = " << ref);
    check_against(e, ref, 1 - ref, 1e-14);
  }
}

TEST_CASE("p within 1e-12 of 1: the complement keeps its relative accuracy", "[exact][tail]") {
  // [-b, b]^2 under a standard normal: q = 1 - (1 - 2 Q(b))^2 = 4 Q(b) - 4 Q(b)^2.
  for (double b : {7.2, 8.0, 8.3}) {
    const Estimate e = integrate(standard(), rectangle({-b, -b}, {b, b}));
    const double Q = upper_tail(b);
    const double q_ref = 4 * Q - 4 * Q * Q;
    INFO("b = " << b << " q = " << q_ref);
    check_against(e, 1 - q_ref, q_ref);
  }
}

TEST_CASE("hard classes: edges through and near the mean, thin strips, extreme spreads",
          "[exact][pitfalls]") {
  SECTION("a thin strip pointing at the mean") {
    const Mat2 R = rotation(0.61);
    const Region r = transformed(rectangle({3, -1e-4}, {8, 1e-4}), R, Vec2::Zero());
    const double ref = normal_interval(3, 8) * normal_interval(-1e-4, 1e-4);
    // Rotating the vertices rounds them by ~1e-15 m, which moves the 2e-4 m wide strip's area
    // by ~1e-11 relative: that much of the difference is the input's, not the method's.
    check_against(integrate(standard(), r), ref, 1 - ref, 2e-11);
  }
  SECTION("an edge whose line passes 1e-9 from the mean") {
    const double ref = normal_interval(2, 9) * normal_interval(1e-9, 2);
    check_against(integrate(standard(), rectangle({2, 1e-9}, {9, 2})), ref, 1 - ref, 1e-13);
  }
  SECTION("correlation 0.999, region aligned with the principal axes") {
    // Covariance [[1, .999], [.999, 1]] has axes sqrt(1.999) and sqrt(0.001) at 45 degrees.
    Mat2 cov;
    cov << 1.0, 0.999, 0.999, 1.0;
    const auto g = Gaussian::from_covariance({0, 0}, cov);
    const double s1 = std::sqrt(1.999), s2 = std::sqrt(0.001);
    const Region r = transformed(rectangle({0.5, 0.02}, {3.0, 0.09}), rotation(kPi / 4), Vec2::Zero());
    const double ref = normal_interval(0.5 / s1, 3.0 / s1) * normal_interval(0.02 / s2, 0.09 / s2);
    check_against(integrate(g, r), ref, 1 - ref, 1e-13);
  }
  SECTION("axis ratio 50:1") {
    const auto g = Gaussian::from_axes({1, 2}, 5.0, 0.1, 30.0);
    const Region r = transformed(rectangle({2, 0.05}, {9, 0.4}), rotation(kPi / 6), Vec2(1, 2));
    const double ref = normal_interval(2 / 5.0, 9 / 5.0) * normal_interval(0.5, 4.0);
    check_against(integrate(g, r), ref, 1 - ref, 1e-13);
  }
  SECTION("axis ratio 1000:1 still integrates") {
    const auto g = Gaussian::from_axes({0, 0}, 10.0, 0.01, 0.0);
    const double ref = normal_interval(0.1, 0.5) * normal_interval(-1.0, 2.0);
    check_against(integrate(g, rectangle({1, -0.01}, {5, 0.02})), ref, 1 - ref, 1e-13);
  }
  SECTION("a tiny square next to the mean (p ~ 1e-11)") {
    const double ref = normal_interval(1e-5, 3e-5) * normal_interval(1e-5, 2e-5);
    check_against(integrate(standard(), rectangle({1e-5, 1e-5}, {3e-5, 2e-5})), ref, 1 - ref, 1e-12);
  }
  SECTION("the mean exactly on a vertex, interior angle measured after whitening") {
    const double ref = normal_interval(0, 1.5) * normal_interval(0, 0.7);
    check_against(integrate(standard(), rectangle({0, 0}, {1.5, 0.7})), ref, 1 - ref);
    Mat2 cov;
    cov << 4.0, 1.2, 1.2, 1.0;
    const auto g = Gaussian::from_covariance({0, 0}, cov);
    const double rho = 1.2 / 2.0;
    const double sheppard = 0.25 + std::asin(rho) / (2 * kPi);
    check_against(integrate(g, rectangle({0, 0}, {80, 40})), sheppard, 1 - sheppard);
  }
  SECTION("the mean exactly on an edge") {
    const double ref = normal_interval(-1, 2) * normal_interval(0, 1);
    check_against(integrate(standard(), rectangle({-1, 0}, {2, 1})), ref, 1 - ref);
  }
}

TEST_CASE("a square 8 and 10 sigma away is neither 1% off nor negative", "[exact][pitfalls]") {
  // The failure mode of summing arctangent terms instead of using the winding number.
  for (double a : {8.0, 10.0}) {
    const Estimate e = integrate(standard(), rectangle({a, a}, {a + 1, a + 1}));
    const double ref = normal_interval(a, a + 1) * normal_interval(a, a + 1);
    CHECK(e.p > 0);
    check_against(e, ref, 1 - ref, 1e-14);
  }
}

TEST_CASE("holes are subtracted", "[exact]") {
  const Region r = with_hole({{-3, -3}, {3, -3}, {3, 3}, {-3, 3}}, {{-1, -1}, {1, -1}, {1, 1}, {-1, 1}});
  const double ref = normal_interval(-3, 3) * normal_interval(-3, 3) -
                     normal_interval(-1, 1) * normal_interval(-1, 1);
  check_against(integrate(standard(), r), ref, 1 - ref, 1e-14);
}

TEST_CASE("mixtures are weighted sums", "[exact]") {
  const auto a = Gaussian::from_axes({0, 0}, 1.0, 1.0, 0.0);
  const auto b = Gaussian::from_axes({0, 0}, 3.0, 3.0, 0.0);
  const auto model = ScatterModel::mixture({{0.8, a}, {0.2, b}});
  const Region r = rectangle({1, -1}, {2, 1});
  const double ref = 0.8 * normal_interval(1, 2) * normal_interval(-1, 1) +
                     0.2 * normal_interval(1 / 3.0, 2 / 3.0) * normal_interval(-1 / 3.0, 1 / 3.0);
  check_against(integrate(model, r), ref, 1 - ref, 1e-14);
}

TEST_CASE("probability over many events avoids 1 - (1 - p)^N", "[exposure]") {
  // -expm1(N log1p(-p)) = N p - N(N-1)/2 p^2 + ... for tiny p.
  CHECK(probability_of_any(1e-15, 1000) == Approx(1e-12).epsilon(1e-9));
  CHECK(probability_of_any(0.5, 2) == Approx(0.75).epsilon(1e-15));
  CHECK(probability_of_any(0.0, 1e6) == 0.0);
  CHECK(probability_of_any(1.0, 3) == 1.0);
  CHECK_THROWS(probability_of_any(-0.1, 3));
}

TEST_CASE("the one-pass path for far polygons gives what the general path gives", "[exact]") {
  // Common practice: two routes through the same formula must agree to rounding. A polygon
  // whose whitened bounding box leaves out the mean (most of these) takes the one-pass path;
  // the same polygon with a small disk far away (an arc, so the general path; its share
  // underflows to 0) does not.
  std::mt19937_64 rng(20261202);
  std::uniform_real_distribution<double> u(0.0, 1.0);
  for (int trial = 0; trial < 300; ++trial) {
    const auto g = Gaussian::from_axes({0.2 * u(rng), -0.1 * u(rng)}, 0.5 + u(rng), 0.3 + 0.5 * u(rng), 180 * u(rng));
    const Vec2 c(3 + 6 * u(rng), -3 + 6 * u(rng));
    std::vector<Vec2> pts;
    const int n = 3 + trial % 9;
    for (int i = 0; i < n; ++i) {
      const double a = 2 * kPi * i / n, r = 0.3 + 1.2 * u(rng);
      pts.emplace_back(c.x() + r * std::cos(a), c.y() + r * std::sin(a));
    }
    Region alone = polygon(pts);
    if (bounds(alone).min.x() <= 0.3) continue;  // the one-pass path wants the mean outside
    Region with_far_disk = alone;
    with_far_disk.loops.push_back(disk({200, 200}, 0.5).loops.front());
    IntegrateOptions o;
    o.rel_tolerance = 1e-12;
    o.abs_tolerance = 1e-300;
    const Estimate a = integrate(g, alone, o), b = integrate(g, with_far_disk, o);
    INFO("trial " << trial << ": " << a.p << " +- " << a.abs_err << " vs " << b.p << " +- " << b.abs_err);
    CHECK(std::fabs(a.p - b.p) <= 1e-14 * a.p + 1e-300);
    CHECK(std::fabs(a.q - b.q) <= 1e-15);
    CHECK(a.abs_err <= b.abs_err * (1 + 1e-9) + 1e-300);
    CHECK(a.abs_err >= 0.5 * b.abs_err);
  }
}
