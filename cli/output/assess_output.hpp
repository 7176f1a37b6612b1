#ifndef STREWN_CLI_REPORT_HPP
#define STREWN_CLI_REPORT_HPP

// Writing an assessment for people (an 80-column table) or for scripts (CSV, JSON).
#include <iosfwd>
#include <string>

#include "strewn/assess.hpp"
#include "strewn/uncertainty.hpp"

namespace strewn::cli {

extern const char* const kCaution;

// Words wrapped to lines of at most `width` characters, each starting with `indent`.
std::string wrapped(const std::string& text, const std::string& indent, std::size_t width = 78);

// The accuracy an assessment actually reached, beside the one requested: the largest error bound
// relative to the smaller of p and q (what the exact method's request is measured against), where
// it was, and how many results did not meet the request.
// Bounds at or under the absolute floor (abs_tolerance: a tail of 1e-40 with a bound of 1e-44
// met the request that way) are counted apart, not as a relative figure.
struct AccuracyReached {
  double requested = 0.0;
  double floor = 0.0;           // the request's abs_tolerance
  int under_floor = 0;          // results whose bound is at or under it
  double worst_relative = 0.0;  // over the others; 0 when there are none
  std::string worst_zone, worst_source;
  int results = 0, not_met = 0;
};
AccuracyReached accuracy_reached(const Site& s, const Assessment& a);
// One sentence on it, for the table and the report.
std::string accuracy_sentence(const AccuracyReached& r);

// The design command to run next when a limit is exceeded: `strewn solve clearance FILE --zone
// NAME` for the zone furthest over its limit (ratio of its upper bound to the limit), with the
// scenario path as given; empty when every limit holds or none is decided exceeded.
std::string next_command(const Site& s, const Assessment& a);

void write_table(std::ostream& out, const Site& s, const Assessment& a, const Uncertainty* u = nullptr);
void write_csv(std::ostream& out, const Site& s, const Assessment& a, const Uncertainty* u = nullptr);
void write_json(std::ostream& out, const Site& s, const Assessment& a, const Uncertainty* u = nullptr);

}  // namespace strewn::cli

#endif
