#ifndef STREWN_BARRIER_HPP
#define STREWN_BARRIER_HPP

/// \file
/// Barriers (nets, fences, walls, screens) and the shadows they cast from a source's position.
///
/// The path of an impact is the straight ground line from the source's position to the impact
/// point (a flat site; the object stops where it lands, no bounce or roll). A barrier is a
/// polyline on the ground; its shadow from a position S is the set of impact points whose path
/// crosses it: for each of its segments AB the unbounded wedge behind AB seen from S. `catch` is
/// the share of the impacts whose path crosses it that it stops (1 for a wall, 0.95 for a net):
/// the user's assumption, stated in every output.
///
/// Height. Without `height` a barrier stops (its catch of) every path that crosses it, however
/// high the throw: the user says so by leaving height out. With `height` h and a source that
/// releases at height h0 > h (Thrower::release_height), the flight is taken as the straight line
/// from the release point down to the impact point: it passes the barrier, crossed at ground
/// distance a from S, at height h0 (1 - a / L) for a path of length L, so it is stopped only when
/// L <= a h0 / (h0 - h): the shadow ends at the barrier scaled by h0 / (h0 - h) about S. A real
/// throw arcs above that straight line, so objects lobbed over a barrier are NOT modelled: the
/// rule suits flat, fast throws; for lobs give a lower catch. When h >= h0, or the source has
/// no release height, the whole shadow counts.
///
/// Example (a net 2 m long, 3 m in front of a thrower at the origin):
///   strewn::Barrier net{"net", {{-1, 3}, {1, 3}}, 0.95, std::nullopt};
///   strewn::Region behind = strewn::shadow(net, {0, 0}, 50.0, std::nullopt);
///   // the wedge from (-1, 3), (1, 3) outward, cut off beyond 50 m from the origin

#include <optional>
#include <string>
#include <vector>

#include "strewn/export.hpp"
#include "strewn/region.hpp"

namespace strewn {

struct Barrier {
  std::string name;
  std::vector<Vec2> points;  ///< the polyline, at least two points, site metres
  double catch_share = 1.0;  ///< in [0, 1]: the share of crossing paths it stops (`catch` in a file)
  std::optional<double> height;  ///< m above the ground (see above)
};

/// Throws strewn::input_error (one line) unless the barrier has two or more points, no zero-length
/// segment, a catch in [0, 1] and a positive height when given.
STREWN_API void check_barrier(const Barrier& barrier);

/// The barrier's shadow seen from `from`, cut off at `reach` metres from `from` (every point of
/// the unbounded shadow within `reach` of `from` is in the result; the result may reach a little
/// further, by a polygon of chords outside the circle). `release_height` gives the height rule
/// above. A segment whose line passes through `from` casts no shadow (zero area). The result is
/// a polygonal, normalised region (the union of the segments' wedges).
STREWN_API Region shadow(const Barrier& barrier, const Vec2& from, double reach,
                         std::optional<double> release_height);

/// The same shadow as convex polygons (vertex lists), one per segment of the barrier, whose union
/// it is: for quick tests of a box against it.
STREWN_API std::vector<std::vector<Vec2>> shadow_pieces(const Barrier& barrier, const Vec2& from, double reach,
                                                        std::optional<double> release_height);

/// True when the straight ground path from `from` to `point` crosses the barrier (the direct
/// test that the shadow describes; points on the polyline or the path's end on it count as
/// crossed). With a height, the rule above.
STREWN_API bool path_crosses(const Barrier& barrier, const Vec2& from, const Vec2& point,
                             std::optional<double> release_height);

}  // namespace strewn

#endif
