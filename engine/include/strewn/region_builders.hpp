#ifndef STREWN_REGION_BUILDERS_HPP
#define STREWN_REGION_BUILDERS_HPP

/// \file
/// The common regions built directly, without a plugin: each is returned normalised (outer loop
/// counter-clockwise), ready for integrate(). Lengths in metres, angles in radians
/// counter-clockwise from +x (the plugins take degrees; these take what Edge::arc takes).
///
///     const strewn::Region bench = strewn::rectangle({2.0, 5.0}, {4.0, 5.6});
///     const strewn::Region pool = strewn::disk({-3.0, 8.0}, 2.5);
///
/// Invalid input throws strewn::input_error with a one-line message naming the builder and the
/// fault: a non-finite coordinate, no area (fewer than three distinct vertices, a radius <= 0,
/// inner >= outer, parallel axes), and for polygons whatever a scenario's or a geometry file's
/// polygon is refused for (strewn::check_validity: edges that cross, e.g. "polygon:
/// self-intersection at (0.5, 0.5), edges 1 and 3 of loop 1", spikes, a coordinate beyond
/// +-1e12 m; a hole outside its outer ring or crossing it). The checks run here, once: integrate()
/// does not repeat them on every call. A Region assembled by hand (its loops filled directly) is
/// the caller's to check with check_validity(); integrate() runs that check only when a result
/// fails its final consistency check, to report the invalid region as an input_error.

#include <vector>

#include "strewn/export.hpp"
#include "strewn/region.hpp"

namespace strewn {

/// The polygon through `vertices` in order, closed back to the first (either orientation; a
/// closing repeat of the first vertex is dropped).
STREWN_API Region polygon(const std::vector<Vec2>& vertices);
/// The polygon `outer` with `holes`, each a ring of vertices as above lying inside `outer`.
///
///     const strewn::Region yard = strewn::polygon({{0, 0}, {10, 0}, {10, 8}, {0, 8}},
///                                                 {{{4, 3}, {6, 3}, {6, 5}, {4, 5}}});
STREWN_API Region polygon(const std::vector<Vec2>& outer, const std::vector<std::vector<Vec2>>& holes);
/// The axis-parallel rectangle with corners `lo` (smallest x and y) and `hi`.
STREWN_API Region rectangle(const Vec2& lo, const Vec2& hi);
/// The ellipse centre + axes * (cos s, sin s), s in [0, 2 pi): semi-axes are the columns of
/// `axes` (any non-singular matrix, e.g. R diag(a, b) for semi-axes a, b rotated by R).
STREWN_API Region ellipse(const Vec2& centre, const Mat2& axes);
/// The disk of `radius` about `centre`.
STREWN_API Region disk(const Vec2& centre, double radius);
/// The ring sector between radii inner < outer about `centre`, from angle `from` to `to`
/// (radians, counter-clockwise; to > from, at most a whole turn).
STREWN_API Region ring_sector(const Vec2& centre, double inner, double outer, double from, double to);

}  // namespace strewn

#endif
