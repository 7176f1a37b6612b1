// strewn/spacing.hpp: a layout placed again at another spacing is the layout the scenario reader
// places when that spacing is typed into the file (the reader as the reference, its own tests in
// head_test and site_io_test), a rectangular layout keeps its aspect ratio, and the search's
// requests are checked.
#include <catch2/catch.hpp>
#include <fstream>
#include <sstream>
#include <string>

#include "strewn/error.hpp"
#include "strewn/site_io.hpp"
#include "strewn/spacing.hpp"

namespace {

// A made-up 30 m x 20 m lawn with a rectangular layout of triangular-profile heads.
std::string lawn(double spacing, double row_spacing) {
  std::ostringstream s;
  s.precision(17);
  s << "[site]\nname = \"test lawn\"\n[deposition]\nhours = 1.0\n"
    << "catch_grid = { origin = [1.0, 1.0], spacing = 2.0, columns = 15, rows = 10, can_diameter = 0.15 }\n"
    << "[[layout]]\nname = \"rows\"\nzone = \"lawn\"\npattern = \"rectangular\"\nspacing = " << spacing
    << "\nrow_spacing = " << row_spacing << "\nradius = 10.0\nflow = 20.0\n"
    << "[[zone]]\nname = \"lawn\"\nrole = \"target\"\nshape = \"polygon\"\n"
    << "params = { outer = [[0, 0], [30, 0], [30, 20], [0, 20]] }\n"
    << "[[zone]]\nname = \"path\"\nrole = \"keep_out\"\nshape = \"polygon\"\n"
    << "params = { outer = [[0, -2], [30, -2], [30, -1], [0, -1]] }\n";
  return s.str();
}

strewn::Site load(const std::string& text, const std::string& name) {
  const std::string path = std::string(STREWN_TEST_BINARY_DIR) + "/" + name + ".toml";
  std::ofstream(path) << text;
  return strewn::load_site(path);
}

}  // namespace

TEST_CASE("a layout placed again at a spacing equals the reader's layout at that spacing, aspect ratio kept", "[spacing]") {
  const strewn::Site base = load(lawn(10.0, 5.0), "spacing_base");
  const strewn::Site again = strewn::with_layout_spacing(base, "rows", 7.0);
  const strewn::Site typed = load(lawn(7.0, 3.5), "spacing_typed");  // row spacing 5/10 of the spacing
  REQUIRE(again.heads.size() == typed.heads.size());
  REQUIRE(again.sources.size() == typed.sources.size());
  CHECK(again.heads.size() != base.heads.size());
  for (std::size_t i = 0; i < typed.heads.size(); ++i) {
    CHECK(again.heads[i].name == typed.heads[i].name);
    CHECK((again.heads[i].position - typed.heads[i].position).norm() <= 1e-12);
    CHECK(again.heads[i].flow_l_per_min == Approx(typed.heads[i].flow_l_per_min));
    CHECK(again.sources[i].name == typed.sources[i].name);
  }
  CHECK(again.layouts.front().row_spacing_m == Approx(3.5));
}

TEST_CASE("check_spacing judges litres on upper bounds and solve_spacing refuses bad requests", "[spacing]") {
  const strewn::Site base = load(lawn(10.0, 5.0), "spacing_requests");
  strewn::SpacingQuery q;
  q.max_litres_per_zone = 1e9;
  const strewn::SpacingCheck c = strewn::check_spacing(base, q, 10.0);
  REQUIRE(c.limits.size() == 1);  // the one keep-out zone
  CHECK(c.limits.front().name == "litres on zone 'path'");
  CHECK(c.limits.front().holds());
  strewn::SpacingQuery none;
  CHECK_THROWS_AS(strewn::solve_spacing(base, none), strewn::request_error);
  strewn::SpacingQuery unknown = q;
  unknown.layout = "row";
  try {
    strewn::solve_spacing(base, unknown);
    FAIL("an unknown layout was accepted");
  } catch (const strewn::request_error& e) {
    CHECK(e.field() == "layout");
    CHECK_THAT(e.what(), Catch::Contains("did you mean 'rows'"));
  }
  strewn::SpacingQuery window = q;
  window.most_of_radius = 0.2;  // below least
  CHECK_THROWS_AS(strewn::solve_spacing(base, window), strewn::request_error);
}
