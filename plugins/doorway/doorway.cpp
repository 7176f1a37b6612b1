// doorway: the floor area swept by a hinged door (a quarter disk) plus an optional approach
// strip in front of the opening, on the side the door swings to.
#include "plugin_support.hpp"

namespace {
using namespace strewn_plugin;

void build_shape(const nlohmann::json& p, Pen& pen) {
  const Point hinge = point(p, "hinge");
  const Point latch = point(p, "latch");
  const double w = std::hypot(latch.x - hinge.x, latch.y - hinge.y);
  if (!(w > 0.0)) throw bad_parameter("'hinge' and 'latch' must be different points");
  const double depth = number(p, "approach_depth");
  if (depth < 0.0) throw bad_parameter("parameter 'approach_depth' must not be negative");
  const bool left = p.at("opens_toward").get<std::string>() == "left_seen_from_hinge";
  // Local frame: hinge at the origin, latch on +x, the door swings into +y; mirrored for "right_seen_from_hinge".
  const double wall = std::atan2(latch.y - hinge.y, latch.x - hinge.x) * 180.0 / kPi;
  const double m = left ? 1.0 : -1.0;
  auto at = [&](double x, double y) { return place({x, m * y}, hinge, wall); };
  pen.begin(at(0, 0));
  pen.line(at(w, 0));
  if (depth >= w) {  // the approach strip covers the whole swing
    pen.line(at(w, depth));
    pen.line(at(0, depth));
    pen.end();
    return;
  }
  double start_deg = 0.0;
  if (depth > 0.0) {
    pen.line(at(w, depth));
    const double x = std::sqrt(w * w - depth * depth);
    pen.line(at(x, depth));
    start_deg = std::asin(depth / w) * 180.0 / kPi;
  }
  // Quarter circle about the hinge from the approach line to the wall normal.
  if (left) pen.arc(hinge, w, w, wall, start_deg, 90.0);
  else pen.arc(hinge, w, w, wall, -start_deg, -90.0);
  pen.end();
}

}  // namespace

static const char kParams[] = R"({"params": [
  {"name": "hinge", "type": "point", "unit": "m", "required": true, "description": "hinge end of the opening [x, y]"},
  {"name": "latch", "type": "point", "unit": "m", "required": true, "description": "latch end of the opening [x, y]"},
  {"name": "opens_toward", "type": "string", "choices": ["left_seen_from_hinge", "right_seen_from_hinge"],
   "default": "left_seen_from_hinge",
   "former": {"name": "swing", "values": {"left": "left_seen_from_hinge", "right": "right_seen_from_hinge"}},
   "description": "the side the door opens to, seen from the hinge looking toward the latch"},
  {"name": "approach_depth", "type": "number", "unit": "m", "default": 0,
   "description": "depth of the strip in front of the opening kept clear, on the swing side"}]})";

STREWN_SINGLE_KIND_PLUGIN("doorway", "Area swept by a hinged door, with an optional approach strip in front", kParams)
