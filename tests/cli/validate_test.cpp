// `strewn validate` and the scenario loader behind every command: bad input is one line naming
// file, line and key, exit status 2; placements, ranges and units.
#include <boost/math/distributions/non_central_chi_squared.hpp>
#include <boost/math/distributions/normal.hpp>
#include <catch2/catch.hpp>
#include <fmt/format.h>
#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <limits>
#include <nlohmann/json.hpp>
#include <random>
#include <sstream>

#include "cli_support.hpp"
#include "strewn/assess.hpp"
#include "strewn/site_io.hpp"

namespace {

using strewn::test::data;
using strewn::test::demo;
using strewn::test::read_file;
using strewn::test::Result;
using strewn::test::run;
using strewn::test::scenario_with;
using strewn::test::xml_parses;

}  // namespace


TEST_CASE("bad input: one clear line, exit status 2, nothing on standard output", "[cli][errors]") {
  struct Case {
    std::string file, expected;
  };
  for (const Case& c : std::vector<Case>{
           {"typo_key.toml", "typo_key.toml:10:1: zone[1].limt: unknown key (did you mean 'limit'?)"},
           {"bad_syntax.toml", "bad_syntax.toml:3:"},
           {"negative_sigma.toml", "source[1].spread: sigma_major must be a positive finite number"},
           {"bow_tie.toml", "self-intersection at (1, 1)"},
           {"does_not_exist.toml", "does_not_exist.toml"},
           {"geojson_no_origin.toml", "geojson_no_origin.toml:7:12: zone[1] 'lot'.geometry: GeoJSON positions are "
                                      "longitude/latitude (RFC 7946): set site.crs or site.origin"},
           {"geojson_unknown_feature.toml", "no feature named 'strp' (did you mean 'strip'?)"},
           {"geojson_shared_name.toml", "geojson_shared_name.toml:7:12: zone[1] 'shed'.geometry: "},
           {"geojson_shared_name.toml", "GeoJSON: 2 features are named 'shed' (features 1 (id 1), 2 (id 2) of the "
                                        "collection): give each its own name, or feature = its id"},
           {"missing_geometry_file.toml", data + "geometry/nowhere.wkt: cannot be read: No such file or directory"},
           {"shape_and_geometry.toml", "zone[1] 'lot': give either shape (with params) or geometry"},
           {"bad_template.toml", "bad_template.toml:4:1: template.parms: unknown key (did you mean 'params'?)"}}) {
    const Result r = run({"assess", data + c.file});
    INFO(c.file << ": " << r.err);
    CHECK(r.status == 2);
    CHECK(r.out.empty());
    CHECK_THAT(r.err, Catch::Contains(c.expected));
    CHECK(std::count(r.err.begin(), r.err.end(), '\n') == 1);
  }
  const Result bad_option = run({"assess", demo, "--format", "xml"});
  CHECK(bad_option.status == 2);
}

TEST_CASE("a zone placed from a template, WKT or GeoJSON equals the same polygon given directly", "[cli]") {
  // The four zones of placed_zones.toml are one strip; the corners of "direct" were rotated and
  // shifted by hand (see the file), so equal probabilities check offset, rotation_deg and the
  // three geometry sources together.
  const Result r = run({"assess", data + "placed_zones.toml", "--format", "json"});
  INFO(r.err);
  REQUIRE(r.status == 0);
  const auto j = nlohmann::json::parse(r.out);
  const double direct = j["zones"][0]["sources"][0]["p_event"].get<double>();
  CHECK(direct > 0.01);
  for (int z = 1; z < 4; ++z) {
    INFO(j["zones"][z]["name"].get<std::string>());
    CHECK(j["zones"][z]["sources"][0]["p_event"].get<double>() == Approx(direct).epsilon(1e-12));
  }
  CHECK_THAT(j["zones"][2]["geometry_file"].get<std::string>(), Catch::EndsWith("strip.wkt"));
  // Individual risk at occupancy f over N = 4 x 50 events a year: 1 - (1 - p)^(f N).
  const double expected = 1.0 - std::pow(1.0 - direct, 0.25 * 200);
  CHECK(j["zones"][0]["occupancy"]["individual_risk_per_year"].get<double>() == Approx(expected).epsilon(1e-12));
  CHECK_FALSE(j["zones"][1].contains("occupancy"));
}

TEST_CASE("a GeoJSON feature is picked by its id when given as a number", "[cli]") {
  // geometry/shared_name.geojson: two features named "shed" (refused by name, above); id 2 is the
  // triangle (5, 4), (6, 4), (6, 6) alone, whose probability under a unit normal about the origin
  // the same triangle given directly reproduces.
  const Result r = run({"assess", data + "geojson_feature_id.toml", "--format", "json"});
  INFO(r.err);
  REQUIRE(r.status == 0);
  const Result direct = run({"assess", data + "geojson_feature_direct.toml", "--format", "json"});
  INFO(direct.err);
  REQUIRE(direct.status == 0);
  const double p = nlohmann::json::parse(r.out)["zones"][0]["sources"][0]["p_event"].get<double>();
  CHECK(p > 0.0);
  CHECK(p == Approx(nlohmann::json::parse(direct.out)["zones"][0]["sources"][0]["p_event"].get<double>()).epsilon(1e-12));
}

// Issue 12 items 6 and 7: counts wrapped or truncated (samples = -1 became 2^64 - 1, "1e30" said
// "must be at least 1", --outside -1 became 1.8e19) and values that overflow gave NaN with exit
// 0 (sigma 1e100, covariance 1e308), "events must be >= 0" (events 1e308 x 1e308), "internal
// error: bad numeric conversion" (radius 1e308), or "region is not normalised" without a place
// (offset [nan, 0], rotation_deg 1e308). Each is now one line naming file, line and key, exit 2.
TEST_CASE("counts and overflowing values are refused with file, line, key and range", "[cli][errors][ranges]") {
  const std::string ok_spread = "{sigma = 1}", ok_disk = "{centre = [1, 0], radius = 0.5}";
  struct Case {
    std::string settings, spread, exposure, params, zone_extra, expected;
  };
  const std::vector<Case> cases = {
      {"samples = -1", ok_spread, "", ok_disk, "", ":2:11: settings.samples: must be a whole number from 1 to 1000000000000, found -1"},
      {"samples = 1e30", ok_spread, "", ok_disk, "", "settings.samples: must be a whole number from 1 to 1000000000000, found 1e+30"},
      {"samples = 2.5", ok_spread, "", ok_disk, "", "settings.samples: must be a whole number"},
      {"seed = -1", ok_spread, "", ok_disk, "", "settings.seed: must be a whole number from 0 to"},
      // The command's --tolerance range, at the key ("settings: rel_tolerance must be in (0, 1)" before).
      {"tolerance = -1", ok_spread, "", ok_disk, "", ":2:13: settings.tolerance: must be a number from 1e-15 to 0.5 (got -1)"},
      {"", "{sigma = 1e100}", "", ok_disk, "", "source[1].spread: sigma_major must be between 1e-12 and 1e12 m (got 1e+100)"},
      {"", "{sigma = 1e-13}", "", ok_disk, "", "source[1].spread: sigma_major must be between 1e-12 and 1e12 m"},
      {"", "{covariance = [[1e308, 0], [0, 1e308]]}", "", ok_disk, "", "source[1].spread: covariance: spread too large"},
      {"", "{sigma_major = 1, sigma_minor = 1, angle_deg = 1e308}", "", ok_disk, "", "source[1].spread.angle_deg: must be a number from -3600 to 3600"},
      {"", ok_spread, "events_per_session = 1e308\nsessions_per_year = 1e308", ok_disk, "",
       ":6:22: source[1].events_per_session: must be a number from 0 to 1e+12 (got 1e+308)"},
      {"", ok_spread, "events_per_session = -1", ok_disk, "", "source[1].events_per_session: must be a number from 0 to 1e+12 (got -1)"},
      {"", ok_spread, "", "{centre = [1, 0], radius = 1e308}", "", "zone[1] 'z': shape 'disk': parameter 'radius' must be a finite number from -1e12 to 1e12 (got 1e+308)"},
      {"", ok_spread, "", "{centre = [1e300, 0], radius = 1}", "", "zone[1] 'z': shape 'disk': parameter 'centre' must be a point"},
      {"", ok_spread, "", ok_disk, "offset = [nan, 0]", ":12:10: zone[1].offset: must be a point [x, y] of finite numbers within +-1e12 m (got [nan, 0])"},
      {"", ok_spread, "", ok_disk, "rotation_deg = 1e308", ":12:16: zone[1].rotation_deg: must be a number from -3600 to 3600 degrees (got 1e+308)"},
  };
  int n = 0;
  for (const Case& c : cases) {
    const std::string path = scenario_with("range_case_" + std::to_string(++n), c.settings, c.spread, c.exposure, c.params, c.zone_extra);
    const Result r = run({"assess", path, "--format", "json"});
    INFO(path << ": " << r.err);
    CHECK(r.status == 2);
    CHECK_THAT(r.err, Catch::StartsWith("strewn: error: " + path + ":") && Catch::Contains(c.expected));
    CHECK(std::count(r.err.begin(), r.err.end(), '\n') == 1);
    CHECK(r.out.empty());
  }
  // The largest exposure allowed: 1e24 events a year is finite and certain, not NaN.
  const Result big = run({"assess", scenario_with("range_big_exposure", "", ok_spread, "events_per_session = 1e12\nsessions_per_year = 1e12", ok_disk, ""),
                          "--format", "json"});
  INFO(big.err);
  REQUIRE(big.status == 0);
  const auto j = nlohmann::json::parse(big.out);
  CHECK(j["zones"][0]["sources"][0]["p_year"].get<double>() == 1.0);
  // Endless exposure (an engine caller may pass it): any chance of a hit makes one certain.
  CHECK(strewn::probability_of_any(1e-300, std::numeric_limits<double>::infinity()) == 1.0);
  CHECK(strewn::probability_of_any(0.0, std::numeric_limits<double>::infinity()) == 0.0);
}

// Found by an adversarial trial: [zone] written for [[zone]] was "at least one [[zone]] is
// needed" at line 1; a composite's misspelt operation and a sector with equal angles (read as a
// whole disk) said nothing of the mistake.
TEST_CASE("likely slips in a scenario are named where they are", "[cli][errors]") {
  const std::string dir = std::string(STREWN_TEST_BINARY_DIR) + "/slips";
  std::filesystem::create_directories(dir);
  const auto file = [&](const std::string& name, const std::string& text) {
    std::ofstream(dir + "/" + name) << text;
    return dir + "/" + name;
  };
  const std::string source = "[[source]]\nmean = [0, 0]\nspread = { sigma = 1 }\n\n";
  const Result single = run({"validate", file("single.toml", source + "[zone]\nname = \"z\"\nrole = \"keep_out\"\n"
                                                                     "shape = \"disk\"\nparams = { centre = [1, 0], radius = 1 }\n")});
  CHECK(single.status == 2);
  CHECK_THAT(single.err, Catch::Contains("single.toml:5:1: zone: zones are [[zone]] tables"));
  const Result op = run({"validate", file("operation.toml", source + "[[zone]]\nname = \"z\"\nrole = \"keep_out\"\nshape = \"composite\"\n"
                         "params = { parts = [{ kind = \"disk\", params = { centre = [0, 0], radius = 2 } }, "
                         "{ kind = \"disk\", operation = \"diference\", params = { centre = [0, 0], radius = 1 } }] }\n")});
  CHECK(op.status == 2);
  CHECK_THAT(op.err, Catch::Contains("operation 'diference' must be union, difference or intersection (did you mean 'difference'?)"));
  const Result equal = run({"validate", file("equal.toml", source + "[[zone]]\nname = \"z\"\nrole = \"keep_out\"\nshape = \"ring_sector\"\n"
                            "params = { centre = [0, 0], outer_radius = 2, from_angle_deg = 10, to_angle_deg = 10 }\n")});
  CHECK(equal.status == 2);
  CHECK_THAT(equal.err, Catch::Contains("the sector's two angles are equal"));
  // Parts that do not meet: their intersection is empty, which is the input's, not the chords'.
  const Result apart = run({"validate", file("apart.toml", source + "[[zone]]\nname = \"z\"\nrole = \"keep_out\"\nshape = \"composite\"\n"
                            "params = { parts = [{ kind = \"disk\", params = { centre = [0, 0], radius = 1 } }, "
                            "{ kind = \"disk\", operation = \"intersection\", params = { centre = [5, 0], radius = 1 } }] }\n")});
  CHECK(apart.status == 2);
  CHECK_THAT(apart.err, Catch::Contains("part 'disk' does not meet the parts before it: their intersection is empty"));
  // A word from a fixed list (role, limit_per, positions, a layout's pattern) misspelt: the
  // nearest is named, as for keys (these said only "must be target, keep_out or report_only").
  const Result role = run({"validate", file("role.toml", source + "[[zone]]\nname = \"z\"\nrole = \"keepout\"\nshape = \"disk\"\n"
                                                                   "params = { centre = [1, 0], radius = 1 }\n")});
  CHECK(role.status == 2);
  CHECK_THAT(role.err, Catch::Contains("role.toml:7:8: zone[1].role: must be target, keep_out or report_only (did you mean 'keep_out'?)"));
  const Result per = run({"validate", file("per.toml", source + "[[zone]]\nname = \"z\"\nrole = \"keep_out\"\nshape = \"disk\"\n"
                                                                 "params = { centre = [1, 0], radius = 1 }\nlimit = 1e-3\nlimit_per = \"sesion\"\n")});
  CHECK(per.status == 2);
  CHECK_THAT(per.err, Catch::Contains("limit_per: must be event, session or year (did you mean 'session'?)"));
  // A number written as text: "must be a finite number" said nothing of the quotes.
  const Result quoted = run({"validate", file("quoted.toml", source + "[[zone]]\nname = \"z\"\nrole = \"keep_out\"\nshape = \"disk\"\n"
                                                                       "params = { centre = [1, 0], radius = 1 }\nlimit = \"1e-3\"\n")});
  CHECK(quoted.status == 2);
  CHECK_THAT(quoted.err, Catch::Contains("zone[1].limit: must be a finite number, not text (write limit = 1e-3 without quotes)"));
  for (const Result& r : {single, op, equal, apart, role, per, quoted}) CHECK(std::count(r.err.begin(), r.err.end(), '\n') == 1);
}

// Issue 12 item 7: GeoJSON coordinates of 1e300 overflowed the validity test's integer
// rescaling: "internal error: bad numeric conversion", exit 1.
TEST_CASE("geometry with coordinates beyond 1e12 m is bad input naming the file and key", "[cli][errors][ranges]") {
  const std::string dir = std::string(STREWN_TEST_BINARY_DIR) + "/huge_geometry";
  std::filesystem::create_directories(dir);
  {
    std::ofstream g(dir + "/far.geojson");
    g << R"({"type": "Polygon", "coordinates": [[[1e300, 0], [1e300, 1], [0, 1], [1e300, 0]]]})";
    std::ofstream w(dir + "/far.wkt");
    w << "POLYGON ((0 0, 1e300 0, 1e300 1, 0 0))";
  }
  for (const char* file : {"far.geojson", "far.wkt"}) {
    const std::string path = dir + "/" + std::string(file) + ".toml";
    {
      std::ofstream f(path);
      f << "[[source]]\nmean = [0, 0]\nspread = {sigma = 1}\n[[zone]]\nname = \"z\"\nrole = \"keep_out\"\ngeometry = \""
        << file << "\"\n" << (std::string(file).find("geojson") != std::string::npos ? "positions = \"site_metres\"\n" : "");
    }
    const Result r = run({"assess", path});
    INFO(r.err);
    CHECK(r.status == 2);
    CHECK_THAT(r.err, Catch::StartsWith("strewn: error: " + path + ":7:") && Catch::Contains("zone[1] 'z'.geometry") &&
                          Catch::Contains("beyond +-1e12 m"));
  }
}

TEST_CASE("a small zone far out, within the allowed range, is refused saying why its points became one", "[cli][errors][ranges]") {
  // A 5 mm triangle at (4.2e11, -9.9e11): points within 32 ulps of their distance from the
  // origin (7.7 mm there) are one point, and the loop had "no edges" without a word of why.
  const std::string path = std::string(STREWN_TEST_BINARY_DIR) + "/far_small_zone.toml";
  std::ofstream(path) << "[[source]]\nmean = [420000000000.0, -990000000000.0]\nspread = {sigma = 1}\n[[zone]]\nname = "
                         "\"z\"\nrole = \"keep_out\"\nshape = \"polygon\"\nparams = { outer = [[420000000000.0, "
                         "-990000000000.0], [420000000000.005, -990000000000.0], [420000000000.005, -989999999999.995]] }\n";
  const Result r = run({"assess", path});
  INFO(r.err);
  CHECK(r.status == 2);
  CHECK(r.out.empty());
  CHECK_THAT(r.err, Catch::Contains("zone[1] 'z': shape 'polygon': a loop has no edges: its points, 0.005 m apart at "
                                    "(420000000000, -990000000000), are one point at coordinates this large") &&
                        Catch::Contains("0.00764 m here"));
}

TEST_CASE("a zone too thin for its coordinates is refused saying so first, not as a spike", "[cli][errors][ranges]") {
  // An ellipse 20 m long and 2e-8 m across at a UTM site: Boost.Geometry's validity test calls
  // it a spike; the message led with "an edge doubles back", which none does (found in an
  // adversarial trial). Its mean width 2 area / perimeter is pi b / 2 = 1.6e-8 m.
  const std::string path = std::string(STREWN_TEST_BINARY_DIR) + "/thin_far_zone.toml";
  std::ofstream(path) << "[[source]]\nmean = [500000.0, 5400000.0]\nspread = {sigma = 1}\n[[zone]]\nname = \"sliver\"\n"
                         "role = \"report_only\"\nshape = \"ellipse\"\nparams = { centre = [500003.0, 5400000.0], "
                         "semi_major = 10.0, semi_minor = 1e-8, angle_deg = 30 }\n";
  const Result r = run({"validate", path});
  INFO(r.err);
  CHECK(r.status == 2);
  CHECK_THAT(r.err, Catch::StartsWith("strewn: error: " + path + ":7:") &&
                        Catch::Contains("zone[1] 'sliver': shape 'ellipse': invalid geometry: the zone is narrower than about "
                                        "1e-8 of its coordinates (about 1.6e-08 m wide at coordinates up to 5.4e+06 m)"));
}

TEST_CASE("two sources of one name are refused at the second name", "[cli][errors]") {
  // Names pick sources (--source, solve): two of one name gave two rows no one could tell apart
  // and --source took one of them without a word (a hostile trial). An unnamed source is
  // "source N", which a named one may take too.
  const std::string path = std::string(STREWN_TEST_BINARY_DIR) + "/duplicate_sources.toml";
  std::ofstream(path) << "[[source]]\nname = \"source 2\"\nspread = {sigma = 1}\n[[source]]\nspread = {sigma = 2}\n"
                         "[[zone]]\nname = \"z\"\nrole = \"report_only\"\nshape = \"disk\"\n"
                         "params = { centre = [1.0, 0.0], radius = 1.0 }\n";
  const Result r = run({"validate", path});
  INFO(r.err);
  CHECK(r.status == 2);
  CHECK_THAT(r.err, Catch::Contains(path + ":4:1: source[2].name: duplicate source name 'source 2'"));
}

TEST_CASE("site units: metres and feet under their usual spellings; anything else named with the accepted ones", "[cli][errors][units]") {
  // Old: "meters" and "m" were refused with no hint, and feet not at all (issue 15, item 8).
  const std::string dir = std::string(STREWN_TEST_BINARY_DIR) + "/units";
  std::filesystem::create_directories(dir);
  const std::string body = "[[source]]\nname = \"s\"\nspread = { sigma = 1 }\n[[zone]]\nname = \"z\"\nrole = "
                           "\"report_only\"\nshape = \"disk\"\nparams = { centre = [1, 0], radius = 1 }\n";
  for (const std::string units : {"metres", "meters", "m", "ft", "feet", "foot", "yards"}) {
    const std::string file = dir + "/" + units + ".toml";
    std::ofstream(file) << "[site]\nunits = \"" << units << "\"\n" << body;
    const Result r = run({"validate", file});
    INFO(units << ": " << r.err);
    if (units == "foot" || units == "yards") {
      CHECK(r.status == 2);
      CHECK(r.out.empty());
      CHECK(std::count(r.err.begin(), r.err.end(), '\n') == 1);
      CHECK_THAT(r.err, Catch::StartsWith("strewn: error: " + file + ":2:9: site.units: '" + units + "' is not a length unit") &&
                            Catch::Contains("(accepted: \"m\", \"metres\", \"meters\", \"metric\", \"ft\", \"feet\", \"us\")"));
      if (units == "foot") CHECK_THAT(r.err, Catch::Contains("did you mean"));
    } else {
      CHECK(r.status == 0);
      CHECK(r.err.empty());
    }
  }
}

// Issue 15 item 9: docs/scenario-format.md said "the three files in shapes/" while there were
// five; it now says every .toml there is a complete example, and this holds it to that.
TEST_CASE("every scenario directly in shapes/ is a complete example that validates", "[cli]") {
  int scenarios = 0;
  for (const auto& entry : std::filesystem::directory_iterator(STREWN_SOURCE_DIR "/shapes")) {
    if (entry.path().extension() != ".toml") continue;
    ++scenarios;
    const Result r = run({"validate", entry.path().string()});
    INFO(entry.path());
    CHECK(r.status == 0);
    CHECK(r.err.empty());
  }
  CHECK(scenarios == 9);  // the count docs/scenario-format.md states
}

namespace {

// A one-source scenario with the given lines, written beside the test binary.
std::string likely_mistake(const std::string& name, const std::string& text) {
  const std::string path = std::string(STREWN_TEST_BINARY_DIR) + "/likely_mistake_" + name + ".toml";
  std::ofstream(path) << text;
  return path;
}

const char* const kLane =
    "\n[[zone]]\nname = \"lane\"\nrole = \"target\"\nshape = \"rectangle\"\n"
    "params = { centre = [0, 3], width = 1.2, depth = 6 }\n"
    "\n[[zone]]\nname = \"door\"\nrole = \"keep_out\"\nshape = \"rectangle\"\n"
    "params = { centre = [2, 0], width = 1, depth = 0.2 }\nlimit = 1e-3\n";

}  // namespace

// Issue 15 item 7: likely mistakes passed without a word. Each is one warning line on stderr with
// file, line, column and key; the exit status and the output are those of the same file without
// the warning (the value is read as written, never corrected).
TEST_CASE("likely mistakes: an angle in degrees that looks like radians is a warning, not a change", "[cli][warnings]") {
  const std::string radians = likely_mistake(
      "radians", "[[source]]\naim = [0, 3]\nspread = { sigma_major = 0.5, sigma_minor = 0.3, angle_deg = 1.5708 }\n" +
                     std::string(kLane));
  const Result r = run({"validate", radians});
  CHECK(r.status == 0);
  CHECK(r.err == "strewn: warning: " + radians +
                     ":3:62: source[1].spread.angle_deg: 1.5708 looks like an angle in radians (1.5708 rad = 90 "
                     "degrees); this key is in degrees, so it is read as 1.5708 degrees\n");
  // Read as written, never corrected: the same numbers as the axes at 1.5708 degrees written
  // as a covariance (a form with no angle, so no warning), R diag(a^2, b^2) R^T.
  const Result assessed = run({"assess", radians, "--format", "json"});
  CHECK(assessed.status == 0);
  CHECK_THAT(assessed.err, Catch::StartsWith("strewn: warning: "));
  const double t = 1.5708 * 3.14159265358979323846 / 180.0, c = std::cos(t), s = std::sin(t);
  const double sxx = 0.25 * c * c + 0.09 * s * s, syy = 0.25 * s * s + 0.09 * c * c, sxy = (0.25 - 0.09) * c * s;
  const std::string as_covariance = likely_mistake(
      "radians_as_covariance", fmt::format("[[source]]\naim = [0, 3]\nspread = {{ covariance = [[{:.17g}, {:.17g}], "
                                           "[{:.17g}, {:.17g}]] }}\n", sxx, sxy, sxy, syy) + std::string(kLane));
  const Result reference = run({"assess", as_covariance, "--format", "json"});
  CHECK(reference.err.empty());
  const auto a = nlohmann::json::parse(assessed.out), b = nlohmann::json::parse(reference.out);
  const double pa = a["zones"][1]["sources"][0]["p_event"].get<double>(), pb = b["zones"][1]["sources"][0]["p_event"].get<double>();
  CHECK(std::fabs(pa - pb) <= 1e-9 * pb);
  // rotation_deg and a shape's *_deg parameter, also inside a composite's parts, are angles too.
  const std::string more = likely_mistake(
      "radians_params",
      "[[source]]\naim = [0, 3]\nspread = { sigma = 0.5 }\n" + std::string(kLane) +
          "rotation_deg = 3.14\n\n[[zone]]\nname = \"ring\"\nrole = \"watch\"\nshape = \"ring_sector\"\n"
          "params = { centre = [0, 0], inner_radius = 1, outer_radius = 2, from_angle_deg = 0, to_angle_deg = 0.7854 }\n");
  const Result m = run({"validate", more});
  CHECK(m.status == 0);
  CHECK_THAT(m.err, Catch::Contains("zone[2].rotation_deg: 3.14 looks like an angle in radians (3.14 rad = 179.9 degrees)") &&
                        Catch::Contains("zone[3] 'ring'.params.to_angle_deg: 0.7854 looks like an angle in radians"));
  // Whole degrees and small plain angles are not suspected: 1, 3, 0.5, 90, 1.5 degrees.
  for (const char* angle : {"1", "3", "0.5", "90", "1.5", "45.5"}) {
    const std::string plain = likely_mistake(
        "plain_angle", "[[source]]\naim = [0, 3]\nspread = { sigma_major = 0.5, sigma_minor = 0.3, angle_deg = " +
                           std::string(angle) + " }\n" + kLane);
    INFO(angle);
    CHECK(run({"validate", plain}).err.empty());
  }
}

TEST_CASE("likely mistakes: a spread larger than the whole plan is a warning", "[cli][warnings]") {
  // The issue's case: a 35 m sigma on a 6 m lane (the plan is 6.3 m across here).
  const std::string wide = likely_mistake("wide", "[[source]]\naim = [0, 3]\nspread = { sigma = 35 }\n" + std::string(kLane));
  const Result r = run({"assess", wide});
  CHECK(r.status == 0);  // as without the warning: the door's limit holds (35 m spreads thin)
  CHECK_THAT(r.err, Catch::StartsWith("strewn: warning: " + wide + ":3:10: source[1].spread: sigma_major 35 m is") &&
                        Catch::Contains("times the size of the whole plan") && Catch::EndsWith("metres\n"));
  CHECK(std::count(r.err.begin(), r.err.end(), '\n') == 1);
  CHECK_THAT(r.out, Catch::Contains("All limits hold."));
  // A spread within the plan says nothing.
  const std::string fits = likely_mistake("fits", "[[source]]\naim = [0, 3]\nspread = { sigma = 3 }\n" + std::string(kLane));
  CHECK(run({"validate", fits}).err.empty());
}

TEST_CASE("likely mistakes: a thrower's or a component's spread larger than the plan is a warning, not a crash",
          "[cli][warnings]") {
  // A new-user trial: range_sigma = 56 typed for centimetres on a 7 m throw. The warning looked
  // for the source's `spread` key, which a thrower has not: a segmentation fault (exit 139).
  const std::string thrower = likely_mistake(
      "wide_thrower", "[[source]]\nposition = [0, -1]\ntoward = [0, 3]\nspread_angle_deg = 4\nrange_sigma = 56\n" +
                          std::string(kLane));
  const Result t = run({"validate", thrower});
  CHECK(t.status == 0);
  CHECK_THAT(t.err, Catch::StartsWith("strewn: warning: " + thrower + ":5:15: source[1].range_sigma: the thrower's "
                                      "spread at its aim: sigma_major 56 m is") &&
                        Catch::Contains("times the size of the whole plan"));
  CHECK(std::count(t.err.begin(), t.err.end(), '\n') == 1);
  // A thrower's bias typed as a point: the hint is not "mean = [x, y]", which a thrower refuses.
  const std::string bias = likely_mistake(
      "thrower_bias", "[[source]]\nposition = [0, -1]\ntoward = [0, 3]\nbias = [0, 3]\nspread_angle_deg = 4\n"
                      "range_fraction = 0.08\n" + std::string(kLane));
  const Result b = run({"validate", bias});
  CHECK_THAT(b.err, Catch::Contains("source[1].bias: the bias is 3 m") && Catch::Contains("from the aim (toward), not a point") &&
                        !Catch::Contains("mean = [x, y]"));
  // A wild component's 2000 typed for millimetres passed without a word.
  const std::string wild = likely_mistake(
      "wide_component", "[[source]]\naim = [0, 3]\nspread = { sigma = 0.3 }\n[[source.component]]\nweight = 0.03\n"
                        "spread = { sigma = 2000 }\n" + std::string(kLane));
  const Result w = run({"validate", wild});
  CHECK(w.status == 0);
  CHECK_THAT(w.err, Catch::StartsWith("strewn: warning: " + wild + ":6:10: source[1].component[1].spread: sigma_major 2e+03 m"));
  CHECK(std::count(w.err.begin(), w.err.end(), '\n') == 1);
}

TEST_CASE("likely mistakes: a zone, an aim or a standing point far from everything else is a warning", "[cli][warnings]") {
  // A new-user trial in EPSG:32630 metres: a bench with x and y swapped, and a thrower's toward
  // swapped (a throw of 7,470 km), each gave p = 0 and "All limits hold" without a word.
  const std::string utm_lane =
      "\n[[zone]]\nname = \"lane\"\nrole = \"target\"\nshape = \"rectangle\"\n"
      "params = { centre = [431200, 5712407], width = 1.2, depth = 6 }\n";
  const std::string bench = "\n[[zone]]\nname = \"bench\"\nrole = \"keep_out\"\nshape = \"rectangle\"\n"
                            "params = { centre = [5712410.5, 431202], width = 1.6, depth = 0.5 }\nlimit = 1e-3\n";
  const std::string zone = likely_mistake(
      "far_zone", "[[source]]\naim = [431200, 5712407]\nspread = { sigma = 0.5 }\n" + utm_lane + bench);
  const Result z = run({"assess", zone});
  CHECK(z.status == 0);
  CHECK_THAT(z.err, Catch::Contains(zone + ":11:1: zone[2]: zone 'bench' lies 7.47e+06 m from everything else on the "
                                           "plan, which spans 6.12 m: check its coordinates"));
  CHECK(std::count(z.err.begin(), z.err.end(), '\n') == 1);
  const std::string toward = likely_mistake(
      "far_toward", "[[source]]\nposition = [431200, 5712400]\ntoward = [5712407, 431200]\nspread_angle_deg = 4\n"
                    "range_fraction = 0.08\n" + utm_lane);
  const Result a = run({"validate", toward});
  CHECK_THAT(a.err, Catch::Contains(toward + ":3:10: source[1].toward: the aim of source 'source 1' lies 7.47e+06 m"));
  const std::string position = likely_mistake(
      "far_position", "[[source]]\nposition = [5712400, 431200]\ntoward = [431200, 5712407]\nspread_angle_deg = 4\n"
                      "range_fraction = 0.08\n" + utm_lane);
  const Result b = run({"validate", position});
  CHECK_THAT(b.err, Catch::Contains(position + ":2:12: source[1].position: where source 'source 1' stands lies 7.47e+06 m"));
  // The demos, each a real layout, say nothing.
  for (const char* demo_file : {"throwing_lane.toml", "town_park.toml", "drone_drop.toml", "sports_pitch_rotors.toml"}) {
    INFO(demo_file);
    CHECK(run({"validate", std::string(STREWN_SOURCE_DIR) + "/shapes/" + demo_file}).err.empty());
  }
}

TEST_CASE("likely mistakes: grid coordinates under a site origin are a warning", "[cli][warnings]") {
  // A new-user trial: UTM metres with origin = [lon, lat] (the local frame, good within 100 km)
  // wrote GeoJSON with a fence at lon 159, lat 76.7, without a word.
  const std::string grid = likely_mistake(
      "grid_under_origin", "[site]\norigin = [-3.99, 51.56]\n[[source]]\naim = [431200, 5712407]\nspread = { sigma = 0.5 }\n"
                           "[[zone]]\nname = \"lane\"\nrole = \"target\"\nshape = \"rectangle\"\n"
                           "params = { centre = [431200, 5712407], width = 1.2, depth = 6 }\n");
  const Result g = run({"validate", grid});
  CHECK(g.status == 0);
  CHECK_THAT(g.err, Catch::Contains(grid + ":2:10: site.origin: the plan reaches 5.71e+03 km from the origin") &&
                        Catch::Contains("give site.crs instead"));
  // Local metres about the same origin say nothing.
  const std::string local = likely_mistake(
      "local_under_origin", "[site]\norigin = [-3.99, 51.56]\n[[source]]\naim = [0, 3]\nspread = { sigma = 0.5 }\n" +
                                std::string(kLane));
  CHECK(run({"validate", local}).err.empty());
}

TEST_CASE("likely mistakes: a bias many sigmas long and an exposure of zero are warnings", "[cli][warnings]") {
  // bias = the aim itself, the mean impact point typed where the offset belongs.
  const std::string bias = likely_mistake(
      "bias", "[[source]]\naim = [0, 3]\nbias = [0, 3]\nspread = { sigma = 0.2 }\nevents_per_session = 0\n" + std::string(kLane));
  const Result r = run({"validate", bias});
  CHECK(r.status == 0);
  CHECK_THAT(r.err, Catch::Contains(bias + ":3:8: source[1].bias: the bias is 3 m, 15 times the spread's sigma_major") &&
                        Catch::Contains(bias + ":5:22: source[1].events_per_session: 0: this source adds nothing"));
  CHECK(std::count(r.err.begin(), r.err.end(), '\n') == 2);
  // Every command that reads the scenario shows them; JSON on stdout stays JSON.
  const Result json = run({"assess", bias, "--format", "json"});
  CHECK(json.status == 0);
  CHECK_THAT(json.err, Catch::Contains("source[1].bias"));
  CHECK_NOTHROW(nlohmann::json::parse(json.out));
}

TEST_CASE("a source given only its mean on a UTM site has no bias; a mean far from a given aim is a warning",
          "[cli][warnings][aim]") {
  // The trial's file: aimed at its mean (bias 0), so nothing to warn about and the report's aim is the mean.
  const Result r = run({"validate", data + "utm/mean_only.toml"});
  CHECK(r.status == 0);
  CHECK(r.err.empty());
  // An aim at the origin beside a mean in UTM metres: the two are 5.4e6 m apart.
  const std::string far = likely_mistake(
      "far_mean", "[[source]]\naim = [0, 0]\nmean = [512350.5, 5403712.25]\nspread = { sigma = 2 }\n" + std::string(kLane));
  const Result w = run({"validate", far});
  CHECK(w.status == 0);
  CHECK_THAT(w.err, Catch::Contains(far + ":3:8: source[1].mean: the mean impact point is 5.43e+06 m from the aim, "
                                          "2.71e+06 times the spread's sigma_major"));
  CHECK(std::count(w.err.begin(), w.err.end(), '\n') == 1);
}

TEST_CASE("a self-intersection on a UTM plan is located to the millimetre", "[cli][errors][position_text]") {
  // A bow tie in EPSG:32633 metres: edges 1 and 3 cross at the midpoint of the diagonals,
  // (512385.25, 5403705.5) (by hand: the two diagonals of the 10 m square bisect each other).
  // Six significant figures printed it as (512385, 5.40371e+06), 4.5 m off in y.
  const std::string bow = likely_mistake(
      "utm_bow_tie", "[[source]]\nmean = [512385, 5403705]\nspread = { sigma = 1 }\n[[zone]]\nname = \"tie\"\n"
                     "role = \"keep_out\"\nshape = \"polygon\"\nparams = { outer = [[512380.25, 5403700.5], "
                     "[512390.25, 5403710.5], [512390.25, 5403700.5], [512380.25, 5403710.5]] }\n");
  const Result r = run({"validate", bow});
  CHECK(r.status == 2);
  CHECK_THAT(r.err, Catch::Contains("self-intersection at (512385.25, 5403705.5)"));
  CHECK(std::count(r.err.begin(), r.err.end(), '\n') == 1);
}
