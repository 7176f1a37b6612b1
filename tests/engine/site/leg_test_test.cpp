// A leg test (strewn/leg_test.hpp): a test made from a known profile gives it back, and the
// volume balance of a constant profile is the volume of a cylinder, pi R^2 x depth (geometry).
#include <catch2/catch.hpp>
#include <cmath>
#include <fmt/format.h>
#include <string>
#include <vector>

#include "strewn/error.hpp"
#include "strewn/leg_test.hpp"

namespace {

std::string message(const std::string& text) {
  try {
    strewn::parse_leg_test_csv(text, "leg.csv");
  } catch (const strewn::input_error& e) {
    return e.what();
  }
  return "accepted";
}

}  // namespace

TEST_CASE("a leg test made from a known profile gives that profile back", "[site][leg_test]") {
  // An invented profile (mm/h at each distance), caught for 40 min in cans of 100 mm: each can
  // holds rate x (40/60) h mm, i.e. that times 78.54 / 10 mL (1 mL over A cm^2 is 10 / A mm).
  const std::vector<double> distance = {0.5, 2, 4, 6, 8, 10, 11.5}, rate = {6, 7.5, 9, 10, 8, 4, 0.5};
  const double area_cm2 = M_PI * 100.0 / 4.0;
  std::string text = "# duration_min = 40\n# opening_diameter_mm = 100\ndistance_m,volume_ml\n";
  for (std::size_t k = 0; k < distance.size(); ++k)
    text += fmt::format("{},{:.17g}\n", distance[k], rate[k] * (40.0 / 60.0) * area_cm2 / 10.0);
  const strewn::LegTestProfile p = strewn::profile_from_leg_test(strewn::parse_leg_test_csv(text, "leg.csv"));
  REQUIRE(p.profile.rate().size() == rate.size());
  for (std::size_t k = 0; k < rate.size(); ++k) {
    CHECK(p.profile.distance_m()[k] == distance[k]);
    CHECK(p.profile.rate()[k] == Approx(rate[k]).epsilon(1e-13));
  }
  CHECK_FALSE(p.balance);  // no flow given
}

TEST_CASE("the volume balance of a constant profile is pi R^2 x depth", "[site][leg_test]") {
  // 6 mm everywhere out to R = 10 m (the last can's rate steps to 0 at R, the first is held in
  // to the head): caught = pi 10^2 x 6 mm = 600 pi L (1 mm over 1 m^2 is 1 L). The head ran
  // 30 min at 80 L/min = 2400 L delivered: balance = 600 pi / 2400.
  std::string text = "# duration_min = 30\n# flow_l_per_min = 80\ndistance_m,depth_mm\n";
  for (int d = 1; d <= 10; ++d) text += fmt::format("{},6\n", d);
  const strewn::LegTestProfile p = strewn::profile_from_leg_test(strewn::parse_leg_test_csv(text, "leg.csv"));
  CHECK(p.caught_l == Approx(600.0 * M_PI).epsilon(1e-13));
  REQUIRE(p.delivered_l);
  CHECK(*p.delivered_l == Approx(2400.0).epsilon(1e-15));
  CHECK(*p.balance == Approx(600.0 * M_PI / 2400.0).epsilon(1e-13));
  CHECK(p.profile.rate_at(5.0) == Approx(12.0).epsilon(1e-15));  // 6 mm in half an hour
}

TEST_CASE("leg tests in feet and US gallons", "[site][leg_test]") {
  // 1 ft = 0.3048 m and 1 US gallon = 3.785411784 L, both exact by definition (NIST SP 811).
  const strewn::LegTest leg =
      strewn::parse_leg_test_csv("# duration_h = 0.5\n# flow_gpm = 10\ndistance_ft,depth_mm\n10,3\n20,2\n", "leg.csv");
  CHECK(leg.distance_m[1] == Approx(6.096).epsilon(1e-15));
  CHECK(*leg.flow_l_per_h == Approx(600.0 * 3.785411784).epsilon(1e-15));
}

TEST_CASE("a leg test in inches reads as the same leg in mm; distances in feet mark the file as US", "[site][leg_test][units]") {
  // 1 in = 25.4 mm and 1 ft = 0.3048 m exactly (NIST SP 811, 2008, appendix B.8): the same
  // cans written in inches and feet give the metric leg to rounding.
  const strewn::LegTest metric = strewn::parse_leg_test_csv(
      "# duration_min = 30\n# opening_diameter_mm = 101.6\ndistance_m,volume_ml\n3.048,20\n6.096,12\n", "leg.csv");
  const strewn::LegTest us = strewn::parse_leg_test_csv(
      "# duration_min = 30\n# opening_diameter_in = 4\ndistance_ft,volume_ml\n10,20\n20,12\n", "leg_us.csv");
  CHECK(metric.units == strewn::LengthUnit::metre);
  CHECK(us.units == strewn::LengthUnit::foot);
  REQUIRE(us.opening_diameter_m);
  CHECK(*us.opening_diameter_m == Approx(0.1016).epsilon(1e-15));
  for (std::size_t k = 0; k < 2; ++k) {
    CHECK(us.distance_m[k] == Approx(metric.distance_m[k]).epsilon(1e-15));
    CHECK(us.depth_mm[k] == Approx(metric.depth_mm[k]).epsilon(1e-14));
  }
  const strewn::LegTest inches =
      strewn::parse_leg_test_csv("# duration_min = 30\ndistance_ft,depth_in\n10,0.5\n20,0.25\n", "leg_in.csv");
  CHECK(inches.depth_mm[0] == Approx(12.7).epsilon(1e-15));
  CHECK(inches.depth_mm[1] == Approx(6.35).epsilon(1e-15));
}

TEST_CASE("a bad leg test is refused with its file, line and column", "[site][leg_test][errors]") {
  CHECK(message("# duration_min = 30\n# flow_lpm = 3\ndistance_m,depth_mm\n1,2\n2,1\n").rfind("leg.csv:2:3: unknown setting 'flow_lpm'", 0) == 0);
  CHECK(message("# duration_min = 30\ndistance_m,depth_mm\n1,2\n1,1\n") == "leg.csv:4:1: distances must increase from can to can");
  CHECK(message("# duration_min = 30\ndistance_m,volume_ml\n1,2\n2,1\n").rfind("leg.csv:2:12: volume_ml needs the cans' opening", 0) == 0);
  CHECK(message("# duration_min = 30\ndistance,depth_mm\n1,2\n2,1\n").rfind("leg.csv:2:1: unknown column 'distance' (did you mean 'distance_m'?)", 0) == 0);
  CHECK(message("# duration_min = 0\ndistance_m,depth_mm\n1,2\n2,1\n") == "leg.csv:1:18: the duration must be above 0 and at most 10000 h");
  CHECK(message("# duration_min = 30\ndistance_m,depth_mm\n1,0\n2,0\n") == "leg.csv:2:1: no can caught anything: there is no profile to make");
  CHECK(message("# duration_min = 30\ndistance_m,depth_mm\n1,2\n") == "leg.csv:2:1: a leg test needs at least two cans");
}
