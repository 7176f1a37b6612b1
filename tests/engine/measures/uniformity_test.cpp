// Christiansen's CU and the low-quarter DU on hand-computed can data. No published worked
// example was at hand; each value below is worked by hand from the definitions in
// strewn/uniformity.hpp.
#include <catch2/catch.hpp>

#include "strewn/error.hpp"
#include "strewn/uniformity.hpp"

using namespace strewn;

TEST_CASE("a uniform field has CU = DU = 100%", "[uniformity]") {
  CHECK(christiansen_cu({3.2, 3.2, 3.2, 3.2, 3.2}) == Approx(100.0).epsilon(1e-15));
  CHECK(low_quarter_du({3.2, 3.2, 3.2, 3.2, 3.2}) == Approx(100.0).epsilon(1e-15));
}

TEST_CASE("CU and DU of four cans by hand", "[uniformity]") {
  // 10, 12, 8, 10: mean 10, sum |x - mean| = 4, sum x = 40: CU = 100 (1 - 4/40) = 90%.
  // Lowest quarter = the lowest can, 8: DU = 100 * 8 / 10 = 80%.
  CHECK(christiansen_cu({10, 12, 8, 10}) == Approx(90.0).epsilon(1e-14));
  CHECK(low_quarter_du({10, 12, 8, 10}) == Approx(80.0).epsilon(1e-14));
}

TEST_CASE("the lowest quarter of six cans is one and a half cans", "[uniformity]") {
  // 14, 4, 10, 6, 12, 8: mean 9, sum |x - mean| = 5+3+1+1+3+5 = 18, sum 54: CU = 66.666...%.
  // n/4 = 1.5 cans: (4 + 0.5 * 6) / 1.5 = 4.6667, over the mean 9: DU = 51.851...%.
  CHECK(christiansen_cu({14, 4, 10, 6, 12, 8}) == Approx(100.0 * (1.0 - 18.0 / 54.0)).epsilon(1e-14));
  CHECK(low_quarter_du({14, 4, 10, 6, 12, 8}) == Approx(100.0 * (7.0 / 1.5) / 9.0).epsilon(1e-14));
}

TEST_CASE("uniformity refuses data it cannot measure", "[uniformity][errors]") {
  CHECK_THROWS_AS(christiansen_cu({}), input_error);
  CHECK_THROWS_AS(low_quarter_du({1.0, -1.0}), input_error);
  CHECK_THROWS_AS(christiansen_cu({0.0, 0.0}), input_error);
}
