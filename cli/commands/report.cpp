// `strewn report FILE --out report.html`: assess, the uncertainty where a source came from a
// fit, a map, and the page (output/html_report.cpp) written atomically.
#include <fmt/format.h>
#include <fmt/ostream.h>

#include <optional>
#include <ostream>

#include "commands/checked_option.hpp"
#include "commands/command.hpp"
#include "commands/former_names.hpp"
#include "output/html_report.hpp"
#include "output/output_file.hpp"
#include "output/progress_bar.hpp"
#include "run_cli.hpp"
#include "strewn/assess.hpp"
#include "strewn/site_io.hpp"
#include "strewn/site_map.hpp"
#include "strewn/uncertainty.hpp"

namespace strewn::cli {
namespace {

class ReportCommand final : public Command {
 public:
  explicit ReportCommand(CLI::App& parent);
  bool chosen() const override { return app_->parsed(); }
  int run(const CommandContext& context) const override;

 private:
  CLI::App* app_;
  std::string file_, out_file_;
  int cells_ = 120;
  int replicates_ = 1000;  // as `assess --uncertainty`: the same file gives the same intervals
  bool force_ = false;
};

ReportCommand::ReportCommand(CLI::App& parent) {
  app_ = parent.add_subcommand("report", "One self-contained HTML page: scenario, assessment, map, methods, cautions.\n"
                                         "Example: strewn report shapes/throwing_lane.toml --out lane_report.html");
  app_->add_option("FILE", file_, "Scenario file (TOML)")->required();
  app_->add_option("--out", out_file_, "The HTML file to write")->required();
  app_->add_option("--cells", cells_, "Map cells along the longer side (default 120)")->transform(whole_number(2, 2000, "2 to 2000"));
  app_->add_option("--replicates", replicates_,
                   "Replicates for the intervals of fitted sources (default 1000, as assess --uncertainty)")
      ->transform(whole_number(20, 100000, "20 to 100000"));
  app_->add_flag("--force", force_, "Run even above the work ceilings (see strewn map --help)");
}

int ReportCommand::run(const CommandContext& context) const {
  const ShapeRegistry& shapes = context.shapes;
  std::ostream& out = context.out;
  std::ostream& err = context.err;
  const bool terminal = context.terminal;
  const Site s = load_scenario(file_, context);
  check_outputs({out_file_}, s.input_files);  // `report site.toml --out site.toml` destroyed the scenario
  const Assessment a = assess(s, false);
  std::optional<Uncertainty> u;
  for (const Source& src : s.sources)
    if (src.fit && !u) {
      ProgressBar bar(err, terminal, "bootstrap");
      u = assess_uncertainty(s, replicates_, 0.95, s.options.seed, bar.callback());
    }
  SiteMapRequest r;
  r.cells = cells_;
  r.force = force_;
  SiteMap map;
  {
    ProgressBar bar(err, terminal, "map");
    map = make_site_map(s, shapes, r, bar.callback());
  }
  write_file_atomically(out_file_, html_report(s, a, map, u ? &*u : nullptr));
  fmt::print(out, "wrote {}\n", out_file_);
  return a.all_limits_hold ? kAllLimitsHold : kLimitExceeded;
}

}  // namespace

std::unique_ptr<Command> make_report_command(CLI::App& app) { return std::make_unique<ReportCommand>(app); }

}  // namespace strewn::cli
