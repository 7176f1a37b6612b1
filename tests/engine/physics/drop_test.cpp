// Drops from flight (strewn/drop.hpp): the integrated fall against closed forms of the drag
// equation (values in /work/shared/CHECKS.md, "Falling objects"), the unscented transform against
// a large Monte Carlo of the same fall, and the normality check firing and not firing.
#include <catch2/catch.hpp>
#include <cmath>

#include "strewn/drop.hpp"
#include "strewn/error.hpp"
#include "strewn/site_io.hpp"

using namespace strewn;

namespace {

constexpr double g = kStandardGravity;  // 9.80665 m/s^2 (CGPM 1901)

// The CHECKS.md body: m = 1 kg, Cd A = 0.05 m^2, rho = 1.225 kg/m^3, no wind.
DropParameters checks_body() {
  DropParameters d;
  d.mass = 1.0;
  d.drag_area = 0.05;
  d.air_density = 1.225;
  d.height = 30.0;
  return d;
}

}  // namespace

TEST_CASE("fall without drag lands at t = sqrt(2h/g), x = v t (vacuum)", "[drop]") {
  DropParameters d;
  d.height = 30.0;
  d.ground_speed = 12.0;
  d.heading_deg = 90.0;  // east
  d.drag_area = 0.0;
  d.release = {100.0, -40.0};
  const FallResult f = fall_of(d);
  // Elementary kinematics; CHECKS.md: h = 30 m gives t = 2.473519209 s.
  CHECK(f.time == Approx(2.473519209).epsilon(1e-9));
  CHECK(f.time == Approx(std::sqrt(2.0 * 30.0 / g)).epsilon(1e-10));
  CHECK(f.landing.x() - 100.0 == Approx(12.0 * std::sqrt(2.0 * 30.0 / g)).epsilon(1e-10));
  CHECK(f.landing.y() == Approx(-40.0).margin(1e-9));
  CHECK(f.vertical_speed == Approx(g * f.time).epsilon(1e-10));
}

TEST_CASE("compass bearings: a heading of 0 flies north, a west wind carries the parcel east", "[drop]") {
  DropParameters d;
  d.height = 20.0;
  d.ground_speed = 5.0;
  d.heading_deg = 0.0;
  d.drag_area = 0.0;
  CHECK(fall_of(d).landing.y() > 5.0);
  CHECK(std::abs(fall_of(d).landing.x()) < 1e-9);
  d.ground_speed = 0.0;
  d.drag_area = 0.05;
  d.wind = {6.0, 270.0, 10.0, 1.0 / 7.0};  // from the west
  const FallResult f = fall_of(d);
  CHECK(f.landing.x() > 0.5);
  CHECK(std::abs(f.landing.y()) < 1e-9);
}

TEST_CASE("vertical fall with quadratic drag follows z(t) = (v_t^2/g) ln cosh(g t / v_t)", "[drop]") {
  // Standard result of the drag equation m dv/dt = m g - (rho Cd A / 2) v^2 from rest:
  // v_t = sqrt(2 m g / (rho Cd A)); CHECKS.md: v_t = 17.894612 m/s, z(2 s) = 16.612995 m.
  DropParameters d = checks_body();
  const double vt = std::sqrt(2.0 * d.mass * g / (d.air_density * d.drag_area));
  CHECK(vt == Approx(17.894612).epsilon(1e-7));
  // From the height the closed form reaches in 2 s the fall takes 2 s ...
  d.height = 16.612995;
  CHECK(fall_of(d).time == Approx(2.0).epsilon(1e-7));
  // ... and from any height, the landing time is the closed form's inverse,
  // t = (v_t / g) acosh(exp(h g / v_t^2)), and the landing speed v_t tanh(g t / v_t).
  for (double h : {1.0, 30.0, 250.0}) {
    d.height = h;
    const FallResult f = fall_of(d);
    const double t = vt / g * std::acosh(std::exp(h * g / (vt * vt)));
    CHECK(f.time == Approx(t).epsilon(1e-8));
    CHECK(f.vertical_speed == Approx(vt * std::tanh(g * t / vt)).epsilon(1e-8));
    CHECK(f.landing.norm() < 1e-12);
  }
}

TEST_CASE("horizontal deceleration under quadratic drag follows x(t) = (m/k) ln(1 + k v0 t / m)", "[drop]") {
  // Standard result of m dv/dt = -k v^2, k = rho Cd A / 2 = 0.030625 kg/m for the CHECKS.md body;
  // CHECKS.md: v0 = 15 m/s gives x(2 s) = 21.279149 m.
  DropParameters d = checks_body();
  const double k = d.air_density * d.drag_area / 2.0;
  const auto x_of = [&](double t) { return d.mass / k * std::log1p(k * 15.0 * t / d.mass); };
  CHECK(x_of(2.0) == Approx(21.279149).epsilon(1e-7));
  // Gravity nearly off (1e-6 m/s^2) and a release 2e-6 m up: the parcel moves horizontally for
  // about 2 s; its vertical speed (~2e-6 m/s) changes |v| by 1e-14 relative, far below the check.
  d.gravity = 1e-6;
  d.height = 2e-6;
  d.ground_speed = 15.0;
  d.heading_deg = 90.0;
  const FallResult f = fall_of(d);
  CHECK(f.time > 1.5);
  CHECK(f.time < 2.5);
  CHECK(f.landing.x() == Approx(x_of(f.time)).epsilon(1e-8));
  CHECK(f.horizontal_velocity.x() == Approx(15.0 / (1.0 + k * 15.0 * f.time / d.mass)).epsilon(1e-8));
}

TEST_CASE("a parachute that opens at once lands at its own terminal speed", "[drop]") {
  // With the canopy open from release the body falls with drag area 0.05 + 0.75 m^2, and after
  // a long fall it lands at v_t = sqrt(2 m g / (rho (CdA_body + CdA_chute))) (the closed form above).
  DropParameters d = checks_body();
  d.height = 200.0;
  d.parachute = Parachute{0.75, 0.0};
  const double vt = std::sqrt(2.0 * d.mass * g / (d.air_density * 0.8));
  CHECK(fall_of(d).vertical_speed == Approx(vt).epsilon(1e-9));
  // Opening later: the first seconds at the body's drag, so the fall is shorter than fully open.
  d.parachute->deploy_delay = 2.0;
  const double t_open_late = fall_of(d).time;
  d.parachute->deploy_delay = 0.0;
  CHECK(t_open_late < fall_of(d).time);
}

TEST_CASE("invalid drop parameters are refused with the member named", "[drop]") {
  DropParameters d = checks_body();
  d.mass = 0.0;
  CHECK_THROWS_WITH(fall_of(d), Catch::Contains("mass"));
  d = checks_body();
  d.height = -1.0;
  CHECK_THROWS_WITH(fall_of(d), Catch::Contains("height"));
  DropUncertainty u;
  u.drag = 0.5;
  CHECK_THROWS_WITH(drop_spread(checks_body(), u), Catch::Contains("drag"));
  // No spread at all: the landing is a point, which is no scatter.
  CHECK_THROWS_AS(drop_spread(checks_body(), DropUncertainty{}), input_error);
  // All but weightless for its drag: the stepper's state went NaN and the spread was called
  // "along one line" (a hostile trial); now the fall itself is refused, saying why.
  // (The parcel of the drone demo, made 1e-6 kg with 1e4 m^2 of drag, from 1e5 m.)
  DropParameters light;
  light.release = {-1.5, 4.7};
  light.height = 1e5;
  light.ground_speed = 6.0;
  light.wind = {3.5, 240.0, 10.0, 0.2};
  light.mass = 1e-6;
  light.drag_area = 1e4;
  light.parachute = Parachute{0.6, 1.0};
  CHECK_THROWS_WITH(fall_of(light), Catch::Contains("check mass and drag_area"));
}

TEST_CASE("unscented mean and covariance match a 10^5-fall Monte Carlo of the same ODE", "[drop][slow]") {
  // Julier & Uhlmann (1997): the unscented transform is exact to second order for the mean and
  // covariance. Reference: 100,000 seeded falls of the same equations (drop_spread's own check,
  // a plain Monte Carlo of the inputs' normal law). Tolerance: 5 standard errors of the Monte
  // Carlo (mean: sqrt(var / n); variance: var sqrt(2 / n), normal-theory) plus 1% of sigma for
  // the transform's own third-order error in this mildly nonlinear case (wind, drag and heading).
  DropParameters d = checks_body();
  d.height = 40.0;
  d.ground_speed = 10.0;
  d.heading_deg = 45.0;
  d.wind = {5.0, 300.0, 10.0, 0.14};
  d.drag_area = 0.02;
  DropUncertainty u;
  u.position = 1.0;
  u.timing = 0.15;
  u.height = 2.0;
  u.ground_speed = 0.8;
  u.heading_deg = 4.0;
  u.wind_speed = 1.5;
  u.wind_from_deg = 8.0;
  u.drag = 0.1;
  DropSpreadOptions o;
  o.falls = 100000;
  const DropSpread s = drop_spread(d, u, o);
  CHECK(s.sigma_points == 19);  // 2 n + 1 for the 9 uncertain inputs (position counts twice)
  const double n = static_cast<double>(o.falls);
  for (int i = 0; i < 2; ++i) {
    const double var = s.mc_covariance(i, i), sigma = std::sqrt(var);
    CHECK(std::abs(s.ut_mean(i) - s.mc_mean(i)) <= 5.0 * sigma / std::sqrt(n) + 0.01 * sigma);
    CHECK(std::abs(s.ut_covariance(i, i) - var) <= 5.0 * var * std::sqrt(2.0 / n) + 0.02 * var);
  }
  // The covariance term: its standard error sqrt((s_xx s_yy + s_xy^2) / n) (normal theory).
  const double sxy_se = std::sqrt((s.mc_covariance(0, 0) * s.mc_covariance(1, 1) + std::pow(s.mc_covariance(0, 1), 2)) / n);
  CHECK(std::abs(s.ut_covariance(0, 1) - s.mc_covariance(0, 1)) <=
        5.0 * sxy_se + 0.02 * std::sqrt(s.mc_covariance(0, 0) * s.mc_covariance(1, 1)));
}

TEST_CASE("the normality check passes a near-normal landing cloud and keeps the unscented normal", "[drop]") {
  // Navigation error and release timing dominate: the landing is nearly a linear map of normal
  // inputs, so the cloud is normal and the source is the unscented normal.
  DropParameters d = checks_body();
  d.ground_speed = 6.0;
  d.drag_area = 0.03;
  d.wind = {3.0, 270.0, 10.0, 1.0 / 7.0};
  DropUncertainty u;
  u.position = 1.5;
  u.timing = 0.2;
  u.wind_speed = 0.3;
  const DropSpread s = drop_spread(d, u);  // the default 4000 falls
  CHECK(s.falls == 4000);
  CHECK(s.normal);
  CHECK(s.ks_p_value >= 0.01);
  CHECK(s.model.components().size() == 1);
  CHECK(s.shape.find("normal") == 0);
}

TEST_CASE("the normality check fires on a curved landing cloud and the source becomes a mixture", "[drop]") {
  // A fast, long throw with a 25 degree heading error: the landings lie on an arc of radius
  // ~85 m spanning +-50 degrees, a crescent no normal describes; at 4000 falls the KS test on the
  // squared Mahalanobis distances rejects it (d^2 of a crescent is far from chi-square(2)).
  DropParameters d;
  d.height = 60.0;
  d.ground_speed = 25.0;
  d.heading_deg = 0.0;
  d.drag_area = 0.0;
  DropUncertainty u;
  u.position = 0.3;
  u.heading_deg = 25.0;
  const DropSpread s = drop_spread(d, u);
  CHECK_FALSE(s.normal);
  CHECK(s.ks_p_value < 1e-6);
  CHECK(s.model.components().size() >= 2);
  CHECK(s.model.components().size() <= 3);
  CHECK(s.mixture_components == static_cast<int>(s.model.components().size()));
  CHECK(s.shape.find("mixture") == 0);
  // The mixture describes the cloud better than the single normal (Schwarz's BIC, lower is better).
  CHECK(s.mixture_bic < s.normal_bic);
  // The output says whether the mixture's own check passed, consistently with its p-value.
  CHECK(s.mixture_check_passed == (s.mixture_ks_p_value >= 0.01));
  CHECK(s.shape.find(s.mixture_check_passed ? "passed" : "NOT passed") != std::string::npos);
}

TEST_CASE("the fallback mixture follows a crescent: its components have their own means along the arc", "[drop]") {
  // Vacuum fall (no drag): a landing is the release plus v t (sin h, cos h), t = sqrt(2 H / g),
  // so with only the heading uncertain the landings lie on an arc of radius R = v t about the
  // release (closed form, CHECKS.md "Falling objects"). H = 60 m, v = 25 m/s: R = 87.45 m.
  DropParameters d;
  d.height = 60.0;
  d.ground_speed = 25.0;
  d.drag_area = 0.0;
  DropUncertainty u;
  u.position = 0.3;
  u.heading_deg = 25.0;
  const DropSpread s = drop_spread(d, u);
  REQUIRE_FALSE(s.normal);
  const double radius = 25.0 * std::sqrt(2.0 * 60.0 / g);
  // Each component's mean lies near the arc (within a tenth of R; the single normal's mean, the
  // arc's centre of mass, lies R (1 - exp(-sigma^2 / 2)) = 0.09 R inside it), and the means are
  // spread across the arc, not stacked on one point as a core and a wide part would be.
  double left = 0.0, right = 0.0;
  for (const WeightedGaussian& c : s.model.components()) {
    const Vec2 m = c.gaussian.mean();
    INFO("component mean " << m.transpose() << ", |m| = " << m.norm());
    CHECK(std::fabs(m.norm() - radius) < 0.1 * radius);
    left = std::min(left, m.x());
    right = std::max(right, m.x());
  }
  CHECK(right - left > 0.5 * radius);
}

TEST_CASE("the Monte Carlo check tells its cost once and its progress up to 1, and reading a site passes them on", "[drop][progress]") {
  // 20000 falls from 1e5 m ran three silent minutes (a hostile trial). The estimate is the falls
  // times the time of the first few; the result does not depend on being observed.
  DropParameters d = checks_body();
  DropUncertainty u;
  u.position = 1.5;
  u.timing = 0.2;
  DropSpreadOptions o;
  o.falls = 300;
  int estimates = 0;
  double units = 0.0, last = 0.0;
  bool rising = true;
  o.estimate = [&](const WorkEstimate& w) {
    ++estimates;
    units = w.units;
    CHECK(w.seconds_per_unit > 0.0);
  };
  o.progress = [&](double done) {
    rising = rising && done >= last;
    last = done;
  };
  const DropSpread observed = drop_spread(d, u, o);
  CHECK(estimates == 1);
  CHECK(units == 300.0);
  CHECK(rising);
  CHECK(last == 1.0);
  o.estimate = {};
  o.progress = {};
  const DropSpread plain = drop_spread(d, u, o);
  CHECK(plain.mc_mean == observed.mc_mean);
  CHECK(plain.mc_covariance == observed.mc_covariance);

  // Through load_site_text inside a scope (how the command line shows it), and not after it.
  const std::string text = "[[source]]\nname = \"parcel\"\n[source.drop]\nrelease = [0.0, 0.0]\nheight = 30.0\n"
                           "ground_speed = 5.0\nheading_deg = 0.0\nmass = 1.0\ndrag_area = 0.05\nfalls = 200\n"
                           "[source.drop.uncertainty]\nposition = 1.0\ntiming = 0.1\n"
                           "[[zone]]\nname = \"z\"\nrole = \"report_only\"\nshape = \"disk\"\nparams = { centre = [5.0, 0.0], radius = 1.0 }\n";
  const ShapeRegistry shapes = ShapeRegistry::with_default_search_path({});
  int told = 0;
  {
    const LoadProgressScope scope([&](const WorkEstimate&) { ++told; }, {});
    load_site_text(text, "drop_progress.toml", shapes);
  }
  CHECK(told == 1);
  load_site_text(text, "drop_progress.toml", shapes);
  CHECK(told == 1);
}
