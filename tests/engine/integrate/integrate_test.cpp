// integrate()'s entry (engine/src/integrate/integrate.cpp): a region assembled by hand that is
// invalid, and so slips past the builders' checks, is reported as an input_error naming the
// fault once something goes wrong with it, not as "numerical check failed" (an engine fault).
#include <catch2/catch.hpp>
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
