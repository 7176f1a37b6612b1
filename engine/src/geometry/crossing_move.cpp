// The move of a boolean operation's computed crossings (crossing_move.hpp).
#include "geometry/crossing_move.hpp"

#include <boost/geometry.hpp>
#include <boost/geometry/index/rtree.hpp>
#include <algorithm>
#include <cmath>
#include <cstring>
#include <iterator>
#include <limits>
#include <unordered_set>
#include <utility>
#include <vector>

namespace strewn {
namespace {

namespace bg = boost::geometry;
using BgPoint = bg::model::point<double, 2, bg::cs::cartesian>;
using BgBox = bg::model::box<BgPoint>;
using Entry = std::pair<BgBox, std::size_t>;

constexpr double kEps = std::numeric_limits<double>::epsilon();

struct PointHash {
  std::size_t operator()(const std::pair<double, double>& p) const {
    std::uint64_t x, y;
    std::memcpy(&x, &p.first, sizeof x);
    std::memcpy(&y, &p.second, sizeof y);
    return std::hash<std::uint64_t>()(x * 0x9E3779B97F4A7C15ULL ^ y);
  }
};

// x1 y2 - y1 x2 with one rounding (Kahan's fma form).
double cross(const Vec2& p, const Vec2& q) {
  const double w = q.x() * p.y();
  const double e = std::fma(-q.x(), p.y(), w);
  const double f = std::fma(p.x(), q.y(), -w);
  return f + e;
}

struct Line {
  Vec2 from, to, unit;
  double length;
};

// Whether a - b is exact in floating point (Knuth's TwoSum error term is zero): always so for
// nearby points (Sterbenz), which is what keeps national-grid coordinates' crossings tight.
bool exact_difference(double a, double b) {
  const double s = a - b, bb = s - a;
  return (a - (s - bb)) + (-b - bb) == 0.0;
}

// Distance from v to the line of s, from above: the cross product's one rounding and the
// length's and quotient's few, and, unless the differences v - from and to - from are exact,
// their rounding (eps of their operands each).
double distance_above(const Line& s, const Vec2& v) {
  const double c = std::fabs(cross(s.to - s.from, v - s.from)) / s.length * (1.0 + 8 * kEps);
  const bool exact = exact_difference(s.to.x(), s.from.x()) && exact_difference(s.to.y(), s.from.y()) &&
                     exact_difference(v.x(), s.from.x()) && exact_difference(v.y(), s.from.y());
  return exact ? c : c + 4 * kEps * (v.norm() + s.from.norm() + s.to.norm());
}

}  // namespace

double crossing_move(const Region& result, const Region& a, const Region& b) {
  std::unordered_set<std::pair<double, double>, PointHash> own;
  std::vector<Line> lines;
  double scale = 0.0;
  for (const Region* r : {&a, &b})
    for (const Loop& loop : r->loops)
      for (const Edge& e : loop) {
        own.insert({e.from.x(), e.from.y()});
        own.insert({e.to.x(), e.to.y()});
        scale = std::max({scale, e.from.cwiseAbs().maxCoeff(), e.to.cwiseAbs().maxCoeff()});
        const double length = (e.to - e.from).norm();
        if (length > 0.0) lines.push_back({e.from, e.to, (e.to - e.from) / length, length});
      }
  const double reach = 1e-6 * std::max(scale, 1e-300);
  std::vector<const Vec2*> moved;
  for (const Loop& loop : result.loops)
    for (const Edge& e : loop)
      if (!own.count({e.from.x(), e.from.y()})) moved.push_back(&e.from);
  if (moved.empty()) return 0.0;
  std::vector<Entry> boxes;
  boxes.reserve(lines.size());
  for (std::size_t i = 0; i < lines.size(); ++i) {
    const Vec2 lo = lines[i].from.cwiseMin(lines[i].to), hi = lines[i].from.cwiseMax(lines[i].to);
    boxes.emplace_back(BgBox(BgPoint(lo.x(), lo.y()), BgPoint(hi.x(), hi.y())), i);
  }
  const bg::index::rtree<Entry, bg::index::rstar<16>> tree(boxes.begin(), boxes.end());
  double largest = 0.0;
  std::vector<Entry> found;
  std::vector<std::pair<double, std::size_t>> near;  // (distance, line)
  for (const Vec2* v : moved) {
    found.clear();
    near.clear();
    const BgBox around(BgPoint(v->x() - reach, v->y() - reach), BgPoint(v->x() + reach, v->y() + reach));
    tree.query(bg::index::intersects(around), std::back_inserter(found));
    for (const Entry& entry : found) {
      const double d = distance_above(lines[entry.second], *v);
      if (d <= reach) near.emplace_back(d, entry.second);
    }
    double best = reach;
    for (std::size_t i = 0; i < near.size(); ++i)
      for (std::size_t j = i + 1; j < near.size(); ++j) {
        const double sine = std::fabs(cross(lines[near[i].second].unit, lines[near[j].second].unit)) - 4 * kEps;
        if (sine > 0.0) best = std::min(best, (near[i].first + near[j].first) / sine * (1.0 + 4 * kEps));
      }
    largest = std::max(largest, best);
  }
  return largest;
}

}  // namespace strewn
