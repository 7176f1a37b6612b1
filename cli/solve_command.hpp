#ifndef STREWN_CLI_SOLVE_COMMAND_HPP
#define STREWN_CLI_SOLVE_COMMAND_HPP

// `strewn solve clearance|spread|aim FILE`: options and dispatch.

#include <CLI/CLI.hpp>
#include <iosfwd>
#include <string>
#include <vector>

#include "design.hpp"

namespace strewn::cli {

class SolveCommand {
 public:
  explicit SolveCommand(CLI::App& parent);
  bool chosen() const { return solve_->parsed(); }
  // Returns the exit status: 0 answered, 3 no answer exists in the window.
  int run(const ShapeRegistry& shapes, std::ostream& out) const;

 private:
  CLI::App* solve_;
  CLI::App* clearance_;
  CLI::App* spread_;
  CLI::App* aim_;
  std::string file_, format_ = "table", per_ = "year";
  std::vector<double> person_, direction_;
  ClearanceQuery clearance_query_;
  SpreadQuery spread_query_;
  AimQuery aim_query_;
  double min_target_ = 0.0;
};

}  // namespace strewn::cli

#endif
