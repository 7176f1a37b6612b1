#include "output/assess_output.hpp"
#include "output/drop_output.hpp"

#include <fmt/format.h>
#include <fmt/ostream.h>
#include <nlohmann/json.hpp>
#include <algorithm>
#include <cctype>
#include <ostream>

#include "output/thrower_output.hpp"
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


// A word for a POSIX shell: as it is when it needs no quoting, else in single quotes (a single
// quote inside closed, escaped and reopened), so that the suggested command runs as printed.
std::string shell_word(const std::string& w) {
  const bool plain = !w.empty() && std::all_of(w.begin(), w.end(), [](char c) {
    return std::isalnum(static_cast<unsigned char>(c)) || std::string("-_./,+:=@%").find(c) != std::string::npos;
  });
  if (plain) return w;
  std::string out = "'";
  for (char c : w) out += c == '\'' ? std::string("'\\''") : std::string(1, c);
  return out + "'";
}

const char* verdict(const ZoneResult& z) {
  if (!z.limit_holds) return "-";
  if (z.limit_undecided) return "NOT SHOWN TO HOLD (its error bound reaches past the limit)";
  return *z.limit_holds ? "holds" : "EXCEEDED";
}

}  // namespace

// Words wrapped to lines of at most `width` characters, each starting with `indent`.
std::string wrapped(const std::string& text, const std::string& indent, std::size_t width) {
  std::string out, line = indent;
  std::size_t i = 0;
  while (i < text.size()) {
    const std::size_t j = std::min(text.find(' ', i), text.size());
    const std::string word = text.substr(i, j - i);
    if (line.size() > indent.size() && line.size() + 1 + word.size() > width) {
      out += line + "\n";
      line = indent;
    }
    line += (line.size() > indent.size() ? " " : "") + word;
    i = j + 1;
  }
  return out + line + "\n";
}

AccuracyReached accuracy_reached(const Site& s, const Assessment& a) {
  AccuracyReached r;
  r.requested = s.options.rel_tolerance;
  r.floor = s.options.abs_tolerance;
  for (const ZoneResult& z : a.zones)
    for (const SourceResult& sr : z.sources) {
      ++r.results;
      if (!sr.event.converged) ++r.not_met;
      if (sr.event.abs_err <= r.floor && sr.event.abs_err > 0.0) {
        ++r.under_floor;
        continue;
      }
      const double scale = std::min(sr.event.p, sr.event.q);
      if (scale > 0.0 && sr.event.abs_err / scale > r.worst_relative) {
        r.worst_relative = sr.event.abs_err / scale;
        r.worst_zone = z.zone->name;
        r.worst_source = sr.source;
      }
    }
  return r;
}

std::string accuracy_sentence(const AccuracyReached& r) {
  std::string text = fmt::format("Requested relative accuracy {:g} (or an error bound of at most {:g}); ", r.requested, r.floor);
  if (r.worst_relative == 0.0 && r.under_floor == 0) return text + "every value was computed without error.";
  if (r.worst_relative == 0.0) {
    text += fmt::format("reached: every error bound is at most {:g}", r.floor);
  } else {
    text += fmt::format("reached: the largest error bound is {:.2g} of its value ('{}' from '{}')",
                        r.worst_relative, r.worst_zone, r.worst_source);
    if (r.under_floor > 0) text += fmt::format(", {} more at most {:g}", r.under_floor, r.floor);
  }
  if (r.not_met == 0) return text + ", so every result met the request.";
  return text + fmt::format("; {} of {} results did NOT meet the request (their error bounds are stated and hold).",
                            r.not_met, r.results);
}

std::string next_command(const Site& s, const Assessment& a) {
  const ZoneResult* worst = nullptr;
  for (const ZoneResult& z : a.zones)
    if (z.limit_holds && !*z.limit_holds && !z.limit_undecided &&
        (!worst || z.limited_upper / *z.zone->limit > worst->limited_upper / *worst->zone->limit))
      worst = &z;
  if (!worst) return {};
  return "strewn solve clearance " + shell_word(s.file) + " --zone " + shell_word(worst->zone->name);
}

void write_table(std::ostream& out, const Site& s, const Assessment& a, const Uncertainty* u) {
  fmt::print(out, "strewn {} assessment: {}\n", STREWN_VERSION_STRING, s.site_name);
  fmt::print(out, "scenario: {}\n", s.file);
  fmt::print(out, "method: {}; p per impact event unless stated; err bound: on p/event's error\n\n",
             to_string(s.options.method));
  fmt::print(out, "{:<22} {:<15} {:>9} {:>9} {:>9} {:>9}\n", "zone / source", "role", "p/event",
             "err bound", "p/session", "p/year");
  fmt::print(out, "{}\n", std::string(78, '-'));
  for (const ZoneResult& z : a.zones) {
    // Names are never cut ("child beanbag (fitte"): a longer one takes its own line.
    fmt::print(out, "{:<22} {:<15}\n", z.zone->name, to_string(z.zone->role));
    for (const SourceResult& r : z.sources) {
      if (r.source.size() > 20) fmt::print(out, "  {}\n", r.source);
      fmt::print(out, "  {:<20} {:<15} {:>9} {:>9} {:>9} {:>9}\n", r.source.size() > 20 ? "" : r.source, "", prob(r.event.p),
                 fmt::format("{:.1g}", r.event.abs_err), prob(r.per_session), prob(r.per_year));
      // What JSON says, said here too: an unmet request and a second method's verdict.
      if (!r.event.converged)
        out << wrapped(fmt::format("requested accuracy NOT MET: {}; the err bound column is the bound that holds.",
                                   r.event.message.empty() ? "see the JSON output" : r.event.message),
                       "    ");
      if (r.verification)
        fmt::print(out, "    checked by {}: {} +- {:.1g}, {}\n", to_string(r.verification->secondary.method),
                   prob(r.verification->secondary.p), r.verification->secondary.abs_err,
                   r.verification->agree ? "agrees within both bounds" : "DISAGREES beyond both bounds");
    }
    fmt::print(out, "  {:<20} {:<15} {:>9} {:>9} {:>9} {:>9}\n", "all sources", "", "", "",
               prob(z.total_per_session), prob(z.total_per_year));
    // The verdict "holds" on the fitted spread, while the fit's one-sided upper bound is above
    // the limit or lies beyond the replicates (at least the largest of them).
    const bool fit_breaks = u && z.limit_holds && *z.limit_holds &&
                            (u->zones[static_cast<std::size_t>(&z - a.zones.data())].limited_upper > *z.zone->limit ||
                             u->zones[static_cast<std::size_t>(&z - a.zones.data())].limited_upper_at_least);
    if (z.zone->limit)
      fmt::print(out, "  limit {} per {}: {} ({}){}\n", prob(*z.zone->limit), to_string(z.zone->limit_per),
                 verdict(z), prob(z.limited_value), fit_breaks ? " on the fitted spread; see below" : "");
    fmt::print(out, "  expected hits per year: {}\n", prob(z.total_expected_hits_per_year));
    if (z.individual_risk_per_year)
      fmt::print(out, "  individual risk per year at occupancy {}: {}\n", *z.zone->occupancy,
                 prob(*z.individual_risk_per_year));
    if (u) {
      const ZoneUncertainty& zu = u->zones[static_cast<std::size_t>(&z - a.zones.data())];
      fmt::print(out, "  {:g}% interval from the fit: per session {} to {},\n    per year {} to {}\n",
                 100 * u->confidence, prob(zu.p_session.low), prob(zu.p_session.high), prob(zu.p_year.low),
                 prob(zu.p_year.high));
      // "at least": the bound's level lies beyond the replicates, the figure is their largest.
      const auto upper = [](double v, bool at_least) { return at_least ? "at least " + prob(v) : prob(v); };
      std::string text = fmt::format("{:g}% upper bound (one-sided): per session {}, per year {}", 100 * u->confidence,
                                     upper(zu.p_session_upper, zu.p_session_upper_at_least),
                                     upper(zu.p_year_upper, zu.p_year_upper_at_least));
      if (z.zone->limit) {
        // The figure the limit is set on: per session or per year as above; per event, the
        // largest of the sources' (printed, as it is not above).
        if (z.zone->limit_per == Period::event)
          text += fmt::format(", per event (the largest source's) {}", upper(zu.limited_upper, zu.limited_upper_at_least));
        const std::string against = fmt::format("the limit {} per {}", prob(*z.zone->limit), to_string(z.zone->limit_per));
        text += zu.limited_upper > *z.zone->limit ? "; above " + against
                : zu.limited_upper_at_least      ? "; " + against + " not shown to hold on it"
                                                 : "; within " + against;
      }
      if (zu.limited_upper_at_least || zu.p_session_upper_at_least || zu.p_year_upper_at_least)
        text += fmt::format(" (\"at least\": the level asks beyond the largest of {} replicates; more --replicates "
                            "raise such a bound)", u->replicates);
      out << wrapped(text + ".", "  ");
      // A verdict "holds" on the fitted spread says nothing of the fit's uncertainty: say when the
      // data leave room for the limit to be broken.
      if (fit_breaks)
        out << wrapped(fmt::format("BUT the {:g}% upper bound {} {}: the data do not show that the limit holds (more "
                                   "field data, or a larger clearance{}).",
                                   100 * u->confidence, upper(zu.limited_upper, zu.limited_upper_at_least),
                                   zu.limited_upper > *z.zone->limit ? fmt::format("is above the limit {}", prob(*z.zone->limit))
                                                                     : "lies beyond the replicates",
                                   zu.limited_upper > *z.zone->limit ? "" : ", or more --replicates"),
                       "  ");
    }
  }
  fmt::print(out, "{}\n", std::string(78, '-'));
  // A spread derived from physics is shown as the spread it became, and how it was checked.
  for (const Source& src : s.sources)
    if (src.drop) out << wrapped(drop_summary(src, Lengths(s)), "");
  if (const auto lines = thrower_sentences(s); !lines.empty()) {
    out << "Throwers (the spread each became at its distance):\n";
    for (const std::string& line : lines) out << wrapped(line, "  ");
  }
  if (const auto lines = barrier_sentences(s, a); !lines.empty()) {
    out << wrapped("Barriers (the values above are past them; each row: the share of events whose straight ground "
                   "path crosses it, times its catch, counted as if it stood alone):", "");
    for (const std::string& line : lines) out << wrapped(line, "  ");
  }
  if (u) {
    out << wrapped("Intervals: " + u->method + ".", "");
    for (std::size_t k = 0; k < u->fitted_sources.size(); ++k)
      out << wrapped(u->fitted_sources[k] + ": " + u->source_methods[k], "  ");
  }
  bool exceeded = false;
  int not_shown_by_fit = 0;  // limits that hold on the fitted spread, not on the fit's upper bound
  for (const ZoneResult& z : a.zones) {
    exceeded = exceeded || (z.limit_holds && !*z.limit_holds && !z.limit_undecided);
    if (u && z.zone->limit && z.limit_holds && *z.limit_holds) {
      const auto& uz = u->zones[static_cast<std::size_t>(&z - a.zones.data())];
      if (uz.limited_upper > *z.zone->limit || uz.limited_upper_at_least) ++not_shown_by_fit;
    }
  }
  out << wrapped(accuracy_sentence(accuracy_reached(s, a)), "", 78);
  // "All limits hold." alone under a BUT line read as a clean bill (a statistician's trial).
  const std::string all_hold =
      not_shown_by_fit == 0
          ? "All limits hold."
          : fmt::format("All limits hold on the fitted spreads, BUT {} of them {} not shown to hold by the fit's "
                        "upper bound (the BUT lines above).",
                        not_shown_by_fit, not_shown_by_fit == 1 ? "is" : "are");
  if (a.all_limits_hold && not_shown_by_fit > 0) {
    out << wrapped(all_hold, "", 78);
    fmt::print(out, "\n{}\n", kCaution);
  } else {
    fmt::print(out, "{}\n\n{}\n",
               a.all_limits_hold ? "All limits hold."
               : exceeded        ? "At least one limit is EXCEEDED."
                                 : "At least one limit is NOT SHOWN TO HOLD: its error bound reaches past it "
                                   "(try a tighter --tolerance or another --method).",
               kCaution);
  }
  const std::string next = next_command(s, a);
  // One line even when long: a command is copied whole, never wrapped.
  if (!next.empty()) fmt::print(out, "\nNext: {}\n", next);
}

void write_csv(std::ostream& out, const Site& s, const Assessment& a, const Uncertainty* u) {
  // The last columns say what the table and JSON say beside the numbers: how each integration
  // ended (status, message), a second method's value under --verify, the limit's verdict in words
  // ("not shown to hold" is neither true nor false) and the fit's one-sided upper bound.
  // p_outside_event (1 - p, computed directly) was q_event before this release.
  out << "zone,role,source,p_event,abs_err,p_outside_event,p_session,p_year,expected_hits_per_year,"
         "limit,limit_per,limit_holds,occupancy,individual_risk_per_year,p_session_low,p_session_high,"
         "p_year_low,p_year_high,status,message,verify_method,verify_p_event,verify_abs_err,verify_agree,"
         "limit_verdict,limit_upper_bound_from_fit,source_spread\n";
  for (const ZoneResult& z : a.zones) {
    for (const SourceResult& r : z.sources) {
      std::string verify_cells = ",,,";
      if (r.verification)
        verify_cells = fmt::format("{},{:.17g},{:.3g},{}", to_string(r.verification->secondary.method),
                                   r.verification->secondary.p, r.verification->secondary.abs_err,
                                   r.verification->agree ? "true" : "false");
      // source_spread: the spread a drop source became (normal or mixture, and its check).
      std::string spread_cell;
      for (const Source& src : s.sources)
        if (src.name == r.source && src.drop) spread_cell = csv_text(src.drop->spread.shape);
      fmt::print(out, "{},{},{},{:.17g},{:.3g},{:.17g},{:.17g},{:.17g},{:.17g},,,,,,,,,,{},{},{},,,{}\n",
                 csv_text(z.zone->name), to_string(z.zone->role), csv_text(r.source), r.event.p, r.event.abs_err,
                 r.event.q, r.per_session, r.per_year, r.expected_hits_per_year, csv_text(to_string(r.event.status)),
                 r.event.message.empty() ? "" : csv_text(r.event.message), verify_cells, spread_cell);
    }
    std::string interval_cells = ",,,", fit_upper;
    if (u) {
      const ZoneUncertainty& zu = u->zones[static_cast<std::size_t>(&z - a.zones.data())];
      interval_cells = fmt::format("{:.17g},{:.17g},{:.17g},{:.17g}", zu.p_session.low, zu.p_session.high,
                                   zu.p_year.low, zu.p_year.high);
      if (z.zone->limit) fit_upper = fmt::format("{:.17g}", zu.limited_upper);
    }
    const std::string verdict_word = !z.limit_holds     ? ""
                                     : z.limit_undecided ? "not shown to hold"
                                     : *z.limit_holds    ? "holds"
                                                         : "exceeded";
    fmt::print(out, "{},{},all sources,,{:.3g},,{:.17g},{:.17g},{:.17g},{},{},{},{},{},{},{},,,,,,{},{},\n", csv_text(z.zone->name),
               to_string(z.zone->role), z.total_abs_err_per_event, z.total_per_session,
               z.total_per_year, z.total_expected_hits_per_year,
               z.zone->limit ? fmt::format("{:.17g}", *z.zone->limit) : "",
               z.zone->limit ? to_string(z.zone->limit_per) : "",
               z.limit_holds ? (*z.limit_holds && !z.limit_undecided ? "true" : "false") : "",
               z.zone->occupancy ? fmt::format("{}", *z.zone->occupancy) : "",
               z.individual_risk_per_year ? fmt::format("{:.17g}", *z.individual_risk_per_year) : "",
               interval_cells, csv_text(to_string(z.status)), verdict_word.empty() ? "" : csv_text(verdict_word),
               fit_upper);
  }
  // Barriers and throwers after the zones, with their own role: a barrier's p_event is the share of
  // the source's events it stops; a thrower's row says in its message the spread it became.
  for (const BarrierStop& b : a.barriers)
    fmt::print(out, "{},barrier,{},{:.17g},{:.3g},{:.17g},,,,,,,,,,,,,{},,,,,,,,\n", csv_text(b.barrier), csv_text(b.source),
               b.stopped.p, b.stopped.abs_err, b.stopped.q, csv_text(to_string(b.stopped.status)));
  std::size_t k = 0;
  for (const Source& src : s.sources)
    if (src.thrower)
      fmt::print(out, "{},thrower,{},,,,,,,,,,,,,,,,{},{},,,,,,,\n", csv_text("thrower"), csv_text(src.name),
                 csv_text("converged"), csv_text(thrower_sentences(s)[k++]));
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
                                            {"limited", zu.limited_upper},
                                            // true: the level lies beyond the replicates, the
                                            // figure is their largest, the bound at least that
                                            {"at_least", {{"p_event", zu.p_event_upper_at_least},
                                                          {"p_session", zu.p_session_upper_at_least},
                                                          {"p_year", zu.p_year_upper_at_least},
                                                          {"limited", zu.limited_upper_at_least}}}}}};
    }
    if (z.zone->limit)
      zj["limit"] = {{"value", *z.zone->limit}, {"per", to_string(z.zone->limit_per)},
                     {"compared", z.limited_value}, {"compared_upper_bound", z.limited_upper},
                     {"holds", *z.limit_holds}, {"undecided", z.limit_undecided}};
    j["zones"].push_back(zj);
  }
  for (const Source& src : s.sources)
    if (src.drop) j["sources_from_physics"].push_back(drop_json(src, Lengths(s)));
  if (const nlohmann::json t = throwers_json(s); !t.empty()) j["throwers"] = t;
  if (const nlohmann::json b = barriers_json(s, a); !b.empty()) j["barriers"] = b;
  j["all_limits_hold"] = a.all_limits_hold;
  j["caution"] = kCaution;
  out << j.dump(2) << "\n";
}

}  // namespace strewn::cli
