// strewn sweep (cli/commands/sweep.cpp, engine/src/site/sweep.cpp): a sweep's rows against
// individual `assess` runs of the same varied scenarios written out by hand (the varied values
// put into the scenario's own keys: a rectangle's centre and angle, a source's bias, sigmas and
// exposure; a drop's height and wind speed), the Latin hypercube's defining property, bad study
// input, and the GeoPackage of the rows read back by GDAL's ogr2ogr.
#include <catch2/catch.hpp>
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <map>
#include <nlohmann/json.hpp>
#include <sstream>
#include <string>
#include <vector>

#include "cli/cli_support.hpp"
#include "gis_tools.hpp"
#include "strewn/shape_registry.hpp"
#include "strewn/sweep.hpp"

namespace {

using strewn::test::read_file;
using strewn::test::run;

const std::string dir = STREWN_TEST_BINARY_DIR "/";

void write(const std::string& path, const std::string& text) { std::ofstream(path) << text; }

// A study that must be refused: exit 2, one line on stderr holding `expected`, no CSV written.
void refused_study(const std::string& text, const std::string& expected) {
  write(dir + "sweep_bad.toml", text);
  std::remove((dir + "sweep_bad.csv").c_str());
  const auto r = run({"sweep", dir + "sweep_bad.toml", "--csv", dir + "sweep_bad.csv"});
  INFO(r.err);
  CHECK(r.status == 2);
  CHECK(r.err.find(expected) != std::string::npos);
  CHECK(std::count(r.err.begin(), r.err.end(), '\n') == 1);
  CHECK(!std::ifstream(dir + "sweep_bad.csv").good());
}

// The base scenario with the varied values written into its keys directly.
std::string scenario(double bench_dx, double strip_angle, double bias_x, double factor, double events) {
  std::ostringstream s;
  s.precision(17);
  s << "[settings]\nmethod = \"exact\"\ntolerance = 1e-9\n"
    << "[[source]]\nname = \"thrower\"\naim = [0, 0]\nbias = [" << bias_x << ", 0.1]\n"
    << "spread = { sigma_major = " << 1.0 * factor << ", sigma_minor = " << 0.6 * factor << ", angle_deg = 30 }\n"
    << "events_per_session = " << events << "\nsessions_per_year = 100\n"
    << "[[zone]]\nname = \"bench\"\nrole = \"keep_out\"\nshape = \"rectangle\"\n"
    << "params = { centre = [" << 3.0 + bench_dx << ", 1.0], width = 2.0, depth = 1.0 }\nlimit = 1e-2\n"
    << "[[zone]]\nname = \"strip\"\nrole = \"keep_out\"\nshape = \"rectangle\"\n"
    << "params = { centre = [-1.0, 2.5], width = 4.0, depth = 0.5, angle_deg = " << strip_angle << " }\n"
    << "limit = 1e-3\nlimit_per = \"event\"\n";
  return s.str();
}

const char* kStudy = R"([study]
name = "check"
scenario = "sweep_base.toml"

[[axis]]
zone = "bench"
parameter = "offset_x"
values = [0.0, 1.5]

[[axis]]
zone = "strip"
parameter = "rotation_deg"
values = [0.0, 30.0]

[[axis]]
source = "thrower"
parameter = "bias_x"
values = [0.0, 0.4]

[[axis]]
source = "thrower"
parameter = "spread_factor"
from = 1.0
to = 1.3
steps = 2

[[axis]]
source = "thrower"
parameter = "events_per_session"
values = [10, 50]
)";

std::vector<std::vector<std::string>> csv_rows(const std::string& text) {
  std::vector<std::vector<std::string>> rows;
  std::istringstream in(text);
  std::string line;
  std::getline(in, line);  // header
  while (std::getline(in, line)) {
    std::vector<std::string> fields;
    std::string f;
    bool quoted = false;
    for (char c : line) {
      if (c == '"') quoted = !quoted;
      else if (c == ',' && !quoted) fields.push_back(f), f.clear();
      else f += c;
    }
    fields.push_back(f);
    rows.push_back(fields);
  }
  return rows;
}

}  // namespace

TEST_CASE("sweep rows equal assess runs of the same scenarios written out by hand", "[sweep]") {
  write(dir + "sweep_base.toml", scenario(0, 0, 0, 1, 10));
  write(dir + "sweep_check.toml", kStudy);
  const auto r = run({"sweep", dir + "sweep_check.toml", "--csv", dir + "sweep_check.csv"});
  INFO(r.err);
  REQUIRE((r.status == 0 || r.status == 3));
  const auto rows = csv_rows(read_file(dir + "sweep_check.csv"));
  REQUIRE(rows.size() == 32 * 2);  // 2^5 combinations x 2 zones
  // Columns: combination, 5 axes, zone, role, p_event, bound, p_session, bound, p_year, bound, ...
  int checked = 0;
  for (std::size_t k = 0; k < rows.size(); k += 2) {
    const auto& row = rows[k];
    const double dx = std::stod(row[1]), angle = std::stod(row[2]), bias = std::stod(row[3]),
                 factor = std::stod(row[4]), events = std::stod(row[5]);
    const std::string path = dir + "sweep_by_hand.toml";
    write(path, scenario(dx, angle, bias, factor, events));
    const auto a = run({"assess", path, "--format", "json"});
    REQUIRE((a.status == 0 || a.status == 3));
    const nlohmann::json j = nlohmann::json::parse(a.out);
    for (int z = 0; z < 2; ++z) {
      const auto& srow = rows[k + z];
      const nlohmann::json& zone = j["zones"][z];
      REQUIRE(srow[6] == zone["name"].get<std::string>());
      const double p_event = zone["sources"][0]["p_event"], p_session = zone["all_sources"]["p_session"],
                   p_year = zone["all_sources"]["p_year"];
      // The same probabilities within both runs' error bounds (the regions are built by other
      // routes: a moved or turned region here, the rectangle's own parameters there).
      const double slack = 1e-12;
      CHECK(std::fabs(std::stod(srow[8]) - p_event) <= std::stod(srow[9]) + slack * p_event + 1e-300);
      CHECK(std::fabs(std::stod(srow[10]) - p_session) <= std::stod(srow[11]) + 1e3 * slack * p_session);
      CHECK(std::fabs(std::stod(srow[12]) - p_year) <= std::stod(srow[13]) + 1e3 * slack * p_year);
      const bool holds = zone["limit"]["holds"];
      CHECK(srow[16] == (holds ? "holds" : "exceeded"));
      ++checked;
    }
  }
  CHECK(checked == 64);
}

TEST_CASE("a Latin hypercube takes every stratum of every axis once, the same for the same seed", "[sweep]") {
  // McKay, Beckman & Conover (1979): with n samples each axis's range is cut into n equal strata
  // and every stratum holds exactly one sample.
  write(dir + "sweep_base.toml", scenario(0, 0, 0, 1, 10));
  const auto study = [](int seed) {
    return "[study]\nscenario = \"sweep_base.toml\"\ndesign = \"latin_hypercube\"\nsamples = 7\nseed = " +
           std::to_string(seed) +
           "\n[[axis]]\nzone = \"bench\"\nparameter = \"offset_x\"\nfrom = -1.0\nto = 2.5\nsteps = 2\n"
           "[[axis]]\nsource = \"thrower\"\nparameter = \"spread_factor\"\nfrom = 0.5\nto = 1.2\nsteps = 2\n";
  };
  write(dir + "sweep_lhs.toml", study(11));
  write(dir + "sweep_lhs_other.toml", study(12));
  REQUIRE(run({"sweep", dir + "sweep_lhs.toml", "--csv", dir + "sweep_lhs.csv"}).status != 2);
  REQUIRE(run({"sweep", dir + "sweep_lhs.toml", "--csv", dir + "sweep_lhs_again.csv"}).status != 2);
  REQUIRE(run({"sweep", dir + "sweep_lhs_other.toml", "--csv", dir + "sweep_lhs_other.csv"}).status != 2);
  const auto rows = csv_rows(read_file(dir + "sweep_lhs.csv"));
  REQUIRE(rows.size() == 7 * 2);
  const double lo[2] = {-1.0, 0.5}, hi[2] = {2.5, 1.2};
  for (int a = 0; a < 2; ++a) {
    std::vector<int> hits(7, 0);
    for (std::size_t k = 0; k < rows.size(); k += 2) {
      const double v = std::stod(rows[k][1 + a]);
      REQUIRE(v >= lo[a]);
      REQUIRE(v < hi[a]);
      ++hits[static_cast<int>((v - lo[a]) / (hi[a] - lo[a]) * 7)];
    }
    for (int h : hits) CHECK(h == 1);
  }
  CHECK(read_file(dir + "sweep_lhs.csv") == read_file(dir + "sweep_lhs_again.csv"));
  CHECK(read_file(dir + "sweep_lhs.csv") != read_file(dir + "sweep_lhs_other.csv"));
}

TEST_CASE("bad study input names file, line and key, suggests a name, exits 2 and writes nothing", "[sweep]") {
  write(dir + "sweep_base.toml", scenario(0, 0, 0, 1, 10));
  struct Case {
    std::string text, expected;
  };
  const std::vector<Case> cases = {
      {"[study]\nscenario = \"sweep_base.toml\"\n[[axis]]\nzone = \"bench\"\nparamter = \"offset_x\"\nvalues = [1]\n",
       "sweep_bad.toml:5:1: axis[1].paramter: unknown key (did you mean 'parameter'?)"},
      {"[study]\nscenario = \"sweep_base.toml\"\n[[axis]]\nzone = \"bnech\"\nparameter = \"offset_x\"\nvalues = [1]\n",
       "sweep_bad.toml:4:8: axis[1].zone: the scenario has no zone named 'bnech' (did you mean 'bench'?)"},
      {"[study]\nscenario = \"sweep_base.toml\"\n[[axis]]\nsource = \"thrower\"\nparameter = \"spread_factr\"\nvalues = [1]\n",
       "sweep_bad.toml:5:13: axis[1].parameter: a source cannot vary 'spread_factr' (did you mean 'spread_factor'?)"},
      {"[study]\nscenario = \"sweep_base.toml\"\ndesign = \"latin_hypercube\"\n[[axis]]\nzone = \"bench\"\nparameter = \"offset_x\"\nvalues = [1]\n",
       "sweep_bad.toml:1:1: study.samples: missing"},
      {"[study]\nscenario = \"sweep_base.toml\"\n[[axis]]\nsource = \"thrower\"\nparameter = \"spread_factor\"\nvalues = [0]\n",
       "sweep_bad.toml:6:11: axis[1].values: a spread factor must be from 1e-6 to 1e6"},
      // 1e-300 made every probability NaN: an internal error (a second hostile trial)
      {"[study]\nscenario = \"sweep_base.toml\"\n[[axis]]\nsource = \"thrower\"\nparameter = \"spread_factor\"\nvalues = [1.0, 1e-300]\n",
       "sweep_bad.toml:6:16: axis[1].values: a spread factor must be from 1e-6 to 1e6 (got 1e-300)"},
      {"[study]\nscenario = \"sweep_base.toml\"\n[[axis]]\nzone = \"bench\"\nparameter = \"offset_x\"\nfrom = 0\nto = 1\nsteps = 10000\n"
       "[[axis]]\nzone = \"strip\"\nparameter = \"offset_y\"\nfrom = 0\nto = 1\nsteps = 11\n",
       "combinations, above the ceiling of 100000"},
      // Two axes on one parameter: aim_x 0 and 3 gave 3's results under both columns, two
      // offsets were added together; two labels alike gave two columns of one name (a hostile
      // trial).
      {"[study]\nscenario = \"sweep_base.toml\"\n[[axis]]\nsource = \"thrower\"\nparameter = \"aim_x\"\nvalues = [0]\n"
       "[[axis]]\nsource = \"thrower\"\nparameter = \"aim_x\"\nvalues = [3]\n",
       "sweep_bad.toml:9:13: axis[2].parameter: axis[1] already varies source 'thrower' aim_x: give all its values in one axis"},
      {"[study]\nscenario = \"sweep_base.toml\"\n[[axis]]\nzone = \"bench\"\nparameter = \"offset_x\"\nvalues = [0]\nlabel = \"moved\"\n"
       "[[axis]]\nzone = \"strip\"\nparameter = \"offset_y\"\nvalues = [1]\nlabel = \"moved\"\n",
       "sweep_bad.toml:12:9: axis[2].label: axis[1] has the column 'moved (m)' too"},
      // Column names, not labels, must differ: "x" on a length axis is "x (m)"; and a label may
      // not take a column of the table's own (two "verdict" columns; the GeoPackage then failed
      // after the whole sweep had run), nor be empty (a second hostile trial).
      {"[study]\nscenario = \"sweep_base.toml\"\n[[axis]]\nzone = \"bench\"\nparameter = \"offset_x\"\nvalues = [0]\nlabel = \"x\"\n"
       "[[axis]]\nsource = \"thrower\"\nparameter = \"spread_factor\"\nvalues = [1]\nlabel = \"x (m)\"\n",
       "axis[2].label: axis[1] has the column 'x (m)' too"},
      {"[study]\nscenario = \"sweep_base.toml\"\n[[axis]]\nsource = \"thrower\"\nparameter = \"spread_factor\"\nvalues = [1]\nlabel = \"verdict\"\n",
       "axis[1].label: 'verdict' is a column of the sweep's own table"},
      {"[study]\nscenario = \"sweep_base.toml\"\n[[axis]]\nsource = \"thrower\"\nparameter = \"spread_factor\"\nvalues = [1]\nlabel = \"\"\n",
       "axis[1].label: must not be empty"},
  };
  for (const Case& c : cases) refused_study(c.text, c.expected);
}

TEST_CASE("the demo study runs and its help has an example", "[sweep]") {
  const auto r = run({"sweep", STREWN_SOURCE_DIR "/shapes/studies/fire_door_study.toml"});
  INFO(r.err);
  CHECK(r.status == 0);
  CHECK(r.out.find("combinations that meet every limit") != std::string::npos);
  const auto h = run({"sweep", "--help"});
  CHECK(h.out.find("Example: strewn sweep") != std::string::npos);
}

namespace {

// The drop demo with its drop's height and wind speed written into the scenario's own keys
// (and its aim left out, so that the aim is the mean landing and follows the drop).
std::string drop_scenario(double height, double wind_speed) {
  std::string text = read_file(STREWN_SOURCE_DIR "/shapes/drone_drop_flight.toml");
  const auto replace = [&](const std::string& from, const std::string& to) {
    const std::size_t at = text.find(from);
    REQUIRE(at != std::string::npos);
    text.replace(at, from.size(), to);
  };
  std::ostringstream h, w;
  h.precision(17);
  w.precision(17);
  h << "height = " << height << "  ";
  w << "wind = { speed = " << wind_speed << ",";
  replace("height = 25.0 ", h.str());
  replace("wind = { speed = 3.5,", w.str());
  replace("aim = [7.0, 18.0]", "");
  return text;
}

}  // namespace

TEST_CASE("sweep varies a drop's height and wind speed as assess runs of the scenarios written out do", "[sweep][drop]") {
  // The spread of a drop is computed again from its inputs (strewn/drop.hpp) at every
  // combination; the rows must be those of `assess` on the scenario with the same inputs in its
  // keys, to the error bounds (the same fall, the same seed: in practice to the last digits).
  write(dir + "sweep_drop_base.toml", drop_scenario(25.0, 3.5));
  write(dir + "sweep_drop.toml", "[study]\nscenario = \"sweep_drop_base.toml\"\n\n"
                                 "[[axis]]\nsource = \"parcel on a parachute\"\nparameter = \"drop_height\"\nvalues = [18.0, 30.0]\n\n"
                                 "[[axis]]\nsource = \"parcel on a parachute\"\nparameter = \"drop_wind_speed\"\nvalues = [2.0, 5.0]\n");
  const auto r = run({"sweep", dir + "sweep_drop.toml", "--csv", dir + "sweep_drop.csv"});
  INFO(r.err);
  REQUIRE((r.status == 0 || r.status == 3));
  CHECK_THAT(r.out, Catch::Contains("parcel on a parachute drop_height (m)") &&
                        Catch::Contains("parcel on a parachute drop_wind_speed (m/s)"));
  const auto rows = csv_rows(read_file(dir + "sweep_drop.csv"));
  REQUIRE(rows.size() == 4 * 5);  // 4 combinations x 5 zones
  std::vector<double> patio;      // p per event on the patio, per combination
  for (std::size_t k = 0; k < rows.size(); k += 5) {
    const double height = std::stod(rows[k][1]), wind = std::stod(rows[k][2]);
    write(dir + "sweep_drop_by_hand.toml", drop_scenario(height, wind));
    const auto a = run({"assess", dir + "sweep_drop_by_hand.toml", "--format", "json"});
    INFO(a.err);
    REQUIRE((a.status == 0 || a.status == 3));
    const nlohmann::json j = nlohmann::json::parse(a.out);
    for (int z = 0; z < 5; ++z) {
      const auto& row = rows[k + z];
      const nlohmann::json& zone = j["zones"][z];
      REQUIRE(row[3] == zone["name"].get<std::string>());
      const double p = zone["sources"][0]["p_event"];
      INFO(row[3] << " at height " << height << ", wind " << wind);
      CHECK(std::fabs(std::stod(row[5]) - p) <= std::stod(row[6]) + 1e-12 * p + 1e-300);
      if (z == 1) patio.push_back(p);
    }
  }
  // The axes matter: the four combinations give four different patio probabilities.
  std::sort(patio.begin(), patio.end());
  CHECK(std::adjacent_find(patio.begin(), patio.end()) == patio.end());
  // A source that is not a drop cannot vary a drop's input.
  write(dir + "sweep_not_drop.toml", std::string("[study]\nscenario = \"sweep_base.toml\"\n\n[[axis]]\nsource = \"thrower\"\n"
                                                 "parameter = \"drop_height\"\nvalues = [10.0]\n"));
  write(dir + "sweep_base.toml", scenario(0, 0, 0, 1, 10));
  const auto bad = run({"sweep", dir + "sweep_not_drop.toml"});
  CHECK(bad.status == 2);
  CHECK_THAT(bad.err, Catch::Contains("sweep_not_drop.toml:6:13: axis[1].parameter: source 'thrower' is not a drop from flight"));
}

TEST_CASE("the sweep's work estimate counts each drop spread computed again, growing with the drop axis", "[sweep][drop][work]") {
  // Every combination of a drop axis computes the drop's spread again: its 2n + 1 sigma points and
  // the `falls` of its Monte Carlo check (strewn/drop.hpp), one fall each; both counts are read
  // from `assess --format json` of the base scenario (19 sigma points for the demo's nine
  // uncertain inputs, 4000 falls). An axis that moves a zone re-integrates no drop.
  write(dir + "sweep_work_base.toml", drop_scenario(25.0, 3.5));
  const auto a = run({"assess", dir + "sweep_work_base.toml", "--format", "json"});
  REQUIRE((a.status == 0 || a.status == 3));
  const nlohmann::json j = nlohmann::json::parse(a.out);
  const double falls = j["sources_from_physics"][0]["monte_carlo_check"]["falls"].get<double>() +
                       j["sources_from_physics"][0]["unscented"]["sigma_points"].get<double>();
  CHECK(falls == 4019.0);
  const strewn::ShapeRegistry shapes = strewn::ShapeRegistry::with_default_search_path({});
  const auto study = [&](const std::string& name, const std::string& axis, int values) {
    std::string list;
    for (int k = 0; k < values; ++k) list += (k ? ", " : "") + std::to_string(18 + 2 * k) + ".0";
    write(dir + name, "[study]\nscenario = \"sweep_work_base.toml\"\n\n[[axis]]\n" + axis + "values = [" + list + "]\n");
    return strewn::sweep_work(strewn::load_study(dir + name, shapes));
  };
  const std::string height = "source = \"parcel on a parachute\"\nparameter = \"drop_height\"\n";
  const std::string shed = "zone = \"shed\"\nparameter = \"offset_x\"\n";
  const strewn::WorkEstimate two = study("sweep_work_2.toml", height, 2), four = study("sweep_work_4.toml", height, 4);
  const strewn::WorkEstimate zone_only = study("sweep_work_zone.toml", shed, 4);
  // Five zones, one component: 5 units a combination for the zones; the drop adds its falls.
  CHECK(zone_only.units == Approx(4 * 5.0));
  CHECK(four.units == Approx(4 * (5.0 + strewn::kFallUnits * falls)));
  CHECK(four.units == Approx(2 * two.units));
  CHECK(four.units > 500 * zone_only.units);  // a drop sweep costs far more than moving a zone
  CHECK_THAT(four.what, Catch::Contains("4 drop spread(s) of 4019 falls computed again"));
  CHECK_THAT(zone_only.what, !Catch::Contains("drop"));
}

TEST_CASE("sweep --gpkg writes the CSV's rows, the combinations and the summary as GeoPackage tables", "[sweep][gis]") {
  // Read back by GDAL's own ogr2ogr (Debian's gdal-bin) as CSV, cell for cell equal to the CSV
  // output (numbers to ogr2ogr's 15 printed digits).
  write(dir + "sweep_base.toml", scenario(0, 0, 0, 1, 10));
  write(dir + "sweep_check.toml", kStudy);
  const std::string gpkg = dir + "sweep_check.gpkg", csv = dir + "sweep_check_for_gpkg.csv";
  std::remove(gpkg.c_str());
  const auto r = run({"sweep", dir + "sweep_check.toml", "--csv", csv, "--gpkg", gpkg});
  INFO(r.err);
  REQUIRE((r.status == 0 || r.status == 3));
  const std::string back = dir + "sweep_check_from_gpkg.csv";
  std::remove(back.c_str());
  const strewn::test::ToolRun t = strewn::test::run_tool("ogr2ogr -f CSV " + back + " " + gpkg + " rows");
  INFO(t.out);
  REQUIRE(t.status == 0);
  const auto ours = csv_rows(read_file(csv)), gdal = csv_rows(read_file(back));
  REQUIRE(ours.size() == 64);
  REQUIRE(gdal.size() == ours.size());
  for (std::size_t i = 0; i < ours.size(); ++i) {
    REQUIRE(gdal[i].size() == ours[i].size());
    for (std::size_t k = 0; k < ours[i].size(); ++k) {
      INFO("row " << i + 1 << ", column " << k + 1 << ": " << ours[i][k] << " vs " << gdal[i][k]);
      char* end = nullptr;
      const double a = std::strtod(ours[i][k].c_str(), &end);
      if (!ours[i][k].empty() && *end == '\0') CHECK(std::stod(gdal[i][k]) == Approx(a).epsilon(1e-14).margin(1e-300));
      else CHECK(gdal[i][k] == ours[i][k]);
    }
  }
  // The header's axis columns keep their names (with the unit).
  CHECK_THAT(read_file(back), Catch::Contains("bench offset_x (m)"));
  const strewn::test::ToolRun layers = strewn::test::run_tool("ogrinfo -ro -q " + gpkg);
  CHECK_THAT(layers.out, Catch::Contains("rows") && Catch::Contains("combinations") && Catch::Contains("study"));
  const strewn::test::ToolRun study = strewn::test::run_tool("ogrinfo -ro -q " + gpkg + " study");
  CHECK_THAT(study.out, Catch::Contains("meeting_every_limit") && Catch::Contains("base_scenario"));
  const strewn::test::ToolRun combos = strewn::test::run_tool("ogrinfo -ro -so " + gpkg + " combinations");
  CHECK_THAT(combos.out, Catch::Contains("Feature Count: 32"));
}

TEST_CASE("sweep prints the base scenario's path normalised", "[sweep]") {
  const auto r = run({"sweep", STREWN_SOURCE_DIR "/shapes/studies/fire_door_study.toml"});
  CHECK_THAT(r.out, Catch::Contains("base scenario: " STREWN_SOURCE_DIR "/shapes/throwing_lane.toml") &&
                        !Catch::Contains("/../"));
}

// A layout's spacing (layout_spacing) on the demo pitch, shapes/sports_pitch_rotors.toml: each
// combination's rows against separate `assess` and `deposition` runs of the pitch with that
// spacing typed into its [[layout]] (the reader places the heads; the sweep places them again).
namespace {

const std::string kPitch = STREWN_SOURCE_DIR "/shapes/sports_pitch_rotors.toml";

std::string pitch_with_spacing(double spacing) {
  std::string text = read_file(kPitch);
  const auto replace = [&](const std::string& from, const std::string& to) {
    const std::size_t at = text.find(from);
    REQUIRE(at != std::string::npos);
    text.replace(at, from.size(), to);
  };
  std::ostringstream v;
  v.precision(17);
  v << "spacing = " << spacing;
  replace("spacing = \"head-to-head\"", v.str());
  replace("\"field_data/rotor_profile.csv\"", "\"" STREWN_SOURCE_DIR "/shapes/field_data/rotor_profile.csv\"");
  return text;
}

}  // namespace

TEST_CASE("sweep varies a layout's spacing as assess and deposition runs of the pitch written out do", "[sweep][layout]") {
  write(dir + "sweep_pitch_base.toml", pitch_with_spacing(15.0));
  write(dir + "sweep_pitch.toml", "[study]\nscenario = \"sweep_pitch_base.toml\"\n[[axis]]\nlayout = \"pitch rotors\"\n"
                                  "parameter = \"layout_spacing\"\nvalues = [9.0, 12.0, 20.0]\n");
  const auto r = run({"sweep", dir + "sweep_pitch.toml", "--csv", dir + "sweep_pitch.csv"});
  INFO(r.err);
  REQUIRE((r.status == 0 || r.status == 3));
  const std::string csv = read_file(dir + "sweep_pitch.csv");
  CHECK(csv.rfind("combination,\"pitch rotors layout_spacing (m)\",zone,", 0) == 0);
  CHECK(csv.substr(0, csv.find('\n')).find(",cu_percent,du_percent") != std::string::npos);
  const auto rows = csv_rows(csv);
  REQUIRE(rows.size() == 3 * 3);  // 3 spacings x 3 zones
  for (std::size_t k = 0; k < rows.size(); k += 3) {
    const double spacing = std::stod(rows[k][1]);
    write(dir + "sweep_pitch_by_hand.toml", pitch_with_spacing(spacing));
    const auto a = run({"assess", dir + "sweep_pitch_by_hand.toml", "--format", "json"});
    REQUIRE((a.status == 0 || a.status == 3));
    const nlohmann::json j = nlohmann::json::parse(a.out);
    for (std::size_t z = 0; z < 3; ++z) {
      const auto& row = rows[k + z];
      REQUIRE(row[2] == j["zones"][z]["name"].get<std::string>());
      const double p = j["zones"][z]["all_sources"]["p_session"], err = j["zones"][z]["all_sources"]["p_session_abs_err"];
      CHECK(std::fabs(std::stod(row[6]) - p) <= std::stod(row[7]) + err + 1e-300);
    }
    const auto d = run({"deposition", dir + "sweep_pitch_by_hand.toml", "--format", "json"});
    REQUIRE(d.status == 0);
    const nlohmann::json g = nlohmann::json::parse(d.out)["grid"];
    // The same heads and cans on both routes: the same CU and DU to rounding.
    CHECK(std::stod(rows[k][15]) == Approx(g["cu_percent"].get<double>()).epsilon(1e-9));
    CHECK(std::stod(rows[k][16]) == Approx(g["du_low_quarter_percent"].get<double>()).epsilon(1e-9));
  }
  // The spacing changes the water: 9 m and 20 m place different heads, so the CU differs.
  CHECK(rows[0][15] != rows[6][15]);
}

TEST_CASE("a layout axis's keys are checked: unknown layout, wrong parameter, a bad spacing", "[sweep][layout]") {
  write(dir + "sweep_pitch_base.toml", pitch_with_spacing(15.0));
  struct Case {
    std::string text, expected;
  };
  const std::string head = "[study]\nscenario = \"sweep_pitch_base.toml\"\n[[axis]]\n";
  const std::vector<Case> cases = {
      {head + "layout = \"pitch rotor\"\nparameter = \"layout_spacing\"\nvalues = [10]\n",
       "sweep_bad.toml:4:10: axis[1].layout: the scenario has no layout named 'pitch rotor' (did you mean 'pitch rotors'?)"},
      {head + "layout = \"pitch rotors\"\nparameter = \"spacing\"\nvalues = [10]\n",
       "sweep_bad.toml:5:13: axis[1].parameter: a layout cannot vary 'spacing'"},
      {head + "layout = \"pitch rotors\"\nparameter = \"layout_spacing\"\nvalues = [-1]\n",
       "sweep_bad.toml:6:11: axis[1].values: a layout's spacing must be above 0"},
      {head + "layout = \"pitch rotors\"\nzone = \"pitch\"\nparameter = \"layout_spacing\"\nvalues = [10]\n",
       "axis[1]: name exactly one of zone"},
      {head + "zone = \"pitch\"\nparameter = \"layout_spacing\"\nvalues = [10]\n",
       "axis[1].parameter: a zone cannot vary 'layout_spacing'"},
  };
  for (const Case& c : cases) refused_study(c.text, c.expected);
}

TEST_CASE("sweep: a tolerance not met does not fail a limit that holds at its upper bound, as in assess", "[cli][sweep]") {
  // Monte Carlo's sampled bound (1e4 samples) is far above the 1e-8 request: every result is
  // "tolerance not met". The bench's p is about 0.1 under a limit of 0.5 per event: it holds at
  // its upper bound, assess says "All limits hold" (exit 0), and the sweep said
  // meets_every_limit = no for every combination (a second hostile trial, at a UTM site).
  write(dir + "sweep_mc_base.toml",
        "[settings]\nmethod = \"monte_carlo\"\nsamples = 10000\n[[source]]\nname = \"thrower\"\naim = [0, 0]\n"
        "spread = { sigma = 1.0 }\nevents_per_session = 1\n[[zone]]\nname = \"bench\"\nrole = \"keep_out\"\n"
        "shape = \"rectangle\"\nparams = { centre = [1.5, 0.0], width = 1.0, depth = 2.0 }\nlimit = 0.5\nlimit_per = \"event\"\n");
  const auto assess = run({"assess", dir + "sweep_mc_base.toml"});
  REQUIRE(assess.status == 0);
  REQUIRE_THAT(assess.out, Catch::Contains("All limits hold"));
  write(dir + "sweep_mc.toml", "[study]\nscenario = \"sweep_mc_base.toml\"\n[[axis]]\nzone = \"bench\"\nparameter = \"offset_x\"\n"
                               "values = [0.0, 0.5]\n");
  const auto r = run({"sweep", dir + "sweep_mc.toml", "--csv", dir + "sweep_mc.csv"});
  INFO(r.err);
  REQUIRE(r.status == 0);
  const std::string csv = read_file(dir + "sweep_mc.csv");
  CHECK_THAT(csv, Catch::Contains(",holds,not met: ") && Catch::Contains("tolerance not met"));
  CHECK_THAT(csv, !Catch::Contains(",no\n"));
  CHECK(std::count(csv.begin(), csv.end(), '\n') == 3);  // the header and two combinations, each "yes"
  CHECK(csv.find(",yes\n") != std::string::npos);
}
