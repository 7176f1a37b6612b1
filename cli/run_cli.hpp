#ifndef STREWN_CLI_RUN_CLI_HPP
#define STREWN_CLI_RUN_CLI_HPP

#include <iosfwd>

#include "strewn/distribute.hpp"

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

/// The same as one process of an mpirun job (cli/distribute/cluster.hpp): every process parses
/// and checks the input alike (so bad input exits 2 on every rank), but only the gathering
/// process (rank 0) prints to `out` and `err`; a command that does not share its work runs on
/// rank 0 alone.
int run_cli(int argc, const char* const* argv, std::ostream& out, std::ostream& err,
            const Distributor* distributor);

}  // namespace strewn::cli

#endif
