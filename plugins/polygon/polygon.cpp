// polygon: an outer boundary with optional holes, straight edges only.
#include <algorithm>

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

// Whether two edges that share no end cross or touch (orientation tests; exact for the
// inputs' doubles up to the products' rounding, which only decides which message is given).
bool edges_meet(Point a, Point b, Point c, Point d) {
  const auto side = [](Point p, Point q, Point r) {
    const double v = (q.x - p.x) * (r.y - p.y) - (q.y - p.y) * (r.x - p.x);
    return (v > 0) - (v < 0);
  };
  const int d1 = side(a, b, c), d2 = side(a, b, d), d3 = side(c, d, a), d4 = side(c, d, b);
  return d1 * d2 <= 0 && d3 * d4 <= 0 && !(d1 == 0 && d2 == 0 && d3 == 0 && d4 == 0 &&
                                           (std::max(a.x, b.x) < std::min(c.x, d.x) || std::max(c.x, d.x) < std::min(a.x, b.x) ||
                                            std::max(a.y, b.y) < std::min(c.y, d.y) || std::max(c.y, d.y) < std::min(a.y, b.y)));
}

// Whether a ring crosses itself (O(n^2): taken only on the way to an error message).
bool crosses_itself(const std::vector<Point>& ring) {
  const std::size_t n = ring.size();
  for (std::size_t i = 0; i < n; ++i)
    for (std::size_t j = i + 2; j < n; ++j) {
      if (i == 0 && j == n - 1) continue;  // neighbours through the closing edge
      if (edges_meet(ring[i], ring[(i + 1) % n], ring[j], ring[(j + 1) % n])) return true;
    }
  return false;
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
    // A hole outside a ring that crosses itself: the crossing is the fault to name, which the
    // engine's check of the whole region does (with where it is); the even-odd test means
    // little on such a ring.
    for (const Point& q : ring)
      if (!inside(outer, q) && !crosses_itself(outer))
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
