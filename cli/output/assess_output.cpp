#include "output/assess_output.hpp"

#include <fmt/format.h>
#include <fmt/ostream.h>
#include <nlohmann/json.hpp>
#include <ostream>

#include "strewn/version.hpp"

namespace strewn::cli {

const char* const kCaution =
    "Caution: these are model estimates from a statistical scatter model. They do\n"
    "not replace physical barriers, the venue's rules, local codes or a competent\n"
    "person's assessment.";

namespace {

// RFC 4180: a field in double quotes, with any quote inside doubled.
std::string csv_text(const std::string& s) {
  std::string out = "\"";
  for (char c : s) out += c == '"' ? std::string("\"\"") : std::string(1, c);
  return out + "\"";
}

std::string prob(double p) { return p == 0.0 ? "0" : fmt::format("{:.3g}", p); }

const char* verdict(const ZoneResult& z) {
  if (!z.limit_holds) return "-";
  if (z.limit_undecided) return "NOT SHOWN TO HOLD (its error bound reaches past the limit)";
  return *z.limit_holds ? "holds" : "EXCEEDED";
}

}  // namespace

void write_table(std::ostream& out, const Site& s, const Assessment& a, const Uncertainty* u) {
  fmt::print(out, "strewn {} assessment: {}\n", STREWN_VERSION_STRING, s.site_name);
  fmt::print(out, "scenario: {}\n", s.file);
  fmt::print(out, "method: {}; p per impact event unless stated; err bound: on p/event's error\n\n",
             to_string(s.options.method));
  fmt::print(out, "{:<22} {:<15} {:>9} {:>9} {:>9} {:>9}\n", "zone / source", "role", "p/event",
             "err bound", "p/session", "p/year");
  fmt::print(out, "{}\n", std::string(78, '-'));
  for (const ZoneResult& z : a.zones) {
    fmt::print(out, "{:<22.22} {:<15}\n", z.zone->name, to_string(z.zone->role));
    for (const SourceResult& r : z.sources) {
      fmt::print(out, "  {:<20.20} {:<15} {:>9} {:>9} {:>9} {:>9}\n", r.source, "", prob(r.event.p),
                 fmt::format("{:.1g}", r.event.abs_err), prob(r.per_session), prob(r.per_year));
      // What JSON says, said here too: an unmet request and a second method's verdict.
      if (!r.event.converged)
        fmt::print(out, "    requested accuracy not met: {} (the err bound column is the bound that holds)\n",
                   r.event.message.empty() ? "see the JSON output" : r.event.message);
      if (r.verification)
        fmt::print(out, "    checked by {}: {} +- {:.1g}, {}\n", to_string(r.verification->secondary.method),
                   prob(r.verification->secondary.p), r.verification->secondary.abs_err,
                   r.verification->agree ? "agrees within both bounds" : "DISAGREES beyond both bounds");
    }
    fmt::print(out, "  {:<20} {:<15} {:>9} {:>9} {:>9} {:>9}\n", "all sources", "", "", "",
               prob(z.total_per_session), prob(z.total_per_year));
    if (z.zone->limit)
      fmt::print(out, "  limit {} per {}: {} ({})\n", prob(*z.zone->limit), to_string(z.zone->limit_per),
                 verdict(z), prob(z.limited_value));
    fmt::print(out, "  expected hits per year: {}\n", prob(z.total_expected_hits_per_year));
    if (z.individual_risk_per_year)
      fmt::print(out, "  individual risk per year at occupancy {}: {}\n", *z.zone->occupancy,
                 prob(*z.individual_risk_per_year));
    if (u) {
      const ZoneUncertainty& zu = u->zones[static_cast<std::size_t>(&z - a.zones.data())];
      fmt::print(out, "  {:g}% interval from the fit: per session {} to {},\n    per year {} to {}\n",
                 100 * u->confidence, prob(zu.p_session.low), prob(zu.p_session.high), prob(zu.p_year.low),
                 prob(zu.p_year.high));
      fmt::print(out, "  {:g}% upper bound (one-sided): per session {}, per year {}{}\n", 100 * u->confidence,
                 prob(zu.p_session_upper), prob(zu.p_year_upper),
                 z.zone->limit ? fmt::format(", compared with the limit {}", prob(zu.limited_upper)) : "");
    }
  }
  fmt::print(out, "{}\n", std::string(78, '-'));
  if (u) {
    fmt::print(out, "Intervals: {}.\n", u->method);
    for (std::size_t k = 0; k < u->fitted_sources.size(); ++k)
      fmt::print(out, "  {}: {}\n", u->fitted_sources[k], u->source_methods[k]);
  }
  bool exceeded = false;
  for (const ZoneResult& z : a.zones) exceeded = exceeded || (z.limit_holds && !*z.limit_holds && !z.limit_undecided);
  fmt::print(out, "{}\n\n{}\n",
             a.all_limits_hold ? "All limits hold."
             : exceeded        ? "At least one limit is EXCEEDED."
                               : "At least one limit is NOT SHOWN TO HOLD: its error bound reaches past it "
                                 "(try a tighter --tolerance or another --method).",
             kCaution);
}

void write_csv(std::ostream& out, const Site&, const Assessment& a, const Uncertainty* u) {
  // p_outside_event (1 - p, computed directly) was q_event before this release.
  out << "zone,role,source,p_event,abs_err,p_outside_event,p_session,p_year,expected_hits_per_year,"
         "limit,limit_per,limit_holds,occupancy,individual_risk_per_year,p_session_low,p_session_high,"
         "p_year_low,p_year_high\n";
  for (const ZoneResult& z : a.zones) {
    for (const SourceResult& r : z.sources)
      fmt::print(out, "{},{},{},{:.17g},{:.3g},{:.17g},{:.17g},{:.17g},{:.17g},,,,,,,,,\n", csv_text(z.zone->name),
                 to_string(z.zone->role), csv_text(r.source), r.event.p, r.event.abs_err, r.event.q,
                 r.per_session, r.per_year, r.expected_hits_per_year);
    std::string interval_cells = ",,,";
    if (u) {
      const ZoneUncertainty& zu = u->zones[static_cast<std::size_t>(&z - a.zones.data())];
      interval_cells = fmt::format("{:.17g},{:.17g},{:.17g},{:.17g}", zu.p_session.low, zu.p_session.high,
                                   zu.p_year.low, zu.p_year.high);
    }
    fmt::print(out, "{},{},all sources,,{:.3g},,{:.17g},{:.17g},{:.17g},{},{},{},{},{},{}\n", csv_text(z.zone->name),
               to_string(z.zone->role), z.total_abs_err_per_event, z.total_per_session,
               z.total_per_year, z.total_expected_hits_per_year,
               z.zone->limit ? fmt::format("{:.17g}", *z.zone->limit) : "",
               z.zone->limit ? to_string(z.zone->limit_per) : "",
               z.limit_holds ? (*z.limit_holds ? "true" : "false") : "",
               z.zone->occupancy ? fmt::format("{}", *z.zone->occupancy) : "",
               z.individual_risk_per_year ? fmt::format("{:.17g}", *z.individual_risk_per_year) : "",
               interval_cells);
  }
}

void write_json(std::ostream& out, const Site& s, const Assessment& a, const Uncertainty* u) {
  nlohmann::json j;
  j["strewn_version"] = STREWN_VERSION_STRING;
  j["site"] = s.site_name;
  j["file"] = s.file;
  j["method"] = to_string(s.options.method);
  j["units"] = {{"length", symbol(s.units)}, {"probability", "per event unless named"}};
  for (const ZoneResult& z : a.zones) {
    nlohmann::json zj;
    zj["name"] = z.zone->name;
    zj["role"] = to_string(z.zone->role);
    zj["shape"] = z.zone->shape;
    if (!z.zone->geometry_file.empty()) zj["geometry_file"] = z.zone->geometry_file;
    for (const SourceResult& r : z.sources) {
      nlohmann::json sj = {{"source", r.source},
                           {"p_event", r.event.p},
                           {"p_outside_event", r.event.q},
                           {"abs_err", r.event.abs_err},
                           {"p_outside_abs_err", r.event.q_abs_err()},
                           // former names of p_outside_event and p_outside_abs_err, kept for one release
                           {"q_event", r.event.q},
                           {"q_abs_err", r.event.q_abs_err()},
                           {"converged", r.event.converged},
                           {"evaluations", r.event.evaluations},
                           {"p_session", r.per_session},
                           {"p_session_abs_err", r.per_session_err},
                           {"p_year", r.per_year},
                           {"p_year_abs_err", r.per_year_err},
                           {"expected_hits_per_year", r.expected_hits_per_year}};
      if (!r.event.message.empty()) sj["message"] = r.event.message;
      if (r.verification)
        sj["verification"] = {{"method", to_string(r.verification->secondary.method)},
                              {"p_event", r.verification->secondary.p},
                              {"abs_err", r.verification->secondary.abs_err},
                              {"agree", r.verification->agree}};
      zj["sources"].push_back(sj);
    }
    zj["all_sources"] = {{"p_session", z.total_per_session},
                         {"p_session_abs_err", z.total_per_session_err},
                         {"p_year", z.total_per_year},
                         {"p_year_abs_err", z.total_per_year_err},
                         {"expected_hits_per_year", z.total_expected_hits_per_year},
                         {"abs_err_per_event", z.total_abs_err_per_event}};
    if (z.individual_risk_per_year)
      zj["occupancy"] = {{"fraction", *z.zone->occupancy},
                         {"individual_risk_per_year", *z.individual_risk_per_year}};
    if (u) {
      const ZoneUncertainty& zu = u->zones[static_cast<std::size_t>(&z - a.zones.data())];
      nlohmann::json per_source = nlohmann::json::array();
      for (const Interval& i : zu.p_event) per_source.push_back({i.low, i.high});
      zj["uncertainty"] = {{"confidence", u->confidence},       {"replicates", u->replicates},
                           {"p_event", per_source},             {"p_session", {zu.p_session.low, zu.p_session.high}},
                           {"p_year", {zu.p_year.low, zu.p_year.high}}, {"limited", {zu.limited.low, zu.limited.high}},
                           {"method", u->method},
                           {"upper_bound", {{"one_sided_confidence", u->confidence},
                                            {"p_event", zu.p_event_upper},
                                            {"p_session", zu.p_session_upper},
                                            {"p_year", zu.p_year_upper},
                                            {"limited", zu.limited_upper}}}};
    }
    if (z.zone->limit)
      zj["limit"] = {{"value", *z.zone->limit}, {"per", to_string(z.zone->limit_per)},
                     {"compared", z.limited_value}, {"compared_upper_bound", z.limited_upper},
                     {"holds", *z.limit_holds}, {"undecided", z.limit_undecided}};
    j["zones"].push_back(zj);
  }
  j["all_limits_hold"] = a.all_limits_hold;
  j["caution"] = kCaution;
  out << j.dump(2) << "\n";
}

}  // namespace strewn::cli
