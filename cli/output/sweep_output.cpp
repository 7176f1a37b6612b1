#include "output/sweep_output.hpp"

#include <fmt/format.h>
#include <fmt/ostream.h>

#include <ostream>
#include <string>

#include "strewn/version.hpp"

namespace strewn::cli {
namespace {

constexpr std::size_t kListed = 20;  // combinations named in the summary; the CSV has them all

// RFC 4180: a field in double quotes, with any quote inside doubled.
std::string quoted(const std::string& s) {
  std::string out = "\"";
  for (char c : s) out += c == '"' ? std::string("\"\"") : std::string(1, c);
  return out + "\"";
}

std::string axis_heading(const Study& study, const SweepAxis& a) { return a.heading(study.base.units); }

// What an axis varies: "zone", "source" or "layout", and its name.
const char* axis_subject_kind(const SweepAxis& a) { return !a.zone.empty() ? "zone" : !a.layout.empty() ? "layout" : "source"; }
const std::string& axis_subject(const SweepAxis& a) { return !a.zone.empty() ? a.zone : !a.layout.empty() ? a.layout : a.source; }

std::string verdict(const SweepZoneRow& z) {
  if (!z.limit_holds) return "no limit";
  if (z.limit_undecided) return "not shown to hold";
  return *z.limit_holds ? "holds" : "exceeded";
}

}  // namespace

SweepTable sweep_table(const Study& study, const SweepResult& result) {
  SweepTable t;
  const auto column = [&](const std::string& name, bool numeric) {
    t.header.push_back(name);
    t.numeric.push_back(numeric);
  };
  // The fixed columns by name from the one list (sweep_result_columns), which the study's
  // reader keeps the axes' headings out of.
  const std::vector<std::string>& fixed = sweep_result_columns();
  const auto numeric = [](const std::string& name) {
    return !(name == "zone" || name == "role" || name == "limit_per" || name == "verdict" || name == "accuracy" ||
             name == "meets_every_limit");
  };
  column(fixed.front(), true);
  for (const SweepAxis& a : study.axes) column(axis_heading(study, a), true);
  const bool uniformity = sweep_has_uniformity(study);
  for (std::size_t k = 1; k < fixed.size(); ++k)
    if (uniformity || (fixed[k] != "cu_percent" && fixed[k] != "du_percent")) column(fixed[k], numeric(fixed[k]));
  const auto number = [](const std::string& text) { return SweepCell{text, true}; };
  const auto text = [](const std::string& text) { return SweepCell{text, false}; };
  for (std::size_t i = 0; i < result.combinations.size(); ++i) {
    const SweepCombination& c = result.combinations[i];
    std::vector<SweepCell> head{number(std::to_string(i + 1))};
    for (double v : c.values) head.push_back(number(fmt::format("{:.10g}", v)));
    for (const SweepZoneRow& z : c.zones) {
      std::vector<SweepCell> row = head;
      row.insert(row.end(), {text(z.zone), text(to_string(z.role)), number(fmt::format("{:.17g}", z.per_event)),
                             number(fmt::format("{:.3g}", z.per_event_err)), number(fmt::format("{:.17g}", z.per_session)),
                             number(fmt::format("{:.3g}", z.per_session_err)), number(fmt::format("{:.17g}", z.per_year)),
                             number(fmt::format("{:.3g}", z.per_year_err)),
                             number(z.limit ? fmt::format("{:.6g}", *z.limit) : ""),
                             text(z.limit ? to_string(z.limit_per) : ""), text(verdict(z)),
                             text(z.status == Status::converged ? "met" : std::string("not met: ") + to_string(z.status)),
                             text(c.meets_every_limit ? "yes" : "no")});
      if (uniformity)
        for (const std::optional<double>& v : {c.cu, c.du}) row.push_back(number(v ? fmt::format("{:.10g}", *v) : ""));
      t.rows.push_back(std::move(row));
    }
  }
  return t;
}

void write_sweep_csv(std::ostream& out, const Study& study, const SweepResult& result) {
  const SweepTable t = sweep_table(study, result);
  // Headings of axes and text cells quoted (a zone name may hold a comma); numbers as they are.
  for (std::size_t k = 0; k < t.header.size(); ++k)
    out << (k ? "," : "") << (k > 0 && k <= study.axes.size() ? quoted(t.header[k]) : t.header[k]);
  out << "\n";
  for (const std::vector<SweepCell>& row : t.rows) {
    for (std::size_t k = 0; k < row.size(); ++k) {
      const bool quote = k == study.axes.size() + 1;  // the zone's name; the other text cells are plain words
      out << (k ? "," : "") << (quote ? quoted(row[k].text) : row[k].text);
    }
    out << "\n";
  }
}

std::vector<std::pair<std::string, std::string>> sweep_facts(const Study& study, const SweepResult& result) {
  std::size_t meeting = 0;
  for (const SweepCombination& c : result.combinations) meeting += c.meets_every_limit ? 1 : 0;
  std::vector<std::pair<std::string, std::string>> f = {
      {"strewn", library_version()},
      {"study", study.file},
      {"name", study.name},
      {"base_scenario", study.base.file},
      {"design", study.design == Study::Design::grid ? "grid" : fmt::format("latin_hypercube, seed {}", study.seed)},
      {"combinations", std::to_string(result.combinations.size())},
      {"meeting_every_limit", std::to_string(meeting)}};
  for (const SweepAxis& a : study.axes)
    f.push_back({"axis", fmt::format("{}: {} of {} '{}'", axis_heading(study, a), a.parameter, axis_subject_kind(a),
                                     axis_subject(a))});
  return f;
}

void write_sweep_summary(std::ostream& out, const Study& study, const SweepResult& result, double seconds) {
  fmt::print(out, "strewn {} sweep: {}\n", library_version(), study.name);
  fmt::print(out, "study: {}; base scenario: {}\n", study.file, study.base.file);
  const std::size_t n = result.combinations.size();
  if (study.design == Study::Design::grid)
    fmt::print(out, "design: every combination of {} axis value list{}: {} combination{}\n", study.axes.size(),
               study.axes.size() == 1 ? "" : "s", n, n == 1 ? "" : "s");
  else
    fmt::print(out, "design: Latin hypercube, {} samples, seed {}\n", n, study.seed);
  for (const SweepAxis& a : study.axes) {
    fmt::print(out, "  axis '{}': {} of {} '{}', ", axis_heading(study, a), a.parameter, axis_subject_kind(a), axis_subject(a));
    if (a.is_range) fmt::print(out, "from {:g} to {:g}\n", a.values.front(), a.values.back());
    else fmt::print(out, "{} value(s)\n", a.values.size());
  }
  std::size_t meeting = 0;
  for (const SweepCombination& c : result.combinations) meeting += c.meets_every_limit ? 1 : 0;
  fmt::print(out, "combinations that meet every limit (at the upper error bound, tolerance met): {} of {}\n", meeting, n);
  std::size_t listed = 0;
  for (std::size_t i = 0; i < n && listed < kListed; ++i) {
    const SweepCombination& c = result.combinations[i];
    if (!c.meets_every_limit) continue;
    std::string values;
    for (std::size_t a = 0; a < c.values.size(); ++a)
      values += fmt::format("{}{} = {:.6g}", a ? ", " : "", axis_heading(study, study.axes[a]), c.values[a]);
    fmt::print(out, "  #{}: {}\n", i + 1, values);
    ++listed;
  }
  if (meeting > listed) fmt::print(out, "  ... and {} more (the CSV has every row)\n", meeting - listed);
  fmt::print(out, "time: {:.2g} s\n", seconds);
  fmt::print(out,
             "Caution: these are model estimates from a statistical scatter model. They do not replace physical\n"
             "barriers, the venue's rules, local codes or a competent person's assessment.\n");
}

}  // namespace strewn::cli
