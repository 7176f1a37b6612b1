// A pre-scan of JSON text before a recursive parser or copy sees it: nlohmann::json's copy and
// destruction recurse once per level and overflowed the stack at ~200,000 nested brackets. And
// a parse that notices a key given twice.
#ifndef STREWN_NESTING_SCAN_HPP
#define STREWN_NESTING_SCAN_HPP

#include <cstddef>
#include <set>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "strewn/error.hpp"

namespace strewn::detail {

/// The deepest nesting of arrays and objects accepted in JSON input (GeoJSON, shape parameters).
constexpr int kMaxJsonNesting = 256;

/// Throws input_error "WHAT: line N: arrays or objects nested more than 256 deep" when the
/// brackets and braces outside strings nest deeper than kMaxJsonNesting. Linear, no allocation.
inline void check_json_nesting(const std::string& text, const std::string& what) {
  int depth = 0;
  std::size_t line = 1;
  bool in_string = false;
  for (std::size_t i = 0; i < text.size(); ++i) {
    const char c = text[i];
    if (c == '\n') ++line;
    if (in_string) {
      if (c == '\\') ++i;
      else if (c == '"') in_string = false;
    } else if (c == '"') {
      in_string = true;
    } else if (c == '[' || c == '{') {
      if (++depth > kMaxJsonNesting)
        throw input_error(what + ": line " + std::to_string(line) + ": arrays or objects nested more than " +
                          std::to_string(kMaxJsonNesting) + " deep (checked before parsing)");
    } else if ((c == ']' || c == '}') && depth > 0) {
      --depth;
    }
  }
}

/// JSON text parsed, and the first key given twice in one object (empty if none): JSON keeps
/// the last without a word (`--footprint-params '{"radius": 0.3, "radius": 0.5}'` drew 0.5; a
/// hostile trial), where TOML refuses a repeated key. A parse error throws nlohmann's exception.
inline nlohmann::json parse_json_once(const std::string& text, std::string& repeated) {
  std::vector<std::set<std::string>> keys;
  repeated.clear();
  const nlohmann::json::parser_callback_t once = [&](int, nlohmann::json::parse_event_t event, nlohmann::json& parsed) {
    using E = nlohmann::json::parse_event_t;
    if (event == E::object_start) keys.emplace_back();
    else if (event == E::object_end && !keys.empty()) keys.pop_back();
    else if (event == E::key && !keys.empty() && !keys.back().insert(parsed.get<std::string>()).second && repeated.empty())
      repeated = parsed.get<std::string>();
    return true;
  };
  return nlohmann::json::parse(text, once);
}

}  // namespace strewn::detail

#endif
