#include "strewn/region_builders.hpp"

#include <cmath>
#include <string>

#include "strewn/constants.hpp"
#include "strewn/error.hpp"

namespace strewn {
namespace {

void require(bool ok, const std::string& what) {
  if (!ok) throw input_error(what);
}

}  // namespace

Region polygon(const std::vector<Vec2>& vertices) {
  require(vertices.size() >= 3, "a polygon needs at least three vertices");
  Loop loop;
  for (std::size_t i = 0; i < vertices.size(); ++i)
    loop.push_back(Edge::segment(vertices[i], vertices[(i + 1) % vertices.size()]));
  Region r;
  r.loops.push_back(loop);
  return normalised(r);
}

Region rectangle(const Vec2& lo, const Vec2& hi) {
  return polygon({lo, {hi.x(), lo.y()}, hi, {lo.x(), hi.y()}});
}

Region ellipse(const Vec2& centre, const Mat2& axes) {
  Region r;
  r.loops.push_back({Edge::arc(centre, axes, 0.0, 2 * kPi)});
  return normalised(r);
}

Region disk(const Vec2& centre, double radius) {
  require(radius > 0.0 && std::isfinite(radius), "a disk needs a positive, finite radius");
  return ellipse(centre, radius * Mat2::Identity());
}

Region ring_sector(const Vec2& centre, double inner, double outer, double from, double to) {
  require(inner > 0.0 && inner < outer && std::isfinite(outer), "a ring sector needs radii 0 < inner < outer");
  require(to > from && to - from <= 2 * kPi, "a ring sector needs from < to <= from + 2 pi");
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
