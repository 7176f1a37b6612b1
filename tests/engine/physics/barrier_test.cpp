// A barrier's shadow against the direct test it stands for: a point is in the shadow when the
// straight segment from the source to it crosses the barrier (written here again, independently,
// with the orientation test of computational geometry: de Berg et al., "Computational
// Geometry", 3rd ed., section 2.1), and the height rule's similar triangles worked by hand.

#include <catch2/catch.hpp>

#include <random>

#include "strewn/barrier.hpp"
#include "strewn/error.hpp"
#include "strewn/region.hpp"

using namespace strewn;

namespace {

double orient(const Vec2& a, const Vec2& b, const Vec2& c) {
  return (b.x() - a.x()) * (c.y() - a.y()) - (b.y() - a.y()) * (c.x() - a.x());
}

// Proper crossing of segments pq and ab (each pair of ends strictly on opposite sides).
bool segments_cross(const Vec2& p, const Vec2& q, const Vec2& a, const Vec2& b) {
  return orient(p, q, a) * orient(p, q, b) < 0 && orient(a, b, p) * orient(a, b, q) < 0;
}

}  // namespace

TEST_CASE("a point behind the net is in its shadow, a point beside or before it is not", "[barrier]") {
  const Barrier net{"net", {{-1, 3}, {1, 3}}, 0.95, std::nullopt};
  const Region h = shadow(net, {0, 0}, 50.0, std::nullopt);
  CHECK(winding_number(h, {0, 6}) == 1);
  CHECK(winding_number(h, {1.2, 4.0}) == 1);   // x / y = 0.3 < 1 / 3, the edge ray through (1, 3)
  CHECK(winding_number(h, {3.0, 4.0}) == 0);   // beside: outside the wedge
  CHECK(winding_number(h, {0, 2}) == 0);       // before the net
  CHECK(winding_number(h, {0, 49}) == 1);      // far, within the reach
  CHECK(path_crosses(net, {0, 0}, {0, 6}, std::nullopt));
  CHECK_FALSE(path_crosses(net, {0, 0}, {3, 4}, std::nullopt));
}

TEST_CASE("the shadow agrees with the direct path-crosses-segment test at random points", "[barrier]") {
  std::mt19937_64 rng(18);
  std::uniform_real_distribution<double> u(-20.0, 20.0);
  const Barrier fence{"fence", {{-4, 2}, {-1, 5}, {3, 4}, {6, 8}}, 1.0, std::nullopt};
  const Vec2 from(0.5, -1.0);
  const Region h = shadow(fence, from, 40.0, std::nullopt);
  int inside = 0;
  for (int k = 0; k < 4000; ++k) {
    const Vec2 x(u(rng), u(rng));
    bool crosses = false;
    for (std::size_t s = 0; s + 1 < fence.points.size(); ++s)
      crosses = crosses || segments_cross(from, x, fence.points[s], fence.points[s + 1]);
    INFO("point " << x.transpose());
    CHECK((winding_number(h, x) == 1) == crosses);
    CHECK(path_crosses(fence, from, x, std::nullopt) == crosses);
    inside += crosses;
  }
  CHECK(inside > 400);  // the sample reached into the shadow
}

TEST_CASE("with a height below the release height the shadow ends where the straight flight clears the top", "[barrier]") {
  // Released at h0 = 2 m, barrier h = 1 m at 5 m: by similar triangles the line from (0, 2 m) to
  // an impact at L metres is at height 2 (1 - 5 / L) over the barrier, <= 1 m when L <= 10 m.
  const Barrier screen{"screen", {{-3, 5}, {3, 5}}, 1.0, 1.0};
  CHECK(path_crosses(screen, {0, 0}, {0, 9.9}, 2.0));
  CHECK_FALSE(path_crosses(screen, {0, 0}, {0, 10.1}, 2.0));
  const Region h = shadow(screen, {0, 0}, 100.0, 2.0);
  CHECK(winding_number(h, {0, 9.9}) == 1);
  CHECK(winding_number(h, {0, 10.1}) == 0);
  // The area of the trapezoid between the barrier (6 m) and its double (12 m), 5 m deep: 45 m^2.
  CHECK(area(h) == Approx(45.0).epsilon(1e-12));
  // A barrier as tall as the release point, or a source without a release height: all of it.
  CHECK(path_crosses(screen, {0, 0}, {0, 30}, 1.0));
  CHECK(path_crosses(screen, {0, 0}, {0, 30}, std::nullopt));
}

TEST_CASE("a barrier on a line through the source casts no shadow", "[barrier]") {
  const Barrier edge_on{"edge on", {{0, 2}, {0, 6}}, 1.0, std::nullopt};
  CHECK(shadow(edge_on, {0, 0}, 20.0, std::nullopt).empty());
}

TEST_CASE("a barrier that is not well formed is refused", "[barrier]") {
  CHECK_THROWS_AS(check_barrier({"one point", {{0, 0}}, 1.0, std::nullopt}), input_error);
  CHECK_THROWS_AS(check_barrier({"repeat", {{0, 0}, {0, 0}}, 1.0, std::nullopt}), input_error);
  CHECK_THROWS_AS(check_barrier({"catch", {{0, 0}, {1, 0}}, 1.5, std::nullopt}), input_error);
  CHECK_THROWS_AS(check_barrier({"height", {{0, 0}, {1, 0}}, 0.5, -1.0}), input_error);
  CHECK_NOTHROW(check_barrier({"ok", {{0, 0}, {1, 0}}, 0.5, 2.0}));
}
