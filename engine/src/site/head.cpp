#include "strewn/head.hpp"

#include <cmath>

#include "strewn/closest_names.hpp"
#include "strewn/constants.hpp"
#include "strewn/error.hpp"
#include "strewn/site.hpp"

namespace strewn {

const std::vector<std::string>& generic_profile_names() {
  static const std::vector<std::string> names = {"flat", "triangular", "doughnut"};
  return names;
}

RadialProfile generic_profile(const std::string& shape, double radius_m) {
  if (!(radius_m > 0.0 && std::isfinite(radius_m))) throw input_error("a head's radius must be a positive length");
  const double r = radius_m;
  if (shape == "flat") return RadialProfile({0.0, r}, {1.0, 1.0}, "flat");
  if (shape == "triangular") return RadialProfile({0.0, r}, {1.0, 0.0}, "triangular");
  if (shape == "doughnut") return RadialProfile({0.0, 0.5 * r, r}, {0.3, 1.0, 0.0}, "doughnut");
  throw input_error("unknown profile shape '" + shape + "'" + did_you_mean(shape, generic_profile_names()) +
                    " (the built-in shapes are flat, triangular and doughnut; or give a leg-test CSV file)");
}

RadialProfile profile_to_radius(const RadialProfile& profile, double radius_m) {
  if (!(radius_m > 0.0 && std::isfinite(radius_m))) throw input_error("a head's radius must be a positive length");
  const double k = radius_m / profile.wetted_radius();
  std::vector<double> d = profile.distance_m();
  for (double& x : d) x *= k;
  d.back() = radius_m;  // exactly, whatever the rounding of k
  return RadialProfile(d, profile.rate(), profile.label());
}

double head_sweep_deg(const Head& head) {
  if (!head.arc) return 360.0;
  const double sweep = std::fmod(std::fmod(head.arc->to_deg - head.arc->from_deg, 360.0) + 360.0, 360.0);
  return sweep > 0.0 ? sweep : 360.0;
}

double head_rate_mm_per_h(const Head& head) {
  return 60.0 * head.flow_l_per_min / (head_sweep_deg(head) / 360.0 * kPi * head.radius_m * head.radius_m);
}

Source head_source(const Head& head) {
  if (!(head.radius_m > 0.0 && std::isfinite(head.radius_m))) throw input_error("head '" + head.name + "': the radius must be positive");
  if (!(head.flow_l_per_min > 0.0 && std::isfinite(head.flow_l_per_min)))
    throw input_error("head '" + head.name + "': the flow must be positive");
  Source s;
  s.name = head.name;
  s.aim = head.position;
  s.model = profile_spread(head.position, profile_to_radius(head.profile, head.radius_m), head.wind, head.arc);
  s.amount_per_event = head.flow_l_per_min * 60.0;  // litres an hour: one "event" is an hour's flow
  s.events_per_hour = 1.0;
  s.component_labels = {"head"};
  s.positions = {head.position};
  return s;
}

}  // namespace strewn
