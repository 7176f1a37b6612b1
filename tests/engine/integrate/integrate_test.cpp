// integrate()'s entry (engine/src/integrate/integrate.cpp): a region assembled by hand that is
// invalid, and so slips past the builders' checks, is reported as an input_error naming the
// fault once something goes wrong with it, not as "numerical check failed" (an engine fault).
#include <catch2/catch.hpp>
#include <cmath>
#include <limits>
#include <string>

#include "strewn/error.hpp"
#include "strewn/integrate.hpp"
#include "test_support.hpp"

using namespace strewn;
using namespace strewn::test;
using Catch::StartsWith;

namespace {

Loop loop_through(const std::vector<Vec2>& pts) {
  Loop l;
  for (std::size_t i = 0; i < pts.size(); ++i) l.push_back(Edge::segment(pts[i], pts[(i + 1) % pts.size()]));
  return l;
}

std::string refusal(const Region& r) {
  const Gaussian g = Gaussian::from_axes(Vec2(0.5, 0.5), 1.0, 0.5, 0.0);
  for (const Method m : {Method::exact, Method::cubature}) {
    IntegrateOptions o;
    o.method = m;
    try {
      integrate(g, r, o);
    } catch (const input_error& e) {
      return e.what();
    }
  }
  FAIL("no input_error");
  return {};
}

}  // namespace

TEST_CASE("a bow-tie assembled by hand is refused as an invalid region, not as a numerical fault", "[integrate][errors]") {
  // Its lobes wind in opposite senses: the exact method's p came out 1.075 and the final check
  // threw std::runtime_error ("numerical check failed ... Please report this").
  Region bow;
  bow.loops.push_back(loop_through({{0, 0}, {2, 2}, {2, 0}, {0, 1}}));
  CHECK(refusal(normalised(bow)) == "invalid region: self-intersection at (0.667, 0.667), edges 2 and 4 of loop 1");
}

TEST_CASE("a region with a non-finite coordinate assembled by hand is refused as such", "[integrate][errors]") {
  // Its area is NaN: refused before as "not normalised ... pass it through strewn::normalised()".
  Region r;
  r.loops.push_back(loop_through({{0, 0}, {std::numeric_limits<double>::quiet_NaN(), 0}, {1, 1}}));
  CHECK(refusal(r) == "invalid region: a coordinate is not finite or beyond +-1e12 m");
}

TEST_CASE("a valid region that is not normalised is still told to normalise", "[integrate][errors]") {
  Region r;
  r.loops.push_back(loop_through({{0, 0}, {0, 1}, {1, 1}, {1, 0}}));  // clockwise
  CHECK_THAT(refusal(r), StartsWith("the region is not normalised"));
}

TEST_CASE("a clockwise polygon is told to normalise wherever the mean lies and however many edges it has", "[integrate][errors]") {
  // The exact method's one-pass path proves the area positive in its own pass over the edges
  // (integrate_exact_polygon); a clockwise ring must still be refused, with the mean inside,
  // outside, on a vertex and far away, at the origin and at national-grid coordinates, with 4
  // and with 200 vertices (several blocks of the pass).
  for (const Vec2& site : {Vec2(0.0, 0.0), Vec2(452317.0, 5300042.0)}) {
    for (const int sides : {4, 200}) {
      std::vector<Vec2> pts;
      for (int i = 0; i < sides; ++i) {
        const double a = -2 * 3.141592653589793 * i / sides;  // clockwise
        pts.push_back(site + Vec2(3.0 * std::cos(a), 2.0 * std::sin(a)));
      }
      Region r;
      r.loops.push_back(loop_through(pts));
      for (const Vec2& mean : {Vec2(0.2, 0.1), Vec2(3.0, 0.0), Vec2(5.0, 4.0), Vec2(60.0, -80.0)}) {
        INFO("site " << site.x() << ", sides " << sides << ", mean offset " << mean.x() << ", " << mean.y());
        const Gaussian g = Gaussian::from_axes(site + mean, 1.0, 0.5, 0.3);
        IntegrateOptions o;
        o.method = Method::exact;
        try {
          integrate(g, r, o);
          FAIL("not refused");
        } catch (const input_error& e) {
          CHECK_THAT(std::string(e.what()), StartsWith("the region is not normalised"));
        }
      }
    }
  }
}
