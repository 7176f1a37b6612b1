#ifndef STREWN_TESTS_CLI_RUN_HPP
#define STREWN_TESTS_CLI_RUN_HPP

// The command line run in-process, as the CLI tests use it: arguments after "strewn", its exit
// status and what it wrote to stdout and stderr.

#include <sstream>
#include <string>
#include <vector>

#include "run_cli.hpp"

namespace strewn::test {

struct Result {
  int status;
  std::string out, err;
};

inline Result run(std::vector<std::string> args) {
  args.insert(args.begin(), "strewn");
  std::vector<const char*> argv;
  for (const auto& a : args) argv.push_back(a.c_str());
  std::ostringstream out, err;
  const int status = strewn::cli::run_cli(static_cast<int>(argv.size()), argv.data(), out, err);
  return {status, out.str(), err.str()};
}

}  // namespace strewn::test

#endif
