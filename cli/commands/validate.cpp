// `strewn validate FILE`: the scenario read and every zone's geometry built, nothing computed.
#include <fmt/format.h>
#include <fmt/ostream.h>

#include <string>

#include "commands/command.hpp"
#include "commands/former_names.hpp"
#include "run_cli.hpp"
#include "strewn/site_io.hpp"

namespace strewn::cli {
namespace {

class ValidateCommand final : public Command {
 public:
  explicit ValidateCommand(CLI::App& parent) {
    app_ = parent.add_subcommand("validate", "Check a scenario file and every zone's geometry without computing; values that look\n"
                                             "like slips (an angle_deg of 1.5708, a spread larger than the plan) are warnings on stderr.\n"
                                             "Example: strewn validate shapes/throwing_lane.toml");
    app_->add_option("FILE", file_, "Scenario file (TOML)")->required();
  }

  bool chosen() const override { return app_->parsed(); }

  int run(const CommandContext& c) const override {
    const Site s = load_scenario(file_, c);
    const auto count = [](std::size_t n, const char* word) { return fmt::format("{} {}{}", n, word, n == 1 ? "" : "s"); };
    fmt::print(c.out, "{}: valid ({}, {}{})\n", file_, count(s.sources.size(), "source"), count(s.zones.size(), "zone"),
               s.barriers.empty() ? "" : ", " + count(s.barriers.size(), "barrier"));
    return kAllLimitsHold;
  }

 private:
  CLI::App* app_;
  std::string file_;
};

}  // namespace

std::unique_ptr<Command> make_validate_command(CLI::App& app) { return std::make_unique<ValidateCommand>(app); }

}  // namespace strewn::cli
