#ifndef STREWN_CLI_FIT_COMMAND_HPP
#define STREWN_CLI_FIT_COMMAND_HPP

// `strewn fit`: options and dispatch.

#include <CLI/CLI.hpp>
#include <cstdint>
#include <iosfwd>
#include <string>
#include <vector>

namespace strewn::cli {

class FitCommand {
 public:
  explicit FitCommand(CLI::App& parent);
  bool chosen() const { return app_->parsed(); }
  int run(std::ostream& out) const;

 private:
  CLI::App* app_;
  std::string data_, format_ = "table", out_file_, plot_file_;
  std::vector<double> aim_;
  std::vector<std::uint64_t> counts_;
  double radius_ = 0.0, confidence_ = 0.95;
  std::uint64_t outside_ = 0;
  std::uint64_t seed_ = 20261202;
  bool design_ = false, mixture_ = false;
};

}  // namespace strewn::cli

#endif
