// Scenarios in feet (issue 15, item 8): converted to metres when read and back when printed, so a
// scenario written in feet gives the probabilities of the same scenario in metres, and every
// printed length is in feet with its unit. The conversion is the international foot, 0.3048 m
// exactly (NIST SP 811, 2008, appendix B.8): the test writes each length of a metre scenario
// divided by 0.3048 (and each covariance entry by 0.3048^2), never through the engine.
#include <algorithm>
#include <catch2/catch.hpp>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <string>

#include "cli_support.hpp"

namespace {

using strewn::test::read_file;
using strewn::test::Result;
using strewn::test::run;

constexpr double kFoot = 0.3048;  // m, exactly (NIST SP 811 B.8)

// The scenario with every <<length>> divided by `per_unit` and every ((area)) by its square.
std::string in_unit(const std::string& text, double per_unit) {
  std::string out;
  for (std::size_t i = 0; i < text.size();) {
    const bool length = text.compare(i, 2, "<<") == 0, area = text.compare(i, 2, "((") == 0;
    if (length || area) {
      const std::size_t end = text.find(length ? ">>" : "))", i + 2);
      const double v = std::stod(text.substr(i + 2, end - i - 2));
      char number[40];
      std::snprintf(number, sizeof number, "%.17g", v / (area ? per_unit * per_unit : per_unit));
      out += number;
      i = end + 2;
    } else {
      out += text[i++];
    }
  }
  return out;
}

// Every shape kind that takes lengths, an offset and a rotation, a template, every spread form
// with a length in it, a component with its own bias and a catch-can grid.
const std::string kScenario = R"(
[site]
name = "units check"
units = "UNIT"

[[source]]
name = "thrower"
aim = [<<0>>, <<6>>]
bias = [<<0.08>>, <<-0.03>>]
spread = { sigma_major = <<0.22>>, sigma_minor = <<0.15>>, angle_deg = 90 }
events_per_session = 60
sessions_per_year = 150
  [[source.component]]
  label = "wide"
  weight = 0.02
  bias = [<<0.1>>, <<0.2>>]
  spread = { sigma = <<1.1>> }

[[source]]
name = "covariance"
aim = [<<0.5>>, <<5>>]
mean = [<<0.6>>, <<5.2>>]
spread = { covariance = [[((0.25)), ((0.05))], [((0.05)), ((0.36))]] }

[[source]]
name = "cep"
aim = [<<-0.5>>, <<5.5>>]
spread = { cep = <<0.7>> }

[[source]]
name = "r95"
aim = [<<0.2>>, <<6.5>>]
spread = { r95 = <<1.9>> }

[[source]]
name = "fraction"
aim = [<<0>>, <<6>>]
spread = { fraction = 0.8, radius = <<0.9>> }

[[zone]]
name = "board"
role = "target"
shape = "rectangle"
params = { centre = [<<0>>, <<6>>], width = <<1.2>>, depth = <<1.2>>, angle_deg = 10 }
limit = 0.9

[[zone]]
name = "door"
role = "keep_out"
shape = "doorway"
params = { hinge = [<<1.8>>, <<4.2>>], latch = [<<1.8>>, <<3.3>>], opens_toward = "left_seen_from_hinge", approach_depth = <<0.5>> }
limit = 1e-3

[[zone]]
name = "arc"
role = "keep_out"
shape = "ring_sector"
params = { centre = [<<0>>, <<6>>], inner_radius = <<1.5>>, outer_radius = <<2.5>>, from_angle_deg = 20, to_angle_deg = 160 }

[[zone]]
name = "placed polygon"
role = "keep_out"
shape = "polygon"
params = { outer = [[<<0>>, <<0>>], [<<1>>, <<0>>], [<<1>>, <<0.8>>], [<<0>>, <<0.8>>]] }
offset = [<<2.4>>, <<6.8>>]
rotation_deg = 30
limit = 1e-4

[[zone]]
name = "scorer"
role = "report_only"
shape = "person"
params = { centre = [<<-2.4>>, <<5>>] }
)";

std::string write(const std::string& name, const std::string& text) {
  const std::string dir = std::string(STREWN_TEST_BINARY_DIR) + "/units_check";
  std::filesystem::create_directories(dir);
  const std::string path = dir + "/" + name;
  std::ofstream(path) << text;
  return path;
}

std::string scenario(const std::string& unit, double per_unit) {
  std::string text = kScenario;
  text.replace(text.find("UNIT"), 4, unit);
  return in_unit(text, per_unit);
}

}  // namespace

TEST_CASE("a scenario in feet gives the probabilities of the same scenario in metres", "[cli][units]") {
  const std::string metres = write("metres.toml", scenario("m", 1.0));
  const std::string feet = write("feet.toml", scenario("ft", kFoot));
  const Result m = run({"assess", metres, "--format", "json"});
  const Result f = run({"assess", feet, "--format", "json"});
  INFO(m.err << f.err);
  REQUIRE((m.status == 0 || m.status == 3));
  REQUIRE(f.status == m.status);
  const nlohmann::json jm = nlohmann::json::parse(m.out), jf = nlohmann::json::parse(f.out);
  CHECK(jm["units"]["length"] == "m");
  CHECK(jf["units"]["length"] == "ft");
  REQUIRE(jm["zones"].size() == jf["zones"].size());
  int compared = 0;
  for (std::size_t z = 0; z < jm["zones"].size(); ++z)
    for (std::size_t k = 0; k < jm["zones"][z]["sources"].size(); ++k) {
      const auto& a = jm["zones"][z]["sources"][k];
      const auto& b = jf["zones"][z]["sources"][k];
      INFO(jm["zones"][z]["name"] << " / " << a["source"]);
      // The same region and spread up to the rounding of v / 0.3048 * 0.3048 (a few 1e-16
      // relative): equal within both error bounds and that rounding.
      const double pa = a["p_event"], pb = b["p_event"];
      CHECK(std::fabs(pa - pb) <= a["abs_err"].get<double>() + b["abs_err"].get<double>() + 1e-12 * pa);
      CHECK(pa > 0.0);
      ++compared;
    }
  CHECK(compared == 25);
}

TEST_CASE("a scenario in feet prints its lengths in feet: map, solve, deposition", "[cli][units]") {
  const std::string metres = write("metres.toml", scenario("m", 1.0));
  const std::string feet = write("feet.toml", scenario("ft", kFoot));
  // The map's extent and footprint are given in the scenario's unit.
  const Result mm = run({"map", metres, "--cells", "8", "--extent", "-1", "4", "1", "8", "--footprint", "disk",
                         "--footprint-params", R"({"radius": 0.3})", "--format", "json"});
  const Result mf = run({"map", feet, "--cells", "8", "--extent", in_unit("<<-1>>", kFoot), in_unit("<<4>>", kFoot),
                         in_unit("<<1>>", kFoot), in_unit("<<8>>", kFoot), "--footprint", "disk", "--footprint-params",
                         in_unit(R"({"radius": <<0.3>>})", kFoot), "--format", "json"});
  INFO(mm.err << mf.err);
  REQUIRE(mm.status == 0);
  REQUIRE(mf.status == 0);
  const nlohmann::json a = nlohmann::json::parse(mm.out), b = nlohmann::json::parse(mf.out);
  CHECK(b["units"]["length"] == "ft");
  CHECK(b["grid"]["spacing_ft"].get<double>() * kFoot == Approx(a["grid"]["spacing_m"].get<double>()).epsilon(1e-12));
  CHECK(b["max_at"][0].get<double>() * kFoot == Approx(a["max_at"][0].get<double>()).margin(1e-9));
  CHECK(b["max_risk"].get<double>() == Approx(a["max_risk"].get<double>()).epsilon(1e-9));
  const std::string csv = write("grid.csv", "");
  REQUIRE(run({"map", feet, "--cells", "4", "--csv", csv}).status == 0);
  CHECK(read_file(csv).rfind("x_ft,y_ft,risk_per_session,abs_err\n", 0) == 0);
  // Clearance: the move in feet is the move in metres over 0.3048, to the solver's tolerance
  // (1e-4 in the scenario's unit).
  const Result cm = run({"solve", "clearance", metres, "--zone", "door", "--direction", "1", "0", "--format", "json"});
  const Result cf = run({"solve", "clearance", feet, "--zone", "door", "--direction", "1", "0", "--format", "json"});
  INFO(cm.err << cf.err);
  REQUIRE(cm.status == 0);
  REQUIRE(cf.status == 0);
  const nlohmann::json jm = nlohmann::json::parse(cm.out), jf = nlohmann::json::parse(cf.out);
  CHECK(jf["units"]["length"] == "ft");
  CHECK(jf["max_move_ft"] == 50.0);
  CHECK(jf["shift_ft"].get<double>() * kFoot == Approx(jm["shift_m"].get<double>()).margin(2e-4));
  // Where the zone stood and where the answer puts it (issue 15 item 5), in feet too.
  for (const char* key : {"start", "moved_to"})
    for (int i = 0; i < 2; ++i)
      CHECK(jf[key][i].get<double>() * kFoot == Approx(jm[key][i].get<double>()).margin(2e-4));
  const Result table = run({"solve", "clearance", feet, "--zone", "door", "--direction", "1", "0"});
  CHECK_THAT(table.out, Catch::Contains(" ft: from (") && Catch::Contains(" ft it is ") && Catch::Contains(" ft apart"));
  // No answer: the largest move is named in feet, in the table and in the engine's reason.
  const Result none = run({"solve", "clearance", feet, "--zone", "door", "--direction", "1", "0", "--max-move",
                           in_unit("<<0.01>>", kFoot)});
  CHECK(none.status == 3);
  std::string flat = none.out;
  std::replace(flat.begin(), flat.end(), '\n', ' ');
  CHECK_THAT(flat, Catch::Contains("at the largest move, " + in_unit("<<0.01>>", kFoot).substr(0, 6)) &&
                       Catch::Contains(" ft, its upper bound") && Catch::Contains(" ft considered"));
  // The report's tables state feet.
  const std::string page = write("report.html", "");
  const Result r = run({"report", feet, "--out", page, "--cells", "10"});
  INFO(r.err);
  REQUIRE((r.status == 0 || r.status == 3));
  CHECK_THAT(read_file(page), Catch::Contains("aim (ft)") && !Catch::Contains("aim (m)"));
}

TEST_CASE("a map in feet draws its axes, scale bar and unsafe areas in feet", "[cli][units][map]") {
  // The plan is drawn from metres; every length written on it, and each unsafe area's size in the
  // summary and the GeoJSON, is in the scenario's unit (areas by 0.3048^2, NIST SP 811 B.8).
  const std::string metres = write("metres.toml", scenario("m", 1.0));
  const std::string feet = write("feet.toml", scenario("ft", kFoot));
  const std::string svg_m = write("map_m.svg", ""), svg_ft = write("map_ft.svg", ""), geo_ft = write("map_ft.geojson", "");
  const Result mm = run({"map", metres, "--cells", "40", "--format", "json", "--svg", svg_m});
  const Result mf = run({"map", feet, "--cells", "40", "--format", "json", "--svg", svg_ft, "--geojson", geo_ft});
  INFO(mm.err << mf.err);
  REQUIRE(mm.status == 0);
  REQUIRE(mf.status == 0);
  const std::string in_m = read_file(svg_m), in_ft = read_file(svg_ft);
  CHECK_THAT(in_m, Catch::Contains("x: east (m)") && Catch::Contains("y: north (m)") && Catch::Contains("Coordinates in metres"));
  CHECK_THAT(in_ft, Catch::Contains("x: east (ft)") && Catch::Contains("y: north (ft)") && Catch::Contains("Coordinates in feet") &&
                        Catch::Contains(" ft</text></g>") && Catch::Contains(" ft\u00b2 here)"));
  CHECK_THAT(in_ft, !Catch::Contains("(m)") && !Catch::Contains(" m</text></g>") && !Catch::Contains(" m\u00b2"));
  const nlohmann::json a = nlohmann::json::parse(mm.out), b = nlohmann::json::parse(mf.out);
  REQUIRE(a["unsafe_areas"].size() == b["unsafe_areas"].size());
  REQUIRE(!a["unsafe_areas"].empty());
  for (std::size_t k = 0; k < a["unsafe_areas"].size(); ++k) {
    CHECK(b["unsafe_areas"][k].count("area_m2") == 0);
    CHECK(b["unsafe_areas"][k]["area_ft2"].get<double>() * kFoot * kFoot ==
          Approx(a["unsafe_areas"][k]["area_m2"].get<double>()).epsilon(1e-9));
  }
  const nlohmann::json geo = nlohmann::json::parse(read_file(geo_ft));
  CHECK(geo["strewn_coordinates"] == "site_feet");
  int areas = 0;
  for (const auto& f : geo["features"])
    if (f["properties"]["kind"] == "unsafe_area") {
      CHECK(f["properties"].contains("area_ft2"));
      ++areas;
    }
  CHECK(areas > 0);
}
