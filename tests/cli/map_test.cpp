// `strewn map`: cells against assess of the footprint placed there, every footprint kind, the
// outputs, worker-thread errors, windows.
#include <boost/math/distributions/non_central_chi_squared.hpp>
#include <boost/math/distributions/normal.hpp>
#include <boost/math/tools/roots.hpp>
#include <catch2/catch.hpp>
#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <limits>
#include <nlohmann/json.hpp>
#include <random>
#include <set>
#include <sstream>
#include <tuple>

#include "cli_support.hpp"
#include "strewn/assess.hpp"
#include "strewn/site_io.hpp"
#include "strewn/risk_map.hpp"
#include "strewn/site_map.hpp"
#include "uncertainty_coverage.hpp"

namespace {

using strewn::test::data;
using strewn::test::demo;
using strewn::test::read_file;
using strewn::test::Result;
using strewn::test::run;
using strewn::test::xml_parses;

}  // namespace

TEST_CASE("map cells equal assess for the same footprint placed there", "[cli][map]") {
  // Per session (all sources together): values from 7e-7 to 0.986, not the saturated per-year 1.0 that
  // equalled 1.0 whatever either side computed. The footprint is placed at the cell centre to 17
  // digits, so both sides integrate the same region and must agree within their bounds, and to
  // 1e-9 relative (the request is 1e-8 on each). Deliberate fault that made it fail: the cell
  // centre passed with std::to_string's 6 decimals (5e-7 m off: the old 1e-4 hid it).
  const strewn::ShapeRegistry shapes = strewn::ShapeRegistry::with_default_search_path({});
  const strewn::Site s = strewn::load_site(demo, shapes);
  strewn::SiteMapRequest r;
  r.cells = 24;
  r.per = strewn::Period::session;
  const strewn::SiteMap m = strewn::make_site_map(s, shapes, r, {});
  const strewn::GridSpec& g = m.map.grid;
  int compared = 0;
  for (const auto& [i, j] : std::vector<std::pair<int, int>>{{3, 4}, {12, 12}, {20, 7}, {0, 0}, {10, 14}}) {
    const strewn::Vec2 c = g.centre(i, j);
    strewn::Zone person;
    person.name = "person";
    person.limit = 1.0;
    person.limit_per = strewn::Period::session;
    std::ostringstream params;
    params.precision(17);
    params << "{\"centre\": [" << c.x() << ", " << c.y() << "]}";
    person.region = shapes.build("person", params.str());
    const strewn::ZoneResult z = strewn::assess_zone(person, s.sources, s.options);
    const double map_value = m.map.at(i, j), map_err = m.map.abs_err[static_cast<std::size_t>(j) * g.columns + i];
    INFO(i << ", " << j << ": map " << map_value << " +- " << map_err << ", assess " << z.total_per_session << " +- "
           << z.total_per_session_err);
    if (z.total_per_session < 1e-300) continue;  // far outside: nothing to compare relatively
    CHECK(z.total_per_session < 0.999);  // not saturated
    CHECK(std::fabs(map_value - z.total_per_session) <= map_err + z.total_per_session_err + 1e-14 * z.total_per_session);
    CHECK(map_value == Approx(z.total_per_session).epsilon(1e-9));
    ++compared;
  }
  CHECK(compared >= 4);
}

TEST_CASE("map writes a well-formed SVG, CSV and GeoJSON in longitude/latitude", "[cli][map]") {
  const std::string dir = std::string(STREWN_TEST_BINARY_DIR) + "/map_outputs";
  std::filesystem::create_directories(dir);
  const Result r = run({"map", STREWN_SOURCE_DIR "/shapes/drone_drop.toml", "--cells", "40", "--per", "event", "--svg",
                        dir + "/map.svg", "--csv", dir + "/map.csv", "--geojson", dir + "/contours.geojson", "--format", "json"});
  INFO(r.err);
  REQUIRE(r.status == 0);
  const auto j = nlohmann::json::parse(r.out);
  CHECK(j["grid"]["columns"].get<int>() >= 2);
  const std::string svg = read_file(dir + "/map.svg");
  CHECK(xml_parses(dir + "/map.svg"));
  for (const char* part : {"id=\"field\"", "id=\"contours\"", "id=\"zones\"", "id=\"colour-bar\"", "id=\"scale-bar\"", "neighbour"})
    CHECK_THAT(svg, Catch::Contains(part));
  const std::string csv = read_file(dir + "/map.csv");
  CHECK(static_cast<int>(std::count(csv.begin(), csv.end(), '\n')) ==
        1 + j["grid"]["columns"].get<int>() * j["grid"]["rows"].get<int>());
  const auto geo = nlohmann::json::parse(read_file(dir + "/contours.geojson"));
  CHECK(geo["type"] == "FeatureCollection");
  REQUIRE(!geo["features"].empty());
  // The drone site has an origin: positions are longitude/latitude near it (RFC 7946).
  const auto& first = geo["features"][0]["geometry"]["coordinates"][0][0];
  CHECK(first[0].get<double>() == Approx(-30.0).margin(0.01));
  CHECK(first[1].get<double>() == Approx(45.0).margin(0.01));
  // Every contour position, taken back to site metres with the ellipsoid's local radii at the
  // origin (WGS 84: x = dlon N cos phi0, y = dlat M; off by d^2 / R < 2 mm within 100 m),
  // lies on the map's grid to 1 cm: the degrees are checked to ~1e-7, not +-0.01 (1 km).
  // Deliberate fault that made it fail: the origin's latitude taken 1e-4 degrees off in this check.
  const double a = 6378137.0, e2 = 0.00669437999014, lat0 = 45.0 * M_PI / 180, lon0 = -30.0;
  const double w = 1 - e2 * std::sin(lat0) * std::sin(lat0);
  const double n_radius = a / std::sqrt(w), m_radius = a * (1 - e2) / (w * std::sqrt(w));
  const double x0 = j["grid"]["origin"][0].get<double>(), y0 = j["grid"]["origin"][1].get<double>();
  const double step = j["grid"]["spacing_m"].get<double>();
  const double x1 = x0 + step * j["grid"]["columns"].get<int>(), y1 = y0 + step * j["grid"]["rows"].get<int>();
  int positions = 0;
  // The contours' lines and the unsafe areas' rings (one level deeper: MultiPolygon).
  std::vector<nlohmann::json> rings;
  for (const auto& f : geo["features"])
    for (const auto& part : f["geometry"]["coordinates"]) {
      if (f["properties"]["kind"] == "contour") rings.push_back(part);
      else
        for (const auto& ring : part) rings.push_back(ring);
    }
  for (const auto& ring : rings)
    for (const auto& pos : ring) {
      const double x = (pos[0].get<double>() - lon0) * M_PI / 180 * n_radius * std::cos(lat0);
      const double y = (pos[1].get<double>() - 45.0) * M_PI / 180 * m_radius;
      INFO("position " << pos.dump() << " at site (" << x << ", " << y << ")");
      CHECK(x >= x0 - step - 0.01);
      CHECK(x <= x1 + step + 0.01);
      CHECK(y >= y0 - step - 0.01);
      CHECK(y <= y1 + step + 0.01);
      ++positions;
    }
  CHECK(positions >= 10);
  CHECK(geo["features"][0]["properties"].contains("log10_accuracy"));
}

// Issue 12 item 8: `map --footprint polygon|doorway|composite` always failed ("unknown parameter
// 'centre'": the map injected a centre those kinds do not take). Every kind now works: a kind
// with a centre stands on it, any other kind on the centre of its bounding box; each cell equals
// assess of the same footprint placed there as a zone.
TEST_CASE("map: every footprint kind works and a cell equals assess of the zone placed there", "[cli][map][footprint]") {
  const strewn::ShapeRegistry shapes = strewn::ShapeRegistry::with_default_search_path({});
  const strewn::Site s = strewn::load_site(demo, shapes);
  struct Case {
    std::string kind, params;
    bool has_centre;
  };
  const std::vector<Case> cases = {
      {"polygon", R"({"outer": [[10, 20], [10.6, 20], [10.6, 20.3], [10.2, 20.5]]})", false},
      {"rectangle", R"({"width": 0.5, "depth": 0.3, "angle_deg": 30})", true},
      {"doorway", R"({"hinge": [0, 0], "latch": [0.9, 0], "approach_depth": 0.4})", false},
      {"composite", R"({"parts": [{"kind": "rectangle", "params": {"centre": [0, 0], "width": 0.8, "depth": 0.6}},)"
                    R"( {"kind": "rectangle", "operation": "difference", "params": {"centre": [0.3, 0.2], "width": 0.3, "depth": 0.3}}]})",
       false},
      {"disk", R"({"radius": 0.35})", true},
      {"person", R"({"facing_deg": 45})", true}};
  for (const Case& c : cases) {
    INFO(c.kind);
    strewn::SiteMapRequest r;
    r.cells = 12;
    r.per = strewn::Period::event;
    r.footprint_kind = c.kind;
    r.footprint_params = c.params;
    strewn::SiteMap m;
    REQUIRE_NOTHROW(m = strewn::make_site_map(s, shapes, r, {}));
    const strewn::GridSpec& g = m.map.grid;
    for (const auto& [i, j] : std::vector<std::pair<int, int>>{{5, 7}, {6, 10}}) {
      const strewn::Vec2 at = g.centre(i, j);
      // The same footprint as a zone with its reference point on the cell centre.
      nlohmann::json p = nlohmann::json::parse(c.params);
      strewn::Region region;
      if (c.has_centre) {
        p["centre"] = {at.x(), at.y()};
        region = shapes.build(c.kind, p.dump());
      } else {
        const strewn::Region drawn = shapes.build(c.kind, p.dump());
        const strewn::BoundingBox b = strewn::bounds(drawn);
        region = strewn::transformed(drawn, strewn::Mat2::Identity(), at - 0.5 * (b.min + b.max));
      }
      strewn::Zone zone;
      zone.name = "footprint";
      zone.region = region;
      const strewn::ZoneResult z = strewn::assess_zone(zone, s.sources, s.options);
      // Per event the map shows the largest single source, as per-event limits are judged.
      double sum = 0.0, err = 0.0;
      for (const auto& src : z.sources) {
        sum = std::max(sum, src.event.p);
        err = std::max(err, src.event.abs_err);
      }
      INFO(i << ", " << j << ": map " << m.map.at(i, j) << ", assess " << sum);
      CHECK(std::fabs(m.map.at(i, j) - sum) <= m.map.abs_err[static_cast<std::size_t>(j) * g.columns + i] + err + 1e-12 * sum);
      CHECK(sum > 1e-6);  // a cell with something in it
    }
  }
  // Through the command line too, for the kinds that failed.
  for (const Case& c : cases) {
    const Result r = run({"map", demo, "--cells", "10", "--footprint", c.kind, "--footprint-params", c.params});
    INFO(c.kind << ": " << r.err);
    CHECK(r.status == 0);
  }
}

TEST_CASE("map: a footprint parameter given twice is refused, not the last one taken", "[cli][map][errors]") {
  // '{"radius": 0.3, "radius": 0.5}' drew a 0.5 m disk without a word (a hostile trial).
  const std::string csv = std::string(STREWN_TEST_BINARY_DIR) + "/twice_map.csv";
  std::filesystem::remove(csv);
  const Result r = run({"map", demo, "--cells", "10", "--footprint", "disk", "--footprint-params",
                        R"({"radius": 0.3, "radius": 0.5})", "--csv", csv});
  CHECK(r.status == 2);
  CHECK(r.err == "strewn: error: --footprint-params: the footprint's parameter 'radius' is given twice\n");
  CHECK_FALSE(std::filesystem::exists(csv));
}

// Issue 12 item 5: a cell that threw on a worker thread aborted the program (SIGABRT,
// "terminate called without an active exception"; with --threads 1, exit 2 without a location).
// The old code kills this test binary. A 1 mm footprint at 1e9 m makes every cell throw as long
// as areas are computed on absolute coordinates (item 1); once that is fixed the map may succeed.
TEST_CASE("map: a cell that fails on a worker thread is one error line naming the cell, no abort", "[cli][map][threads]") {
  for (const char* threads : {"1", "2", "4"}) {
    const Result r = run({"map", demo, "--footprint", "rectangle", "--footprint-params", R"({"width": 1e-3, "depth": 1e-3})",
                          "--extent", "1e9", "1e9", "1.00000001e9", "1.00000001e9", "--cells", "10", "--threads", threads});
    INFO(threads << ": " << r.err);
    if (r.status != 0) {
      CHECK(r.status == 2);
      CHECK_THAT(r.err, Catch::StartsWith("strewn: error: " + demo + ": map with footprint rectangle") &&
                            Catch::Contains("map cell ("));
      CHECK(std::count(r.err.begin(), r.err.end(), '\n') == 1);
    }
  }
}

TEST_CASE("map: an extent beyond 1e12 m is refused before any cell is computed", "[cli][errors][ranges]") {
  const Result r = run({"map", demo, "--extent", "-1e308", "-1e308", "1e308", "1e308"});
  CHECK(r.status == 2);
  CHECK(r.err == "strewn: error: --extent: the map extent's coordinates must be finite numbers within +-1e12 m\n");
}

TEST_CASE("a per-event map cell and a per-event limit use one definition", "[cli][map]") {
  // Two sources; a disk zone 'spot' with a per-event limit that the largest single source meets
  // but their sum does not. assess compares the largest single source (docs/scenario-format.md);
  // the per-event map summed the sources, so it drew "limit of 'spot'" around a zone whose limit
  // holds. A map cell with the zone's own shape as footprint, placed on the zone, must equal the
  // value assess compares.
  strewn::Site s;
  strewn::Source a, b;
  a.name = "west";
  a.model = strewn::Gaussian::from_axes({-1.0, 0.0}, 0.8, 0.8, 0.0);
  b.name = "east";
  b.model = strewn::Gaussian::from_axes({1.0, 0.0}, 0.8, 0.8, 0.0);
  s.sources = {a, b};
  strewn::Zone spot;
  spot.name = "spot";
  spot.region = strewn::coverage::disk({0.0, 2.0}, 0.3);
  spot.limit = 0.002;  // each source gives 0.00156 here
  spot.limit_per = strewn::Period::event;
  const strewn::ZoneResult zr = strewn::assess_zone(spot, s.sources, s.options);
  const double each = zr.sources[0].event.p;
  INFO("single source " << each << ", compared " << zr.limited_value);
  REQUIRE(each < *spot.limit);
  REQUIRE(2 * each > *spot.limit);  // the sum would exceed the limit
  CHECK(*zr.limit_holds);
  const std::vector<strewn::MapSource> ms = {{a.model, 1, 1}, {b.model, 1, 1}};
  const strewn::Estimate cell =
      strewn::risk_at(ms, strewn::coverage::disk({0.0, 0.0}, 0.3), {0.0, 2.0}, strewn::Period::event);
  CHECK(std::fabs(cell.p - zr.limited_value) <= cell.abs_err + zr.total_abs_err_per_event);
  CHECK(cell.p <= *spot.limit);
}

// Issue 15 item 6: the unsafe area at a limit. One circular source (sigma 1 m at the origin) and a
// disk footprint of radius 0.5 m: the risk at distance d is the noncentral chi-square CDF
// F(0.25; 2, d^2) (CHECKS.md, offset disk), which falls with d, so the area at or above a limit L is
// the disk of radius d* with F(0.25; 2, d*^2) = L (solved here by Boost's bracket-and-solve).
TEST_CASE("map: the unsafe area at a limit is the disk the noncentral chi-square predicts", "[cli][map][unsafe]") {
  const std::string dir = std::string(STREWN_TEST_BINARY_DIR) + "/map_unsafe";
  std::filesystem::create_directories(dir);
  const std::string file = strewn::test::scenario_with("map_unsafe", "", "{ sigma = 1.0 }", "events_per_session = 1",
                                                       "{ centre = [5.0, 0.0], radius = 0.5 }", "limit = 1e-3\nlimit_per = \"event\"");
  const Result r = run({"map", file, "--per", "event", "--footprint", "disk", "--footprint-params", "{\"radius\": 0.5}", "--extent",
                        "-6", "-6", "6", "6", "--cells", "120", "--format", "json", "--svg", dir + "/map.svg", "--geojson",
                        dir + "/map.geojson"});
  INFO(r.err);
  REQUIRE(r.status == 0);
  const auto j = nlohmann::json::parse(r.out);
  REQUIRE(j["unsafe_areas"].size() == 1);
  const double level = 1e-3;
  const auto risk_at = [](double d) {
    return boost::math::cdf(boost::math::non_central_chi_squared(2.0, d * d), 0.25);
  };
  std::uintmax_t iterations = 200;
  const auto root = boost::math::tools::bisect([&](double d) { return risk_at(d) - level; }, 0.5, 6.0,
                                               boost::math::tools::eps_tolerance<double>(40), iterations);
  const double d_star = (root.first + root.second) / 2;
  // The polygon through the grid's crossings is inscribed within about a cell (0.1 m) of the
  // circle: relative area within 2 h / d* plus the polygon's chord defect.
  const double h = 12.0 / 120.0;
  CHECK(j["unsafe_areas"][0]["area_m2"].get<double>() == Approx(M_PI * d_star * d_star).epsilon(2 * h / d_star));
  CHECK(j["unsafe_areas"][0]["loops"].get<int>() == 1);
  // The same polygons in the GeoJSON (site metres here: no origin), by the shoelace formula.
  const auto geo = nlohmann::json::parse(read_file(dir + "/map.geojson"));
  CHECK(geo["strewn_coordinates"] == "site_metres");
  double shoelace = 0.0;
  int unsafe_features = 0;
  for (const auto& f : geo["features"]) {
    if (f["properties"]["kind"] != "unsafe_area") continue;
    ++unsafe_features;
    for (const auto& polygon : f["geometry"]["coordinates"])
      for (const auto& ring : polygon)
        for (std::size_t k = 0; k + 1 < ring.size(); ++k)
          shoelace += 0.5 * (ring[k][0].get<double>() * ring[k + 1][1].get<double>() - ring[k + 1][0].get<double>() * ring[k][1].get<double>());
  }
  CHECK(unsafe_features == 1);
  CHECK(shoelace == Approx(j["unsafe_areas"][0]["area_m2"].get<double>()).epsilon(1e-9));
  // The SVG fills it, labels the zone with its verdict, and fits its colour scale to the field
  // (0.12 at the centre, far below 1e-10 in the corners: the ten decades below the top).
  const std::string svg = read_file(dir + "/map.svg");
  CHECK(xml_parses(dir + "/map.svg"));
  CHECK_THAT(svg, Catch::Contains("class=\"unsafe-area\"") && Catch::Contains("z: limit holds") &&
                      Catch::Contains("data-log10-range=\"-10 0\"") && Catch::Contains("y axis = grid north") &&
                      Catch::Contains("id=\"legend\"") && Catch::Contains("x: east (m)"));
  CHECK_THAT(svg, !Catch::Contains("{\"centre\"") && !Catch::Contains("{&quot;"));  // no raw JSON in the captions
}

TEST_CASE("map: a field of a few decades gets a colour scale of a few decades", "[cli][map][unsafe]") {
  // Within a 2 m square about the mean of a sigma 1 m source, a 0.5 m disk's risk per event runs
  // from about 0.12 (centre) to 0.05 (corner cells): the scale spans 1e0 .. 1e-2, not ten decades.
  const std::string dir = std::string(STREWN_TEST_BINARY_DIR) + "/map_scale";
  std::filesystem::create_directories(dir);
  const std::string file = strewn::test::scenario_with("map_scale", "", "{ sigma = 1.0 }", "events_per_session = 1",
                                                       "{ centre = [5.0, 0.0], radius = 0.5 }", "");
  const Result r = run({"map", file, "--per", "event", "--footprint", "disk", "--footprint-params", "{\"radius\": 0.5}", "--extent",
                        "-1", "-1", "1", "1", "--cells", "20", "--svg", dir + "/map.svg"});
  INFO(r.err);
  REQUIRE(r.status == 0);
  const std::string svg = read_file(dir + "/map.svg");
  // F(0.25; 2, d^2) at the corner cells (noncentral chi-square, d^2 = 2 x 0.95^2) is above 1e-2,
  // so the scale's bottom is the decade below the smallest value, 1e-2.
  CHECK(boost::math::cdf(boost::math::non_central_chi_squared(2.0, 2 * 0.95 * 0.95), 0.25) > 0.01);
  CHECK_THAT(svg, Catch::Contains("data-log10-range=\"-2 0\"") && Catch::Contains(">1e0<") && Catch::Contains(">1e-2<"));
}

TEST_CASE("map cells under student_t and uniform spreads equal assess of the footprint placed there",
          "[cli][map][family]") {
  // The map's whole-ellipse fast path is the normal's: other families go through the full
  // integrator, and a cell must still be assess of the person standing there.
  const strewn::ShapeRegistry shapes = strewn::ShapeRegistry::with_default_search_path({});
  const strewn::Site s = strewn::load_site(data + "heavy_tail_families.toml", shapes);
  strewn::SiteMapRequest r;
  r.cells = 12;
  r.per = strewn::Period::session;
  const strewn::SiteMap m = strewn::make_site_map(s, shapes, r, {});
  const strewn::GridSpec& g = m.map.grid;
  for (const auto& [i, j] : std::vector<std::pair<int, int>>{{3, 4}, {6, 6}, {10, 2}, {0, 11}}) {
    const strewn::Vec2 c = g.centre(i, j);
    strewn::Zone person;
    person.name = "person";
    std::ostringstream params;
    params.precision(17);
    params << "{\"centre\": [" << c.x() << ", " << c.y() << "]}";
    person.region = shapes.build("person", params.str());
    const strewn::ZoneResult z = strewn::assess_zone(person, s.sources, s.options);
    INFO(i << ", " << j << ": map " << m.map.at(i, j) << ", assess " << z.total_per_session);
    CHECK(m.map.at(i, j) == Approx(z.total_per_session).epsilon(1e-9));
  }
}

TEST_CASE("map of a UTM site whose source gives only its mean spans the site, not the origin", "[cli][map][aim]") {
  // A new-user trial's file (tests/data/cli/utm/mean_only.toml): once the aim defaulted to
  // (0, 0), the map ran from the origin to the site in 59 km cells, zero everywhere.
  const std::string file = data + "utm/mean_only.toml";
  const Result r = run({"map", file, "--cells", "20", "--format", "json"});
  REQUIRE(r.status == 0);
  // 20 cells of about 1.2 m under a spread of decimetres: the one warning is that its cells are
  // wider than the risk's peak (map_test below), none about the extent.
  CHECK_THAT(r.err, !Catch::Contains("--extent:"));
  const nlohmann::json j = nlohmann::json::parse(r.out);
  // The plan's polygons run over x 512345.5 to 512361, y 5403712.25 to 5403722.25 (ogrinfo of
  // the trial's GeoPackage); the automatic extent is them, the mean and 3 sigma, plus 5%.
  CHECK(j["grid"]["origin"][0].get<double>() > 512330.0);
  CHECK(j["grid"]["origin"][1].get<double>() > 5403700.0);
  CHECK(j["grid"]["spacing_m"].get<double>() < 2.0);
  CHECK(j["max_risk"].get<double>() > 0.01);  // a person on the mean impact point is at risk
}

TEST_CASE("map: an extent holding no zone and no mean impact point is one warning line, and the map is still made",
          "[cli][map][aim][warnings]") {
  const std::string file = data + "utm/mean_only.toml";
  const Result r = run({"map", file, "--cells", "4", "--extent", "0", "0", "10", "10"});
  REQUIRE(r.status == 0);
  CHECK_THAT(r.err, Catch::StartsWith("strewn: warning: --extent: from (0, 0) to (10, 10) m holds no zone and no source's "
                                      "mean impact point (the site lies from (512345.5, 5403712.25) to (512361, 5403722.25))"));
  // One line for it (the other: its 4 cells are wider than the risk's peak).
  CHECK(std::count(r.err.begin(), r.err.end(), '\n') == 2);
  CHECK_THAT(r.err, Catch::Contains("\nstrewn: warning: the cells (2.5 m) are wider than the narrowest peak of the risk"));
  // An extent over the site, or over the mean alone, says nothing of the extent.
  CHECK_THAT(run({"map", file, "--cells", "4", "--extent", "512340", "5403700", "512370", "5403730"}).err, !Catch::Contains("--extent:"));
  CHECK(run({"map", file, "--cells", "4", "--extent", "512350", "5403711", "512351", "5403712.3"}).err.empty());
}

TEST_CASE("map: cells wider than the risk's narrowest peak are one warning line; fine cells say nothing", "[cli][map][warnings]") {
  const std::string file = data + "utm/mean_only.toml";
  const Result coarse = run({"map", file, "--cells", "4", "--extent", "512340", "5403700", "512370", "5403730"});
  REQUIRE(coarse.status == 0);
  CHECK_THAT(coarse.err, Catch::StartsWith("strewn: warning: the cells (7.5 m) are wider than the narrowest peak of the risk") &&
                             Catch::EndsWith("map a smaller extent or more cells (--extent, --cells)\n"));
  CHECK(std::count(coarse.err.begin(), coarse.err.end(), '\n') == 1);
  CHECK(run({"map", file, "--cells", "400", "--extent", "512340", "5403700", "512370", "5403730"}).err.empty());
}

TEST_CASE("map CSV on a UTM site: millimetre cells keep distinct coordinates that read back to their centres",
          "[cli][map][position_text]") {
  // A new-user trial: 40 x 40 cells of 5 mm at a northing of 5.7e6 m gave 840 distinct points
  // in 1,600 rows (9 significant digits round to the centimetre there).
  const std::string dir = std::string(STREWN_TEST_BINARY_DIR) + "/map_csv_utm";
  std::filesystem::create_directories(dir);
  const std::string file = data + "utm/mean_only.toml";
  const Result r = run({"map", file, "--extent", "512350.4", "5403712.15", "512350.6", "5403712.35", "--cells", "40",
                        "--csv", dir + "/fine.csv", "--format", "json"});
  REQUIRE(r.status == 0);
  std::istringstream csv(read_file(dir + "/fine.csv"));
  std::string line;
  std::getline(csv, line);  // header
  std::set<std::pair<double, double>> points;
  int rows = 0;
  while (std::getline(csv, line)) {
    double x = 0, y = 0;
    REQUIRE(std::sscanf(line.c_str(), "%lf,%lf", &x, &y) == 2);
    CHECK(x > 512350.4);
    CHECK(x < 512350.6);
    CHECK(y > 5403712.15);
    CHECK(y < 5403712.35);
    points.insert({x, y});
    ++rows;
  }
  CHECK(rows == 1600);
  CHECK(points.size() == 1600);
}

TEST_CASE("map summary on a UTM site: the grid's origin and the peak read back to the millimetre", "[cli][map][position_text]") {
  const std::string file = data + "utm/mean_only.toml";
  const Result table = run({"map", file, "--cells", "10"});
  const Result json = run({"map", file, "--cells", "10", "--format", "json"});
  REQUIRE(table.status == 0);
  REQUIRE(json.status == 0);
  const nlohmann::json j = nlohmann::json::parse(json.out);  // 17 significant digits
  // "grid: 10 x 7 cells of 1.6 m from (X, Y) m" and "largest risk R at (X, Y) m": the
  // coordinates parsed back by strtod are within half a millimetre of the JSON's.
  const auto pair_at = [&](std::size_t at) {  // at: the "(" of "(X, Y)"
    const char* p = table.out.c_str() + at + 1;
    char* end = nullptr;
    const double x = std::strtod(p, &end);
    const bool comma = std::string(end, 2) == ", ";
    const double y = std::strtod(end + 2, &end);
    return std::make_tuple(x, y, comma && *end == ')');
  };
  const std::size_t from = table.out.find(" from (");
  const std::size_t peak = table.out.find(" at (", table.out.find("largest risk"));
  REQUIRE(from != std::string::npos);
  REQUIRE(peak != std::string::npos);
  // Half a millimetre, plus the spacing of doubles at 5.4e6 m (9.3e-10 m) for a value that
  // lies on a half millimetre (the grid's origin here: x.xxx5 rounds either way).
  const double half_mm = 5e-4 + 2e-9;
  const auto [ox, oy, o_ok] = pair_at(from + 6);
  const auto [px, py, p_ok] = pair_at(peak + 4);
  CHECK(o_ok);
  CHECK(p_ok);
  CHECK(std::fabs(ox - j["grid"]["origin"][0].get<double>()) <= half_mm);
  CHECK(std::fabs(oy - j["grid"]["origin"][1].get<double>()) <= half_mm);
  CHECK(std::fabs(px - j["max_at"][0].get<double>()) <= half_mm);
  CHECK(std::fabs(py - j["max_at"][1].get<double>()) <= half_mm);
  CHECK_THAT(table.out, !Catch::Contains("e+0"));
}
