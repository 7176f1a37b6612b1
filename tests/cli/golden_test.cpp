// Golden JSON outputs of every command other than assess (whose goldens, checked against an
// independent method as well, are in assess_test.cpp): fit, solve (clearance, spread, aim, release),
// deposition and the map's summary. Each case is a command line and the file holding its
// output; after a deliberate change, regenerate with STREWN_UPDATE_GOLDEN=1 and review
// `git diff tests/data/golden` before committing.
#include <catch2/catch.hpp>
#include <cstdlib>
#include <fstream>
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "cli_run.hpp"
#include "golden_support.hpp"

namespace {

using strewn::test::Result;
using strewn::test::run;

const std::string data = STREWN_TEST_DATA_DIR "/cli/";
const std::string shapes = STREWN_SOURCE_DIR "/shapes/";

struct GoldenCase {
  std::string golden;  // file name under tests/data/golden/
  std::vector<std::string> args;
};

const std::vector<GoldenCase> kCases = {
    {"fit_lane_marks.json", {"fit", shapes + "field_data/lane_marks.csv", "--format", "json"}},
    {"fit_counts.json", {"fit", "--counts", "41", "60", "--radius", "0.3", "--aim", "0", "6", "--format", "json"}},
    {"solve_clearance_strip.json",
     {"solve", "clearance", data + "solve_half_plane.toml", "--zone", "strip", "--direction", "1", "0", "--format", "json"}},
    {"solve_clearance_person.json",
     {"solve", "clearance", shapes + "throwing_lane.toml", "--person", "0", "10", "--format", "json"}},
    {"solve_spread_half_plane.json", {"solve", "spread", data + "solve_half_plane.toml", "--format", "json"}},
    {"solve_spread_throwing_lane.json", {"solve", "spread", shapes + "throwing_lane.toml", "--format", "json"}},
    {"solve_aim_half_plane.json", {"solve", "aim", data + "solve_half_plane.toml", "--format", "json"}},
    {"solve_aim_door.json", {"solve", "aim", data + "solve_aim_door.toml", "--min-target", "0.5", "--format", "json"}},
    {"solve_release_vacuum.json",
     {"solve", "release", data + "release_vacuum.toml", "--vary", "height", "--format", "json"}},
    {"deposition_small_lawn_heads.json", {"deposition", shapes + "small_lawn_heads.toml", "--format", "json"}},
    {"deposition_seed_drop_zone.json", {"deposition", shapes + "seed_drop_zone.toml", "--format", "json"}},
    {"deposition_single_can.json", {"deposition", data + "deposition_single_can.toml", "--format", "json"}},
    {"map_throwing_lane.json", {"map", shapes + "throwing_lane.toml", "--cells", "40", "--format", "json"}},
    {"map_drone_drop_event.json",
     {"map", shapes + "drone_drop.toml", "--cells", "30", "--per", "event", "--format", "json"}},
    {"map_lawn_rectangle_year.json",
     {"map", shapes + "lawn_sprinkler.toml", "--cells", "25", "--per", "year", "--footprint", "rectangle",
      "--footprint-params", R"({"centre": [0, 0], "width": 0.5, "depth": 0.3})", "--format", "json"}},
};

}  // namespace

TEST_CASE("every command's JSON matches its golden output", "[cli][golden]") {
  const bool update = std::getenv("STREWN_UPDATE_GOLDEN") != nullptr;
  for (const GoldenCase& c : kCases) {
    const Result r = run(c.args);
    INFO(c.golden << ": " << r.err);
    REQUIRE((r.status == 0 || r.status == 3));
    nlohmann::json got = nlohmann::json::parse(r.out);
    strewn::test::strip_local(got);
    const std::string golden = STREWN_TEST_DATA_DIR "/golden/" + c.golden;
    if (update) std::ofstream(golden) << got.dump(2) << "\n";
    std::ifstream in(golden);
    REQUIRE(in.good());
    strewn::test::compare_golden(got, nlohmann::json::parse(in), c.golden);
  }
}
