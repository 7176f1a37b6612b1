#ifndef STREWN_CLI_RUN_CLI_HPP
#define STREWN_CLI_RUN_CLI_HPP

#include <iosfwd>

namespace strewn::cli {

/// Exit statuses scripts can rely on.
enum ExitStatus : int {
  kAllLimitsHold = 0,
  kInternalError = 1,
  kBadInput = 2,
  kLimitExceeded = 3,
};

/// Runs the strewn command line; returns the exit status.
int run_cli(int argc, const char* const* argv, std::ostream& out, std::ostream& err);

}  // namespace strewn::cli

#endif
