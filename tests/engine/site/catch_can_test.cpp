// A measured catch-can test (strewn/catch_can_test.hpp) against the model, on the demo lawn
// (shapes/small_lawn_heads.toml: 8 x 6 cans, 1 m apart, a 0.5 h run). The "measured" files are
// synthetic, written from the model itself (so the comparison must give RMS 0) or from a
// perturbed copy with a known bias; the expected values follow from the definitions
// (difference = model - measured, bias its mean, RMS its root mean square) by hand.
#include <catch2/catch.hpp>
#include <cmath>
#include <fmt/format.h>
#include <string>

#include "strewn/catch_can_test.hpp"
#include "strewn/error.hpp"
#include "strewn/input_file.hpp"
#include "strewn/site_io.hpp"

namespace {

const std::string kLawn = STREWN_SOURCE_DIR "/shapes/small_lawn_heads.toml";

// The scenario's own cans over `minutes`, as a measured file: depth_mm, or volume_ml in cans of
// 100 mm (78.54 cm^2: 1 mm is 7.854 mL), each depth mapped by `f`.
template <class F>
std::string measured_file(const strewn::Site& s, double minutes, bool by_volume, F f) {
  strewn::Site scaled = s;
  scaled.deposition->hours = minutes / 60.0;
  const strewn::Deposition d = strewn::compute_deposition(scaled);
  std::string text = fmt::format("# a synthetic test\n# duration_min = {}\n# opening_diameter_mm = 100\nrow,col,{}\n", minutes,
                                 by_volume ? "volume_ml" : "depth_mm");
  const double area_cm2 = M_PI * 10.0 * 10.0 / 4.0;
  const int columns = s.deposition->grid->columns;
  for (std::size_t k = 0; k < d.cans.size(); ++k) {
    const double depth = f(d.cans[k].depth);
    text += fmt::format("{},{},{:.17g}\n", k / columns + 1, k % columns + 1, by_volume ? depth * area_cm2 / 10.0 : depth);
  }
  return text;
}

}  // namespace

TEST_CASE("a test made from the model itself compares with RMS 0 and the model's own uniformity", "[site][catch_cans]") {
  const strewn::Site s = strewn::load_site(kLawn);
  const auto test = strewn::parse_catch_can_csv(measured_file(s, 45, false, [](double z) { return z; }), "self.csv", s);
  CHECK(test.duration_h == Approx(0.75).epsilon(1e-15));
  const strewn::CatchCanComparison c = strewn::compare_catch_cans(s, test);
  REQUIRE(c.cans.size() == 48);
  CHECK(c.missing == 0);
  CHECK(c.rms_mm <= 1e-12);
  CHECK(std::fabs(c.bias_mm) <= 1e-12);
  CHECK(c.measured_cu == Approx(c.model_cu).epsilon(1e-12));
  CHECK(c.measured_du == Approx(c.model_du).epsilon(1e-12));
  REQUIRE(c.measured_sc);
  REQUIRE(c.model_sc);
  CHECK(c.measured_sc->sc == Approx(c.model_sc->sc).epsilon(1e-12));
  // Scaled to the test: the amount emitted is linear in the run's hours, so each can holds
  // 0.75 / 0.5 = 1.5 times what the scenario's own 0.5 h run gives it.
  const strewn::Deposition own = strewn::compute_deposition(s);
  for (std::size_t k = 0; k < c.cans.size(); ++k) CHECK(c.cans[k].model_mm == Approx(1.5 * own.cans[k].depth).epsilon(1e-12));
}

TEST_CASE("cans in inches read as the same cans in mm; a bare depth follows the site's units", "[site][catch_cans][units]") {
  // 1 in = 25.4 mm exactly (NIST SP 811, 2008, appendix B.8).
  const strewn::Site s = strewn::load_site(kLawn);
  const auto mm = strewn::parse_catch_can_csv("# duration_min = 45\n# opening_diameter_mm = 101.6\nrow,col,depth_mm\n1,1,12.7\n2,3,5.08\n",
                                              "mm.csv", s);
  const auto in = strewn::parse_catch_can_csv("# duration_min = 45\n# opening_diameter_in = 4\nrow,col,depth_in\n1,1,0.5\n2,3,0.2\n",
                                              "in.csv", s);
  REQUIRE(in.cans.size() == 2);
  REQUIRE(in.opening_diameter_m);
  CHECK(*in.opening_diameter_m == Approx(*mm.opening_diameter_m).epsilon(1e-15));
  for (std::size_t k = 0; k < 2; ++k) CHECK(in.cans[k].depth_mm == Approx(mm.cans[k].depth_mm).epsilon(1e-15));
  // An area in square inches: 4 in^2 = 25.8064 cm^2 exactly; a volume of 25.8064 mL over it is 10 mm.
  const auto area = strewn::parse_catch_can_csv("# duration_min = 45\n# opening_area_in2 = 4\nrow,col,volume_ml\n1,1,25.8064\n",
                                                "area.csv", s);
  CHECK(area.cans[0].depth_mm == Approx(10.0).epsilon(1e-13));
  // The same lawn declared in US units: a bare depth is in inches, a bare opening in inches.
  std::string text = strewn::read_input_file(kLawn);
  const auto at = text.find("units = \"metres\"");
  REQUIRE(at != std::string::npos);
  text.replace(at, 16, "units = \"us\"");
  const strewn::Site us = strewn::load_site_text(text, kLawn, strewn::ShapeRegistry::with_default_search_path({}));
  REQUIRE(us.units == strewn::LengthUnit::foot);
  const auto bare = strewn::parse_catch_can_csv("# duration_min = 45\n# opening_diameter = 4\nrow,col,depth\n1,1,0.5\n2,3,0.2\n",
                                                "bare.csv", us);
  CHECK(*bare.opening_diameter_m == Approx(0.1016).epsilon(1e-15));
  for (std::size_t k = 0; k < 2; ++k) CHECK(bare.cans[k].depth_mm == Approx(mm.cans[k].depth_mm).epsilon(1e-15));
  const auto metric_bare = strewn::parse_catch_can_csv("# duration_min = 45\nrow,col,depth\n1,1,12.7\n", "bare_mm.csv", s);
  CHECK(metric_bare.cans[0].depth_mm == 12.7);
}

TEST_CASE("a perturbed copy gives the known bias and RMS; a scaled copy keeps CU, DU and SC", "[site][catch_cans]") {
  const strewn::Site s = strewn::load_site(kLawn);
  // Every can 0.25 mm wetter than the model: difference = -0.25 everywhere, so bias -0.25 and
  // RMS 0.25; given as volumes, which the reader turns back into depths (10 / A mm per mL).
  const auto wetter = strewn::parse_catch_can_csv(measured_file(s, 30, true, [](double z) { return z + 0.25; }), "wet.csv", s);
  const strewn::CatchCanComparison c = strewn::compare_catch_cans(s, wetter);
  CHECK(c.bias_mm == Approx(-0.25).epsilon(1e-10));
  CHECK(c.rms_mm == Approx(0.25).epsilon(1e-10));
  CHECK(c.largest_mm == Approx(0.25).epsilon(1e-10));
  // Every can 20% above the model: CU, DU and SC are ratios of depths, unchanged by a common
  // factor (their definitions); the bias is -0.2 x the model's mean depth.
  const auto more = strewn::parse_catch_can_csv(measured_file(s, 30, false, [](double z) { return 1.2 * z; }), "more.csv", s);
  const strewn::CatchCanComparison m = strewn::compare_catch_cans(s, more);
  CHECK(m.measured_cu == Approx(m.model_cu).epsilon(1e-12));
  CHECK(m.measured_du == Approx(m.model_du).epsilon(1e-12));
  CHECK(m.measured_sc->sc == Approx(m.model_sc->sc).epsilon(1e-12));
  CHECK(m.bias_mm == Approx(-0.2 * m.model_mean_mm).epsilon(1e-12));
  CHECK(m.measured_mean_mm == Approx(1.2 * m.model_mean_mm).epsilon(1e-12));
}

TEST_CASE("cans given by position, and cans left out", "[site][catch_cans]") {
  const strewn::Site s = strewn::load_site(kLawn);
  // The grid's origin is (0.5, 0.5) with 1 m spacing: (2.6, 1.4) is row 2, col 3 (0.14 m off).
  const auto test = strewn::parse_catch_can_csv("# duration_h = 0.5\nx,y,depth_mm\n2.6,1.4,3\n0.5,0.5,2\n", "xy.csv", s);
  REQUIRE(test.cans.size() == 2);
  CHECK(test.cans[0].row == 1);
  CHECK(test.cans[0].column == 2);
  const strewn::CatchCanComparison c = strewn::compare_catch_cans(s, test);
  CHECK(c.cans.size() == 2);
  CHECK(c.missing == 46);
  // Two cans hold no 2 x 2 window of the 5% share: no SC.
  CHECK_FALSE(c.measured_sc);
}

TEST_CASE("a bad catch-can file is refused with its file, line and column", "[site][catch_cans][errors]") {
  const strewn::Site s = strewn::load_site(kLawn);
  const auto message = [&](const std::string& text) {
    try {
      strewn::parse_catch_can_csv(text, "cans.csv", s);
    } catch (const strewn::input_error& e) {
      return std::string(e.what());
    }
    return std::string("accepted");
  };
  CHECK(message("# duraton_min = 45\nrow,col,depth_mm\n1,1,2\n") ==
        "cans.csv:1:3: unknown setting 'duraton_min' (did you mean 'duration_min'?)");
  CHECK(message("row,col,depth_mm\n1,1,2\n") ==
        "cans.csv:1:1: the test's duration is missing: add a line '# duration_min = 45' before the header");
  CHECK(message("# duration_min = 45\nrow,col,volume_ml\n1,1,2\n").rfind("cans.csv:2:9: volume_ml needs the cans' opening", 0) == 0);
  CHECK(message("# duration_min = 45\nrow,col,depht_mm\n1,1,2\n").rfind("cans.csv:2:9: unknown column 'depht_mm' (did you mean 'depth_mm'?)", 0) == 0);
  CHECK(message("# duration_min = 45\nrow,col,depth_mm\n1,9,2\n") ==
        "cans.csv:3:3: col must be a whole number from 1 to 8 (the grid's columns)");
  CHECK(message("# duration_min = 45\nrow, col, depth_mm\n1, 1, x2\n") ==
        "cans.csv:3:7: depth_mm must be a finite number (found 'x2')");
  CHECK(message("# duration_min = 45\nrow,col,depth_mm\n1,1,2\n1,1,3\n") ==
        "cans.csv:4:1: can row 1, col 1 is given twice (also on line 3)");
  CHECK(message("# duration_min = 45\nx,y,depth_mm\n1.0,0.5,2\n").rfind("cans.csv:3:1: (1.0, 0.5) is not on the catch grid", 0) == 0);
  CHECK(message("# duration_min = 45\nrow,col,depth_mm\n1,1,-2\n") == "cans.csv:3:5: depth_mm must be from 0 to 1e9");
  CHECK(message("# duration_min = 45\nrow,col,depth_mm\n1,1\n") == "cans.csv:3:4: expected 3 cells as in the header, found 2");
}
