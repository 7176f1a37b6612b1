#include "strewn/contours.hpp"

#include <algorithm>
#include <cmath>
#include <map>

#include "map/log_field.hpp"

namespace strewn {
namespace {

// Edges of the grid are named by their lower-left corner and direction, so that the squares on
// either side of an edge agree on its crossing point and segments join exactly.
struct EdgeKey {
  int i, j;
  bool vertical;
  bool operator<(const EdgeKey& o) const { return std::tie(i, j, vertical) < std::tie(o.i, o.j, o.vertical); }
};

}  // namespace

ContourSet contour(const RiskMap& map, double level, double floor) {
  ContourSet set;
  set.level = level;
  const GridSpec& g = map.grid;
  if (g.columns < 2 || g.rows < 2 || !(level > floor)) return set;
  const detail::LogField field(map, level, floor);
  const double L = field.log_level();
  const auto F = [&](int i, int j) { return field.at(i, j); };
  const auto second = [&](int i, int j) {  // largest |second difference| at a node
    double d = 0.0;
    if (i > 0 && i + 1 < g.columns) d = std::max(d, std::fabs(F(i + 1, j) - 2 * F(i, j) + F(i - 1, j)));
    if (j > 0 && j + 1 < g.rows) d = std::max(d, std::fabs(F(i, j + 1) - 2 * F(i, j) + F(i, j - 1)));
    return d;
  };
  std::map<EdgeKey, Vec2> crossing;
  const auto point_on = [&](const EdgeKey& e) {
    auto it = crossing.find(e);
    if (it != crossing.end()) return e;
    const int i2 = e.vertical ? e.i : e.i + 1, j2 = e.vertical ? e.j + 1 : e.j;
    const double a = F(e.i, e.j), b = F(i2, j2);
    const double t = a == b ? 0.5 : std::clamp((L - a) / (b - a), 0.0, 1.0);
    crossing[e] = g.centre(e.i, e.j) + t * (g.centre(i2, j2) - g.centre(e.i, e.j));
    return e;
  };
  // |mixed difference| of a square (i, j)..(i + 1, j + 1): about h^2 |f_xy| at its centre.
  const auto mixed = [&](int i, int j) {
    if (i < 0 || j < 0 || i + 1 >= g.columns || j + 1 >= g.rows) return 0.0;
    return std::fabs(F(i + 1, j + 1) - F(i + 1, j) - F(i, j + 1) + F(i, j));
  };
  std::multimap<EdgeKey, EdgeKey> links;
  double worst_second = 0.0, worst_mixed = 0.0;
  for (int j = 0; j + 1 < g.rows; ++j)
    for (int i = 0; i + 1 < g.columns; ++i) {
      const int ci[4] = {i, i + 1, i + 1, i}, cj[4] = {j, j, j + 1, j + 1};
      int mask = 0;
      for (int k = 0; k < 4; ++k) mask |= (field.high(ci[k], cj[k]) ? 1 : 0) << k;
      if (mask == 0 || mask == 15) continue;
      const double c[4] = {F(i, j), F(i + 1, j), F(i + 1, j + 1), F(i, j + 1)};
      for (const auto& [a, b] : std::initializer_list<std::pair<int, int>>{{i, j}, {i + 1, j}, {i + 1, j + 1}, {i, j + 1}})
        worst_second = std::max(worst_second, second(a, b));
      for (int di = -1; di <= 1; ++di)  // the square and its neighbours: f_xy varies across it
        for (int dj = -1; dj <= 1; ++dj) worst_mixed = std::max(worst_mixed, mixed(i + di, j + dj));
      // Edges: 0 bottom, 1 right, 2 top, 3 left.
      const EdgeKey e[4] = {{i, j, false}, {i + 1, j, true}, {i, j + 1, false}, {i, j, true}};
      std::vector<std::pair<int, int>> segs;
      switch (mask) {
        case 1: case 14: segs = {{3, 0}}; break;
        case 2: case 13: segs = {{0, 1}}; break;
        case 3: case 12: segs = {{3, 1}}; break;
        case 4: case 11: segs = {{1, 2}}; break;
        case 6: case 9: segs = {{0, 2}}; break;
        case 7: case 8: segs = {{3, 2}}; break;
        case 5: case 10: {
          // Saddle: corners 0 and 2 on one side, 1 and 3 on the other; the centre decides.
          const bool centre_above = (c[0] + c[1] + c[2] + c[3]) / 4 >= L;
          const bool zero_above = mask == 5;
          if (centre_above == zero_above) segs = {{3, 2}, {0, 1}};
          else segs = {{3, 0}, {1, 2}};
          break;
        }
        default: break;
      }
      for (const auto& [a, b] : segs) {
        const EdgeKey ka = point_on(e[a]), kb = point_on(e[b]);
        links.emplace(ka, kb);
        links.emplace(kb, ka);
      }
    }
  // A segment joins two edge points, each within D2 / 8 of the level (linear interpolation along
  // an edge, D2 = h^2 max|f''|). Along the segment, of components (dx, dy) with |dx|, |dy| <= h,
  // f departs from the chord between its ends by at most (dx^2 |f_xx| + 2 |dx dy| |f_xy| +
  // dy^2 |f_yy|) / 8 <= (2 D2 + 2 Dxy) / 8, Dxy = h^2 max|f_xy|. Hence D2 / 8 + (2 D2 + 2 Dxy) / 8
  // in all. The earlier D2 / 8 left out the inside of the square and was exceeded there (x1.00075
  // against a stated x1.00038).
  set.log10_error = (3.0 * worst_second + 2.0 * worst_mixed) / 8.0;
  // Join: start from ends (edges seen once) for open lines, then what remains are closed loops.
  std::map<EdgeKey, int> degree;
  for (const auto& [a, b] : links) ++degree[a];
  std::multimap<EdgeKey, EdgeKey> open = links;
  const auto take = [&](const EdgeKey& from) {
    auto it = open.find(from);
    const EdgeKey to = it->second;
    open.erase(it);
    for (auto r = open.lower_bound(to); r != open.upper_bound(to); ++r)
      if (!(r->second < from) && !(from < r->second)) {
        open.erase(r);
        break;
      }
    return to;
  };
  const auto trace = [&](const EdgeKey& start) {
    ContourLine line;
    line.points.push_back(crossing[start]);
    EdgeKey at = start;
    while (open.count(at) > 0) {
      at = take(at);
      line.points.push_back(crossing[at]);
    }
    line.closed = line.points.size() > 2 && !(start < at) && !(at < start);
    return line;
  };
  for (const auto& [k, d] : degree)
    if (d == 1 && open.count(k) > 0) set.lines.push_back(trace(k));
  while (!open.empty()) set.lines.push_back(trace(open.begin()->first));
  return set;
}

}  // namespace strewn
