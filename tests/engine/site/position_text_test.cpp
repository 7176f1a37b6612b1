// Printing a site position (strewn/position_text.hpp): fixed-point to the millimetre at any
// distance from the origin, where "%g" keeps six significant figures and loses metres on a UTM
// northing.
#include <catch2/catch.hpp>

#include <cmath>
#include <cstdlib>
#include <string>

#include "strewn/position_text.hpp"

TEST_CASE("a UTM position prints to the millimetre, trailing zeros dropped", "[site][position_text]") {
  // EPSG:32633 coordinates of the trial's plan (x ~ 5e5 m, y ~ 5.4e6 m).
  CHECK(strewn::position_text({512350.5, 5403712.25}) == "(512350.5, 5403712.25)");
  CHECK(strewn::position_text({512386.1234, 5403712.0}) == "(512386.123, 5403712)");
  CHECK(strewn::position_text({0.0, 6.0}) == "(0, 6)");
  CHECK(strewn::coordinate_text(-0.0004) == "0");  // rounds to zero: no "-0"
  CHECK(strewn::coordinate_text(-1.25) == "-1.25");
  // In feet: 0.3048 m is 1 ft exactly (NIST SP 811 B.8).
  CHECK(strewn::position_text({0.3048, 3048.0}, strewn::LengthUnit::foot) == "(1, 10000)");
}

TEST_CASE("a printed coordinate reads back within half a millimetre at every scale up to 1e12 m", "[site][position_text]") {
  // strtod (the C library, not strewn) parses the text back; the printed value is the nearest
  // multiple of 1e-3, so it is within 5e-4 of the value plus the double's own rounding there.
  for (double v : {0.0012345, 1.5, 512350.5004, 5403712.2496, 9.87654321e9, -4.4e11}) {
    const std::string t = strewn::coordinate_text(v);
    const double back = std::strtod(t.c_str(), nullptr);
    INFO(v << " -> " << t);
    CHECK(std::fabs(back - v) <= 5e-4 + 4 * std::abs(v) * 2.2e-16);
  }
}
