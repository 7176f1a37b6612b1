#ifndef STREWN_CLI_REQUEST_OPTION_HPP
#define STREWN_CLI_REQUEST_OPTION_HPP

// The engine names a bad field of a request in its own words (strewn::request_error, e.g. field
// "window": "the map window must be ..."); a command knows which of its options set that field
// and puts the option's name in front, so that the user reads what to change on the command line.
#include <string>
#include <utility>
#include <vector>

#include "strewn/error.hpp"

namespace strewn::cli {

// `options` pairs a request field with the option(s) that set it, e.g. {"window", "--extent"}.
// A field without an option (set by the command itself) keeps the engine's words.
[[noreturn]] inline void throw_for_option(const request_error& e,
                                          const std::vector<std::pair<std::string, std::string>>& options) {
  for (const auto& [field, option] : options)
    if (field == e.field()) throw input_error(option + ": " + e.what());
  throw input_error(e.what());
}

}  // namespace strewn::cli

#endif
