#include <CLI/CLI.hpp>
#include <fmt/format.h>
#include <fmt/ostream.h>
#include <iosfwd>
#include <sstream>
#include <string>

#include "commands/command.hpp"
#include "commands/former_names.hpp"
#include "output/deposition_output.hpp"
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
  std::string file_, format_ = "table", svg_;
};

DepositionCommand::DepositionCommand(CLI::App& parent) {
  app_ = parent.add_subcommand(
      "deposition", "Where the emitted material lands: depth per catch can, CU and DU, share per zone.\n"
                    "Example: strewn deposition shapes/small_lawn_heads.toml --svg lawn.svg");
  app_->add_option("FILE", file_, "Scenario file with a [deposition] table (TOML)")->required();
  app_->add_option("--format", format_, "table, csv (one row per can) or json")
      ->check(CLI::IsMember({"table", "csv", "json"}));
  app_->add_option("--svg", svg_, "Also write a plan (SVG): the depth field over the whole site, each can's value, CU and DU");
}

int DepositionCommand::run(const CommandContext& context) const {
  std::ostream& out = context.out;
  const Site s = load_scenario(file_, context);
  check_outputs({svg_}, s.input_files);
  const Deposition d = compute_deposition(s);
  std::ostringstream rendered;
  if (format_ == "json") write_deposition_json(rendered, s, d);
  else if (format_ == "csv") write_deposition_csv(rendered, s, d);
  else write_deposition_table(rendered, s, d);
  if (!svg_.empty()) write_file_atomically(svg_, deposition_svg(s, d));
  out << rendered.str();
  return kAllLimitsHold;
}

std::unique_ptr<Command> make_deposition_command(CLI::App& app) { return std::make_unique<DepositionCommand>(app); }

}  // namespace strewn::cli
