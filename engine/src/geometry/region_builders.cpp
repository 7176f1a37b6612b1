#include "strewn/region_builders.hpp"

#include <Eigen/LU>
#include <cmath>
#include <string>

#include "geometry/polygon_rings.hpp"
#include "geometry/region_internal.hpp"
#include "strewn/constants.hpp"
#include "strewn/error.hpp"

namespace strewn {
namespace {

void require(bool ok, const std::string& what) {
  if (!ok) throw input_error(what);
}

bool finite(const Vec2& v) { return std::isfinite(v.x()) && std::isfinite(v.y()); }

}  // namespace

Region unchecked_polygon(const std::vector<Vec2>& vertices) {
  Loop loop;
  for (std::size_t i = 0; i < vertices.size(); ++i)
    loop.push_back(Edge::segment(vertices[i], vertices[(i + 1) % vertices.size()]));
  Region r;
  r.loops.push_back(loop);
  return normalised(r);
}

// The readers' checks (geometry/polygon_rings.cpp), so that a polygon is refused here for what a
// scenario's, a WKT's or a GeoJSON's polygon is refused for, in the same words.
Region polygon(const std::vector<Vec2>& outer, const std::vector<std::vector<Vec2>>& holes) {
  PolygonRings rings{outer};
  rings.insert(rings.end(), holes.begin(), holes.end());
  return region_from_polygons({rings}, "polygon");
}

Region polygon(const std::vector<Vec2>& vertices) { return polygon(vertices, {}); }

// The curved and axis-parallel shapes are valid whenever their parameters are (finite, with
// area), which is checked directly: the validity test would polygonise them on every build
// (a can of a deposition grid builds a disk and a rectangle).
Region rectangle(const Vec2& lo, const Vec2& hi) {
  require(finite(lo) && finite(hi), "rectangle: a corner is not finite");
  require(lo.x() != hi.x() && lo.y() != hi.y(), "rectangle: the corners must differ in x and in y (no area)");
  return unchecked_polygon({lo, {hi.x(), lo.y()}, hi, {lo.x(), hi.y()}});
}

Region ellipse(const Vec2& centre, const Mat2& axes) {
  require(finite(centre), "ellipse: the centre is not finite");
  require(axes.allFinite() && axes.determinant() != 0.0, "ellipse: the axes must be finite and not parallel (no area)");
  Region r;
  r.loops.push_back({Edge::arc(centre, axes, 0.0, 2 * kPi)});
  return normalised(r);
}

Region disk(const Vec2& centre, double radius) {
  require(radius > 0.0 && std::isfinite(radius), "disk: the radius must be positive and finite");
  require(finite(centre), "disk: the centre is not finite");
  return ellipse(centre, radius * Mat2::Identity());
}

Region ring_sector(const Vec2& centre, double inner, double outer, double from, double to) {
  require(inner > 0.0 && inner < outer && std::isfinite(outer), "ring_sector: the radii must be finite with 0 < inner < outer");
  require(to > from && to - from <= 2 * kPi, "ring_sector: the angles must be finite with from < to <= from + 2 pi");
  require(finite(centre), "ring_sector: the centre is not finite");
  Loop loop;
  const Edge o = Edge::arc(centre, outer * Mat2::Identity(), from, to);
  const Edge i = Edge::arc(centre, inner * Mat2::Identity(), to, from);
  loop.push_back(Edge::segment(i.to, o.from));
  loop.push_back(o);
  loop.push_back(Edge::segment(o.to, i.from));
  loop.push_back(i);
  Region r;
  r.loops.push_back(loop);
  return normalised(r);
}

}  // namespace strewn
