#include "strewn/region.hpp"

#include <boost/geometry.hpp>
#include <boost/geometry/index/rtree.hpp>
#include <iterator>
#include <vector>

#include <Eigen/SVD>
#include <algorithm>
#include <Eigen/LU>
#include <cmath>
#include <limits>

#include "strewn/constants.hpp"
#include "strewn/error.hpp"
#include "geometry/region_internal.hpp"

namespace strewn {
namespace {


double cross(const Vec2& a, const Vec2& b) { return a.x() * b.y() - a.y() * b.x(); }

// Position of s along the arc's travel, in [0, 2 pi).
double travel_offset(const Edge& e, double s) {
  const double dir = e.s_to >= e.s_from ? 1.0 : -1.0;
  const double offset = dir * (s - e.s_from);
  if (offset >= 0.0 && offset < kTwoPi) return offset;  // what fmod returns, without the call
  double k = std::fmod(offset, kTwoPi);
  if (k < 0) k += kTwoPi;
  return k;
}

int edge_crossings(const Edge& e, const Vec2& p) {
  if (e.kind == Edge::Kind::segment) {
    const Vec2& a = e.from;
    const Vec2& b = e.to;
    if (a.y() <= p.y() && p.y() < b.y() && cross(b - a, p - a) > 0) return 1;
    if (b.y() <= p.y() && p.y() < a.y() && cross(b - a, p - a) < 0) return -1;
    return 0;
  }
  // Arc: split into pieces monotone in y (dy/ds = 0 at s = atan2(A11, A10) + k pi) and apply
  // the segments' half-open rule to each piece, with the arc's own end points exactly as
  // stored so that neighbouring edges agree on a vertex lying on the ray.
  const double a10 = e.axes(1, 0), a11 = e.axes(1, 1);
  const double span = std::fabs(e.s_to - e.s_from);
  const double dir = e.s_to >= e.s_from ? 1.0 : -1.0;
  double cuts[4];
  int n_cuts = 0;
  const double s_turn = std::atan2(a11, a10);
  for (int k = -2; k <= 2 && n_cuts < 4; ++k) {
    const double off = travel_offset(e, s_turn + k * kPi);
    if (off > 0.0 && off < span) {
      bool dup = false;
      for (int i = 0; i < n_cuts; ++i) dup = dup || std::fabs(cuts[i] - off) < 1e-15;
      if (!dup) cuts[n_cuts++] = off;
    }
  }
  std::sort(cuts, cuts + n_cuts);
  const double R = std::hypot(a10, a11);
  const double d = p.y() - e.centre.y();
  if (R == 0.0 || std::fabs(d) > R) return 0;
  const double phi = std::atan2(a11, a10);
  const double delta = std::acos(std::clamp(d / R, -1.0, 1.0));
  int w = 0;
  double off_a = 0.0;
  Vec2 P = e.from;
  for (int i = 0; i <= n_cuts; ++i) {
    const double off_b = i < n_cuts ? cuts[i] : span;
    const Vec2 Q = i < n_cuts ? e.point(e.s_from + dir * off_b) : e.to;
    const bool up = Q.y() > P.y();
    const bool crosses = up ? (P.y() <= p.y() && p.y() < Q.y()) : (Q.y() <= p.y() && p.y() < P.y());
    if (crosses) {
      // The crossing is the solution of y(s) = p.y inside this piece.
      double best_x = P.x(), best_gap = 1e300;
      for (double s : {phi + delta, phi - delta}) {
        const double off = travel_offset(e, s);
        auto gap = [&](double x) { return x < off_a ? off_a - x : (x > off_b ? x - off_b : 0.0); };
        const double wrap = std::min(gap(off), gap(off + 2 * kPi));  // offset 0 is also 2 pi
        if (wrap < best_gap) {
          best_gap = wrap;
          best_x = e.point(s).x();
        }
      }
      if (best_x > p.x()) w += up ? 1 : -1;
    }
    P = Q;
    off_a = off_b;
  }
  return w;
}

}  // namespace

int loop_winding(const Loop& loop, const Vec2& p) {
  // The half-open rule pairs the crossings of neighbouring edges at a vertex on the ray only if
  // they agree on that vertex to the last bit. A loop closed only to rounding (an arc's end
  // computed by cos and sin next to a segment's typed-in end) is closed here by the tiny
  // segments between them, as the exact integrator closes it too.
  // An arc's stored ends need not be its own points at s_from and s_to either: a whitened
  // arc's ends are whitened apart from its centre and axes, each with its own rounding (an
  // ellipse about the mean at a UTM site under a 1e5:1 spread: the stored start 5.7e-6 below
  // the arc's own, the ray from the centre passing between them, winding 0 for 1 and p = 0
  // for 0.989). Those gaps are closed by segments too.
  int w = 0;
  for (std::size_t k = 0; k < loop.size(); ++k) {
    const Edge& e = loop[k];
    const Vec2& start = loop[(k + loop.size() - 1) % loop.size()].to;
    if (e.from != start) w += edge_crossings(Edge::segment(start, e.from), p);
    if (e.kind == Edge::Kind::arc) {
      const Edge own = Edge::arc(e.centre, e.axes, e.s_from, e.s_to);
      if (own.from != e.from) w += edge_crossings(Edge::segment(e.from, own.from), p);
      w += edge_crossings(own, p);
      if (own.to != e.to) w += edge_crossings(Edge::segment(own.to, e.to), p);
    } else {
      w += edge_crossings(e, p);
    }
  }
  return w;
}

namespace {

double loop_length(const Loop& loop);

}  // namespace

Edge Edge::segment(const Vec2& from, const Vec2& to) {
  Edge e;
  e.kind = Kind::segment;
  e.from = from;
  e.to = to;
  return e;
}

Edge Edge::arc(const Vec2& centre, const Mat2& axes, double s_from, double s_to) {
  Edge e;
  e.kind = Kind::arc;
  e.centre = centre;
  e.axes = axes;
  e.s_from = s_from;
  e.s_to = s_to;
  e.from = e.point(s_from);
  // A whole turn ends where it starts, to the bit (cos(s + 2 pi) need not equal cos(s)).
  const double turn = kTwoPi;
  e.to = std::fabs(std::fabs(s_to - s_from) - turn) <= 1e-14 * turn ? e.from : e.point(s_to);
  return e;
}

Vec2 Edge::point(double s) const {
  if (kind == Kind::segment) return from + s * (to - from);
  return centre + axes * Vec2(std::cos(s), std::sin(s));
}

Vec2 Edge::tangent(double s) const {
  if (kind == Kind::segment) return to - from;
  return axes * Vec2(-std::sin(s), std::cos(s));
}

Edge Edge::reversed() const {
  Edge e = *this;
  std::swap(e.from, e.to);
  std::swap(e.s_from, e.s_to);
  return e;
}

double signed_area(const Loop& loop) {
  // Green's theorem: A = 1/2 * closed integral of (x dy - y dx). For an arc c + A u(s):
  // 1/2 [c x A (u(s1) - u(s0))] + 1/2 det(A) (s1 - s0).
  // Taken about the loop's first vertex r (the integral over a closed loop does not depend on the
  // origin): at national-grid coordinates (x ~ 5e5, y ~ 5e6) the products x dy of absolute
  // coordinates would cancel to nothing for a centimetre loop; the differences to r are exact
  // for nearby points (Sterbenz) and the products keep their relative accuracy.
  if (loop.empty()) return 0.0;
  const Vec2 r = loop.front().from;
  double twice = 0.0;
  for (const Edge& e : loop) {
    if (e.kind == Edge::Kind::segment) {
      twice += cross(e.from - r, e.to - r);
    } else {
      const Vec2 du(std::cos(e.s_to) - std::cos(e.s_from), std::sin(e.s_to) - std::sin(e.s_from));
      twice += cross(e.centre - r, e.axes * du) + e.axes.determinant() * (e.s_to - e.s_from);
    }
  }
  return 0.5 * twice;
}

double area(const Region& region) {
  double a = 0.0;
  for (const Loop& l : region.loops) a += signed_area(l);
  return a;
}

int winding_number(const Region& region, const Vec2& p) {
  int w = 0;
  for (const Loop& l : region.loops) w += loop_winding(l, p);
  return w;
}

namespace {

// Adds a loop's extent to b: its vertices and each arc's extreme points.
void add_loop_bounds(const Loop& l, BoundingBox& b) {
  auto add = [&](const Vec2& p) {
    b.min = b.min.cwiseMin(p);
    b.max = b.max.cwiseMax(p);
  };
  {
    for (const Edge& e : l) {
      add(e.from);
      add(e.to);
      if (e.kind == Edge::Kind::arc) {
        // Extremes of c + A u(s): x extremes at s = atan2(A01, A00) (+ pi), y likewise.
        for (int row = 0; row < 2; ++row) {
          const double s0 = std::atan2(e.axes(row, 1), e.axes(row, 0));
          for (double s : {s0, s0 + kPi})
            if (travel_offset(e, s) <= std::fabs(e.s_to - e.s_from)) add(e.point(s));
        }
      }
    }
  }
}

}  // namespace

BoundingBox bounds(const Region& region) {
  const double inf = std::numeric_limits<double>::infinity();
  BoundingBox b{Vec2(inf, inf), Vec2(-inf, -inf)};
  for (const Loop& l : region.loops) add_loop_bounds(l, b);
  // And where the region described may differ from its polygonisation: a sliver a boolean lost
  // whole is outside the loops' box, and whatever skips the region by its box (far mixture
  // components, cubature's underflow, Monte Carlo's samples) must not skip it.
  for (const ApproximationPatch& p : region.approximation_patches) {
    b.min = b.min.cwiseMin(p.box.min);
    b.max = b.max.cwiseMax(p.box.max);
  }
  return b;
}

std::vector<std::vector<std::size_t>> loops_around(const Region& region, const std::vector<Vec2>& probes,
                                                   const std::vector<std::size_t>& skip) {
  // Only a loop whose box holds a point can wind around it; Boost.Geometry's R-tree finds those
  // boxes (a MULTIPOLYGON of 10,000 squares took 24 s when every pair was tested).
  namespace bg = boost::geometry;
  using BgPoint = bg::model::point<double, 2, bg::cs::cartesian>;
  using BgBox = bg::model::box<BgPoint>;
  using Entry = std::pair<BgBox, std::size_t>;
  std::vector<Entry> boxes;
  boxes.reserve(region.loops.size());
  const double inf = std::numeric_limits<double>::infinity();
  for (std::size_t j = 0; j < region.loops.size(); ++j) {
    BoundingBox b{Vec2(inf, inf), Vec2(-inf, -inf)};
    add_loop_bounds(region.loops[j], b);
    // Padded by far more than the rounding of an arc's extreme points.
    const double pad = 1e-9 * (b.max - b.min).norm() + 1e-12 * std::max(b.min.cwiseAbs().maxCoeff(), b.max.cwiseAbs().maxCoeff());
    boxes.emplace_back(BgBox(BgPoint(b.min.x() - pad, b.min.y() - pad), BgPoint(b.max.x() + pad, b.max.y() + pad)), j);
  }
  const bg::index::rtree<Entry, bg::index::rstar<16>> tree(boxes.begin(), boxes.end());
  std::vector<std::vector<std::size_t>> out(probes.size());
  std::vector<Entry> found;
  for (std::size_t i = 0; i < probes.size(); ++i) {
    found.clear();
    tree.query(bg::index::covers(BgPoint(probes[i].x(), probes[i].y())), std::back_inserter(found));
    for (const Entry& entry : found)
      if (entry.second != skip[i] && loop_winding(region.loops[entry.second], probes[i]) != 0)
        out[i].push_back(entry.second);
    std::sort(out[i].begin(), out[i].end());
  }
  return out;
}

namespace {
double loop_length(const Loop& loop) {
  double len = 0.0;
  for (const Edge& e : loop) {
    if (e.kind == Edge::Kind::segment) {
      len += (e.to - e.from).norm();
    } else {
      // 64-chord estimate from above by the polygon plus the sagitta slack; good to ~1e-3 relative,
      // used only for error bounds and tolerances.
      const int n = 64;
      double l = 0.0;
      Vec2 prev = e.from;
      for (int i = 1; i <= n; ++i) {
        const Vec2 q = e.point(e.s_from + (e.s_to - e.s_from) * i / n);
        l += (q - prev).norm();
        prev = q;
      }
      len += l * 1.001;
    }
  }
  return len;
}
}  // namespace

double perimeter(const Region& region) {
  double len = 0.0;
  for (const Loop& l : region.loops) len += loop_length(l);
  return len;
}

Region normalised(Region region) {
  const BoundingBox box = bounds(region);
  const double scale = std::max((box.max - box.min).norm(), 1e-300);
  // Joints computed by cos and sin about a centre far from the origin (an arc at national-grid
  // coordinates) round to the ulp of those coordinates, whatever the region's size.
  const double magnitude = std::max(box.min.cwiseAbs().maxCoeff(), box.max.cwiseAbs().maxCoeff());
  const double closure = std::max(1e-9 * scale, 64 * std::numeric_limits<double>::epsilon() * magnitude);
  for (std::size_t i = 0; i < region.loops.size(); ++i) {
    const Loop& l = region.loops[i];
    if (l.empty()) throw input_error("loop " + std::to_string(i + 1) + " has no edges");
    for (std::size_t k = 0; k < l.size(); ++k) {
      const Edge& e = l[k];
      if (!e.from.allFinite() || !e.to.allFinite() || !e.centre.allFinite() || !e.axes.allFinite())
        throw input_error("loop " + std::to_string(i + 1) + " has a non-finite coordinate");
      const Edge& next = l[(k + 1) % l.size()];
      if (!((e.to - next.from).norm() <= closure))
        throw input_error("loop " + std::to_string(i + 1) + " is not closed at edge " +
                          std::to_string(k + 1));
    }
    // Make every joint exact, so that crossing tests see one shared point per vertex.
    Loop& writable = region.loops[i];
    for (std::size_t k = 0; k < writable.size(); ++k)
      writable[k].to = writable[(k + 1) % writable.size()].from;
    if (!(std::fabs(signed_area(l)) > 1e-14 * scale * scale))
      throw input_error("loop " + std::to_string(i + 1) + " encloses no area");
  }
  // The depth of each loop inside the others, from a point on it.
  std::vector<Vec2> probes;
  std::vector<std::size_t> self;
  for (std::size_t i = 0; i < region.loops.size(); ++i) {
    const Edge& e0 = region.loops[i].front();
    probes.push_back(e0.point(0.5 * (e0.param_from() + e0.param_to())));
    self.push_back(i);
  }
  const std::vector<std::vector<std::size_t>> around = loops_around(region, probes, self);
  for (std::size_t i = 0; i < region.loops.size(); ++i) {
    Loop& l = region.loops[i];
    const int depth = static_cast<int>(around[i].size());
    const bool want_ccw = depth % 2 == 0;
    if ((signed_area(l) > 0) != want_ccw) {
      std::reverse(l.begin(), l.end());
      for (Edge& e : l) e = e.reversed();
    }
  }
  return region;
}

namespace {

// x -> M (x - origin) + t, with the difference taken first.
Region map_region(const Region& region, const Mat2& M, const Vec2& origin, const Vec2& t) {
  Region out;
  out.approximation_area = region.approximation_area * std::fabs(M.determinant());
  if (region.approximation_width > 0.0 || region.vertex_move > 0.0) {
    const double stretch = Eigen::JacobiSVD<Mat2>(M).singularValues()(0);
    out.approximation_width = region.approximation_width * stretch;
    out.vertex_move = region.vertex_move * stretch;
  }
  // A box maps to a parallelogram, held by the box of its four corners.
  out.approximation_patches.reserve(region.approximation_patches.size());
  for (const ApproximationPatch& p : region.approximation_patches) {
    ApproximationPatch q;
    q.area = p.area * std::fabs(M.determinant());
    const Vec2 d = p.box.max - p.box.min;
    const Vec2 c0 = M * (p.box.min - origin) + t;
    const Vec2 cx = M.col(0) * d.x(), cy = M.col(1) * d.y();
    q.box.min = c0.cwiseMin(c0 + cx).cwiseMin(c0 + cy).cwiseMin(c0 + cx + cy);
    q.box.max = c0.cwiseMax(c0 + cx).cwiseMax(c0 + cy).cwiseMax(c0 + cx + cy);
    const double pad = 1e-12 * (q.box.max - q.box.min).norm() + 1e-15 * q.box.max.cwiseAbs().maxCoeff();
    q.box.min -= Vec2(pad, pad);
    q.box.max += Vec2(pad, pad);
    out.approximation_patches.push_back(q);
  }
  const bool flips = M.determinant() < 0;
  for (const Loop& l : region.loops) {
    Loop nl;
    nl.reserve(l.size());
    for (const Edge& e : l) {
      Edge ne = e;
      ne.from = M * (e.from - origin) + t;
      ne.to = M * (e.to - origin) + t;
      if (e.kind == Edge::Kind::arc) {
        ne.centre = M * (e.centre - origin) + t;
        ne.axes = M * e.axes;
      }
      nl.push_back(ne);
    }
    if (flips) {
      // A reflection turns counter-clockwise into clockwise: reverse to keep the region on the left.
      std::reverse(nl.begin(), nl.end());
      for (Edge& e : nl) e = e.reversed();
    }
    out.loops.push_back(std::move(nl));
  }
  return out;
}

}  // namespace

Region transformed(const Region& region, const Mat2& M, const Vec2& t) {
  return map_region(region, M, Vec2::Zero(), t);
}

Region transformed_about(const Region& region, const Mat2& M, const Vec2& origin) {
  return map_region(region, M, origin, Vec2::Zero());
}

Region polygonised(const Region& region, double sagitta) {
  if (!(sagitta > 0.0)) throw input_error("sagitta tolerance must be positive");
  Region out;
  out.approximation_area = region.approximation_area;
  out.approximation_width = region.approximation_width;
  out.approximation_patches = region.approximation_patches;
  out.vertex_move = region.vertex_move;
  for (const Loop& l : region.loops) {
    Loop nl;
    for (const Edge& e : l) {
      if (e.kind == Edge::Kind::segment) {
        nl.push_back(e);
        continue;
      }
      // The sagitta of a chord spanning parameter step ds on an ellipse is at most
      // R (1 - cos(ds/2)), R the larger semi-axis (largest singular value of axes).
      const double R = Eigen::JacobiSVD<Mat2>(e.axes).singularValues()(0);
      const double span = e.s_to - e.s_from;
      double step = R > sagitta ? 2.0 * std::acos(1.0 - sagitta / R) : kPi / 2;
      step = std::min(step, kPi / 2);
      const int n = std::max(1, static_cast<int>(std::ceil(std::fabs(span) / step)));
      const double ds = span / n;
      // Area between an elliptic arc of parameter step ds and its chord: |det A| (ds - sin ds) / 2.
      const double piece = 0.5 * std::fabs(e.axes.determinant()) * (std::fabs(ds) - std::sin(std::fabs(ds)));
      // The arc is the image under A of a unit-circle arc, which lies within 1 - cos(ds/2) of its
      // chord (and over it, ds <= pi/2): so within R (1 - cos(ds/2)) of the chord, inside the
      // chord's box widened by that much (plus rounding of the points, relative 1e-12).
      const double width = R * (1.0 - std::cos(0.5 * ds));
      constexpr int kChordsPerPatch = 8;
      ApproximationPatch patch;
      int in_patch = 0;
      Vec2 prev = e.from;
      for (int i = 1; i <= n; ++i) {
        const Vec2 q = i == n ? e.to : e.point(e.s_from + ds * i);
        nl.push_back(Edge::segment(prev, q));
        if (in_patch == 0) patch.box = {prev.cwiseMin(q), prev.cwiseMax(q)};
        patch.box.min = patch.box.min.cwiseMin(prev.cwiseMin(q));
        patch.box.max = patch.box.max.cwiseMax(prev.cwiseMax(q));
        ++in_patch;
        if (in_patch == kChordsPerPatch || i == n) {
          const double pad = width + 1e-12 * (R + e.centre.cwiseAbs().maxCoeff());
          patch.box.min -= Vec2(pad, pad);
          patch.box.max += Vec2(pad, pad);
          patch.area = in_patch * piece;
          out.approximation_patches.push_back(patch);
          in_patch = 0;
        }
        prev = q;
      }
      out.approximation_area += n * piece;
      out.approximation_width = std::max(out.approximation_width, width);
    }
    out.loops.push_back(std::move(nl));
  }
  return out;
}

}  // namespace strewn
