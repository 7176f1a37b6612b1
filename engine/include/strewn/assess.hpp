#ifndef STREWN_ASSESS_HPP
#define STREWN_ASSESS_HPP

/// \file
/// Assessing a site: for every zone and source the per-event probability with its bound, per
/// session and per year (strewn/exposure.hpp: -expm1(N log1p(-p)), never 1 - (1 - p)^N),
/// expected hits per year, the same totals over all sources, individual risk for zones with an
/// occupancy, and for zones with a limit whether it holds. A limit holds when the upper bound of
/// the compared value (from every p + abs_err) is within it: a value below the limit whose bound
/// reaches past it is "not shown to hold", never "holds".
///
/// Example (verdict of every zone with a limit):
///   const strewn::Site site = strewn::load_site("shapes/throwing_lane.toml");
///   for (const strewn::ZoneResult& z : strewn::assess(site).zones)
///     if (z.limit_holds) std::cout << z.zone->name << (*z.limit_holds ? " holds\n" : " exceeded\n");

#include <optional>
#include <string>
#include <vector>

#include "strewn/barrier_effect.hpp"
#include "strewn/export.hpp"
#include "strewn/site.hpp"
#include "strewn/status.hpp"
#include "strewn/work.hpp"

namespace strewn {

struct SourceResult {
  std::string source;
  Estimate event;
  double per_session = 0.0, per_session_err = 0.0;  ///< errors carried from the event's abs_err
  double per_year = 0.0, per_year_err = 0.0;
  double expected_hits_per_year = 0.0;
  std::optional<Verification> verification;
};

struct ZoneResult {
  const Zone* zone = nullptr;  ///< points into the Site assessed (or the zone given)
  std::vector<SourceResult> sources;
  double total_per_session = 0.0, total_per_session_err = 0.0;  ///< at least one hit from any source
  double total_per_year = 0.0, total_per_year_err = 0.0;
  double total_expected_hits_per_year = 0.0;
  double total_abs_err_per_event = 0.0;
  /// For zones with an occupancy f: the chance per year that someone in the zone is hit, when they
  /// are present for a fraction f of the events, -expm1(f * sum N log1p(-p)).
  std::optional<double> individual_risk_per_year;
  std::optional<bool> limit_holds;  ///< for zones with a limit: its upper bound within it
  bool limit_undecided = false;     ///< the value is within the limit but its upper bound is not
  double limited_value = 0.0;       ///< the probability compared with the limit
  double limited_upper = 0.0;       ///< the same from p + abs_err: what design answers compare
  /// converged when every source's integration met its tolerance, else the status of the last
  /// that did not (each Estimate's message says why).
  Status status = Status::converged;
};

struct Assessment {
  std::vector<ZoneResult> zones;
  /// One row per barrier and source with a position: the share of events it stops
  /// (strewn/barrier_effect.hpp); empty without barriers.
  std::vector<BarrierStop> barriers;
  bool all_limits_hold = true;
  bool all_verified = true;
  Status status = Status::converged;  ///< the worst of the zones'
};

/// Every zone of `site` against all its sources with site.options. `verify_second_method` runs a
/// second method beside each (strewn::verify). `progress`, when given, hears the share of the
/// work done (0 to 1): per zone, and within a zone per block of Monte Carlo samples.
STREWN_API Assessment assess(const Site& site, bool verify_second_method = false, const ProgressFn& progress = {});

/// Zone probabilities honour barriers and throwing lines through strewn::integrate_source.
///
/// One zone against the given sources (design searches call this with moved or scaled copies).
STREWN_API ZoneResult assess_zone(const Zone& zone, const std::vector<Source>& sources,
                                  const IntegrateOptions& options, bool verify_second_method = false);

/// (limited_upper - limit) / limit: <= 0 when the zone's limit holds even at the upper error
/// bound of every probability. Zones without a limit give -1.
STREWN_API double limit_margin(const ZoneResult& result);

}  // namespace strewn

#endif
