#ifndef STREWN_BARRIER_EFFECT_HPP
#define STREWN_BARRIER_EFFECT_HPP

/// \file
/// What barriers do to a source's probabilities, and a throwing line's discretisation bound.
///
/// For one component with position S and barriers i = 1..m of catch c_i and shadows H_i
/// (strewn/barrier.hpp), each barrier a path crosses stops it independently with its catch, so
/// an impact at x gets through with probability prod over the barriers crossed of (1 - c_i) and
///   P(zone, not stopped) = sum over subsets T of {1..m} of prod_{i in T} (-c_i) P(zone n H_T),
/// H_T the intersection of the shadows in T (inclusion-exclusion; Boost.Geometry intersections;
/// subsets whose intersection is empty are skipped with all their supersets). With one barrier
/// this is P(zone outside the shadow) + (1 - c) P(zone inside it). Each shadow is cut off beyond
/// every point of the zone (strewn::shadow's reach), so the cut loses nothing for a zone; the
/// bound is the sum of |coefficient| times each term's bound. A mixture sums its components.
///
/// A throwing line (Source::thrower with a line_end) is the integral over the standing point
/// u in [0, 1] along the line of p(u) = P_u(zone, not stopped); all its throws share the mean
/// (toward + bias) while the spread turns and grows along the line, so it is no normal
/// convolved with a uniform and no closed form applies. It is integrated by the midpoint rule
/// on pieces with a PROVEN bound on each piece's error (engine/src/physics/line_bound.hpp):
/// h^3/24 times a bound on |d^2 p / du^2| obtained from the derivatives of the covariance along
/// the line and an isotropic normal envelope (one extra probability of the zone), plus, behind
/// barriers, h times the envelope's probability of the part of the zone that the shadows sweep
/// as the standing point moves over the piece (first order: a zone across a shadow's edge
/// converges slowly). The line starts as line_components equal pieces; the piece with the
/// largest bound is halved until the bound is at most half the request, or the pieces reach
/// `line_pieces_limit` (then the estimate says "not met" when its bound exceeds the request).
/// Example:
///   const strewn::Site site = strewn::load_site("shapes/throwing_lane.toml");
///   strewn::Estimate e = strewn::integrate_source(site.sources[0], site.zones[0].region, site.options);

#include <cstddef>
#include <string>
#include <vector>

#include "strewn/export.hpp"
#include "strewn/site.hpp"

namespace strewn {

/// The most barriers with a catch above 0 a site may have: each source combines their shadows'
/// 2^N subsets (most pruned as empty).
inline constexpr std::size_t kMaxActiveBarriers = 12;


/// P(impact in region and not stopped by the source's barriers), with a throwing line's
/// discretisation bound in its bound (at most `line_pieces_limit` pieces, never fewer than
/// line_components). A source without position or barriers is plain strewn::integrate. Throws
/// strewn::input_error when a source has barriers and no positions (one per component), or
/// more than 12 barriers with a catch above 0.
STREWN_API Estimate integrate_source(const Source& source, const Region& region, const IntegrateOptions& options,
                                     int line_pieces_limit = 256);

/// The same with a second method beside (as strewn::verify does for a plain model).
STREWN_API Verification verify_source(const Source& source, const Region& region, const IntegrateOptions& options);

/// One barrier's row: the share of the events of one source whose path crosses it, times its
/// catch: what it stops, counted as if it stood alone (a path that crosses two barriers counts in
/// both rows). The shadow is cut off far out (`reach`, m from the position) and the probability
/// beyond is added to the bound.
struct BarrierStop {
  std::string barrier;
  std::string source;
  Estimate stopped;  ///< per event
  double reach = 0.0;
};

/// Every barrier against every source with a position.
STREWN_API std::vector<BarrierStop> barrier_stops(const Site& site);

/// True when the source has barriers with catch > 0 that apply to it, or is a throwing line.
STREWN_API bool needs_barrier_integration(const Source& source);

}  // namespace strewn

#endif
