#include "strewn/risk_area.hpp"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <unordered_map>
#include <vector>

#include "map/log_field.hpp"

namespace strewn {
namespace {

// Nodes of the boundary are named, not compared by coordinates: a grid corner (kind 0), or the
// crossing on the horizontal (kind 1) or vertical (kind 2) grid edge from corner (i, j). Two
// squares sharing an edge name its crossing alike, so their shared pieces cancel exactly.
std::int64_t node(int i, int j, int kind, int columns) {
  return 3 * (static_cast<std::int64_t>(j) * columns + i) + kind;
}

}  // namespace

Region area_at_or_above(const RiskMap& map, double level, double floor) {
  Region out;
  const GridSpec& g = map.grid;
  if (g.columns < 2 || g.rows < 2 || !(level > floor)) return out;
  const detail::LogField field(map, level, floor);
  const double L = field.log_level();
  const auto F = [&](int i, int j) { return field.at(i, j); };

  // Where a node lies: a grid corner, or the crossing on a grid edge interpolated as
  // strewn::contour does, from the lower-left corner always, kept off the corners so that loops
  // never touch.
  const auto where = [&](std::int64_t id) {
    const int kind = static_cast<int>(id % 3);
    const std::int64_t cell = id / 3;
    const int i = static_cast<int>(cell % g.columns), j = static_cast<int>(cell / g.columns);
    if (kind == 0) return g.centre(i, j);
    const bool vertical = kind == 2;
    const int i2 = vertical ? i : i + 1, j2 = vertical ? j + 1 : j;
    const double a = F(i, j), b = F(i2, j2);
    const double t = a == b ? 0.5 : std::clamp((L - a) / (b - a), 1e-6, 1.0 - 1e-6);
    return Vec2(g.centre(i, j) + t * (g.centre(i2, j2) - g.centre(i, j)));
  };

  // Each square at or above the level on some corner is walked counter-clockwise, keeping its
  // high side: a ring of corners and crossings. A piece of a ring along a grid edge shared by two
  // squares cancels: the square on the other side sees the same corners, so it walks the same
  // piece, between the same named nodes, the other way. What is left is every chord across a
  // square (from crossing to crossing) and the pieces along the map's outer edge, so only those
  // are kept, and a square wholly high away from the outer edge adds nothing. (This gives the
  // edges a set with erase-on-reverse gave, without its cost per high square: measured, 1.07 G
  // instructions of a 500 x 500 map's 4.2 G.)
  std::vector<std::pair<std::int64_t, std::int64_t>> edges;
  const int last_i = g.columns - 2, last_j = g.rows - 2;  // the squares along the outer edge
  for (int j = 0; j + 1 < g.rows; ++j)
    for (int i = 0; i + 1 < g.columns; ++i) {
      // Corners counter-clockwise from the lower left; edge k runs from corner k to k + 1.
      const int ci[4] = {i, i + 1, i + 1, i}, cj[4] = {j, j, j + 1, j + 1};
      bool high[4];
      int mask = 0;
      for (int k = 0; k < 4; ++k) {
        high[k] = field.high(ci[k], cj[k]);
        mask |= (high[k] ? 1 : 0) << k;
      }
      if (mask == 0) continue;
      const bool outer[4] = {j == 0, i == last_i, j == last_j, i == 0};
      if (mask == 15 && !(outer[0] || outer[1] || outer[2] || outer[3])) continue;
      // A ring's node: a corner k (crossing false) or the crossing on edge k.
      struct Node {
        int k;
        bool crossing;
      };
      const auto id = [&](const Node& n) {
        if (!n.crossing) return node(ci[n.k], cj[n.k], 0, g.columns);
        return n.k == 0 ? node(i, j, 1, g.columns)
                        : n.k == 1 ? node(i + 1, j, 2, g.columns)
                                   : n.k == 2 ? node(i, j + 1, 1, g.columns) : node(i, j, 2, g.columns);
      };
      // From a corner k the ring runs along edge k; from the crossing on edge k to a corner, along
      // edge k too; from crossing to crossing, across the square.
      const auto keep = [&](const Node& a, const Node& b) {
        if (a.crossing && b.crossing) return true;
        return outer[a.k];
      };
      Node ring[8];
      int size = 0;
      const bool saddle = mask == 5 || mask == 10;
      const double mean = (F(i, j) + F(i + 1, j) + F(i + 1, j + 1) + F(i, j + 1)) / 4;
      const auto add_ring = [&]() {
        for (int k = 0; k < size; ++k) {
          const Node& a = ring[k];
          const Node& b = ring[(k + 1) % size];
          if (keep(a, b)) edges.emplace_back(id(a), id(b));
        }
      };
      if (saddle && !(mean >= L)) {
        // Separated: one triangle at each high corner (the contour's saddle rule).
        for (int k = 0; k < 4; ++k)
          if (high[k]) {
            ring[0] = {(k + 3) % 4, true};
            ring[1] = {k, false};
            ring[2] = {k, true};
            size = 3;
            add_ring();
          }
        continue;
      }
      for (int k = 0; k < 4; ++k) {  // walk the square, keeping the high side
        if (high[k]) ring[size++] = {k, false};
        if (high[k] != high[(k + 1) % 4]) ring[size++] = {k, true};
      }
      add_ring();
    }
  // In the order the set of edges had, so that the loops come out in the same order.
  std::sort(edges.begin(), edges.end());

  std::unordered_map<std::int64_t, std::int64_t> next;
  for (const auto& [a, b] : edges) next[a] = b;
  while (!next.empty()) {
    const std::int64_t start = next.begin()->first;
    std::vector<Vec2> pts;
    std::int64_t at = start;
    do {
      pts.push_back(where(at));
      auto it = next.find(at);
      if (it == next.end()) break;  // cannot happen for a consistent tiling; never loop forever
      at = it->second;
      next.erase(it);
    } while (at != start);
    // Drop points on a straight run (the map's edge, runs of high corners): same region, fewer
    // vertices. Collinear within rounding of the grid's own arithmetic.
    std::vector<Vec2> kept;
    for (std::size_t k = 0; k < pts.size(); ++k) {
      const Vec2& a = pts[(k + pts.size() - 1) % pts.size()];
      const Vec2& b = pts[k];
      const Vec2& c = pts[(k + 1) % pts.size()];
      const Vec2 u = b - a, v = c - b;
      const double cross = u.x() * v.y() - u.y() * v.x();
      if (std::fabs(cross) > 1e-12 * u.norm() * v.norm() || u.dot(v) < 0) kept.push_back(b);
    }
    if (kept.size() < 3) continue;
    Loop loop;
    for (std::size_t k = 0; k < kept.size(); ++k) loop.push_back(Edge::segment(kept[k], kept[(k + 1) % kept.size()]));
    out.loops.push_back(std::move(loop));
  }
  return out;
}

}  // namespace strewn
