#include "map_command.hpp"

#include <fmt/format.h>
#include <fmt/ostream.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <nlohmann/json.hpp>
#include <sstream>

#include "checked_option.hpp"
#include "input_file.hpp"
#include "output_file.hpp"
#include "progress_bar.hpp"
#include "report.hpp"
#include "run_cli.hpp"
#include "scenario.hpp"
#include "strewn/error.hpp"
#include "strewn/version.hpp"
#include "svg_plan.hpp"

namespace strewn::cli {
namespace {

MapPer per_of(const std::string& p) { return p == "event" ? MapPer::event : p == "year" ? MapPer::year : MapPer::session; }

// How the sources combine in a cell: the same definitions as the limits of an assessment.
std::string combined_text(const std::string& per) {
  return per == "event" ? "largest single source (as per-event limits are judged)" : "at least one impact from any source";
}

LimitPer limit_per_of(MapPer p) { return p == MapPer::event ? LimitPer::event : p == MapPer::year ? LimitPer::year : LimitPer::session; }

GridSpec grid_for(const Scenario& s, const MapRequest& r) {
  BoundingBox box;
  if (r.window.size() == 4) {
    for (double v : r.window)
      if (!(std::fabs(v) <= 1e12)) throw input_error("--window coordinates must be finite numbers within +-1e12 m");
    box = {Vec2(r.window[0], r.window[1]), Vec2(r.window[2], r.window[3])};
    if (!(box.max.x() > box.min.x() && box.max.y() > box.min.y())) throw input_error("--window must be X0 Y0 X1 Y1 with X1 > X0 and Y1 > Y0");
  } else {
    // The zones and three standard deviations around every component's mean, plus 5%.
    box = plan_extent(s);
    for (const Source& src : s.sources)
      for (const WeightedGaussian& c : src.model.components()) {
        const double reach = 3.0 * c.gaussian.axes().sigma_major;
        box.min = box.min.cwiseMin(c.gaussian.mean() - Vec2(reach, reach));
        box.max = box.max.cwiseMax(c.gaussian.mean() + Vec2(reach, reach));
      }
    const Vec2 pad = 0.05 * (box.max - box.min);
    box = {box.min - pad, box.max + pad};
  }
  const Vec2 size = box.max - box.min;
  GridSpec g;
  g.spacing = std::max(size.x(), size.y()) / r.cells;
  g.columns = std::max(2, static_cast<int>(std::ceil(size.x() / g.spacing)));
  g.rows = std::max(2, static_cast<int>(std::ceil(size.y() / g.spacing)));
  g.origin = box.min + Vec2(g.spacing / 2, g.spacing / 2);
  return g;
}

std::string level_text(double v) { return fmt::format("{:.3g}", v); }

}  // namespace

MapResult make_risk_map(const Scenario& s, const ShapeRegistry& shapes, const MapRequest& r,
                        const ProgressFn& progress) {
  check_json_nesting(r.footprint_params, "--footprint-params");
  nlohmann::json params = nlohmann::json::parse(r.footprint_params, nullptr, false);
  if (params.is_discarded() || !params.is_object()) throw input_error("--footprint-params must be a JSON object");
  // The footprint is built once and translated to every cell (compute_risk_map). A kind with a
  // `centre` parameter stands on that centre ([0, 0] unless given: a given centre offsets the
  // footprint from the cell); any other kind (polygon, doorway, composite) stands on the centre of
  // its bounding box, whatever coordinates it was drawn in.
  const ShapeKindInfo* kind = shapes.find(r.footprint_kind);
  bool has_centre = false;
  if (kind != nullptr) {
    const nlohmann::json d = nlohmann::json::parse(kind->params_json, nullptr, false);
    if (!d.is_discarded() && d.contains("params") && d["params"].is_array())
      for (const auto& p : d["params"]) has_centre = has_centre || (p.is_object() && p.value("name", "") == "centre");
  }
  if (has_centre && !params.contains("centre")) params["centre"] = {0.0, 0.0};
  Region built;
  try {
    built = shapes.build(r.footprint_kind, params.dump());
  } catch (const input_error& e) {
    throw input_error(std::string("--footprint: ") + e.what());
  }
  const Region footprint = has_centre ? built : footprint_about(built, footprint_reference(built));
  std::vector<MapSource> sources;
  for (const Source& src : s.sources) sources.push_back({src.model, src.events_per_session, src.sessions_per_year});
  const GridSpec grid = grid_for(s, r);
  check_work(risk_map_work(sources, footprint, grid), kMapWorkCeiling, r.force,
             "use fewer --cells (or a smaller --window), or pass --force to run it anyway");
  MapResult m;
  m.per = r.per;
  m.footprint = r.footprint_kind + " " + params.dump();
  RiskMapOptions o;
  o.integrate = s.options;
  o.threads = r.threads;
  o.progress = progress;
  try {
    m.map = compute_risk_map(sources, footprint, grid, per_of(r.per), o);
  } catch (const input_error& e) {
    throw input_error(s.file + ": map with footprint " + m.footprint + ": " + e.what());
  }
  const double top = *std::max_element(m.map.value.begin(), m.map.value.end());
  // Contours: every keep-out limit stated per the map's period, and the decades 1e-2 .. 1e-8.
  std::vector<std::pair<double, std::vector<std::string>>> limits;  // zones sharing a limit share a line
  for (const Zone& z : s.zones) {
    if (!z.limit || z.limit_per != limit_per_of(per_of(r.per)) || !(*z.limit < top)) continue;
    auto same = std::find_if(limits.begin(), limits.end(), [&](const auto& l) { return l.first == *z.limit; });
    if (same == limits.end()) limits.push_back({*z.limit, {z.name}});
    else same->second.push_back(z.name);
  }
  for (const auto& [level, names] : limits)
    m.contours.push_back({contour(m.map, level), "limit of '" + fmt::format("{}", fmt::join(names, "', '")) + "' (" + level_text(level) + ")"});
  const double bottom = *std::min_element(m.map.value.begin(), m.map.value.end());
  for (int d = -2; d >= -8; --d) {
    const double level = std::pow(10.0, d);
    const bool is_limit = std::any_of(m.contours.begin(), m.contours.end(), [&](const LabelledContours& c) { return std::fabs(c.set.level - level) <= 1e-12 * level; });
    if (level < top && level > bottom && !is_limit) m.contours.push_back({contour(m.map, level), level_text(level)});
  }
  return m;
}

MapCommand::MapCommand(CLI::App& parent) {
  app_ = parent.add_subcommand(
      "map", "Risk map: for every point, the chance that an impact lands on a person standing there.\n"
             "Example: strewn map shapes/throwing_lane.toml --svg lane_map.svg --geojson lane_contours.geojson");
  app_->add_option("FILE", file_, "Scenario file (TOML)")->required();
  app_->add_option("--footprint", request_.footprint_kind, "Shape kind of the body footprint (default person)");
  app_->add_option("--footprint-params", request_.footprint_params,
                   "Its parameters as JSON, e.g. '{\"radius\": 0.3}' (a kind with a centre stands on it, default [0, 0]; other kinds on their bounding box's centre)");
  app_->add_option("--per", request_.per, "event, session (default) or year")->check(CLI::IsMember({"event", "session", "year"}));
  app_->add_option("--cells", request_.cells, "Cells along the longer side (default 200)")->transform(whole_number(2, 4000, "2 to 4000"));
  app_->add_option("--window", request_.window, "Map window X0 Y0 X1 Y1 in m (default: the zones and 3 sigma)")->expected(4);
  app_->add_option("--threads", request_.threads, "Worker threads (default: all cores)")->transform(whole_number(1, 256, "1 to 256"));
  app_->add_flag("--force", request_.force, "Run even above the work ceiling (cells x components x footprint edges > 2e8)");
  app_->add_option("--format", format_, "table or json (the summary)")->check(CLI::IsMember({"table", "json"}));
  app_->add_option("--svg", svg_, "Write the plan with the risk field and contours (SVG)");
  app_->add_option("--csv", csv_, "Write the grid (CSV: x, y, risk, bound)");
  app_->add_option("--geojson", geojson_, "Write the contours (GeoJSON, RFC 7946)");
}

int MapCommand::run(const ShapeRegistry& shapes, std::ostream& out, std::ostream& err, bool terminal) const {
  const Scenario s = load_scenario(file_, shapes);
  check_outputs({svg_, csv_, geojson_}, s.input_files);  // before the map is computed
  // A progress bar on a terminal, once the map has taken more than a second.
  const auto start = std::chrono::steady_clock::now();
  MapResult m;
  {
    ProgressBar bar(err, terminal, "map");
    m = make_risk_map(s, shapes, request_, bar.callback());
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
                        {"footprint", m.footprint}, {"per", m.per}, {"sources_combined", combined_text(m.per)},
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
    fmt::print(rendered, "footprint: {}; risk per {}, {}\n", m.footprint, m.per, combined_text(m.per));
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

}  // namespace strewn::cli
