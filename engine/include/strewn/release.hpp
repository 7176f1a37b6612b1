#ifndef STREWN_RELEASE_HPP
#define STREWN_RELEASE_HPP

/// \file
/// Where to release a drop (strewn/drop.hpp) so that it lands on a target, and how high or in
/// how much wind the release may still be made.
///
/// The release point. The fall does not depend on where over the flat site it starts, so the
/// landing scatter moves with the release point: releasing at target - (mean landing - release)
/// puts the mean landing (the weighted mean of the scatter's components) exactly on the target.
/// The offset is the drift: against the wind and back along the track, i.e. upwind and before
/// the target.
///
/// The largest height or wind. For each trial value of the drop's height (m) or wind speed
/// (m/s at the reference height), the drop's spread is computed again (unscented transform and
/// its Monte Carlo check) and released from the point that centres it on the target; every zone
/// limit is compared with its upper bound (p + abs_err). strewn::last_holding scans the values
/// from `least` to `most` in `steps` equal steps and closes the bracket to `tolerance`: the answer
/// is the largest value such that every limit holds at every scanned value up to it. A limit that
/// fails already at `least` is named (failing_limit).
///
/// Example:
///   strewn::ReleaseQuery q;
///   q.vary = strewn::ReleaseQuery::Vary::wind;
///   const strewn::ReleaseAnswer a = strewn::solve_release(site, q);
///   // a.release: fly over it; a.crossing.x: the largest wind speed with every limit held

#include <optional>
#include <string>

#include "strewn/drop.hpp"
#include "strewn/export.hpp"
#include "strewn/site.hpp"
#include "strewn/solve.hpp"
#include "strewn/status.hpp"
#include "strewn/work.hpp"

namespace strewn {

struct ReleaseQuery {
  std::string source;           ///< the drop source; default: the only source with a drop
  std::optional<Vec2> target;   ///< site metres; default: the source's aim
  enum class Vary { none, height, wind };
  Vary vary = Vary::none;
  /// The values considered (m for height, m/s for wind); unset: height from 1 m (wind from 0)
  /// to four times the scenario's value (wind: at least 20 m/s).
  std::optional<double> least, most;
  int steps = 30;
  double tolerance = 0.01;      ///< m or m/s
};

struct ReleaseAnswer {
  std::string source;
  Vec2 target = Vec2::Zero();
  Vec2 scenario_release = Vec2::Zero();  ///< the release the scenario gives
  Vec2 release = Vec2::Zero();           ///< the release that centres the mean landing on the target
  Vec2 drift = Vec2::Zero();             ///< mean landing minus release
  DropSpread spread;                     ///< at the scenario's values, released at `release`
  /// Every limit at the scenario's values from `release`: the worst (upper bound / limit) ratio
  /// and its zone; holds when the ratio is at most 1.
  double worst_ratio = 0.0;
  std::string worst_zone;
  bool limits_hold = false;
  /// vary != none: the scan and its answer.
  ReleaseQuery::Vary vary = ReleaseQuery::Vary::none;
  double least = 0.0, most = 0.0;
  Crossing crossing;
  Vec2 release_at_answer = Vec2::Zero();  ///< the centring release at crossing.x
  std::string limiting_zone;              ///< the zone whose limit fails at crossing.x_fails
  std::string failing_limit;              ///< when no value holds: "the limit of zone 'x' (... per ...)"
  double failing_ratio = 0.0;
  /// converged; no_answer: vary set and no value in the window keeps every limit (failing_limit),
  /// or vary none and a limit fails at the centred release.
  Status status = Status::converged;
};

/// Throws strewn::request_error (field "source", "target", "range") for a query the site cannot
/// answer: no drop source, a name it lacks, a window out of order; strewn::input_error for a site
/// without limits when vary is set. `progress` hears the share of the spreads computed.
STREWN_API ReleaseAnswer solve_release(const Site& s, const ReleaseQuery& q, const ProgressFn& progress = {});

}  // namespace strewn

#endif
