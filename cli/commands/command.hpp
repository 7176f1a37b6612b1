#ifndef STREWN_CLI_COMMAND_HPP
#define STREWN_CLI_COMMAND_HPP

// One subcommand of `strewn`: it declares its options on the parser, and when chosen, reads its
// inputs, calls the engine and hands the results to a renderer in cli/output/. A command holds
// no domain logic (the engine's site modules do: strewn/assess.hpp, design.hpp, ...).
// Every command is registered in the one table of commands.cpp.

#include <CLI/CLI.hpp>
#include <iosfwd>
#include <memory>
#include <vector>

#include "strewn/distribute.hpp"
#include "strewn/shape_registry.hpp"
#include "strewn/site.hpp"

namespace strewn::cli {

struct CommandContext {
  const ShapeRegistry& shapes;
  std::ostream& out;
  std::ostream& err;
  bool terminal = false;  // progress bars only on a terminal
  // Under mpirun: shares a command's items among the processes (cli/distribute/cluster.hpp);
  // nullptr when this process runs alone. Only the gathering process writes files and prints.
  const Distributor* distributor = nullptr;
  bool writes() const { return gathers_results(distributor); }
};

class Command {
 public:
  virtual ~Command() = default;
  virtual bool chosen() const = 0;
  // Returns the exit status (run_cli.hpp); bad input throws strewn::input_error.
  virtual int run(const CommandContext& context) const = 0;
  // True for a command that shares its work among the processes of an mpirun job (map, sweep);
  // any other command runs on rank 0 alone while the other ranks exit at once.
  virtual bool distributed() const { return false; }
};

// The scenario read with strewn::load_site, the loader's warnings (Site::warnings: likely
// mistakes and former spellings) printed on stderr as "strewn: warning: ..." lines, one each;
// the exit status is not changed by them.
Site load_scenario(const std::string& file, const CommandContext& context);

// The subcommands in the order `strewn --help` lists them, each registered on `app`.
std::vector<std::unique_ptr<Command>> make_commands(CLI::App& app);

// One factory per command file (commands/<name>.cpp).
std::unique_ptr<Command> make_assess_command(CLI::App& app);
std::unique_ptr<Command> make_validate_command(CLI::App& app);
std::unique_ptr<Command> make_shapes_command(CLI::App& app);
std::unique_ptr<Command> make_solve_command(CLI::App& app);
std::unique_ptr<Command> make_deposition_command(CLI::App& app);
std::unique_ptr<Command> make_fit_command(CLI::App& app);
std::unique_ptr<Command> make_map_command(CLI::App& app);
std::unique_ptr<Command> make_report_command(CLI::App& app);
std::unique_ptr<Command> make_sweep_command(CLI::App& app);

}  // namespace strewn::cli

#endif
