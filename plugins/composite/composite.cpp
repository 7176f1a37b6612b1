// composite: union, difference and intersection of other shapes, applied in order.
#include "plugin_support.hpp"

namespace {
using namespace strewn_plugin;

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
    else throw bad_parameter(where + ": operation must be union, difference or intersection");
    const auto params = part.contains("params") ? part["params"] : nlohmann::json::object();
    pen.combine(code, part["kind"].get<std::string>(), params.dump());
  }
}

}  // namespace

static const char kParams[] = R"({"params": [
  {"name": "parts", "type": "parts", "required": true,
   "description": "[{kind, operation = union|difference|intersection, params}, ...]; the first part is the base"}]})";

STREWN_SINGLE_KIND_PLUGIN("composite", "Union, difference or intersection of other shapes, applied in order", kParams)
