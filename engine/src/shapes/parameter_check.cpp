#include "shapes/parameter_check.hpp"

#include <cmath>

#include "strewn/closest_names.hpp"
#include "strewn/error.hpp"
#include "strewn/shape_registry.hpp"

namespace strewn::detail {
namespace {

// Coordinates and lengths within 1e12 m, angles within ten turns (docs/scenario-format.md): beyond
// them a radius of 1e308 overflowed inside the geometry ("bad numeric conversion", exit 1) and a
// rotation of 1e308 degrees made a region that is not normalised.
constexpr double kMaxLength = 1e12;
constexpr double kMaxAngle = 3600.0;

bool within(const nlohmann::json& v, double most) {
  return v.is_number() && std::fabs(v.get<double>()) <= most;  // false for NaN and infinity
}

bool is_point(const nlohmann::json& v) {
  return v.is_array() && v.size() == 2 && within(v[0], kMaxLength) && within(v[1], kMaxLength);
}

bool is_points(const nlohmann::json& v) {
  if (!v.is_array()) return false;
  for (const auto& p : v)
    if (!is_point(p)) return false;
  return true;
}

bool has_type(const nlohmann::json& v, const std::string& type, const std::string& unit) {
  if (type == "number") return within(v, unit == "deg" ? kMaxAngle : kMaxLength);
  if (type == "point") return is_point(v);
  if (type == "points") return is_points(v);
  if (type == "point_lists") {
    if (!v.is_array()) return false;
    for (const auto& l : v)
      if (!is_points(l)) return false;
    return true;
  }
  if (type == "string") return v.is_string();
  if (type == "parts") return v.is_array();
  if (type == "boolean") return v.is_boolean();
  return true;
}

std::string type_phrase(const std::string& type, const std::string& unit) {
  if (type == "number")
    return unit == "deg" ? "a number of degrees from -3600 to 3600" : "a finite number from -1e12 to 1e12";
  if (type == "point") return "a point [x, y] of finite numbers within +-1e12 m";
  if (type == "points") return "a list of points [[x, y], ...] of finite numbers within +-1e12 m";
  if (type == "point_lists") return "a list of point lists";
  if (type == "string") return "a string";
  if (type == "parts") return "a list of parts";
  if (type == "boolean") return "true or false";
  return type;
}

}  // namespace

void rename_former_parameters(const std::string& kind, const nlohmann::json& description,
                              nlohmann::json& params, std::vector<Warning>* warnings) {
  if (!params.is_object() || !description.contains("params") || !description["params"].is_array()) return;
  const std::string prefix = "shape '" + kind + "': ";
  for (const auto& p : description["params"]) {
    if (!p.is_object() || !p.contains("former") || !p["former"].is_object()) continue;
    const nlohmann::json& former = p["former"];
    if (!former.contains("name") || !former["name"].is_string() || !p.contains("name")) continue;
    const std::string old_name = former["name"], new_name = p["name"];
    if (!params.contains(old_name)) continue;
    if (params.contains(new_name))
      throw input_error(prefix + "parameter '" + old_name + "' is the former name of '" + new_name +
                        "': give '" + new_name + "' only");
    nlohmann::json value = params[old_name];
    std::string how = "parameter '" + old_name + "' is the former name of '" + new_name + "'";
    if (former.contains("values") && former["values"].is_object() && value.is_string() &&
        former["values"].contains(value.get<std::string>())) {
      const nlohmann::json now = former["values"][value.get<std::string>()];
      how = "parameter '" + old_name + "' = " + value.dump() + " is the former spelling of '" + new_name +
            "' = " + now.dump();
      value = now;
    }
    params.erase(old_name);
    params[new_name] = value;
    if (warnings)
      warnings->push_back({WarningKind::former_name,
                           prefix + how + "; it is read in this release and will be refused in the next"});
  }
}

void check_parameters(const std::string& kind, const nlohmann::json& description,
                      nlohmann::json& params) {
  const std::string prefix = "shape '" + kind + "': ";
  if (!params.is_object()) throw input_error(prefix + "parameters must be a table of named values");
  const auto& list = description.at("params");
  std::vector<std::string> names;
  for (const auto& p : list) names.push_back(p.at("name").get<std::string>());
  for (auto it = params.begin(); it != params.end(); ++it) {
    bool known = false;
    for (const auto& n : names) known = known || n == it.key();
    if (known) continue;
    std::string message = prefix + "unknown parameter '" + it.key() + "'";
    const std::string hint = did_you_mean(it.key(), names);
    if (!hint.empty()) {
      message += hint;
    } else {  // nothing close: name what the shape takes, so the next try can be right
      message += " (it takes ";
      for (std::size_t k = 0; k < names.size(); ++k) message += (k ? ", " : "") + names[k];
      message += ")";
    }
    throw input_error(message);
  }
  for (const auto& p : list) {
    const std::string name = p.at("name").get<std::string>();
    const std::string type = p.value("type", "number");
    if (!params.contains(name)) {
      if (p.contains("default")) {
        params[name] = p["default"];
        continue;
      }
      if (p.value("required", false)) throw input_error(prefix + "missing parameter '" + name + "'");
      continue;
    }
    const auto& v = params[name];
    const std::string unit = p.value("unit", "");
    if (!has_type(v, type, unit)) {
      std::string got;
      if (v.is_number()) got = " (got " + v.dump() + ")";
      throw input_error(prefix + "parameter '" + name + "' must be " + type_phrase(type, unit) + got);
    }
    if (p.contains("choices")) {
      bool ok = false;
      for (const auto& c : p["choices"]) ok = ok || c == v;
      if (!ok) throw input_error(prefix + "parameter '" + name + "' must be one of " + p["choices"].dump());
    }
  }
}

}  // namespace strewn::detail
