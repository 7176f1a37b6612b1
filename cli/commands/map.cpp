#include <CLI/CLI.hpp>
#include <algorithm>
#include <chrono>
#include <cmath>
#include <fmt/format.h>
#include <fmt/ostream.h>
#include <iosfwd>
#include <nlohmann/json.hpp>
#include <sstream>
#include <string>
#include <vector>

#include "commands/checked_option.hpp"
#include "commands/command.hpp"
#include "output/assess_output.hpp"
#include "output/map_output.hpp"
#include "output/output_file.hpp"
#include "output/progress_bar.hpp"
#include "output/svg_plan.hpp"
#include "run_cli.hpp"
#include "strewn/site_map.hpp"
#include "strewn/error.hpp"
#include "strewn/input_file.hpp"
#include "strewn/shape_registry.hpp"
#include "strewn/site_io.hpp"
#include "strewn/version.hpp"
#include "strewn/work.hpp"

namespace strewn::cli {

class MapCommand final : public Command {
 public:
  explicit MapCommand(CLI::App& parent);
  bool chosen() const override { return app_->parsed(); }
  int run(const CommandContext& context) const override;

 private:
  CLI::App* app_;
  std::string file_, format_ = "table", svg_, csv_, geojson_;
  SiteMapRequest request_;
  std::string per_ = "session";
};
namespace {

// How the sources combine in a cell: the same definitions as the limits of an assessment.
std::string combined_text(Period per) {
  return per == Period::event ? "largest single source (as per-event limits are judged)" : "at least one impact from any source";
}

Period period_of(const std::string& p) { return p == "event" ? Period::event : p == "year" ? Period::year : Period::session; }

}  // namespace

MapCommand::MapCommand(CLI::App& parent) {
  app_ = parent.add_subcommand(
      "map", "Risk map: for every point, the chance that an impact lands on a person standing there.\n"
             "Example: strewn map shapes/throwing_lane.toml --svg lane_map.svg --geojson lane_contours.geojson");
  app_->add_option("FILE", file_, "Scenario file (TOML)")->required();
  app_->add_option("--footprint", request_.footprint_kind, "Shape kind of the body footprint (default person)");
  app_->add_option("--footprint-params", request_.footprint_params,
                   "Its parameters as JSON, e.g. '{\"radius\": 0.3}' (a kind with a centre stands on it, default [0, 0]; other kinds on their bounding box's centre)");
  app_->add_option("--per", per_, "event, session (default) or year")->check(CLI::IsMember({"event", "session", "year"}));
  app_->add_option("--cells", request_.cells, "Cells along the longer side (default 200)")->transform(whole_number(2, 4000, "2 to 4000"));
  app_->add_option("--window", request_.window, "Map window X0 Y0 X1 Y1 in m (default: the zones and 3 sigma)")->expected(4);
  app_->add_option("--threads", request_.threads, "Worker threads (default: all cores)")->transform(whole_number(1, 256, "1 to 256"));
  app_->add_flag("--force", request_.force, "Run even above the work ceiling (cells x components x footprint edges > 2e8)");
  app_->add_option("--format", format_, "table or json (the summary)")->check(CLI::IsMember({"table", "json"}));
  app_->add_option("--svg", svg_, "Write the plan with the risk field and contours (SVG)");
  app_->add_option("--csv", csv_, "Write the grid (CSV: x, y, risk, bound)");
  app_->add_option("--geojson", geojson_, "Write the contours (GeoJSON, RFC 7946)");
}

int MapCommand::run(const CommandContext& context) const {
  const ShapeRegistry& shapes = context.shapes;
  std::ostream& out = context.out;
  std::ostream& err = context.err;
  const bool terminal = context.terminal;
  const Site s = load_site(file_, shapes);
  check_outputs({svg_, csv_, geojson_}, s.input_files);  // before the map is computed
  // A progress bar on a terminal, once the map has taken more than a second.
  const auto start = std::chrono::steady_clock::now();
  SiteMapRequest request = request_;
  request.per = period_of(per_);
  SiteMap m;
  {
    ProgressBar bar(err, terminal, "map");
    m = make_site_map(s, shapes, request, bar.callback());
  }
  const double elapsed = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  const GridSpec& g = m.map.grid;
  std::size_t best = 0;
  double worst_rel = 0.0;
  for (std::size_t k = 0; k < m.map.value.size(); ++k) {
    if (m.map.value[k] > m.map.value[best]) best = k;
    if (m.map.value[k] > 0) worst_rel = std::max(worst_rel, m.map.abs_err[k] / m.map.value[k]);
  }
  const Vec2 at = g.centre(static_cast<int>(best % g.columns), static_cast<int>(best / g.columns));
  std::ostringstream rendered;
  if (format_ == "json") {
    nlohmann::json j = {{"strewn_version", STREWN_VERSION_STRING}, {"site", s.site_name}, {"file", s.file},
                        {"footprint", m.footprint}, {"per", to_string(m.per)}, {"sources_combined", combined_text(m.per)},
                        {"grid", {{"origin", {g.origin.x(), g.origin.y()}}, {"spacing_m", g.spacing}, {"columns", g.columns}, {"rows", g.rows}}},
                        {"max_risk", m.map.value[best]}, {"max_at", {at.x(), at.y()}},
                        {"worst_relative_bound", worst_rel}, {"converged", m.map.converged}, {"seconds", elapsed},
                        {"caution", kCaution}};
    for (const LabelledContours& c : m.contours)
      j["contours"].push_back({{"level", c.set.level}, {"label", c.label}, {"lines", c.set.lines.size()},
                               {"log10_accuracy", c.set.log10_error}});
    rendered << j.dump(2) << "\n";
  } else {
    fmt::print(rendered, "strewn {} map: {}\nscenario: {}\n", STREWN_VERSION_STRING, s.site_name, s.file);
    fmt::print(rendered, "footprint: {}; risk per {}, {}\n", m.footprint, to_string(m.per), combined_text(m.per));
    fmt::print(rendered, "grid: {} x {} cells of {:.3g} m from ({:.3g}, {:.3g}) m; {:.1f} s\n", g.columns, g.rows, g.spacing,
               g.origin.x(), g.origin.y(), elapsed);
    fmt::print(rendered, "largest risk {:.3g} at ({:.3g}, {:.3g}) m; every cell within its bound, worst {:.1g} relative\n",
               m.map.value[best], at.x(), at.y(), worst_rel);
    fmt::print(rendered, "\ncontours (marching squares; the field on a line is within the factor shown):\n");
    for (const LabelledContours& c : m.contours)
      fmt::print(rendered, "  {:<40.40} {:>3} line(s), within x{:.4f}\n", c.label, c.set.lines.size(), std::pow(10.0, c.set.log10_error));
    fmt::print(rendered, "\n{}\n", kCaution);
  }
  const std::string svg = svg_.empty() ? "" : risk_map_svg(s, m);
  const std::string csv = csv_.empty() ? "" : risk_map_csv(m);
  const std::string geojson = geojson_.empty() ? "" : contours_geojson(s, m);
  std::vector<OutputFile> files;
  if (!svg_.empty()) files.push_back({svg_, svg});
  if (!csv_.empty()) files.push_back({csv_, csv});
  if (!geojson_.empty()) files.push_back({geojson_, geojson});
  write_outputs(files);  // all or none
  out << rendered.str();
  return kAllLimitsHold;
}

std::unique_ptr<Command> make_map_command(CLI::App& app) { return std::make_unique<MapCommand>(app); }

}  // namespace strewn::cli
