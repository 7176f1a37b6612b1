// The one table of subcommands: a new command is a file in commands/ and a line here.
#include "command.hpp"

#include <fmt/format.h>
#include <fmt/ostream.h>

#include "output/progress_bar.hpp"
#include "strewn/site_io.hpp"

namespace strewn::cli {

Site load_scenario(const std::string& file, const CommandContext& context) {
  // Reading may be long work of its own (a drop from a great height: minutes of falls), told
  // and shown like a command's (by the process that prints, under mpirun).
  ProgressBar bar(context.err, context.terminal && context.writes(), "reading " + file);
  const LoadProgressScope observed(context.writes() ? print_estimate(context.err, 8) : EstimateFn{}, bar.callback());
  Site s = load_site(file, context.shapes);
  for (const Warning& w : s.warnings) fmt::print(context.err, "strewn: warning: {}\n", w.message);
  return s;
}

std::vector<std::unique_ptr<Command>> make_commands(CLI::App& app) {
  using Factory = std::unique_ptr<Command> (*)(CLI::App&);
  static constexpr Factory kTable[] = {
      make_assess_command,      // strewn assess FILE
      make_validate_command,    // strewn validate FILE
      make_shapes_command,      // strewn shapes
      make_solve_command,       // strewn solve clearance|spread|aim FILE
      make_deposition_command,  // strewn deposition FILE
      make_fit_command,         // strewn fit DATA
      make_map_command,         // strewn map FILE
      make_report_command,      // strewn report FILE --out PAGE
      make_sweep_command,       // strewn sweep STUDY
  };
  std::vector<std::unique_ptr<Command>> commands;
  for (const Factory make : kTable) commands.push_back(make(app));
  return commands;
}

}  // namespace strewn::cli
