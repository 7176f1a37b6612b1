#include <CLI/CLI.hpp>
#include <chrono>
#include <fmt/format.h>
#include <fmt/ostream.h>
#include <iosfwd>
#include <optional>
#include <sstream>
#include <string>
#include <vector>

#include "commands/checked_option.hpp"
#include "commands/command.hpp"
#include "commands/former_names.hpp"
#include "commands/request_option.hpp"
#include "output/gis_output.hpp"
#include "output/map_output.hpp"
#include "output/output_file.hpp"
#include "output/progress_bar.hpp"
#include "output/svg_plan.hpp"
#include "run_cli.hpp"
#include "strewn/assess.hpp"
#include "strewn/site_map.hpp"
#include "strewn/error.hpp"
#include "strewn/input_file.hpp"
#include "strewn/position_text.hpp"
#include "strewn/shape_registry.hpp"
#include "strewn/site_io.hpp"
#include "strewn/work.hpp"

namespace strewn::cli {

class MapCommand final : public Command {
 public:
  explicit MapCommand(CLI::App& parent);
  bool chosen() const override { return app_->parsed(); }
  int run(const CommandContext& context) const override;
  bool distributed() const override { return true; }

 private:
  CLI::App* app_;
  std::string file_, format_ = "table", svg_, csv_, geojson_, geotiff_, gpkg_;
  SiteMapRequest request_;
  std::string per_ = "session";
  FormerNames former_;
};
namespace {

Period period_of(const std::string& p) { return p == "event" ? Period::event : p == "year" ? Period::year : Period::session; }

}  // namespace

MapCommand::MapCommand(CLI::App& parent) {
  app_ = parent.add_subcommand(
      "map", "Risk map: for every point, the chance that an impact lands on a person standing there.\n"
             "Example: strewn map shapes/throwing_lane.toml --svg lane_map.svg --geojson lane_contours.geojson\n"
             "Example: strewn map shapes/town_park.toml --geotiff park_risk.tif --gpkg park_layers.gpkg\n"
             "Example (4 processes, the same files): mpirun -n 4 strewn map shapes/town_park.toml --geotiff park_risk.tif");
  app_->add_option("FILE", file_, "Scenario file (TOML)")->required();
  app_->add_option("--footprint", request_.footprint_kind, "Shape kind of the body footprint (default person)");
  app_->add_option("--footprint-params", request_.footprint_params,
                   "Its parameters as JSON, lengths in the scenario's unit, e.g. '{\"radius\": 0.3}' (a kind with a centre stands on it, default [0, 0]; other kinds on their bounding box's centre)");
  app_->add_option("--per", per_, "event, session (default) or year")->check(CLI::IsMember({"event", "session", "year"}));
  app_->add_option("--cells", request_.cells, "Cells along the longer side (default 200)")->transform(whole_number(2, 4000, "2 to 4000"));
  app_->add_option("--extent", request_.extent, "Area mapped, X0 Y0 X1 Y1 in the scenario's unit and coordinates (default: the zones and 3 sigma; a warning when it holds no zone and no mean impact point)")->expected(4);
  former_.add(app_, "--window", "--extent", request_.extent, "former name of --extent")->expected(4);
  app_->add_option("--threads", request_.threads, "Worker threads (default: all cores; under mpirun, 1 per process)")->transform(whole_number(1, 256, "1 to 256"));
  app_->add_flag("--force", request_.force, "Run even above the work ceiling (cells x components x footprint edges > 2e8)");
  app_->add_option("--format", format_, "table or json (the summary)")->check(CLI::IsMember({"table", "json"}));
  app_->add_option("--svg", svg_, "Write the plan (SVG): the risk field, the unsafe area at each limit, contours, zones coloured by verdict, barriers and their shadows, drops' release points and flight tracks, axes, legend");
  app_->add_option("--csv", csv_, "Write the grid (CSV: x, y, risk, bound)");
  app_->add_option("--geojson", geojson_, "Write the contours, the unsafe areas, barriers and their shadows, drops' release points and tracks (GeoJSON, RFC 7946)");
  app_->add_option("--geotiff", geotiff_,
                   "Write the map as a GeoTIFF: band 1 the risk, band 2 its bound, Float64, in the site's CRS");
  app_->add_option("--gpkg", gpkg_,
                   "Write a GeoPackage: zones with verdicts, contours, unsafe areas, sources' means and ellipses, barriers and shadows, drops' flights");
}

int MapCommand::run(const CommandContext& context) const {
  const ShapeRegistry& shapes = context.shapes;
  std::ostream& out = context.out;
  std::ostream& err = context.err;
  const bool terminal = context.terminal;
  former_.warn(err);
  const Site s = load_scenario(file_, context);
  check_outputs({svg_, csv_, geojson_, geotiff_, gpkg_}, s.input_files);  // before the map is computed
  // A progress bar on a terminal, once the map has taken more than a second.
  const auto start = std::chrono::steady_clock::now();
  SiteMapRequest request = request_;
  request.per = period_of(per_);
  // The extent and the footprint's lengths are in the scenario's unit, the engine's in metres.
  request.footprint_metres_per_unit = metres_per(s.units);
  for (double& v : request.extent) v = to_metres(v, s.units);
  // Under mpirun the rows go out in tiles to the ranks, one thread each unless --threads says
  // otherwise (the ranks are the parallelism).
  request.distributor = context.distributor;
  if (context.distributor != nullptr && request.threads == 0) request.threads = 1;
  SiteMap m;
  {
    ProgressBar bar(err, terminal, "map");
    try {
      m = make_site_map(s, shapes, request, bar.callback());
    } catch (const work_error& e) {
      // The engine states the estimate and the ceiling; the way out is in this command's options.
      throw input_error(e.summary() + "; use fewer --cells (or a smaller --extent), or pass --force to run it anyway");
    } catch (const request_error& e) {
      throw_for_option(e, {{"extent", "--extent"}, {"footprint_params", "--footprint-params"}, {"footprint_kind", "--footprint"}});
    }
  }
  if (!context.writes()) return kAllLimitsHold;  // rank 0 renders and writes the gathered map
  for (const Warning& w : m.warnings) fmt::print(err, "strewn: warning: --footprint-params: {}\n", w.message);
  if (m.extent_holds_nothing) {
    const Vec2 lo(request.extent[0], request.extent[1]), hi(request.extent[2], request.extent[3]);
    const BoundingBox site = site_extent(s);
    fmt::print(err, "strewn: warning: --extent: from {} to {} {} holds no zone and no source's mean impact point "
               "(the site lies from {} to {}): every cell is empty ground\n",
               position_text(lo, s.units), position_text(hi, s.units), symbol(s.units), position_text(site.min, s.units),
               position_text(site.max, s.units));
  }
  if (m.cells_too_coarse()) fmt::print(err, "strewn: warning: {} (--extent, --cells)\n", coarse_cells_warning(m));
  const double elapsed = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  std::ostringstream rendered;
  if (format_ == "json") write_map_summary_json(rendered, s, m, elapsed);
  else write_map_summary_table(rendered, s, m, elapsed);
  // The plan colours each zone by its verdict: one assessment (quick next to the map).
  std::optional<Assessment> verdicts;
  if (!svg_.empty()) verdicts = assess(s, false);
  const std::string svg = svg_.empty() ? "" : risk_map_svg(s, m, &*verdicts);
  const std::string csv = csv_.empty() ? "" : risk_map_csv(s, m);
  const std::string geojson = geojson_.empty() ? "" : contours_geojson(s, m);
  const std::string geotiff = geotiff_.empty() ? "" : risk_map_geotiff(s, m);
  const std::string gpkg = gpkg_.empty() ? "" : site_geopackage(s, assess(s), &m);
  std::vector<OutputFile> files;
  if (!svg_.empty()) files.push_back({svg_, svg});
  if (!csv_.empty()) files.push_back({csv_, csv});
  if (!geojson_.empty()) files.push_back({geojson_, geojson});
  if (!geotiff_.empty()) files.push_back({geotiff_, geotiff});
  if (!gpkg_.empty()) files.push_back({gpkg_, gpkg});
  write_outputs(files);  // all or none
  out << rendered.str();
  return kAllLimitsHold;
}

std::unique_ptr<Command> make_map_command(CLI::App& app) { return std::make_unique<MapCommand>(app); }

}  // namespace strewn::cli
