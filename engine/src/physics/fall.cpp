// fall_of: one parcel's fall from release to the ground (the equations in strewn/drop.hpp).
#include <algorithm>
#include <array>
#include <cmath>
#include <string>

#include <boost/numeric/odeint.hpp>
#include <fmt/format.h>

#include "strewn/constants.hpp"
#include "strewn/drop.hpp"
#include "strewn/error.hpp"

namespace strewn {
namespace {

using State = std::array<double, 6>;  // x, y, z, vx, vy, vz

bool finite_nonneg(double v) { return std::isfinite(v) && v >= 0.0; }

// The compass bearing's unit vector in site axes (x east, y north).
Vec2 bearing_vector(double deg) {
  const double a = deg * kPi / 180.0;
  return {std::sin(a), std::cos(a)};
}

struct Dynamics {
  double k = 0.0;  // rho C_dA / (2 m), 1/m
  double g = kStandardGravity;
  Vec2 wind_ref = Vec2::Zero();  // the wind's velocity at the reference height
  double reference_height = 10.0, exponent = 1.0 / 7.0;

  void operator()(const State& s, State& ds, double /*t*/) const {
    // The power law is zero at the ground; below it (a step's trial point) the air is still.
    const double f = s[2] > 0.0 ? std::pow(s[2] / reference_height, exponent) : 0.0;
    const double rx = s[3] - f * wind_ref.x(), ry = s[4] - f * wind_ref.y(), rz = s[5];
    const double speed = std::sqrt(rx * rx + ry * ry + rz * rz);
    ds[0] = s[3];
    ds[1] = s[4];
    ds[2] = s[5];
    ds[3] = -k * speed * rx;
    ds[4] = -k * speed * ry;
    ds[5] = -g - k * speed * rz;
  }
};

using Stepper = boost::numeric::odeint::runge_kutta_dopri5<State>;

// Steps from (t, s) with the dense-output Dormand-Prince stepper until z reaches 0 (returns true,
// with the landing in s and t) or until `until` (returns false, with the state at `until`).
bool run_phase(const Dynamics& dyn, State& s, double& t, double until, const FallOptions& o, int& steps) {
  auto stepper = boost::numeric::odeint::make_dense_output(o.abs_tolerance, o.rel_tolerance, Stepper());
  // A first step of a hundredth of the free-fall time from here: the controller adapts it.
  const double first = 0.01 * std::sqrt(2.0 * std::max(s[2], 1e-6) / dyn.g) + 1e-6;
  stepper.initialize(s, t, first);
  while (true) {
    if (++steps > 1000000) throw input_error("drop: the fall did not end within a million integration steps");
    stepper.do_step(dyn);
    const double t1 = stepper.current_time();
    const State& s1 = stepper.current_state();
    // A parcel all but weightless for its drag (1e-6 kg under 1e4 m^2) is stiff for this
    // explicit stepper: its state became NaN and the landing came out NaN, then was reported as
    // "spread along one line" (a hostile trial).
    if (!std::isfinite(t1) || !std::all_of(s1.begin(), s1.end(), [](double v) { return std::isfinite(v); }))
      throw input_error(
          "drop: the fall could not be integrated (its state stopped being finite): a parcel this light for its drag "
          "area hardly falls; check mass and drag_area");
    if (s1[2] <= 0.0) {
      // Bisection on the dense output for z = 0 between the last two steps: 80 halvings reach
      // the double resolution of any step length.
      double lo = stepper.previous_time(), hi = t1;
      if (until < hi && until > lo) {
        State at{};
        stepper.calc_state(until, at);
        if (at[2] > 0.0) {
          s = at;
          t = until;
          return false;
        }
        hi = until;
      }
      State mid{};
      for (int i = 0; i < 80 && hi - lo > 0.0; ++i) {
        const double m = 0.5 * (lo + hi);
        if (m <= lo || m >= hi) break;
        stepper.calc_state(m, mid);
        (mid[2] > 0.0 ? lo : hi) = m;
      }
      stepper.calc_state(hi, s);
      t = hi;
      return true;
    }
    if (t1 >= until) {
      stepper.calc_state(until, s);
      t = until;
      return false;
    }
    if (t1 > o.max_time)
      throw input_error(fmt::format("drop: the fall takes longer than {:g} s (the parcel hardly sinks)", o.max_time));
  }
}

}  // namespace

std::string DropParameters::invalid_reason() const {
  if (!release.allFinite()) return "release must be a finite point";
  if (!(std::isfinite(height) && height > 0.0)) return "height must be above 0 m";
  if (!finite_nonneg(ground_speed)) return "ground_speed must be 0 m/s or more";
  if (!std::isfinite(heading_deg)) return "heading_deg must be finite";
  if (!std::isfinite(wind.speed)) return "wind.speed must be finite";
  if (!std::isfinite(wind.from_deg)) return "wind.from_deg must be finite";
  if (!(std::isfinite(wind.reference_height) && wind.reference_height > 0.0))
    return "wind.reference_height must be above 0 m";
  if (!(finite_nonneg(wind.profile_exponent) && wind.profile_exponent <= 1.0))
    return "wind.profile_exponent must be from 0 to 1";
  if (!(std::isfinite(mass) && mass > 0.0)) return "mass must be above 0 kg";
  if (!finite_nonneg(drag_area)) return "drag_area must be 0 m^2 or more";
  if (parachute) {
    if (!(std::isfinite(parachute->drag_area) && parachute->drag_area > 0.0))
      return "parachute.drag_area must be above 0 m^2";
    if (!finite_nonneg(parachute->deploy_delay)) return "parachute.deploy_delay must be 0 s or more";
  }
  if (!(std::isfinite(air_density) && air_density > 0.0)) return "air_density must be above 0 kg/m^3";
  if (!(std::isfinite(gravity) && gravity > 0.0)) return "gravity must be above 0 m/s^2";
  return {};
}

FallResult fall_of(const DropParameters& d, const FallOptions& o) {
  if (const std::string why = d.invalid_reason(); !why.empty()) throw input_error("drop: " + why);
  Dynamics dyn;
  dyn.g = d.gravity;
  dyn.k = d.air_density * d.drag_area / (2.0 * d.mass);
  dyn.wind_ref = -d.wind.speed * bearing_vector(d.wind.from_deg);  // blows toward from + 180
  dyn.reference_height = d.wind.reference_height;
  dyn.exponent = d.wind.profile_exponent;
  const Vec2 v0 = d.ground_speed * bearing_vector(d.heading_deg);
  // Relative to the release point: the dynamics do not depend on x, y, and small numbers keep
  // the step control's absolute tolerance meaningful on a national grid.
  State s{0.0, 0.0, d.height, v0.x(), v0.y(), 0.0};
  double t = 0.0;
  FallResult r;
  bool landed = false;
  if (d.parachute) {
    landed = run_phase(dyn, s, t, d.parachute->deploy_delay, o, r.steps);
    dyn.k = d.air_density * (d.drag_area + d.parachute->drag_area) / (2.0 * d.mass);
  }
  if (!landed) run_phase(dyn, s, t, o.max_time * 2.0, o, r.steps);
  r.landing = d.release + Vec2(s[0], s[1]);
  r.time = t;
  r.horizontal_velocity = {s[3], s[4]};
  r.vertical_speed = -s[5];
  return r;
}

}  // namespace strewn
