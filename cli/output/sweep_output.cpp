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

std::string axis_heading(const Study& study, const SweepAxis& a) {
  return a.is_length() ? a.label + " (" + symbol(study.base.units) + ")"
         : a.parameter == "rotation_deg" ? a.label + " (deg)" : a.label;
}

std::string verdict(const SweepZoneRow& z) {
  if (!z.limit_holds) return "no limit";
  if (z.limit_undecided) return "not shown to hold";
  return *z.limit_holds ? "holds" : "exceeded";
}

}  // namespace

void write_sweep_csv(std::ostream& out, const Study& study, const SweepResult& result) {
  out << "combination";
  for (const SweepAxis& a : study.axes) out << ',' << quoted(axis_heading(study, a));
  out << ",zone,role,p_per_event,p_per_event_bound,p_per_session,p_per_session_bound,p_per_year,p_per_year_bound,"
         "limit,limit_per,verdict,accuracy,meets_every_limit\n";
  for (std::size_t i = 0; i < result.combinations.size(); ++i) {
    const SweepCombination& c = result.combinations[i];
    std::string head = std::to_string(i + 1);
    for (double v : c.values) head += fmt::format(",{:.10g}", v);
    for (const SweepZoneRow& z : c.zones)
      fmt::print(out, "{},{},{},{:.17g},{:.3g},{:.17g},{:.3g},{:.17g},{:.3g},{},{},{},{},{}\n", head, quoted(z.zone),
                 to_string(z.role), z.per_event, z.per_event_err, z.per_session, z.per_session_err, z.per_year,
                 z.per_year_err, z.limit ? fmt::format("{:.6g}", *z.limit) : "", z.limit ? to_string(z.limit_per) : "",
                 verdict(z), z.status == Status::converged ? "met" : std::string("not met: ") + to_string(z.status),
                 c.meets_every_limit ? "yes" : "no");
  }
}

void write_sweep_summary(std::ostream& out, const Study& study, const SweepResult& result, double seconds) {
  fmt::print(out, "strewn {} sweep: {}\n", library_version(), study.name);
  fmt::print(out, "study: {}; base scenario: {}\n", study.file, study.base.file);
  const std::size_t n = result.combinations.size();
  if (study.design == Study::Design::grid)
    fmt::print(out, "design: every combination of {} axis value lists: {} combinations\n", study.axes.size(), n);
  else
    fmt::print(out, "design: Latin hypercube, {} samples, seed {}\n", n, study.seed);
  for (const SweepAxis& a : study.axes) {
    fmt::print(out, "  axis '{}': {} of {} '{}', ", axis_heading(study, a), a.parameter, a.zone.empty() ? "source" : "zone",
               a.zone.empty() ? a.source : a.zone);
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
  fmt::print(out, "time: {:.1f} s\n", seconds);
  fmt::print(out,
             "Caution: these are model estimates from a statistical scatter model. They do not replace physical\n"
             "barriers, the venue's rules, local codes or a competent person's assessment.\n");
}

}  // namespace strewn::cli
