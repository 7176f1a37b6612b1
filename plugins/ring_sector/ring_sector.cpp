// ring_sector: the part of a ring between two directions; a disk, ring or pie slice as
// special cases. Directions as theta (counter-clockwise from +x) or as bearings (clockwise
// from north). Formerly named annular_sector, which the host still reads for one release
// ("former_kind" below, strewn/plugin.h).
#include "plugin_support.hpp"

namespace {
using namespace strewn_plugin;

void build_shape(const nlohmann::json& p, Pen& pen) {
  const Point c = point(p, "centre");
  const double r_in = number(p, "inner_radius");
  const double r_out = positive(p, "outer_radius");
  if (r_in < 0.0) throw bad_parameter("parameter 'inner_radius' must not be negative");
  if (r_in >= r_out) throw bad_parameter("parameter 'inner_radius' must be less than 'outer_radius'");
  const bool by_theta = p.contains("from_angle_deg") || p.contains("to_angle_deg");
  const bool by_bearing = p.contains("from_bearing_deg") || p.contains("to_bearing_deg");
  if (by_theta && by_bearing)
    throw bad_parameter("give either from_angle_deg/to_angle_deg or from_bearing_deg/to_bearing_deg, not both");
  double from = 0.0, to = 360.0;
  if (by_theta) {
    from = number(p, "from_angle_deg");
    to = number(p, "to_angle_deg");
  } else if (by_bearing) {
    // Bearing b (clockwise from north) is theta = 90 - b; clockwise from b1 to b2 is
    // counter-clockwise from 90 - b2 to 90 - b1.
    from = 90.0 - number(p, "to_bearing_deg");
    to = 90.0 - number(p, "from_bearing_deg");
  }
  // Equal ends read as a whole turn made a zero-width sector a whole disk without a word.
  if ((by_theta || by_bearing) && from == to)
    throw bad_parameter("the sector's two angles are equal; for a whole ring leave both out, or give ends 360 degrees apart");
  while (to <= from) to += 360.0;
  const double sweep = to - from;
  if (sweep > 360.0) throw bad_parameter("the sector sweeps more than 360 degrees");
  if (sweep >= 360.0) {
    pen.begin({c.x + r_out, c.y});
    pen.arc(c, r_out, r_out, 0.0, 0.0, 360.0);
    pen.end();
    if (r_in > 0.0) {
      pen.begin({c.x + r_in, c.y});
      pen.arc(c, r_in, r_in, 0.0, 360.0, 0.0);
      pen.end();
    }
    return;
  }
  const double a = from * kPi / 180.0;
  if (r_in > 0.0) pen.begin({c.x + r_in * std::cos(a), c.y + r_in * std::sin(a)});
  else pen.begin(c);
  pen.arc(c, r_out, r_out, 0.0, from, to);
  if (r_in > 0.0) pen.arc(c, r_in, r_in, 0.0, to, from);
  pen.end();
}

}  // namespace

static const char kParams[] = R"json({"former_kind": "annular_sector", "params": [
  {"name": "centre", "type": "point", "unit": "m", "required": true, "description": "centre of the ring [x, y]"},
  {"name": "inner_radius", "type": "number", "unit": "m", "default": 0, "former": {"name": "r_inner"},
   "description": "inner radius (0 for a pie slice)"},
  {"name": "outer_radius", "type": "number", "unit": "m", "required": true, "former": {"name": "r_outer"},
   "description": "outer radius"},
  {"name": "from_angle_deg", "type": "number", "unit": "deg", "former": {"name": "theta_from_deg"},
   "description": "start direction, counter-clockwise from +x"},
  {"name": "to_angle_deg", "type": "number", "unit": "deg", "former": {"name": "theta_to_deg"},
   "description": "end direction, counter-clockwise from +x"},
  {"name": "from_bearing_deg", "type": "number", "unit": "deg", "former": {"name": "bearing_from_deg"},
   "description": "start bearing, clockwise from north"},
  {"name": "to_bearing_deg", "type": "number", "unit": "deg", "former": {"name": "bearing_to_deg"},
   "description": "end bearing, clockwise from north"}]})json";

STREWN_SINGLE_KIND_PLUGIN("ring_sector", "Part of a ring between two directions (disk, ring and pie slice included)", kParams)
