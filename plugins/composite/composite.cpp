// composite: union, difference and intersection of other shapes, applied in order.
#include <algorithm>
#include <string>
#include <vector>

#include "plugin_support.hpp"

namespace {
using namespace strewn_plugin;

// Levenshtein distance, for a "did you mean" on a misspelt operation.
std::size_t edits(const std::string& a, const std::string& b) {
  std::vector<std::size_t> row(b.size() + 1);
  for (std::size_t j = 0; j <= b.size(); ++j) row[j] = j;
  for (std::size_t i = 1; i <= a.size(); ++i) {
    std::size_t diagonal = row[0];
    row[0] = i;
    for (std::size_t j = 1; j <= b.size(); ++j) {
      const std::size_t up = row[j];
      row[j] = std::min({row[j] + 1, row[j - 1] + 1, diagonal + (a[i - 1] == b[j - 1] ? 0 : 1)});
      diagonal = up;
    }
  }
  return row[b.size()];
}

void build_shape(const nlohmann::json& p, Pen& pen) {
  const auto& parts = p.at("parts");
  if (!parts.is_array() || parts.empty()) throw bad_parameter("parameter 'parts' must list at least one part");
  for (std::size_t i = 0; i < parts.size(); ++i) {
    const auto& part = parts[i];
    const std::string where = "part " + std::to_string(i + 1);
    if (!part.is_object() || !part.contains("kind") || !part["kind"].is_string())
      throw bad_parameter(where + " needs a 'kind'");
    const std::string op = part.value("operation", "union");
    int code = STREWN_UNION;
    if (op == "union") code = STREWN_UNION;
    else if (op == "difference") code = STREWN_DIFFERENCE;
    else if (op == "intersection") code = STREWN_INTERSECTION;
    else {
      std::string hint;
      for (const char* name : {"union", "difference", "intersection"})
        if (edits(op, name) <= 2) hint = std::string(" (did you mean '") + name + "'?)";
      throw bad_parameter(where + ": operation '" + op + "' must be union, difference or intersection" + hint);
    }
    const auto params = part.contains("params") ? part["params"] : nlohmann::json::object();
    pen.combine(code, part["kind"].get<std::string>(), params.dump());
  }
}

}  // namespace

static const char kParams[] = R"({"params": [
  {"name": "parts", "type": "parts", "required": true,
   "description": "[{kind, operation = union|difference|intersection, params}, ...]; the first part is the base"}]})";

STREWN_SINGLE_KIND_PLUGIN("composite", "Union, difference or intersection of other shapes, applied in order", kParams)
