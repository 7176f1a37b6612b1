#include "strewn/profile_spread.hpp"

#include <cmath>

#include "strewn/constants.hpp"
#include "strewn/error.hpp"

namespace strewn {

Gaussian profile_spread(const Vec2& head, const RadialProfile& profile, const ProfileWind& wind,
                        const std::optional<ProfileArc>& arc) {
  if (!(wind.stretch > 0.0 && wind.stretch <= 10.0))
    throw input_error("the wind's stretch must be in (0, 10] (1 is calm)");
  if (!(wind.shift_m >= 0.0 && std::isfinite(wind.shift_m) && wind.shift_m <= 1e6))
    throw input_error("the wind's shift must be a finite distance >= 0");
  if (!(std::isfinite(wind.downwind_deg) && std::fabs(wind.downwind_deg) <= 1e4))
    throw input_error("the wind's direction must be a finite number of degrees");
  ScatterFamily family = ScatterFamily::profile(profile);
  const double sigma = family.profile_scale_m();
  const double a = wind.downwind_deg * kPi / 180.0;
  const Vec2 w(std::cos(a), std::sin(a));
  const Vec2 centre = head + wind.shift_m * w;
  // Covariance sigma^2 A A^T with A = I + (s - 1) w w^T: axes sigma s along w and sigma across.
  const Gaussian g = wind.stretch >= 1.0 ? Gaussian::from_axes(centre, sigma * wind.stretch, sigma, wind.downwind_deg)
                                         : Gaussian::from_axes(centre, sigma, sigma * wind.stretch, wind.downwind_deg + 90.0);
  if (arc) {
    // The rays of the calm arc, carried by A: A u = u + (s - 1)(w . u) w.
    const auto carried = [&](double deg) {
      const double t = deg * kPi / 180.0;
      const Vec2 u(std::cos(t), std::sin(t));
      const Vec2 v = u + (wind.stretch - 1.0) * w.dot(u) * w;
      return std::atan2(v.y(), v.x()) * 180.0 / kPi;
    };
    const double sweep = std::fmod(std::fmod(arc->to_deg - arc->from_deg, 360.0) + 360.0, 360.0);
    if (!(sweep > 0.0)) throw input_error("an arc's sweep (to - from) mod 360 must be above 0 degrees");
    const double from = carried(arc->from_deg);
    // The carried sweep stays on the same side of a half turn (det A > 0); only rounding at a
    // sweep of almost nothing or almost a whole turn can wrap it.
    double carried_sweep = std::fmod(std::fmod(carried(arc->to_deg) - from, 360.0) + 360.0, 360.0);
    if ((sweep > 180.0) != (carried_sweep > 180.0)) carried_sweep = sweep > 180.0 ? 360.0 - 1e-12 : 1e-12;
    family = family.with_arc(from, from + carried_sweep);
  }
  return g.with_family(family);
}

}  // namespace strewn
