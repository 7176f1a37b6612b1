// polygon: an outer boundary with optional holes, straight edges only.
#include "plugin_support.hpp"

namespace {
using namespace strewn_plugin;

std::vector<Point> points(const nlohmann::json& list, const std::string& what) {
  std::vector<Point> out;
  for (std::size_t i = 0; i < list.size(); ++i)
    out.push_back(point(list[i], what + " point " + std::to_string(i + 1)));
  if (out.size() >= 2 && out.front().x == out.back().x && out.front().y == out.back().y)
    out.pop_back();  // a closing repeat of the first point is allowed
  if (out.size() < 3) throw bad_parameter(what + " needs at least 3 distinct points");
  return out;
}

// Even-odd crossing test; holes must have every vertex strictly inside the outer boundary.
bool inside(const std::vector<Point>& ring, Point p) {
  bool in = false;
  for (std::size_t i = 0, j = ring.size() - 1; i < ring.size(); j = i++) {
    const Point a = ring[i], b = ring[j];
    if ((a.y > p.y) != (b.y > p.y) && p.x < (b.x - a.x) * (p.y - a.y) / (b.y - a.y) + a.x) in = !in;
  }
  return in;
}

void emit(Pen& pen, const std::vector<Point>& ring) {
  pen.begin(ring[0]);
  for (std::size_t i = 1; i < ring.size(); ++i) pen.line(ring[i]);
  pen.end();
}

void build_shape(const nlohmann::json& p, Pen& pen) {
  const auto outer = points(p.at("outer"), "outer");
  emit(pen, outer);
  const auto& holes = p.contains("holes") ? p["holes"] : nlohmann::json::array();
  for (std::size_t h = 0; h < holes.size(); ++h) {
    const auto ring = points(holes[h], "hole " + std::to_string(h + 1));
    for (const Point& q : ring)
      if (!inside(outer, q))
        throw bad_parameter("hole " + std::to_string(h + 1) + " lies outside the outer boundary");
    emit(pen, ring);
  }
}

}  // namespace

static const char kParams[] = R"({"params": [
  {"name": "outer", "type": "points", "unit": "m", "required": true,
   "description": "vertices of the outer boundary, [[x, y], ...], at least 3"},
  {"name": "holes", "type": "point_lists", "unit": "m", "default": [],
   "description": "vertices of each hole, inside the outer boundary"}]})";

STREWN_SINGLE_KIND_PLUGIN("polygon", "Polygon with optional holes (straight edges; any orientation)", kParams)
