#include "strewn/assess.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>

#include "strewn/barrier_effect.hpp"
#include "strewn/error.hpp"
#include "strewn/exposure.hpp"

namespace strewn {

ZoneResult assess_zone(const Zone& zone, const std::vector<Source>& sources, const IntegrateOptions& options,
                       bool verify_second_method) {
  ZoneResult zr;
  zr.zone = &zone;
  ExposureSum session, year;
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
        r.verification = verify_source(src, zone.region, own);
        r.event = r.verification->primary;
      } else {
        // Plain integrate() unless barriers or a throwing line apply (strewn/barrier_effect.hpp).
        r.event = integrate_source(src, zone.region, own);
      }
    } catch (const input_error&) {
      throw;
    } catch (const std::runtime_error& e) {
      // The engine's last check (p, q in [0, 1], p + q = 1 within the bound) failed: no number.
      throw std::runtime_error("zone '" + zone.name + "', source '" + src.name + "': " + e.what());
    }
    if (!r.event.converged)
      zr.status = r.event.status == Status::converged ? Status::tolerance_not_met : r.event.status;
    const double p = r.event.p, err = r.event.abs_err;
    const Exposure exposure = src.exposure();
    const double n_session = exposure.events(Period::session), n_year = exposure.events(Period::year);
    r.per_session = probability_of_any(p, n_session);
    r.per_year = probability_of_any(p, n_year);
    // 1 - (1 - p)^N grows with p, so the bound on p maps to a bound on each side; take the wider.
    const double p_upper = std::min(1.0, p + err), p_lower = std::max(0.0, p - err);
    r.per_session_err = std::max(probability_of_any(p_upper, n_session) - r.per_session,
                                 r.per_session - probability_of_any(p_lower, n_session));
    r.per_year_err = std::max(probability_of_any(p_upper, n_year) - r.per_year,
                              r.per_year - probability_of_any(p_lower, n_year));
    r.expected_hits_per_year = p * n_year;
    session.add(p, err, n_session);
    year.add(p, err, n_year);
    zr.total_expected_hits_per_year += r.expected_hits_per_year;
    zr.total_abs_err_per_event += err;
    zr.sources.push_back(std::move(r));
  }
  zr.total_per_session = session.any();
  zr.total_per_year = year.any();
  zr.total_per_session_err = session.any_abs_err();
  zr.total_per_year_err = year.any_abs_err();
  if (zone.occupancy) zr.individual_risk_per_year = -std::expm1(*zone.occupancy * year.log_none());
  if (zone.limit) {
    switch (zone.limit_per) {
      case Period::event:
        zr.limited_value = session.largest();
        zr.limited_upper = session.largest_upper();
        break;
      case Period::session:
        zr.limited_value = zr.total_per_session;
        zr.limited_upper = session.any_upper();
        break;
      case Period::year:
        zr.limited_value = zr.total_per_year;
        zr.limited_upper = year.any_upper();
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

Assessment assess(const Site& site, bool verify_second_method, const ProgressFn& progress) {
  Assessment a;
  const double zones = static_cast<double>(site.zones.size());
  for (std::size_t k = 0; k < site.zones.size(); ++k) {
    const Zone& zone = site.zones[k];
    // Each zone an equal share of the bar; within it each source, and within that Monte Carlo
    // reports its samples (assess_zone).
    IntegrateOptions options = site.options;
    if (progress)
      options.progress = [&progress, k, zones](double done) { progress((static_cast<double>(k) + done) / zones); };
    ZoneResult zr = assess_zone(zone, site.sources, options, verify_second_method);
    if (progress) progress(static_cast<double>(k + 1) / zones);
    for (const SourceResult& r : zr.sources)
      if (r.verification) a.all_verified = a.all_verified && r.verification->agree;
    if (zr.limit_holds) a.all_limits_hold = a.all_limits_hold && *zr.limit_holds;
    if (zr.status != Status::converged) a.status = zr.status;
    a.zones.push_back(std::move(zr));
  }
  a.barriers = barrier_stops(site);
  for (const BarrierStop& b : a.barriers)
    if (!b.stopped.converged) a.status = b.stopped.status;
  return a;
}

}  // namespace strewn
