// Christiansen's CU and the low-quarter DU on hand-computed can data. No published worked
// example was at hand; each value below is worked by hand from the definitions in
// strewn/uniformity.hpp.
#include <catch2/catch.hpp>

#include "strewn/error.hpp"
#include "strewn/uniformity.hpp"

#include <cmath>
#include <vector>

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

// The scheduling coefficient (strewn/uniformity.hpp; the definition is from memory, CHECKS.md
// "Irrigation": SC = mean depth / mean of the driest contiguous window of a stated share of the
// area). Every value below is hand-computed from that definition and the window rule.

TEST_CASE("the scheduling window is the smallest square-ish block holding the share", "[uniformity][sc]") {
  // 8 x 6 = 48 cans at 5%: 2.4 cans, at least 3; 1 x 3 is longer than twice its width, so 2 x 2.
  SchedulingWindow w = scheduling_window(6, 8, 0.05);
  CHECK(w.rows == 2);
  CHECK(w.columns == 2);
  CHECK(w.share == Approx(4.0 / 48.0).epsilon(1e-15));
  // 10 x 10 at 5%: 5 cans; 2 x 3 = 6 is the smallest square-ish block.
  w = scheduling_window(10, 10, 0.05);
  CHECK(w.rows * w.columns == 6);
  CHECK(w.rows == 2);
  // 20 x 20 at 5%: exactly 20 cans, 4 x 5, not 21 from rounding.
  w = scheduling_window(20, 20, 0.05);
  CHECK(w.rows == 4);
  CHECK(w.columns == 5);
  CHECK(w.share == Approx(0.05).epsilon(1e-15));
  // One row of 10 cans at 25%: 2.5 -> 3 cans; only a strip fits, so 1 x 3.
  w = scheduling_window(1, 10, 0.25);
  CHECK(w.rows == 1);
  CHECK(w.columns == 3);
  // The whole grid at 100%.
  w = scheduling_window(3, 4, 1.0);
  CHECK(w.rows * w.columns == 12);
  CHECK_THROWS_AS(scheduling_window(3, 4, 0.0), input_error);
  CHECK_THROWS_AS(scheduling_window(3, 4, 1.5), input_error);
  CHECK_THROWS_AS(scheduling_window(0, 4, 0.05), input_error);
}

TEST_CASE("the scheduling coefficient of a 3 x 4 can set by hand", "[uniformity][sc]") {
  // Rows (top to bottom):  10 10  9  8
  //                        10  9  6  5
  //                        11 10  7  6
  // Sum 101, mean 101/12 = 8.41667. At 25%: k = 3 cans, 1 x 3 is too long, so 2 x 2 blocks.
  // The 2 x 2 means: (10+10+10+9)/4 = 9.75, (10+9+9+6)/4 = 8.5, (9+8+6+5)/4 = 7,
  // (10+9+11+10)/4 = 10, (9+6+10+7)/4 = 8, (6+5+7+6)/4 = 6 <- driest, rows 1-2, columns 2-3.
  // SC = (101/12) / 6 = 1.402778.
  const std::vector<double> d = {10, 10, 9, 8, 10, 9, 6, 5, 11, 10, 7, 6};
  const auto sc = scheduling_coefficient(d, 3, 4, 0.25);
  REQUIRE(sc);
  CHECK(sc->window_mean == Approx(6.0).epsilon(1e-15));
  CHECK(sc->sc == Approx(101.0 / 12.0 / 6.0).epsilon(1e-14));
  CHECK(sc->first_row == 1);
  CHECK(sc->first_column == 2);
  CHECK(sc->window_rows == 2);
  CHECK(sc->window_columns == 2);
  // A uniform field: SC = 1.
  CHECK(scheduling_coefficient(std::vector<double>(12, 4.0), 3, 4)->sc == Approx(1.0).epsilon(1e-15));
}

TEST_CASE("the scheduling window turns to fit the driest strip", "[uniformity][sc]") {
  // 4 x 4 at 12.5%: k = 2, a 1 x 2 block, tried lying and standing. Hand values:
  //   8 8 8 8
  //   8 2 8 8      the driest pair stands: (2 + 3) / 2 = 2.5 (rows 1-2, column 1);
  //   8 3 8 8      the driest lying pair is (8 + 2) / 2 = 5.
  //   8 8 8 8      mean = (14 * 8 + 2 + 3) / 16 = 117 / 16; SC = 117 / 16 / 2.5 = 2.925.
  std::vector<double> d(16, 8.0);
  d[5] = 2.0;
  d[9] = 3.0;
  const auto sc = scheduling_coefficient(d, 4, 4, 0.125);
  REQUIRE(sc);
  CHECK(sc->window_rows == 2);
  CHECK(sc->window_columns == 1);
  CHECK(sc->sc == Approx(117.0 / 16.0 / 2.5).epsilon(1e-14));
}

TEST_CASE("a missing can is no part of any scheduling window", "[uniformity][sc]") {
  // The 3 x 4 set above with the driest block's 5 lost (NaN): mean = 96 / 11; every 2 x 2 block
  // that held it is skipped, leaving (9+6+10+7)/4 = 8 as the driest. SC = (96/11) / 8.
  std::vector<double> d = {10, 10, 9, 8, 10, 9, 6, std::nan(""), 11, 10, 7, 6};
  const auto sc = scheduling_coefficient(d, 3, 4, 0.25);
  REQUIRE(sc);
  CHECK(sc->window_mean == Approx(8.0).epsilon(1e-15));
  CHECK(sc->sc == Approx(96.0 / 11.0 / 8.0).epsilon(1e-14));
  // A driest window that caught nothing: SC is unbounded, so none is given.
  CHECK_FALSE(scheduling_coefficient({0, 0, 5, 5}, 1, 4, 0.5));
  CHECK_THROWS_AS(scheduling_coefficient({1, 2, 3}, 2, 2), input_error);
}
