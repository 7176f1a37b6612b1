#include "assessment.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>

#include "strewn/error.hpp"

namespace strewn::cli {
namespace {

// P(no hit) multiplies over independent sources and events: add N log1p(-p).
double log_none(double p, double n) { return n * std::log1p(-std::min(p, 1.0 - 1e-300)); }

}  // namespace

ZoneResult assess_zone(const Zone& zone, const std::vector<Source>& sources, const IntegrateOptions& options,
                       bool verify_second_method) {
  ZoneResult zr;
  zr.zone = &zone;
  double log_none_session = 0.0, log_none_year = 0.0;
  double upper_session = 0.0, upper_year = 0.0;  // the same from p + abs_err
  double lower_session = 0.0, lower_year = 0.0;  // and from p - abs_err
  double worst_event = 0.0, worst_event_upper = 0.0;
  for (const Source& src : sources) {
    SourceResult r;
    r.source = src.name;
    IntegrateOptions own = options;
    if (options.progress) {
      const double j = static_cast<double>(&src - sources.data()), n = static_cast<double>(sources.size());
      own.progress = [&options, j, n](double done) { options.progress((j + done) / n); };
    }
    try {
      if (verify_second_method) {
        r.verification = verify(src.model, zone.region, own);
        r.event = r.verification->primary;
      } else {
        r.event = integrate(src.model, zone.region, own);
      }
    } catch (const input_error&) {
      throw;
    } catch (const std::runtime_error& e) {
      // The engine's last check (p, q in [0, 1], p + q = 1 within the bound) failed: no number.
      throw std::runtime_error("zone '" + zone.name + "', source '" + src.name + "': " + e.what());
    }
    const double p = r.event.p, p_upper = std::min(1.0, p + r.event.abs_err);
    const double n_session = src.events_per_session;
    const double n_year = src.events_per_session * src.sessions_per_year;
    r.per_session = probability_of_any(p, n_session);
    r.per_year = probability_of_any(p, n_year);
    // 1 - (1 - p)^N grows with p, so the bound on p maps to a bound on each side; take the wider.
    const double p_lower = std::max(0.0, p - r.event.abs_err);
    r.per_session_err = std::max(probability_of_any(p_upper, n_session) - r.per_session,
                                 r.per_session - probability_of_any(p_lower, n_session));
    r.per_year_err = std::max(probability_of_any(p_upper, n_year) - r.per_year,
                              r.per_year - probability_of_any(p_lower, n_year));
    lower_session += log_none(p_lower, n_session);
    lower_year += log_none(p_lower, n_year);
    r.expected_hits_per_year = p * n_year;
    log_none_session += log_none(p, n_session);
    log_none_year += log_none(p, n_year);
    upper_session += log_none(p_upper, n_session);
    upper_year += log_none(p_upper, n_year);
    zr.total_expected_hits_per_year += r.expected_hits_per_year;
    zr.total_abs_err_per_event += r.event.abs_err;
    worst_event = std::max(worst_event, p);
    worst_event_upper = std::max(worst_event_upper, p_upper);
    zr.sources.push_back(std::move(r));
  }
  zr.total_per_session = -std::expm1(log_none_session);
  zr.total_per_year = -std::expm1(log_none_year);
  zr.total_per_session_err = std::max(-std::expm1(upper_session) - zr.total_per_session,
                                      zr.total_per_session + std::expm1(lower_session));
  zr.total_per_year_err = std::max(-std::expm1(upper_year) - zr.total_per_year, zr.total_per_year + std::expm1(lower_year));
  if (zone.occupancy) zr.individual_risk_per_year = -std::expm1(*zone.occupancy * log_none_year);
  if (zone.limit) {
    switch (zone.limit_per) {
      case LimitPer::event:
        zr.limited_value = worst_event;
        zr.limited_upper = worst_event_upper;
        break;
      case LimitPer::session:
        zr.limited_value = zr.total_per_session;
        zr.limited_upper = -std::expm1(upper_session);
        break;
      case LimitPer::year:
        zr.limited_value = zr.total_per_year;
        zr.limited_upper = -std::expm1(upper_year);
        break;
    }
    // A limit holds when its upper bound does: a value below the limit whose error bound reaches
    // past it is "not shown to hold", never "holds" (a 1e12:1 spread once printed p = 1 +- 4e20
    // above "All limits hold").
    zr.limit_holds = zr.limited_upper <= *zone.limit;
    zr.limit_undecided = zr.limited_value <= *zone.limit && !*zr.limit_holds;
  }
  return zr;
}

double limit_margin(const ZoneResult& result) {
  if (!result.zone->limit) return -1.0;
  return (result.limited_upper - *result.zone->limit) / *result.zone->limit;
}

Assessment assess(const Scenario& scenario, bool verify_second_method, const ProgressFn& progress) {
  Assessment a;
  const double zones = static_cast<double>(scenario.zones.size());
  for (std::size_t k = 0; k < scenario.zones.size(); ++k) {
    const Zone& zone = scenario.zones[k];
    // Each zone an equal share of the bar; within it each source, and within that Monte Carlo
    // reports its samples (assess_zone).
    IntegrateOptions options = scenario.options;
    if (progress)
      options.progress = [&progress, k, zones](double done) { progress((static_cast<double>(k) + done) / zones); };
    ZoneResult zr = assess_zone(zone, scenario.sources, options, verify_second_method);
    if (progress) progress(static_cast<double>(k + 1) / zones);
    for (const SourceResult& r : zr.sources)
      if (r.verification) a.all_verified = a.all_verified && r.verification->agree;
    if (zr.limit_holds) a.all_limits_hold = a.all_limits_hold && *zr.limit_holds;
    a.zones.push_back(std::move(zr));
  }
  return a;
}

}  // namespace strewn::cli
