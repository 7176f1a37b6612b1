#ifndef STREWN_CLI_DEPOSITION_COMMAND_HPP
#define STREWN_CLI_DEPOSITION_COMMAND_HPP

// `strewn deposition FILE`: options, output and dispatch.

#include <CLI/CLI.hpp>
#include <iosfwd>
#include <string>

#include "strewn/shape_registry.hpp"

namespace strewn::cli {

class DepositionCommand {
 public:
  explicit DepositionCommand(CLI::App& parent);
  bool chosen() const { return app_->parsed(); }
  int run(const ShapeRegistry& shapes, std::ostream& out) const;

 private:
  CLI::App* app_;
  std::string file_, format_ = "table", svg_;
};

}  // namespace strewn::cli

#endif
