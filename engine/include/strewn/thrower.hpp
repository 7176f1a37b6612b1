#ifndef STREWN_THROWER_HPP
#define STREWN_THROWER_HPP

/// \file
/// A thrower described as the trade states it: where the thrower stands, the point thrown at,
/// and the dispersion as an angle across the throw and a share of the distance along it. The
/// impact spread follows from the distance D from the standing point to the aim:
///   sigma_across = D tan(spread_angle),   sigma_along = D * range_fraction  (or range_sigma, m),
/// the across axis perpendicular to the throw and the along axis on it; the mean impact point is
/// the aim plus the bias. This is the small-angle geometry of a throw whose direction and length
/// scatter independently and normally (a flat site; the object stops where it lands).
///
/// A throwing line (the thrower may stand anywhere on a segment, every throw at the same aim) is
/// the continuous mixture of those spreads over the line. No exact convolution applies: the
/// spread's direction and size change along the line (only its mean stays), so the mixture is
/// not a normal convolved with a uniform. thrower_model cuts the line into `line_components`
/// equal pieces, each represented by its midpoint (the midpoint rule), an equally weighted
/// mixture; assess and the maps integrate the line with a proven bound on that rule's error,
/// halving pieces where the bound is largest (strewn/barrier_effect.hpp, integrate_source).
///
/// Example (a thrower 6 m from the target, 2 degrees across, 3% of the distance along):
///   strewn::Thrower t;
///   t.position = {0, 0};
///   t.toward = {0, 6};
///   t.spread_angle_deg = 2;
///   t.range_fraction = 0.03;
///   strewn::ThrowerSpread s = strewn::thrower_spread(t, t.position);
///   // s.sigma_across = 6 tan(2 deg) = 0.2095 m, s.sigma_along = 0.18 m

#include <optional>
#include <vector>

#include "strewn/export.hpp"
#include "strewn/scatter_model.hpp"

namespace strewn {

struct Thrower {
  Vec2 position = Vec2::Zero();   ///< where the thrower stands (the start of a throwing line)
  std::optional<Vec2> line_end;   ///< a throwing line from position to line_end
  Vec2 toward = Vec2::Zero();     ///< the aim point
  Vec2 bias = Vec2::Zero();       ///< mean impact point minus the aim
  double spread_angle_deg = 0.0;  ///< standard deviation of the throw's direction, degrees, in (0, 45)
  std::optional<double> range_fraction;  ///< sigma along = D * range_fraction
  std::optional<double> range_sigma;     ///< or sigma along in metres (exactly one of the two)
  /// Height (m) above the ground at which the object leaves the hand; only barriers with a
  /// height use it (strewn/barrier.hpp).
  std::optional<double> release_height;
  int line_components = 16;  ///< pieces of a throwing line (even, 2 to 256)
};

/// The spread a throw from one standing point became.
struct ThrowerSpread {
  Vec2 position = Vec2::Zero();
  double distance = 0.0;       ///< D = |toward - position|, m
  double direction_deg = 0.0;  ///< of the throw, counter-clockwise from +x
  double sigma_across = 0.0;   ///< D tan(spread_angle), m
  double sigma_along = 0.0;    ///< D * range_fraction or range_sigma, m
  Gaussian gaussian = Gaussian::from_axes({0, 0}, 1, 1, 0);
};

/// Throws strewn::input_error (one line) when the thrower is not well formed: the aim on the
/// standing point, an angle outside (0, 45) degrees, neither or both range keys, a
/// non-positive range spread.
STREWN_API void check_thrower(const Thrower& thrower);

/// The spread of throws from `position` (the thrower's position, or a point of its line).
STREWN_API ThrowerSpread thrower_spread(const Thrower& thrower, const Vec2& position);

/// The standing points that represent the thrower: its position, or the midpoints of the
/// line_components equal pieces of its line.
STREWN_API std::vector<Vec2> standing_points(const Thrower& thrower);

/// The scatter model: one component per standing point, equal weights.
STREWN_API ScatterModel thrower_model(const Thrower& thrower);

}  // namespace strewn

#endif
