// person: the floor footprint of a standing adult, an ellipse across the shoulders.
#include "plugin_support.hpp"

namespace {
using namespace strewn_plugin;

void build_shape(const nlohmann::json& p, Pen& pen) {
  const Point c = point(p, "centre");
  const double half_width = positive(p, "shoulder_width") / 2;
  const double half_depth = positive(p, "depth") / 2;
  // The shoulders run across the facing direction.
  const double across = number(p, "facing_deg") + 90.0;
  pen.begin(place({half_width, 0.0}, c, across));
  pen.arc(c, half_width, half_depth, across, 0.0, 360.0);
  pen.end();
}

}  // namespace

// Default size: shoulder breadth about 0.5 m and body depth about 0.3 m for a standing adult
// (common practice for crowd-space planning; round figures, from memory).
static const char kParams[] = R"({"params": [
  {"name": "centre", "type": "point", "unit": "m", "required": true, "description": "where the person stands [x, y]"},
  {"name": "facing_deg", "type": "number", "unit": "deg", "default": 90,
   "description": "direction the person faces, counter-clockwise from +x"},
  {"name": "shoulder_width", "type": "number", "unit": "m", "default": 0.5, "description": "width across the shoulders"},
  {"name": "depth", "type": "number", "unit": "m", "default": 0.3, "description": "front-to-back depth"}]})";

STREWN_SINGLE_KIND_PLUGIN("person", "Footprint of a standing person: an ellipse across the shoulders", kParams)
