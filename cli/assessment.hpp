#ifndef STREWN_CLI_ASSESSMENT_HPP
#define STREWN_CLI_ASSESSMENT_HPP

// The numbers behind `strewn assess`: for every zone and source the per-event probability with
// its bound, per session and per year (-expm1(N log1p(-p)), never 1 - (1 - p)^N), expected hits
// per year, and for keep-out zones the limit check; and the same totals over all sources.

#include <optional>
#include <string>
#include <vector>

#include "scenario.hpp"
#include "strewn/work.hpp"

namespace strewn::cli {

struct SourceResult {
  std::string source;
  Estimate event;
  double per_session = 0.0, per_session_err = 0.0;  // errors carried from the event's abs_err
  double per_year = 0.0, per_year_err = 0.0;
  double expected_hits_per_year = 0.0;
  std::optional<Verification> verification;
};

struct ZoneResult {
  const Zone* zone = nullptr;
  std::vector<SourceResult> sources;
  double total_per_session = 0.0, total_per_session_err = 0.0;  // at least one hit from any source
  double total_per_year = 0.0, total_per_year_err = 0.0;
  double total_expected_hits_per_year = 0.0;
  double total_abs_err_per_event = 0.0;
  // For zones with an occupancy f: the chance per year that someone in the zone is hit, when they
  // are present for a fraction f of the events, -expm1(f * sum N log1p(-p)).
  std::optional<double> individual_risk_per_year;
  std::optional<bool> limit_holds;  // for zones with a limit: its upper bound (p + abs_err) within it
  bool limit_undecided = false;      // the value is within the limit but its upper bound is not
  double limited_value = 0.0;       // the probability compared with the limit
  double limited_upper = 0.0;       // the same from p + abs_err: what design answers compare
};

struct Assessment {
  std::vector<ZoneResult> zones;
  bool all_limits_hold = true;
  bool all_verified = true;
};

// `progress`, when given, hears the share of the work done (0 to 1): per zone, and within a
// zone per block of Monte Carlo samples.
Assessment assess(const Scenario& scenario, bool verify_second_method, const ProgressFn& progress = {});

/// One zone against the given sources (design searches call this with moved or scaled copies).
ZoneResult assess_zone(const Zone& zone, const std::vector<Source>& sources, const IntegrateOptions& options,
                       bool verify_second_method = false);

/// (limited_upper - limit) / limit: <= 0 when the zone's limit holds even at the upper error
/// bound of every probability. Zones without a limit give -1.
double limit_margin(const ZoneResult& result);

}  // namespace strewn::cli

#endif
