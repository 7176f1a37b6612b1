#ifndef STREWN_HEAD_HPP
#define STREWN_HEAD_HPP

/// \file
/// A sprinkler head as an irrigation designer gives it: where it stands, how far it throws
/// (the wetted radius R), over which arc, how much water it passes (the flow) and how that
/// water falls with distance (a radial profile: a catch-can leg test or a generic shape).
///
/// A head becomes one source of the `profile` family (strewn/profile_spread.hpp): its pattern
/// is the profile turned about the head over its arc, optionally distorted by wind. The
/// family's density integrates to 1 over the arc, and the source emits flow x time, so the
/// volume applied over a run equals the flow times the run's length exactly, whatever the
/// profile's rates say; only the profile's shape matters. A measured profile whose last
/// distance differs from `radius` is stretched along the distance axis to end at `radius`
/// (the same shape thrown further or shorter, as a nozzle at another pressure roughly does:
/// a model assumption).
///
/// Generic shapes, in u = d / R, piecewise linear in d so that they are exact profiles:
///  - "flat":       v = 1 for u < 1 (the uniform family: depth = flow x time / area of the arc);
///  - "triangular": v = 1 - u (the most at the head, nothing at R);
///  - "doughnut":   v = 0.3 + 1.4 u for u <= 1/2, then 2 (1 - u) (a ring at half the radius,
///                  as a rotor's pattern often has; the dip at the head is 0.3 of the peak).
///
/// Example (a made-up quarter-circle rotor at (0, 0) m, 12 m radius, 20 L/min):
/// \code
///   strewn::Head h;
///   h.name = "corner rotor";
///   h.radius_m = 12.0;
///   h.arc = strewn::ProfileArc{0.0, 90.0};
///   h.flow_l_per_min = 20.0;
///   h.profile = strewn::generic_profile("triangular", h.radius_m);
///   strewn::Source s = strewn::head_source(h);   // emits 1200 L per hour
/// \endcode

#include <optional>
#include <string>
#include <vector>

#include "strewn/export.hpp"
#include "strewn/profile_spread.hpp"
#include "strewn/radial_profile.hpp"

namespace strewn {

struct Source;  // strewn/site.hpp, which includes this header

struct Head {
  std::string name;
  Vec2 position = Vec2::Zero();  ///< site metres
  double radius_m = 1.0;         ///< wetted radius, the profile's last distance
  std::optional<ProfileArc> arc;  ///< a part circle (degrees from +x, counter-clockwise); none: full
  double flow_l_per_min = 1.0;
  RadialProfile profile = RadialProfile({0.0, 1.0}, {1.0, 1.0}, "flat");  ///< distances in metres, ending at radius_m
  ProfileWind wind;
  std::string layout;  ///< the [[layout]] that placed it; empty for a head given on its own
};

/// The generic shapes above: "flat", "triangular", "doughnut".
STREWN_API const std::vector<std::string>& generic_profile_names();
/// A generic shape ending at radius_m (> 0). Throws input_error naming the shapes for another name.
STREWN_API RadialProfile generic_profile(const std::string& shape, double radius_m);
/// The same profile with its distances multiplied so that the last one is radius_m (> 0).
STREWN_API RadialProfile profile_to_radius(const RadialProfile& profile, double radius_m);

/// The arc's counter-clockwise sweep in degrees, (0, 360]; 360 without an arc.
STREWN_API double head_sweep_deg(const Head& head);
/// The head's own precipitation rate in mm/h: its flow spread evenly over its wetted sector,
/// 60 Q / (sweep/360 pi R^2) (Q in L/min, R in m; a litre per square metre is 1 mm).
STREWN_API double head_rate_mm_per_h(const Head& head);

/// The head as a source: the profile family about `position` over the arc with the wind, emitting
/// flow_l_per_min * 60 litres an hour (amount_per_event = that, events_per_hour = 1), its position
/// the head's (for barriers). Throws input_error for a radius or flow that is not positive and
/// finite, a bad arc or wind (strewn::profile_spread).
STREWN_API Source head_source(const Head& head);

}  // namespace strewn

#endif
