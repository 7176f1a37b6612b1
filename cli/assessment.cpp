#include "assessment.hpp"

#include <cmath>

namespace strewn::cli {

Assessment assess(const Scenario& scenario, bool verify_second_method) {
  Assessment a;
  for (const Zone& zone : scenario.zones) {
    ZoneResult zr;
    zr.zone = &zone;
    double log_none_session = 0.0, log_none_year = 0.0;
    double worst_event = 0.0;
    for (const Source& src : scenario.sources) {
      SourceResult r;
      r.source = src.name;
      if (verify_second_method) {
        r.verification = verify(src.model, zone.region, scenario.options);
        r.event = r.verification->primary;
        a.all_verified = a.all_verified && r.verification->agree;
      } else {
        r.event = integrate(src.model, zone.region, scenario.options);
      }
      const double p = r.event.p;
      const double n_session = src.events_per_session;
      const double n_year = src.events_per_session * src.sessions_per_year;
      r.per_session = probability_of_any(p, n_session);
      r.per_year = probability_of_any(p, n_year);
      r.expected_hits_per_year = p * n_year;
      // P(no hit) multiplies over independent sources: add the logarithms.
      log_none_session += n_session * std::log1p(-std::min(p, 1.0 - 1e-300));
      log_none_year += n_year * std::log1p(-std::min(p, 1.0 - 1e-300));
      zr.total_expected_hits_per_year += r.expected_hits_per_year;
      zr.total_abs_err_per_event += r.event.abs_err;
      worst_event = std::max(worst_event, p);
      zr.sources.push_back(std::move(r));
    }
    zr.total_per_session = -std::expm1(log_none_session);
    zr.total_per_year = -std::expm1(log_none_year);
    if (zone.occupancy) zr.individual_risk_per_year = -std::expm1(*zone.occupancy * log_none_year);
    if (zone.limit) {
      switch (zone.limit_per) {
        case LimitPer::event: zr.limited_value = worst_event; break;
        case LimitPer::session: zr.limited_value = zr.total_per_session; break;
        case LimitPer::year: zr.limited_value = zr.total_per_year; break;
      }
      zr.limit_holds = zr.limited_value <= *zone.limit;
      a.all_limits_hold = a.all_limits_hold && *zr.limit_holds;
    }
    a.zones.push_back(std::move(zr));
  }
  return a;
}

}  // namespace strewn::cli
