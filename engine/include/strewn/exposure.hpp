#ifndef STREWN_EXPOSURE_HPP
#define STREWN_EXPOSURE_HPP

/// \file
/// Exposure: from the probability of a hit per event to the chance of at least one hit per
/// session or per year, over several independent sources, with bounds. One combiner serves the
/// assessment of zones (strewn/assess.hpp) and every cell of a risk map (strewn/risk_map.hpp),
/// so a map cell and a limit use one definition.
///
/// With source s hit with probability p_s per event and N_s events in the period,
///   P(at least one hit) = 1 - prod_s (1 - p_s)^N_s = -expm1(sum_s N_s log1p(-p_s))
/// (never 1 - pow(1 - p, N), which loses everything below 1e-16). 1 - (1 - p)^N grows with p, so
/// a bound |p_s - exact| <= e_s maps to the interval [f(p_s - e_s), f(p_s + e_s)]; the stated
/// bound is the wider side. Per event, the figure is the worst single source max_s p_s (what a
/// per-event limit is compared with).

#include "strewn/export.hpp"

namespace strewn {

/// The period a probability or a limit is stated for. The order matches to_string's names.
enum class Period { event, session, year };

/// "event", "session", "year".
STREWN_API const char* to_string(Period period) noexcept;

/// How often a source fires: events per session and sessions per year.
struct Exposure {
  double events_per_session = 1.0;
  double sessions_per_year = 1.0;
  /// Events in one period: 1 per event, N per session, N x sessions per year.
  double events(Period period) const {
    return period == Period::event     ? 1.0
           : period == Period::session ? events_per_session
                                       : events_per_session * sessions_per_year;
  }
};

/// Accumulates independent sources' per-event probabilities (each with its bound) over their
/// events in a period. Example, two sources at 1e-6 per event, 100 and 300 events:
///   ExposureSum sum;  sum.add(1e-6, 1e-12, 100);  sum.add(1e-6, 1e-12, 300);
///   sum.any();        // -expm1(400 log1p(-1e-6)), about 4.0e-4
class ExposureSum {
 public:
  /// One source: p per event with |p - exact| <= abs_err, over `events` events (>= 0).
  STREWN_API void add(double p, double abs_err, double events);

  /// P(at least one hit from any source) and its bound from the sources' bounds.
  STREWN_API double any() const;
  STREWN_API double any_abs_err() const;
  /// The same computed from every p_s + e_s (clamped to 1): what a limit is compared with.
  STREWN_API double any_upper() const;

  /// Per event: the largest single p_s, the largest p_s + e_s (clamped to 1) and the largest e_s.
  double largest() const { return largest_; }
  double largest_upper() const { return largest_upper_; }
  double largest_abs_err() const { return largest_err_; }

  /// sum_s N_s log1p(-p_s): the log of P(no hit); a fraction f of it is the chance of someone
  /// present for that share of the events (individual risk: -expm1(f * log_none())).
  double log_none() const { return log_none_; }

 private:
  double log_none_ = 0.0, log_none_upper_ = 0.0, log_none_lower_ = 0.0;
  double largest_ = 0.0, largest_upper_ = 0.0, largest_err_ = 0.0;
};

}  // namespace strewn

#endif
