#include <CLI/CLI.hpp>
#include <fmt/format.h>
#include <fmt/ostream.h>
#include <iosfwd>
#include <sstream>
#include <string>

#include "commands/checked_option.hpp"
#include "commands/command.hpp"
#include "commands/former_names.hpp"
#include "output/catch_can_output.hpp"
#include "output/deposition_output.hpp"
#include "output/histogram_svg.hpp"
#include "output/output_file.hpp"
#include "output/svg_plan.hpp"
#include "run_cli.hpp"
#include "strewn/catch_can_test.hpp"
#include "strewn/deposition.hpp"
#include "strewn/error.hpp"
#include "strewn/site_io.hpp"
#include "strewn/shape_registry.hpp"
#include "strewn/version.hpp"

namespace strewn::cli {

class DepositionCommand final : public Command {
 public:
  explicit DepositionCommand(CLI::App& parent);
  bool chosen() const override { return app_->parsed(); }
  int run(const CommandContext& context) const override;

 private:
  CLI::App* app_;
  std::string file_, format_ = "table", svg_, histogram_, measured_, difference_svg_;
  double sc_share_percent_ = 100.0 * kSchedulingShare;
};

DepositionCommand::DepositionCommand(CLI::App& parent) {
  app_ = parent.add_subcommand(
      "deposition", "Where the emitted material lands: depth per catch can, CU, DU and SC, share per zone; for\n"
                    "sprinkler heads and layouts also precipitation rates and the run time for a target depth;\n"
                    "with --measured, the model against a catch-can test can by can.\n"
                    "Example: strewn deposition shapes/sports_pitch_rotors.toml --svg pitch.svg --histogram cans.svg\n"
                    "Example: strewn deposition shapes/small_lawn_heads.toml --measured shapes/field_data/lawn_cans.csv "
                    "--difference-svg diff.svg");
  app_->add_option("FILE", file_, "Scenario file with a [deposition] table (TOML)")->required();
  app_->add_option("--format", format_, "table, csv (one row per can) or json")
      ->check(CLI::IsMember({"table", "csv", "json"}));
  app_->add_option("--svg", svg_,
                   "Also write a plan (SVG): the depth field over the whole site with contours, each can's value, "
                   "the heads and their arcs, CU and DU");
  app_->add_option("--histogram", histogram_, "Also write a bar chart (SVG) of the cans' depths, with CU and DU");
  app_->add_option("--sc-share", sc_share_percent_,
                   "Share of the area, in percent, whose driest window the scheduling coefficient takes\n"
                   "(default 5; 0.01 to 100)")
      ->check(number_in(0.01, 100.0, "0.01 to 100"));
  app_->add_option("--measured", measured_,
                   "Compare with a catch-can test (CSV): '# duration_min = 45' (or duration_h) and\n"
                   "'# opening_diameter_mm = 100' (or opening_area_cm2) lines, then a header row,\n"
                   "row,col (grid indices from 1) or x,y, and depth_mm or volume_ml; prints model - measured\n"
                   "per can, bias, RMS, and CU, DU, SC of both (docs/deposition.md)");
  app_->add_option("--difference-svg", difference_svg_,
                   "With --measured: write the difference map (SVG), model - measured per can");
}

int DepositionCommand::run(const CommandContext& context) const {
  std::ostream& out = context.out;
  const Site s = load_scenario(file_, context);
  std::vector<std::string> inputs = s.input_files;
  if (!measured_.empty()) inputs.push_back(measured_);
  check_outputs({svg_, histogram_, difference_svg_}, inputs);
  if (!difference_svg_.empty() && measured_.empty()) throw input_error("deposition: --difference-svg needs --measured CANS.csv");
  if (!measured_.empty()) {
    const CatchCanComparison c = compare_catch_cans(s, read_catch_can_csv(measured_, s), sc_share_percent_ / 100.0);
    std::ostringstream rendered;
    if (format_ == "json") write_catch_can_json(rendered, s, c);
    else if (format_ == "csv") write_catch_can_csv(rendered, s, c);
    else write_catch_can_table(rendered, s, c);
    std::vector<OutputFile> files;
    if (!svg_.empty() || !histogram_.empty()) {  // the scenario's own run
      const Deposition model = compute_deposition(s, sc_share_percent_ / 100.0);
      if (!svg_.empty()) files.push_back({svg_, deposition_svg(s, model)});
      if (!histogram_.empty()) files.push_back({histogram_, can_histogram_svg(s, model)});
    }
    if (!difference_svg_.empty()) files.push_back({difference_svg_, catch_can_difference_svg(s, c)});
    write_outputs(files);  // all or none
    out << rendered.str();
    return kAllLimitsHold;
  }
  const Deposition d = compute_deposition(s, sc_share_percent_ / 100.0);
  std::ostringstream rendered;
  if (format_ == "json") write_deposition_json(rendered, s, d);
  else if (format_ == "csv") write_deposition_csv(rendered, s, d);
  else write_deposition_table(rendered, s, d);
  std::vector<OutputFile> files;
  if (!svg_.empty()) files.push_back({svg_, deposition_svg(s, d)});
  if (!histogram_.empty()) files.push_back({histogram_, can_histogram_svg(s, d)});
  write_outputs(files);
  out << rendered.str();
  return kAllLimitsHold;
}

std::unique_ptr<Command> make_deposition_command(CLI::App& app) { return std::make_unique<DepositionCommand>(app); }

}  // namespace strewn::cli
