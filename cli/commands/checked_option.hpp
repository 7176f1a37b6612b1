#ifndef STREWN_CLI_CHECKED_OPTION_HPP
#define STREWN_CLI_CHECKED_OPTION_HPP

// A command-line count checked before it is converted: a whole number in [least, most], so that
// "-1" never wraps to 2^64 - 1 and "1e30" never truncates; the message states the range.
#include <CLI/CLI.hpp>
#include <cmath>
#include <cstdlib>
#include <string>

namespace strewn::cli {

// least >= 0 and most <= 2^53.
inline CLI::Validator whole_number(double least, double most, const std::string& range_text) {
  return CLI::Validator(
      [=](std::string& text) -> std::string {
        char* end = nullptr;
        const double v = std::strtod(text.c_str(), &end);
        if (text.empty() || end == nullptr || *end != '\0' || !(v >= least && v <= most) || v != std::floor(v))
          return "must be a whole number from " + range_text + " (got '" + text + "')";
        text = std::to_string(static_cast<unsigned long long>(v));  // "1e3" reaches the integer as 1000
        return {};
      },
      "WHOLE NUMBER " + range_text);
}

// A real number in [least, most]; the message states the accepted range in plain numbers
// (CLI::Range printed "not in range 0.000000 to 0.500000" for a floor of 1e-15).
inline CLI::Validator number_in(double least, double most, const std::string& range_text) {
  return CLI::Validator(
      [=](std::string& text) -> std::string {
        char* end = nullptr;
        const double v = std::strtod(text.c_str(), &end);
        if (text.empty() || end == nullptr || *end != '\0' || !(v >= least && v <= most))
          return std::string("must be a number ") + (range_text.rfind("above", 0) == 0 ? "" : "from ") + range_text +
                 " (got '" + text + "')";
        return {};
      },
      "NUMBER " + range_text);
}

}  // namespace strewn::cli

#endif
