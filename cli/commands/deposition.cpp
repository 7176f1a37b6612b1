#include <CLI/CLI.hpp>
#include <fmt/format.h>
#include <fmt/ostream.h>
#include <iosfwd>
#include <sstream>
#include <string>

#include "commands/command.hpp"
#include "commands/former_names.hpp"
#include "output/deposition_output.hpp"
#include "output/histogram_svg.hpp"
#include "output/output_file.hpp"
#include "output/svg_plan.hpp"
#include "run_cli.hpp"
#include "strewn/deposition.hpp"
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
  std::string file_, format_ = "table", svg_, histogram_;
};

DepositionCommand::DepositionCommand(CLI::App& parent) {
  app_ = parent.add_subcommand(
      "deposition", "Where the emitted material lands: depth per catch can, CU and DU, share per zone; for\n"
                    "sprinkler heads and layouts also precipitation rates and the run time for a target depth.\n"
                    "Example: strewn deposition shapes/sports_pitch_rotors.toml --svg pitch.svg --histogram cans.svg");
  app_->add_option("FILE", file_, "Scenario file with a [deposition] table (TOML)")->required();
  app_->add_option("--format", format_, "table, csv (one row per can) or json")
      ->check(CLI::IsMember({"table", "csv", "json"}));
  app_->add_option("--svg", svg_,
                   "Also write a plan (SVG): the depth field over the whole site with contours, each can's value, "
                   "the heads and their arcs, CU and DU");
  app_->add_option("--histogram", histogram_, "Also write a bar chart (SVG) of the cans' depths, with CU and DU");
}

int DepositionCommand::run(const CommandContext& context) const {
  std::ostream& out = context.out;
  const Site s = load_scenario(file_, context);
  check_outputs({svg_, histogram_}, s.input_files);
  const Deposition d = compute_deposition(s);
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
