// Boolean operations and validity checks, done by Boost.Geometry on a polygonisation.
#include "strewn/region_ops.hpp"
#include "geometry/region_internal.hpp"
#include "geometry/crossing_move.hpp"

#include <boost/geometry.hpp>
#include <boost/geometry/geometries/point_xy.hpp>
#include <boost/geometry/geometries/polygon.hpp>
#include <boost/geometry/geometries/multi_polygon.hpp>
#include <Eigen/LU>
#include <algorithm>
#include <cmath>
#include <limits>
#include <optional>
#include <sstream>

#include "strewn/error.hpp"
#include "strewn/position_text.hpp"

namespace strewn {
namespace bg = boost::geometry;
namespace {

using BgPoint = bg::model::d2::point_xy<double>;
using BgPolygon = bg::model::polygon<BgPoint, /*clockwise=*/false, /*closed=*/true>;
using BgMulti = bg::model::multi_polygon<BgPolygon>;

double default_sagitta(const Region& r) {
  const BoundingBox b = bounds(r);
  return std::max(1e-6 * (b.max - b.min).norm(), 1e-12);
}

template <class Ring>
void append_ring(const Loop& loop, Ring& ring) {
  for (const Edge& e : loop) ring.push_back(BgPoint(e.from.x(), e.from.y()));
  ring.push_back(BgPoint(loop.front().from.x(), loop.front().from.y()));
}

// Loops of a polygonised region grouped into polygons by nesting depth: even-depth loops are
// outer boundaries, odd-depth loops holes of the smallest loop around them.
BgMulti to_multi_polygon(const Region& polygonal) {
  const std::size_t n = polygonal.loops.size();
  std::vector<int> depth(n, 0);
  std::vector<long> parent(n, -1);
  std::vector<double> areas(n);
  for (std::size_t i = 0; i < n; ++i) areas[i] = std::fabs(signed_area(polygonal.loops[i]));
  std::vector<Vec2> probes;
  std::vector<std::size_t> self;
  for (std::size_t i = 0; i < n; ++i) {
    const Edge& e0 = polygonal.loops[i].front();
    probes.push_back(0.5 * (e0.from + e0.to));
    self.push_back(i);
  }
  const std::vector<std::vector<std::size_t>> around = loops_around(polygonal, probes, self);
  for (std::size_t i = 0; i < n; ++i)
    for (const std::size_t j : around[i]) {
      ++depth[i];
      if (parent[i] < 0 || areas[j] < areas[static_cast<std::size_t>(parent[i])]) parent[i] = static_cast<long>(j);
    }
  BgMulti multi;
  std::vector<long> index_of(n, -1);
  for (std::size_t i = 0; i < n; ++i) {
    if (depth[i] % 2 != 0) continue;
    BgPolygon poly;
    append_ring(polygonal.loops[i], poly.outer());
    index_of[i] = static_cast<long>(multi.size());
    multi.push_back(poly);
  }
  for (std::size_t i = 0; i < n; ++i) {
    if (depth[i] % 2 == 0) continue;
    // A loop inside an odd number of loops whose nearest enclosing loop is not an outer one:
    // two loops that coincide (a duplicated ring; a hole equal to its outer ring) each lie
    // "inside" the other. Kept as an outer ring of its own, so that the validity test reports
    // the overlap instead of indexing a polygon that does not exist (a crash before).
    if (parent[i] < 0 || index_of[static_cast<std::size_t>(parent[i])] < 0) {
      BgPolygon poly;
      append_ring(polygonal.loops[i], poly.outer());
      multi.push_back(poly);
      continue;
    }
    auto& owner = multi[static_cast<std::size_t>(index_of[static_cast<std::size_t>(parent[i])])];
    owner.inners().emplace_back();
    append_ring(polygonal.loops[i], owner.inners().back());
  }
  bg::correct(multi);
  return multi;
}

Loop ring_to_loop(const std::vector<BgPoint>& ring) {
  Loop loop;
  for (std::size_t k = 0; k + 1 < ring.size(); ++k) {
    const Vec2 a(ring[k].x(), ring[k].y());
    const Vec2 b(ring[k + 1].x(), ring[k + 1].y());
    if (a != b) loop.push_back(Edge::segment(a, b));
  }
  return loop;
}

Region from_multi_polygon(const BgMulti& multi) {
  Region out;
  for (const BgPolygon& p : multi) {
    Loop outer = ring_to_loop(std::vector<BgPoint>(p.outer().begin(), p.outer().end()));
    if (outer.size() >= 3) out.loops.push_back(std::move(outer));
    for (const auto& inner : p.inners()) {
      Loop hole = ring_to_loop(std::vector<BgPoint>(inner.begin(), inner.end()));
      if (hole.size() >= 3) out.loops.push_back(std::move(hole));
    }
  }
  return out;
}

// Boost.Geometry's validity test reports to a visitor: the kind of failure and, for some, where.
// Kept as values (Boost's own policies would turn them into a sentence to be searched). Duplicate
// consecutive points are allowed, as by bg::is_valid.
struct ValidityFailure {
  bg::validity_failure_type failure = bg::no_failure;
  std::optional<BgPoint> where;  ///< a self-intersection point, when the failure is one

  template <bg::validity_failure_type F>
  bool apply() {
    return record(F);
  }
  template <bg::validity_failure_type F, class Data>
  bool apply(const Data& data) {
    if constexpr (F == bg::failure_self_intersections) where = bg::range::front(data).point;
    return record(F);
  }
  template <bg::validity_failure_type F, class Data1, class Data2>
  bool apply(const Data1& is_linear, const Data2&) {
    // Spikes (is_linear, apex) are allowed on a line only; a polygon is never one.
    if constexpr (F == bg::failure_spikes) return record(is_linear ? bg::no_failure : F);
    return record(F);
  }

 private:
  bool record(bg::validity_failure_type f) {
    failure = f == bg::failure_duplicate_points ? bg::no_failure : f;
    if (failure != bg::failure_self_intersections) where.reset();
    return failure == bg::no_failure;
  }
};

// The narrowest loop's mean width (2 |area| / perimeter) and the largest coordinate: Boost's
// spike test fires on a loop narrower than about 1e-8 of its coordinates, where no edge need
// double back (a thin ellipse at a UTM site), so the message leads with what is likely.
struct Narrowness {
  double width = 0.0;
  double magnitude = 0.0;
  bool narrow() const { return width < 1e-7 * std::max(magnitude, 1.0); }
};
Narrowness narrowness(const Region& polygonal) {
  Narrowness n;
  n.width = std::numeric_limits<double>::infinity();
  for (const Loop& l : polygonal.loops) {
    double length = 0.0;
    for (const Edge& e : l) {
      length += (e.to - e.from).norm();
      n.magnitude = std::max({n.magnitude, e.from.cwiseAbs().maxCoeff(), e.to.cwiseAbs().maxCoeff()});
    }
    if (length > 0.0) n.width = std::min(n.width, 2.0 * std::fabs(signed_area(l)) / length);
  }
  return n;
}

std::string describe(const ValidityFailure& v, const Narrowness& n) {
  std::string where;
  if (v.where) where = " at " + position_text(Vec2(v.where->x(), v.where->y()));  // site metres, to the mm
  const bg::validity_failure_type failure = v.failure;
  switch (failure) {
    case bg::failure_few_points: return "a loop has fewer than three distinct points";
    case bg::failure_wrong_topological_dimension: return "a loop has no area";
    // Boost also reports a spike when three vertices are closer to a line than about 1e-8 of
    // their coordinates: a 1 nm square at (1, 1) is "a spike" to it.
    case bg::failure_spikes:
      if (n.narrow()) {
        std::ostringstream m;
        m.precision(2);
        m << "the zone is narrower than about 1e-8 of its coordinates (about " << n.width << " m wide at coordinates up to "
          << n.magnitude << " m), too small to tell its corners apart; shift the site's coordinates nearer the origin, "
          << "or widen the zone (else an edge doubles back on the previous one" << where << ")";
        return m.str();
      }
      return "an edge doubles back on the previous one (a spike)" + where +
             ", or the zone is narrower than about 1e-8 of its coordinates, too small to tell its corners apart";
    case bg::failure_self_intersections: return "self-intersection" + where;
    case bg::failure_wrong_orientation: return "loop orientation is inconsistent";
    case bg::failure_interior_rings_outside: return "a hole lies outside its outer loop";
    case bg::failure_nested_interior_rings: return "a hole lies inside another hole";
    case bg::failure_disconnected_interior: return "holes cut the region into separate pieces";
    case bg::failure_intersecting_interiors: return "outer loops overlap" + where;
    case bg::failure_wrong_corner_order: return "box corners in the wrong order";
    case bg::failure_invalid_coordinate: return "a coordinate is not finite";
    default: return "invalid geometry (Boost.Geometry failure " + std::to_string(static_cast<int>(failure)) + ")";
  }
}

struct Seg {
  Vec2 a, b;
  std::size_t loop, index, loop_size;
  double xmin, xmax;
};

double orient(const Vec2& a, const Vec2& b, const Vec2& c) {
  return (b.x() - a.x()) * (c.y() - a.y()) - (b.y() - a.y()) * (c.x() - a.x());
}

// First pair of edges that cross or touch away from their shared vertex, found by a sweep over
// x-sorted edges; Boost.Geometry would report a bow tie as an orientation fault, which does not
// tell the user where to look.
std::string find_crossing(const Region& polygonal) {
  std::vector<Seg> segs;
  for (std::size_t li = 0; li < polygonal.loops.size(); ++li) {
    const Loop& l = polygonal.loops[li];
    for (std::size_t k = 0; k < l.size(); ++k)
      segs.push_back({l[k].from, l[k].to, li, k, l.size(), std::min(l[k].from.x(), l[k].to.x()),
                      std::max(l[k].from.x(), l[k].to.x())});
  }
  std::sort(segs.begin(), segs.end(), [](const Seg& p, const Seg& q) { return p.xmin < q.xmin; });
  for (std::size_t i = 0; i < segs.size(); ++i) {
    const Seg& s = segs[i];
    for (std::size_t j = i + 1; j < segs.size() && segs[j].xmin <= s.xmax; ++j) {
      const Seg& t = segs[j];
      if (s.loop == t.loop) {
        const std::size_t d = s.index > t.index ? s.index - t.index : t.index - s.index;
        if (d == 1 || d + 1 == s.loop_size) continue;  // neighbours share a vertex
      }
      const double d1 = orient(s.a, s.b, t.a), d2 = orient(s.a, s.b, t.b);
      const double d3 = orient(t.a, t.b, s.a), d4 = orient(t.a, t.b, s.b);
      if (((d1 > 0 && d2 < 0) || (d1 < 0 && d2 > 0)) && ((d3 > 0 && d4 < 0) || (d3 < 0 && d4 > 0))) {
        const double u = d3 / (d3 - d4);
        const Vec2 x = s.a + u * (s.b - s.a);
        std::ostringstream m;
        m << (s.loop == t.loop ? "self-intersection" : "loops cross") << " at " << position_text(x) << ", edges "
          << s.index + 1 << " and " << t.index + 1;
        if (s.loop == t.loop) m << " of loop " << s.loop + 1;
        else m << " of loops " << s.loop + 1 << " and " << t.loop + 1;
        return m.str();
      }
    }
  }
  return {};
}

// The patches of a polygonised operand, plus one for the part of its approximation_area that has
// none (a reader's stroked arcs): that part lies within approximation_width of the operand's own
// boundary, which after the operation need not be the result's, so it is placed in the operand's
// box widened by that width.
void add_patches(const Region& polygonal, const Region& original, std::vector<ApproximationPatch>& out) {
  double located = 0.0;
  for (const ApproximationPatch& p : polygonal.approximation_patches) {
    out.push_back(p);
    located += p.area;
  }
  const double rest = polygonal.approximation_area - located;
  if (!(rest > 0.0) || original.loops.empty()) return;
  BoundingBox b = bounds(original);
  const double pad = polygonal.approximation_width + 1e-12 * std::max(b.min.cwiseAbs().maxCoeff(), b.max.cwiseAbs().maxCoeff());
  b.min -= Vec2(pad, pad);
  b.max += Vec2(pad, pad);
  out.push_back({b, rest});
}

}  // namespace

Region combine(const Region& a, const Region& b, BooleanOp op, double sagitta) {
  if (!(sagitta > 0.0)) sagitta = std::max(default_sagitta(a), default_sagitta(b));
  const Region pa = polygonised(a, sagitta), pb = polygonised(b, sagitta);
  const BgMulti ma = to_multi_polygon(pa);
  const BgMulti mb = to_multi_polygon(pb);
  BgMulti out;
  switch (op) {
    case BooleanOp::unite: bg::union_(ma, mb, out); break;
    case BooleanOp::subtract: bg::difference(ma, mb, out); break;
    case BooleanOp::intersect: bg::intersection(ma, mb, out); break;
  }
  Region r = from_multi_polygon(out);
  // The exact result and this one differ only where an operand and its polygonisation do (a
  // point in A - B but not in P(A) - P(B) is outside P(A) or inside P(B)): inside the operands'
  // patches, wherever the result's boundary now is, or whether it has any. The bound is taken
  // over those patches, never over the result's boundary (a sliver lost whole gave 0 +- 6e-304).
  r.approximation_area = pa.approximation_area + pb.approximation_area;
  r.approximation_width = std::max(pa.approximation_width, pb.approximation_width);
  add_patches(pa, a, r.approximation_patches);
  add_patches(pb, b, r.approximation_patches);
  // Where edges cross, the result's vertices were computed (crossing_move.hpp): without it a
  // mean on such a corner under a micron spread trusted a corner that had moved 7.5e-8 m.
  r.vertex_move = std::max(pa.vertex_move, pb.vertex_move) + crossing_move(r, pa, pb);
  return r;
}

Validity check_validity(const Region& region) {
  Validity v;
  if (region.loops.empty()) {
    v.valid = false;
    v.fault = "the region has no loops";
    return v;
  }
  for (const Loop& l : region.loops)
    for (const Edge& e : l)
      // Within +-1e12 m (NaN fails too): beyond, the validity test's integer rescaling overflowed
      // ("internal error: bad numeric conversion", issue 12 item 7).
      if (!(e.from.cwiseAbs().maxCoeff() <= 1e12 && e.to.cwiseAbs().maxCoeff() <= 1e12)) {
        v.valid = false;
        v.fault = "a coordinate is not finite or beyond +-1e12 m";
        return v;
      }
  const Region polygonal = polygonised(region, default_sagitta(region));
  if (std::string crossing = find_crossing(polygonal); !crossing.empty()) {
    v.valid = false;
    v.fault = crossing;
    return v;
  }
  const BgMulti multi = to_multi_polygon(polygonal);
  ValidityFailure failure;
  if (!bg::is_valid(multi, failure, bg::default_strategy())) {
    v.valid = false;
    v.fault = describe(failure, narrowness(polygonal));
  }
  return v;
}

}  // namespace strewn
