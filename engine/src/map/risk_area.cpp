#include "strewn/risk_area.hpp"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <set>
#include <unordered_map>
#include <vector>

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
  const double L = std::log10(level);
  std::vector<double> f(map.value.size());
  for (std::size_t k = 0; k < f.size(); ++k) f[k] = std::log10(std::max(map.value[k], floor));
  const auto F = [&](int i, int j) { return f[static_cast<std::size_t>(j) * g.columns + i]; };

  std::unordered_map<std::int64_t, Vec2> where;
  const auto corner = [&](int i, int j) {
    const std::int64_t id = node(i, j, 0, g.columns);
    where.emplace(id, g.centre(i, j));
    return id;
  };
  // The crossing between corners (i, j) and (i2, j2), interpolated as strewn::contour does,
  // from the lower-left corner always; kept off the corners so that loops never touch.
  const auto crossing = [&](int i, int j, bool vertical) {
    const int i2 = vertical ? i : i + 1, j2 = vertical ? j + 1 : j;
    const std::int64_t id = node(i, j, vertical ? 2 : 1, g.columns);
    if (where.count(id) == 0) {
      const double a = F(i, j), b = F(i2, j2);
      const double t = a == b ? 0.5 : std::clamp((L - a) / (b - a), 1e-6, 1.0 - 1e-6);
      where.emplace(id, g.centre(i, j) + t * (g.centre(i2, j2) - g.centre(i, j)));
    }
    return id;
  };

  // Directed edges left after cancellation. An edge meeting its reverse is removed (the two
  // squares on either side are both high there); a node has several outgoing edges until the
  // squares around it are done, exactly one after.
  std::set<std::pair<std::int64_t, std::int64_t>> edges;
  const auto add = [&](std::int64_t a, std::int64_t b) {
    if (edges.erase({b, a}) == 0) edges.insert({a, b});
  };
  const auto add_ring = [&](const std::vector<std::int64_t>& ring) {
    for (std::size_t k = 0; k < ring.size(); ++k) add(ring[k], ring[(k + 1) % ring.size()]);
  };

  for (int j = 0; j + 1 < g.rows; ++j)
    for (int i = 0; i + 1 < g.columns; ++i) {
      // Corners counter-clockwise from the lower left; edge k runs from corner k to k + 1.
      const int ci[4] = {i, i + 1, i + 1, i}, cj[4] = {j, j, j + 1, j + 1};
      bool high[4];
      int mask = 0;
      for (int k = 0; k < 4; ++k) {
        high[k] = F(ci[k], cj[k]) >= L;
        mask |= (high[k] ? 1 : 0) << k;
      }
      if (mask == 0) continue;
      const auto edge_crossing = [&](int k) {
        return k == 0 ? crossing(i, j, false) : k == 1 ? crossing(i + 1, j, true) : k == 2 ? crossing(i, j + 1, false) : crossing(i, j, true);
      };
      const bool saddle = mask == 5 || mask == 10;
      const double mean = (F(i, j) + F(i + 1, j) + F(i + 1, j + 1) + F(i, j + 1)) / 4;
      if (saddle && !(mean >= L)) {
        // Separated: one triangle at each high corner (the contour's saddle rule).
        for (int k = 0; k < 4; ++k)
          if (high[k]) add_ring({edge_crossing((k + 3) % 4), corner(ci[k], cj[k]), edge_crossing(k)});
        continue;
      }
      std::vector<std::int64_t> ring;  // walk the square, keeping the high side
      for (int k = 0; k < 4; ++k) {
        if (high[k]) ring.push_back(corner(ci[k], cj[k]));
        if (high[k] != high[(k + 1) % 4]) ring.push_back(edge_crossing(k));
      }
      add_ring(ring);
    }

  std::unordered_map<std::int64_t, std::int64_t> next;
  for (const auto& [a, b] : edges) next[a] = b;
  while (!next.empty()) {
    const std::int64_t start = next.begin()->first;
    std::vector<Vec2> pts;
    std::int64_t at = start;
    do {
      pts.push_back(where.at(at));
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
