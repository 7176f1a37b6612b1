// rectangle: centre, size and rotation.
#include "plugin_support.hpp"

namespace {
using namespace strewn_plugin;

void build_shape(const nlohmann::json& p, Pen& pen) {
  const Point c = point(p, "centre");
  const double w = positive(p, "width") / 2, h = positive(p, "depth") / 2;
  const double angle = number(p, "angle_deg");
  pen.begin(place({-w, -h}, c, angle));
  pen.line(place({w, -h}, c, angle));
  pen.line(place({w, h}, c, angle));
  pen.line(place({-w, h}, c, angle));
  pen.end();
}

}  // namespace

static const char kParams[] = R"json({"params": [
  {"name": "centre", "type": "point", "unit": "m", "required": true, "description": "centre [x, y]"},
  {"name": "width", "type": "number", "unit": "m", "required": true, "description": "side along the rotated x axis"},
  {"name": "depth", "type": "number", "unit": "m", "required": true, "former": {"name": "height"},
   "description": "side along the rotated y axis (a length on the plan, not a height above ground)"},
  {"name": "angle_deg", "type": "number", "unit": "deg", "default": 0,
   "description": "rotation, counter-clockwise from +x"}]})json";

STREWN_SINGLE_KIND_PLUGIN("rectangle", "Rectangle given by its centre, width, depth and rotation", kParams)
