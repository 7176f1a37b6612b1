#ifndef STREWN_CLI_FORMER_NAMES_HPP
#define STREWN_CLI_FORMER_NAMES_HPP

// Renamed options keep their former spelling for one release: hidden from --help, setting the
// same value, and a warning on stderr when used (the exit status does not change). Giving both
// spellings is an error: which one was meant cannot be told. The scenario file's former names are
// read by the engine, which lists them in Site::warnings; load_scenario (command.hpp) prints them.
#include <CLI/CLI.hpp>
#include <iosfwd>
#include <string>
#include <vector>

#include "commands/command.hpp"
#include "strewn/site.hpp"

namespace strewn::cli {

class FormerNames {
 public:
  // Registers `former` (e.g. "--window") on `app` as a hidden alias of the option `now`
  // (e.g. "--extent") that sets `value`; returns it for the same checks as `now`'s.
  template <typename T>
  CLI::Option* add(CLI::App* app, const std::string& former, const std::string& now, T& value,
                   const std::string& description) {
    entries_.push_back({app, former, now});
    return app->add_option(former, value, description)->group("");
  }
  template <typename T>
  CLI::Option* add_flag(CLI::App* app, const std::string& former, const std::string& now, T& value) {
    entries_.push_back({app, former, now});
    return app->add_flag(former, value, "former name of " + now)->group("");
  }
  // After parsing: a warning per former spelling used on a chosen (sub)command; input_error when
  // the former and the new spelling are both given.
  void warn(std::ostream& err) const;

 private:
  struct Entry {
    CLI::App* app;
    std::string former, now;
  };
  std::vector<Entry> entries_;
};

}  // namespace strewn::cli

#endif
