// A site's risk map (strewn/site_map.hpp): the grid chosen from a window or from the site, and a
// cell equal to the assessment of the footprint placed there (one combiner, strewn/exposure.hpp).
#include <catch2/catch.hpp>
#include <algorithm>
#include <cmath>
#include <string>

#include "strewn/assess.hpp"
#include "strewn/error.hpp"
#include "strewn/site_io.hpp"
#include "strewn/site_map.hpp"
#include "strewn/work.hpp"
#include "test_support.hpp"

namespace {

strewn::Site two_sources() {
  strewn::Site site;
  strewn::Source a;
  a.name = "a";
  a.model = strewn::Gaussian::from_axes({0, 0}, 1.0, 0.5, 20.0);
  a.events_per_session = 30;
  a.sessions_per_year = 10;
  strewn::Source b = a;
  b.name = "b";
  b.model = strewn::Gaussian::from_axes({1, 0.5}, 1.5, 1.0, -10.0);
  b.events_per_session = 5;
  site.sources = {a, b};
  strewn::Zone z;
  z.name = "bench";
  z.role = strewn::Role::keep_out;
  z.region = strewn::test::disk({2, 1}, 0.3);
  z.limit = 0.5;
  z.limit_per = strewn::Period::year;
  site.zones.push_back(z);
  return site;
}

}  // namespace

TEST_CASE("the grid: cells along the longer side of the window, at least 2 each way", "[site][map]") {
  const strewn::Site site = two_sources();
  const strewn::GridSpec g = strewn::site_map_grid(site, {0, 0, 10, 4}, 20);
  CHECK(g.spacing == 0.5);
  CHECK(g.columns == 20);
  CHECK(g.rows == 8);
  CHECK(g.origin == strewn::Vec2(0.25, 0.25));
  CHECK_THROWS_AS(strewn::site_map_grid(site, {0, 0, -1, 4}, 20), strewn::input_error);
  // Automatic: the zones, the aims and three sigma about every mean, plus 5%.
  const strewn::GridSpec a = strewn::site_map_grid(site, {}, 50);
  CHECK(a.origin.x() - a.spacing / 2 <= -3.0);
  CHECK(a.origin.x() + a.spacing * (a.columns - 0.5) >= 1 + 4.5);
}

TEST_CASE("a map cell equals the assessment of the footprint placed on it, per year", "[site][map]") {
  const strewn::Site site = two_sources();
  strewn::SiteMapRequest r;
  r.footprint_kind = "disk";
  r.footprint_params = R"({"radius": 0.3})";
  r.per = strewn::Period::year;
  r.extent = {1.5, 0.5, 2.5, 1.5};  // 2 x 2 cells of 0.5 m: centres at 1.75 and 2.25
  r.cells = 2;
  const strewn::SiteMap m = strewn::make_site_map(site, strewn::ShapeRegistry::with_default_search_path({}), r);
  CHECK(m.status == strewn::Status::converged);
  strewn::Zone placed = site.zones[0];
  placed.region = strewn::test::disk(m.map.grid.centre(1, 1), 0.3);
  const strewn::ZoneResult z = strewn::assess_zone(placed, site.sources, site.options);
  CHECK(m.map.at(1, 1) == Approx(z.total_per_year).epsilon(1e-9));
  // The bench's limit, 0.5 per year, is within the map's range: its contour comes first.
  REQUIRE(!m.contours.empty());
  CHECK(m.contours.front().label == "limit of 'bench' (0.5)");
  CHECK(m.contours.front().set.level == 0.5);
}

TEST_CASE("a map above the work ceiling is refused by type, in the engine's words", "[site][map][work]") {
  // Issue 14: the engine named the CLI's --cells and --force; the command now words its advice
  // from work_error::summary() (tests/cli/run_cli_test.cpp pins the command's message).
  const strewn::Site site = two_sources();
  strewn::SiteMapRequest r;
  r.footprint_kind = "disk";
  r.footprint_params = R"({"radius": 0.3})";
  r.extent = {0, 0, 10, 10};
  r.cells = 20000;  // 4e8 cells x 2 components x 1 edge
  try {
    strewn::make_site_map(site, strewn::ShapeRegistry::with_default_search_path({}), r);
    FAIL("a map of 8e8 units of work was not refused");
  } catch (const strewn::work_error& e) {
    CHECK(e.units() == 8e8);
    CHECK(e.ceiling() == strewn::kMapWorkCeiling);
    CHECK_THAT(e.summary(), Catch::Contains("units of work") && Catch::EndsWith("above the ceiling of 2e+08"));
    CHECK_THAT(e.what(), Catch::StartsWith(e.summary()) && !Catch::Contains("--"));
  }
}

TEST_CASE("a map through barriers is estimated at what its cells cost, curved footprints most", "[site][map][work]") {
  // A throwing line of 16 pieces toward a board past one net: every cell intersects the
  // footprint with the net's shadow for each piece. Measured (1 core, 2026-12-05): a 0.3 m disk
  // footprint 230 us per cell and piece, an octagon 22 us; the flat 40 units (40 us) per
  // component before under-counted the disk's map 5-6 times, so a map of 1e5 cells that runs
  // for about 6 minutes passed a ceiling meant for a few. Now 0.2 + 3 x 1 barrier = 3.2 units
  // per edge, the arc counting 64: 204.8 units per cell and piece.
  const std::string text = R"([[source]]
name = "line"
position = [[2.0, 0.0], [3.0, 0.0]]
toward = [2.5, 5.0]
spread_angle_deg = 2.5
range_sigma = 0.2
events_per_session = 80

[[barrier]]
name = "side net"
points = [[1.25, 1.0], [1.25, 6.0]]
catch = 0.9

[[zone]]
name = "board"
role = "target"
shape = "disk"
params = { centre = [2.5, 5.0], radius = 0.4 }
)";
  const strewn::ShapeRegistry shapes = strewn::ShapeRegistry::with_default_search_path({});
  const strewn::Site site = strewn::load_site_text(text, "netted.toml", shapes);
  REQUIRE(site.sources[0].model.components().size() == 16);
  strewn::SiteMapRequest r;
  r.extent = {0, 0, 5, 5};
  r.cells = 400;  // 1.6e5 cells
  const auto units_per_cell_and_piece = [&](const char* kind, const char* params) {
    r.footprint_kind = kind;
    r.footprint_params = params;
    try {
      strewn::make_site_map(site, shapes, r);
    } catch (const strewn::work_error& e) {
      return e.units() / (400.0 * 400.0 * 16.0);
    }
    return 0.0;  // not refused: would have run (not at these sizes)
  };
  // 1 edge for the plain integration plus the barriers' share
  CHECK(units_per_cell_and_piece("disk", R"({"radius": 0.3})") == Approx(1.0 + 204.8));
}

TEST_CASE("a map whose cells are wider than the risk's narrowest peak says so", "[site][map]") {
  // A board under a 0.3 x 0.2 m spread and a keep-out zone 1e12 m across: the automatic extent
  // takes the whole zone, its cells are 5e9 m, and every cell centre misses the board's peak
  // (p 0.85 per session there): "largest risk 0", "unsafe area 0 m^2", with nothing said.
  const std::string text = R"([[source]]
name = "thrower"
aim = [0.0, 5.0]
spread = { sigma_major = 0.3, sigma_minor = 0.2, angle_deg = 90 }
events_per_session = 10

[[zone]]
name = "door"
role = "keep_out"
shape = "polygon"
params = { outer = [[1, 4], [1e12, 4], [1e12, 1e12], [1, 1e12]] }
limit = 1e-3
limit_per = "session"
)";
  const strewn::ShapeRegistry shapes = strewn::ShapeRegistry::with_default_search_path({});
  const strewn::Site site = strewn::load_site_text(text, "huge.toml", shapes);
  strewn::SiteMapRequest r;
  r.footprint_kind = "disk";
  r.footprint_params = R"({"radius": 0.25})";
  r.cells = 50;
  const strewn::SiteMap coarse = strewn::make_site_map(site, shapes, r);
  CHECK(coarse.resolvable_width == Approx(2 * 0.2 + 0.5).epsilon(1e-12));
  CHECK(coarse.map.grid.spacing > 1e9);
  CHECK(coarse.cells_too_coarse());
  CHECK_THAT(strewn::coarse_cells_warning(coarse), Catch::StartsWith("the cells (") &&
                                                        Catch::Contains("wider than the narrowest peak of the risk (about 0.9 m"));
  // About the board with cells of 0.1 m the peak is seen, and nothing is said.
  r.extent = {-2, 3, 2, 7};
  r.cells = 40;
  const strewn::SiteMap fine = strewn::make_site_map(site, shapes, r);
  CHECK_FALSE(fine.cells_too_coarse());
  CHECK(*std::max_element(fine.map.value.begin(), fine.map.value.end()) > 0.5);
}

// Issue 14: the engine names the request's field and speaks its own words, never a tool's option.
TEST_CASE("a bad extent or footprint is a request_error naming the field, not a command-line option", "[site][map][errors]") {
  const strewn::Site site = two_sources();
  const strewn::ShapeRegistry shapes = strewn::ShapeRegistry::with_default_search_path({});
  const auto field_of = [&](const strewn::SiteMapRequest& r) -> std::string {
    try {
      strewn::make_site_map(site, shapes, r);
    } catch (const strewn::request_error& e) {
      CHECK(std::string(e.what()).find("--") == std::string::npos);
      return e.field();
    }
    return "no error";
  };
  strewn::SiteMapRequest r;
  r.cells = 4;
  r.extent = {0, 0, -1, 4};
  CHECK(field_of(r) == "extent");
  r.extent = {-1e308, 0, 1, 1};
  CHECK(field_of(r) == "extent");
  r.extent = {};
  r.footprint_params = "[1, 2]";
  CHECK(field_of(r) == "footprint_params");
  r.footprint_params = "{\"x\": " + std::string(300, '[') + std::string(300, ']') + "}";
  CHECK(field_of(r) == "footprint_params");
  r.footprint_params = "{}";
  r.footprint_kind = "no_such_kind";
  CHECK(field_of(r) == "footprint_kind");
}
