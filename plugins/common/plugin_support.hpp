#ifndef STREWN_PLUGINS_PLUGIN_SUPPORT_HPP
#define STREWN_PLUGINS_PLUGIN_SUPPORT_HPP

// Helpers shared by the built-in shape plugins: reading parameters from JSON, a pen that turns
// sink refusals into an exception, and run_build(), which keeps every exception on the plugin's
// side of the C boundary and turns it into a status code plus a one-line message.

#include <cmath>
#include <cstdio>
#include <nlohmann/json.hpp>
#include <stdexcept>
#include <string>
#include <utility>

#include "strewn/constants.hpp"
#include "strewn/plugin.h"

namespace strewn_plugin {

using strewn::kPi;

struct bad_parameter : std::runtime_error {
  using std::runtime_error::runtime_error;
};
struct sink_refused {};

struct Point {
  double x, y;
};

inline double number(const nlohmann::json& p, const char* name) {
  if (!p.contains(name) || !p[name].is_number())
    throw bad_parameter(std::string("parameter '") + name + "' must be a number");
  const double v = p[name].get<double>();
  if (!std::isfinite(v)) throw bad_parameter(std::string("parameter '") + name + "' must be finite");
  return v;
}

inline double positive(const nlohmann::json& p, const char* name) {
  const double v = number(p, name);
  if (!(v > 0.0)) throw bad_parameter(std::string("parameter '") + name + "' must be positive");
  return v;
}

inline Point point(const nlohmann::json& v, const std::string& what) {
  if (!v.is_array() || v.size() != 2 || !v[0].is_number() || !v[1].is_number())
    throw bad_parameter(what + " must be a point [x, y]");
  return {v[0].get<double>(), v[1].get<double>()};
}

inline Point point(const nlohmann::json& p, const char* name) {
  if (!p.contains(name)) throw bad_parameter(std::string("missing parameter '") + name + "'");
  return point(p[name], std::string("parameter '") + name + "'");
}

// Rotation by angle_deg counter-clockwise, then translation to centre.
inline Point place(Point local, Point centre, double angle_deg) {
  const double a = angle_deg * kPi / 180.0;
  return {centre.x + local.x * std::cos(a) - local.y * std::sin(a),
          centre.y + local.x * std::sin(a) + local.y * std::cos(a)};
}

class Pen {
 public:
  explicit Pen(const strewn_sink* sink) : sink_(sink) {}
  void begin(Point p) { check(sink_->begin_loop(sink_->user_data, p.x, p.y)); }
  void line(Point p) { check(sink_->line_to(sink_->user_data, p.x, p.y)); }
  void arc(Point c, double rx, double ry, double rotation_deg, double from_deg, double to_deg) {
    check(sink_->arc_to(sink_->user_data, c.x, c.y, rx, ry, rotation_deg, from_deg, to_deg));
  }
  void end() { check(sink_->end_loop(sink_->user_data)); }
  void combine(int operation, const std::string& kind, const std::string& params_json) {
    check(sink_->combine(sink_->user_data, operation, kind.c_str(), params_json.c_str()));
  }

 private:
  static void check(int status) {
    if (status != 0) throw sink_refused{};
  }
  const strewn_sink* sink_;
};

inline void write_error(char* error, size_t size, const char* message) {
  if (error != nullptr && size > 0) std::snprintf(error, size, "%s", message);
}

template <class Builder>
int run_build(Builder&& builder, const char* params_json, const strewn_sink* sink, char* error,
              size_t error_size) {
  try {
    if (params_json == nullptr || sink == nullptr) throw std::runtime_error("no parameters or sink");
    const nlohmann::json params = nlohmann::json::parse(params_json);
    Pen pen(sink);
    builder(params, pen);
    return STREWN_OK;
  } catch (const bad_parameter& e) {
    write_error(error, error_size, e.what());
    return STREWN_BAD_PARAMETER;
  } catch (const sink_refused&) {
    return STREWN_SINK_REFUSED;
  } catch (const std::exception& e) {
    write_error(error, error_size, e.what());
    return STREWN_INTERNAL;
  } catch (...) {
    write_error(error, error_size, "unknown failure");
    return STREWN_INTERNAL;
  }
}

}  // namespace strewn_plugin

// Defines the module's entry point for one shape kind with a build function `build_shape`.
#define STREWN_SINGLE_KIND_PLUGIN(NAME, SUMMARY, PARAMS)                                        \
  static int strewn_build_entry(const char* params_json, const strewn_sink* sink, char* error, \
                                size_t error_size) {                                           \
    return strewn_plugin::run_build(build_shape, params_json, sink, error, error_size);        \
  }                                                                                            \
  static const strewn_shape_kind strewn_kind = {sizeof(strewn_shape_kind),                     \
                                                STREWN_PLUGIN_ABI_VERSION, NAME, SUMMARY,      \
                                                PARAMS, strewn_build_entry};                   \
  static const strewn_shape_kind* const strewn_table[] = {&strewn_kind, nullptr};              \
  extern "C" STREWN_PLUGIN_EXPORT const strewn_shape_kind* const* strewn_plugin_entry(void) {  \
    return strewn_table;                                                                       \
  }

#endif
