#ifndef STREWN_PROFILE_SPREAD_HPP
#define STREWN_PROFILE_SPREAD_HPP

/// \file
/// Placing a measured radial profile (strewn/radial_profile.hpp) on a site: the component a
/// sprinkler head or a spray nozzle scatters by, usable wherever a spread is.
///
/// The profile's distances are site metres from the head: with no wind, the pattern is the
/// profile turned about the head (a circle of radius R, the wetted radius). The component is
/// the `profile` family (strewn/scatter_family.hpp) on a circular spread of sigma = R/2, whose
/// whitened radius 2 is R.
///
/// Wind (a model assumption, not a physical law): the pattern is an affine image of the calm
/// one, x = head + shift w + A p, with w the unit vector toward which the wind blows
/// (`downwind_deg`, degrees from +x) and A = I + (stretch - 1) w w^T, which stretches distances
/// along the wind by `stretch` and keeps those across it. It moves the pattern's centre
/// downwind and elongates it; a real pattern's change in shape (a short upwind and a long
/// downwind leg) is not affine, and a measured pattern in that wind is the better input.
///
/// A part-circle head sprays over an arc from `from_deg` counter-clockwise to `to_deg` (degrees
/// from +x, the head's calm setting); the wind's map carries the arc's rays with it, and the
/// density on the arc is renormalised so that all the head's flow falls in its arc.
///
/// Example (a made-up head at (12, 4) m, quarter circle, light wind toward +y):
/// \code
///   strewn::RadialProfile leg({0, 3, 6, 9, 12}, {10, 12, 11, 6, 0});
///   strewn::ProfileWind wind{1.15, 0.4, 90.0};
///   strewn::Gaussian head = strewn::profile_spread({12.0, 4.0}, leg, wind, strewn::ProfileArc{0.0, 90.0});
/// \endcode

#include <optional>

#include "strewn/radial_profile.hpp"
#include "strewn/scatter_model.hpp"

namespace strewn {

/// The affine wind distortion above; the default is calm.
struct ProfileWind {
  double stretch = 1.0;       ///< along the wind, in (0, 10]
  double shift_m = 0.0;       ///< downwind shift of the centre, metres, >= 0
  double downwind_deg = 0.0;  ///< direction the wind blows toward, degrees from +x
};

/// A part circle, counter-clockwise from `from_deg` to `to_deg` (degrees from +x).
struct ProfileArc {
  double from_deg = 0.0;
  double to_deg = 360.0;
};

/// The component of a head at `head` (site metres) with the given profile, wind and arc.
/// Throws strewn::input_error for a stretch outside (0, 10], a negative or non-finite shift, or
/// an arc whose sweep is 0.
STREWN_API Gaussian profile_spread(const Vec2& head, const RadialProfile& profile, const ProfileWind& wind = {},
                                   const std::optional<ProfileArc>& arc = std::nullopt);

}  // namespace strewn

#endif
