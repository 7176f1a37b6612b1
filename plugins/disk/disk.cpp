// disk: centre and radius.
#include "plugin_support.hpp"

namespace {
using namespace strewn_plugin;

void build_shape(const nlohmann::json& p, Pen& pen) {
  const Point c = point(p, "centre");
  const double r = positive(p, "radius");
  pen.begin({c.x + r, c.y});
  pen.arc(c, r, r, 0.0, 0.0, 360.0);
  pen.end();
}

}  // namespace

static const char kParams[] = R"({"params": [
  {"name": "centre", "type": "point", "unit": "m", "required": true, "description": "centre [x, y]"},
  {"name": "radius", "type": "number", "unit": "m", "required": true, "description": "radius"}]})";

STREWN_SINGLE_KIND_PLUGIN("disk", "Circular disk given by its centre and radius", kParams)
