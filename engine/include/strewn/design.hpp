#ifndef STREWN_DESIGN_HPP
#define STREWN_DESIGN_HPP

/// \file
/// Design answers: what to change so that the limits hold.
///   clearance  - how far to move a zone, a person footprint or a whole source along a direction
///                until the limit(s) hold;
///   spread     - the largest factor on the spread of every source (or one) that keeps all limits;
///   aim        - the aim point of one source that maximises its target probability within the
///                limits, or minimises keep-out risk with the target probability above a floor
///                (and within every limit); when no aim meets them, the answer names the limit.
/// Limits are compared with upper bounds (p + abs_err), so every answer holds whatever the
/// integration error; strewn::first_holding / last_holding / best_point do the searching.

#include <optional>
#include <string>
#include <vector>

#include "strewn/export.hpp"
#include "strewn/shape_registry.hpp"
#include "strewn/site.hpp"
#include "strewn/solve.hpp"
#include "strewn/status.hpp"
#include "strewn/work.hpp"

namespace strewn {

struct ClearanceQuery {
  std::string zone;             // move this zone ...
  std::optional<Vec2> person;   // ... or a person footprint standing here ...
  std::string source;           // ... or this source (its aim and all its impacts)
  double person_limit = 1e-6;   // the limit for a person footprint
  Period person_per = Period::year;
  std::optional<Vec2> direction;  // default: away from the mean impact point
  double max_move = 50.0;         // m: the largest move considered
  int steps = 200;
  double tolerance = 1e-4;        // m
};

struct ClearanceAnswer {
  std::string subject;  // "zone 'x'", "person at (x, y)", "source 'x'"
  Vec2 direction = Vec2::Zero();
  std::string direction_reason;
  Crossing crossing;
  std::vector<std::string> limited_zones;  // the zones whose limits were checked
  double risk_at_answer = 0.0;   // worst (upper bound / limit) ratio at the answer
  double risk_at_fail = 0.0;     // the same just short of it
  std::string worst_zone;
  /// Where the subject stood (a zone's bounding-box centre, the person's point, the source's
  /// aim) and where the answer puts it: start + crossing.x * direction, in metres.
  Vec2 start = Vec2::Zero(), moved_to = Vec2::Zero();
  /// When no move up to max_move works: the limit that still fails at max_move (where moving
  /// away helps most), as "the limit of zone 'x' (1e-06 per year)", and its ratio there
  /// (upper bound / limit).
  std::string failing_limit;
  double failing_ratio = 0.0;
  /// converged: a move found to the tolerance; no_answer: none up to max_move
  /// (crossing.why says why, naming failing_limit).
  Status status = Status::converged;
};

struct SpreadQuery {
  std::string source;  // empty: every source
  double min_factor = 0.01, max_factor = 100.0;
  int steps = 200;
  double tolerance = 1e-6;  // on the logarithm of the factor
};

struct ScaledSpread {
  std::string source;
  std::vector<SpreadAxes> components;  // scaled
  double cep = 0.0;                     // of the scaled mixture about its core component's mean
};

struct SpreadAnswer {
  Crossing crossing;  // on log(factor)
  double factor = 0.0;
  double factor_fails = 0.0;
  std::vector<ScaledSpread> spreads;
  std::string worst_zone;
  /// When no factor works: the limit that fails already at the smallest factor, as "the limit
  /// of zone 'x' (0.0001 per session)", and its ratio there (upper bound / limit).
  std::string failing_limit;
  double failing_ratio = 0.0;
  Status status = Status::converged;  ///< no_answer: no factor in the range keeps every limit
};

struct AimQuery {
  std::string source;
  std::string target;            // target zone; default: the first target zone
  std::optional<double> min_target;  // set: minimise keep-out risk with P(target) >= this
  double search_half_width = 0.0;  // m, of the square searched about the aim; 0: three times the largest sigma
  int grid = 41;
  double tolerance = 1e-3;       // m
};

struct AimAnswer {
  BestPoint best;
  Vec2 current_aim = Vec2::Zero();
  double target_p = 0.0, target_abs_err = 0.0;
  double keep_out_total = 0.0;    // sum over keep-out zones of this source's per-event p
  double current_target_p = 0.0, current_keep_out_total = 0.0;
  std::string objective;
  // When no aim meets every constraint: the one that fails where they come closest to holding,
  // that point, and the constraint's ratio there (upper bound / limit, or lower bound / floor).
  std::string failing_limit;
  Vec2 failing_at = Vec2::Zero();
  double failing_ratio = 0.0;
  Status status = Status::converged;  ///< no_answer: no aim meets every constraint (failing_limit)
};

/// Throws input_error for a query that names no zone or source of the site, or a site without
/// limits; every numerical outcome is in the answer (status, crossing.why, best.why).
/// `progress`, when given, hears the share of the work done (0 to 1), counted in evaluations
/// of the limits against the number the scan or grid plus its refinement usually takes (an
/// aim search on a composite zone can take tens of seconds). `estimate`, when given, hears once,
/// after the first kTimedEvaluations evaluations, the number of evaluations the search usually
/// takes (units) and the mean measured cost of those first ones (seconds_per_unit): the time
/// to expect, known before most of the search runs. An estimate, not a promise: a search may
/// take more evaluations (a refinement that does not settle) or fewer (an early answer).
STREWN_API ClearanceAnswer solve_clearance(const Site& s, const ShapeRegistry& shapes, const ClearanceQuery& q,
                                           const ProgressFn& progress = {}, const EstimateFn& estimate = {});
STREWN_API SpreadAnswer solve_spread(const Site& s, const SpreadQuery& q, const ProgressFn& progress = {},
                                     const EstimateFn& estimate = {});
STREWN_API AimAnswer solve_aim(const Site& s, const AimQuery& q, const ProgressFn& progress = {},
                               const EstimateFn& estimate = {});

/// The evaluations a search times before it calls its EstimateFn.
constexpr int kTimedEvaluations = 3;

}  // namespace strewn

#endif
