// The public builders (strewn/region_builders.hpp) refuse invalid regions with an input_error
// whose one-line message names the builder and the fault, instead of building a region that
// integrate() later reports as "numerical check failed" or integrates to a wrong value.
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

const double kNaN = std::numeric_limits<double>::quiet_NaN();
const double kInf = std::numeric_limits<double>::infinity();

// The message of the input_error `build` throws (fails the test when it throws nothing, or
// another type).
template <class Build>
std::string refusal(Build build) {
  try {
    build();
  } catch (const input_error& e) {
    const std::string m = e.what();
    CHECK(m.find('\n') == std::string::npos);
    return m;
  }
  FAIL("no input_error");
  return {};
}

const std::vector<Vec2> kSquare = {{0, 0}, {4, 0}, {4, 4}, {0, 4}};

}  // namespace

TEST_CASE("polygon refuses a bow-tie, naming the edges that cross and where", "[region][builders][errors]") {
  // Before: built, then integrate() threw "numerical check failed" (p = 1.075 for this one).
  CHECK(refusal([] { return polygon({{0, 0}, {2, 2}, {2, 0}, {0, 1}}); }) ==
        "polygon: self-intersection at (0.667, 0.667), edges 1 and 3 of loop 1");
  CHECK_THAT(refusal([] { return polygon({{0, 0}, {1, 1}, {1, 0}, {0, 1}}); }),
             StartsWith("polygon: self-intersection at (0.5, 0.5)"));
}

TEST_CASE("polygon refuses fewer than three distinct vertices", "[region][builders][errors]") {
  CHECK(refusal([] { return polygon({{0, 0}, {1, 1}, {0, 0}}); }) == "polygon: ring 1 has fewer than 3 distinct points");
  CHECK(refusal([] { return polygon({{0, 0}, {1, 1}}); }) == "polygon: ring 1 has fewer than 3 distinct points");
  CHECK_THAT(refusal([] { return polygon({{0, 0}, {1, 1}, {1, 1}}); }), StartsWith("polygon: "));
  CHECK_THAT(refusal([] { return polygon({{0, 0}, {1, 1}, {2, 2}}); }), StartsWith("polygon: "));  // collinear
}

TEST_CASE("polygon refuses non-finite coordinates", "[region][builders][errors]") {
  for (const double bad : {kNaN, kInf, -kInf}) {
    CHECK(refusal([bad] { return polygon({{0, 0}, {bad, 0}, {1, 1}}); }) ==
          "polygon: a coordinate is not finite or beyond +-1e12 m");
    CHECK_THAT(refusal([bad] { return polygon(kSquare, {{{1, 1}, {2, bad}, {1, 2}}}); }), StartsWith("polygon: "));
  }
}

TEST_CASE("polygon refuses a hole outside its outer ring or crossing it", "[region][builders][errors]") {
  CHECK_THAT(refusal([] { return polygon(kSquare, {{{5, 1}, {6, 1}, {6, 2}}}); }),
             StartsWith("polygon: hole 1 of polygon 1 (ring 2) lies outside its outer ring"));
  CHECK(refusal([] { return polygon(kSquare, {{{3, 1}, {5, 1}, {5, 2}, {3, 2}}}); }) ==
        "polygon: loops cross at (4, 1), edges 1 and 2 of loops 2 and 1");
  // Two holes that cross each other.
  CHECK(refusal([] { return polygon(kSquare, {{{1, 1}, {2, 1}, {2, 2}}, {{1.5, 1.2}, {3, 1.2}, {3, 3}}}); }) ==
        "polygon: loops cross at (2, 1.2), edges 1 and 2 of loops 3 and 2");
}

TEST_CASE("polygon builds a valid polygon, with holes, whatever its orientation", "[region][builders]") {
  const Region r = polygon({{0, 4}, {4, 4}, {4, 0}, {0, 0}, {0, 4}},  // clockwise, closing repeat
                           {{{1, 1}, {3, 1}, {3, 3}, {1, 3}}});          // counter-clockwise
  REQUIRE(r.loops.size() == 2);
  CHECK(r.loops[0].size() == 4);
  CHECK(area(r) == Approx(12.0).epsilon(1e-15));
  CHECK(winding_number(r, {0.5, 0.5}) == 1);
  CHECK(winding_number(r, {2, 2}) == 0);
  // The same as the region built and normalised by hand.
  const Region by_hand = with_hole(kSquare, {{1, 1}, {3, 1}, {3, 3}, {1, 3}});
  const Gaussian g = Gaussian::from_axes(Vec2(1.0, 2.0), 1.0, 0.5, 30.0);
  CHECK(integrate(g, r, IntegrateOptions{}).p == Approx(integrate(g, by_hand, IntegrateOptions{}).p).epsilon(1e-13));
}

TEST_CASE("the other builders refuse non-finite values and shapes without area", "[region][builders][errors]") {
  CHECK(refusal([] { return rectangle({0, kNaN}, {1, 1}); }) == "rectangle: a corner is not finite");
  CHECK(refusal([] { return rectangle({0, 0}, {kInf, 1}); }) == "rectangle: a corner is not finite");
  CHECK(refusal([] { return rectangle({0, 0}, {1, 0}); }) ==
        "rectangle: the corners must differ in x and in y (no area)");
  CHECK(refusal([] { return disk({kNaN, 0}, 1.0); }) == "disk: the centre is not finite");
  CHECK(refusal([] { return disk({0, 0}, kInf); }) == "disk: the radius must be positive and finite");
  CHECK(refusal([] { return disk({0, 0}, 0.0); }) == "disk: the radius must be positive and finite");
  Mat2 parallel;
  parallel << 1, 2, 1, 2;
  CHECK(refusal([&] { return ellipse({0, 0}, parallel); }) ==
        "ellipse: the axes must be finite and not parallel (no area)");
  CHECK(refusal([] { return ellipse({0, 0}, kNaN * Mat2::Identity()); }) ==
        "ellipse: the axes must be finite and not parallel (no area)");
  CHECK(refusal([] { return ellipse({kInf, 0}, Mat2::Identity()); }) == "ellipse: the centre is not finite");
  CHECK(refusal([] { return ring_sector({0, kNaN}, 1, 2, 0, 1); }) == "ring_sector: the centre is not finite");
  CHECK(refusal([] { return ring_sector({0, 0}, 2, 1, 0, 1); }) ==
        "ring_sector: the radii must be finite with 0 < inner < outer");
  CHECK(refusal([] { return ring_sector({0, 0}, 1, 2, kNaN, 1); }) ==
        "ring_sector: the angles must be finite with from < to <= from + 2 pi");
}

TEST_CASE("the builders keep building what they built before", "[region][builders]") {
  CHECK(area(rectangle({1, 1}, {0, 0})) == Approx(1.0).epsilon(1e-15));  // corners either way round
  CHECK(area(disk({1, 2}, 0.5)) == Approx(0.25 * kPi).epsilon(1e-14));
  CHECK(area(ring_sector({0, 0}, 1.0, 2.0, 0.0, 2 * kPi)) == Approx(3 * kPi).epsilon(1e-14));
}
