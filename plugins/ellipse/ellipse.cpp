// ellipse: centre, semi-axes and rotation of the major axis.
#include "plugin_support.hpp"

namespace {
using namespace strewn_plugin;

void build_shape(const nlohmann::json& p, Pen& pen) {
  const Point c = point(p, "centre");
  const double a = positive(p, "semi_major"), b = positive(p, "semi_minor");
  const double angle = number(p, "angle_deg");
  pen.begin(place({a, 0.0}, c, angle));
  pen.arc(c, a, b, angle, 0.0, 360.0);
  pen.end();
}

}  // namespace

static const char kParams[] = R"({"params": [
  {"name": "centre", "type": "point", "unit": "m", "required": true, "description": "centre [x, y]"},
  {"name": "semi_major", "type": "number", "unit": "m", "required": true, "description": "semi-axis along angle_deg"},
  {"name": "semi_minor", "type": "number", "unit": "m", "required": true, "description": "semi-axis across it"},
  {"name": "angle_deg", "type": "number", "unit": "deg", "default": 0,
   "description": "direction of the semi_major axis, counter-clockwise from +x"}]})";

STREWN_SINGLE_KIND_PLUGIN("ellipse", "Ellipse given by its centre, semi-axes and rotation", kParams)
