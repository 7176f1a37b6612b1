// Names that explain themselves (issue 15, item 11): each renamed key, value and option works
// under its new name, and its former spelling still works for one release with a warning on
// stderr naming the new one, the same result and the same exit status; both spellings at once
// are refused.
#include <catch2/catch.hpp>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <string>

#include "cli_support.hpp"

namespace {

using strewn::test::data;
using strewn::test::demo;
using strewn::test::read_file;
using strewn::test::Result;
using strewn::test::run;

std::string dir() {
  const std::string d = std::string(STREWN_TEST_BINARY_DIR) + "/former_names";
  std::filesystem::create_directories(d);
  return d;
}

std::string write(const std::string& name, const std::string& text) {
  const std::string path = dir() + "/" + name;
  std::ofstream(path) << text;
  return path;
}

// The text with the first `from` replaced by `to` (which must be there).
std::string replaced(std::string text, const std::string& from, const std::string& to) {
  const std::size_t at = text.find(from);
  REQUIRE(at != std::string::npos);
  return text.replace(at, from.size(), to);
}

const std::string kWarning = "is the former name of";

// The JSON of two runs, for comparing a former spelling's result with the new one's.
void same_json(const Result& a, const Result& b) {
  INFO(a.err << b.err);
  REQUIRE(a.status == b.status);
  nlohmann::json ja = nlohmann::json::parse(a.out), jb = nlohmann::json::parse(b.out);
  for (nlohmann::json* j : {&ja, &jb}) {
    j->erase("file");
    j->erase("seconds");  // a map's run time
  }
  CHECK(ja == jb);
}

const std::string kSite = R"([[source]]
name = "thrower"
aim = [0, 6]
spread = { sigma = 0.4 }
  [[source.component]]
  label = "wide"
  weight = 0.05
  spread = { sigma = 1.5 }

[[zone]]
name = "board"
role = "target"
shape = "disk"
params = { centre = [0, 6], radius = 0.6 }

[[zone]]
name = "bench"
role = "keep_out"
shape = "rectangle"
params = { centre = [3, 5], width = 2, depth = 0.5 }
limit = 1e-3

[[zone]]
name = "scorer"
role = "report_only"
shape = "person"
params = { centre = [-2, 5] }
)";

}  // namespace

TEST_CASE("scenario keys: [[source.wild]] and role = \"watch\" read as before, with a warning", "[cli][names]") {
  const std::string now = write("now.toml", kSite);
  const Result a = run({"assess", now, "--format", "json"});
  CHECK(a.err.empty());
  const std::string wild = write("wild.toml", replaced(replaced(kSite, "[[source.component]]\n  label = \"wide\"\n", "[[source.wild]]\n"),
                                                       "\"report_only\"", "\"watch\""));
  const Result b = run({"assess", wild, "--format", "json"});
  same_json(a, b);
  CHECK_THAT(b.err, Catch::Contains("strewn: warning: " + wild + ":5:3: source[1].wild: [[source.wild]] " + kWarning +
                                    " [[source.component]]"));
  CHECK_THAT(b.err, Catch::Contains("strewn: warning: " + wild + ":24:8: zone[3].role: \"watch\" " + kWarning + " \"report_only\""));
  CHECK(std::count(b.err.begin(), b.err.end(), '\n') == 2);
  const nlohmann::json j = nlohmann::json::parse(b.out);
  CHECK(j["zones"][2]["role"] == "report_only");
  // Both spellings in one source: which one was meant cannot be told.
  const std::string both = write("both.toml", replaced(kSite, "[[zone]]", "  [[source.wild]]\n  weight = 0.01\n  spread = { sigma = 3 }\n\n[[zone]]"));
  const Result c = run({"validate", both});
  CHECK(c.status == 2);
  CHECK_THAT(c.err, Catch::Contains("source[1].wild: give [[source.component]] only (wild is its former name)"));
  // A component's label must be a string, like every other name.
  const Result d = run({"validate", write("label.toml", replaced(kSite, "label = \"wide\"", "label = 3"))});
  CHECK(d.status == 2);
  CHECK_THAT(d.err, Catch::Contains("source[1].component[1].label: must be a string"));
}

TEST_CASE("shape parameters: a former name reads as the new one, with a warning at the params table", "[cli][names]") {
  // The shape registry's alias table (each plugin's "former" entries): rectangle height -> depth,
  // the kind annular_sector -> ring_sector ("former_kind") and its r_inner/r_outer/theta_*_deg ->
  // inner_radius/outer_radius/*_angle_deg, doorway swing = "left" -> opens_toward = "left_seen_from_hinge".
  const std::string extra = "\n[[zone]]\nname = \"arc\"\nrole = \"report_only\"\nshape = \"ring_sector\"\n"
                            "params = { centre = [0, 6], NAMES }\n\n[[zone]]\nname = \"door\"\nrole = \"keep_out\"\n"
                            "shape = \"doorway\"\nparams = { hinge = [2, 8], latch = [3, 8], DOOR }\n";
  const std::string now_text = kSite + replaced(replaced(extra, "NAMES", "inner_radius = 1, outer_radius = 2, from_angle_deg = 10, "
                                                                         "to_angle_deg = 80"),
                                                "DOOR", "opens_toward = \"right_seen_from_hinge\"");
  const std::string now = write("shape_now.toml", now_text);
  const Result a = run({"assess", now, "--format", "json"});
  CHECK(a.err.empty());
  const std::string former_params = replaced(replaced(replaced(now_text, "depth = 0.5", "height = 0.5"),
                                                    "inner_radius = 1, outer_radius = 2, from_angle_deg = 10, to_angle_deg = 80",
                                                    "r_inner = 1, r_outer = 2, theta_from_deg = 10, theta_to_deg = 80"),
                                           "opens_toward = \"right_seen_from_hinge\"", "swing = \"right\"");
  const std::string former_text = replaced(former_params, "shape = \"ring_sector\"", "shape = \"annular_sector\"");
  const std::string former = write("shape_former.toml", former_text);
  const Result b = run({"assess", former, "--format", "json"});
  same_json(a, b);
  CHECK_THAT(b.err, Catch::Contains("strewn: warning: " + former + ":20:10: zone[2] 'bench'.params: shape 'rectangle': parameter 'height' " +
                                    kWarning + " 'depth'; it is read in this release and will be refused in the next"));
  CHECK_THAT(b.err, Catch::Contains("strewn: warning: " + former + ":32:9: zone[4] 'arc'.shape: shape kind 'annular_sector' " +
                                    kWarning + " 'ring_sector'; it is read in this release and will be refused in the next"));
  CHECK_THAT(b.err, Catch::Contains("zone[4] 'arc'.params: shape 'ring_sector': parameter 'r_inner' " + kWarning + " 'inner_radius'"));
  CHECK_THAT(b.err, Catch::Contains("zone[4] 'arc'.params: shape 'ring_sector': parameter 'theta_to_deg' " + kWarning + " 'to_angle_deg'"));
  CHECK_THAT(b.err, Catch::Contains("zone[5] 'door'.params: shape 'doorway': parameter 'swing' = \"right\" is the former spelling of "
                                    "'opens_toward' = \"right_seen_from_hinge\""));
  CHECK(std::count(b.err.begin(), b.err.end(), '\n') == 7);
  // Both spellings at once are refused, naming the parameter.
  const Result c = run({"validate", write("shape_both.toml", replaced(now_text, "depth = 0.5", "depth = 0.5, height = 0.5"))});
  CHECK(c.status == 2);
  CHECK(c.out.empty());
  CHECK_THAT(c.err, Catch::Contains("shape 'rectangle': parameter 'height' is the former name of 'depth': give 'depth' only"));
  // strewn shapes names each renamed parameter's former spelling.
  const Result kinds = run({"shapes"});
  CHECK_THAT(kinds.out, Catch::Contains("(required; formerly height)") && Catch::Contains("(default 0; formerly r_inner)") &&
                            Catch::Contains("; formerly swing)") &&
                            Catch::Contains("ring_sector (formerly annular_sector): Part of a ring"));
  // A composite's part of the former kind, and a map footprint of it, are read with the warning too.
  const Result part = run({"validate", write("shape_part.toml", kSite + "\n[[zone]]\nname = \"pair\"\nrole = \"keep_out\"\n"
                                                                 "shape = \"composite\"\nparams = { parts = [ { kind = \"annular_sector\", "
                                                                 "params = { centre = [0, 6], outer_radius = 1 } } ] }\n")});
  CHECK(part.status == 0);
  CHECK_THAT(part.err, Catch::Contains("shape kind 'annular_sector' " + kWarning + " 'ring_sector'"));
}

TEST_CASE("deposition: site_zone reads as site_boundary, with a warning", "[cli][names]") {
  const std::string text = read_file(STREWN_SOURCE_DIR "/shapes/small_lawn_heads.toml");
  REQUIRE(text.find("site_boundary = ") != std::string::npos);
  const std::string now = write("lawn_now.toml", text);
  const std::string former = write("lawn_former.toml", replaced(text, "site_boundary = ", "site_zone = "));
  std::filesystem::create_directories(dir() + "/templates");
  const Result a = run({"deposition", now, "--format", "json"});
  const Result b = run({"deposition", former, "--format", "json"});
  same_json(a, b);
  CHECK_THAT(b.err, Catch::Contains("deposition.site_zone: site_zone " + kWarning + " site_boundary"));
  CHECK(a.err.empty());
}

TEST_CASE("options: the three meanings of --window are --extent, --max-move and --search-half-width", "[cli][names]") {
  const std::string site = write("options.toml", kSite);
  // map
  const Result m1 = run({"map", site, "--cells", "6", "--extent", "-3", "3", "3", "9", "--format", "json"});
  CHECK(m1.err.empty());
  const Result m2 = run({"map", site, "--cells", "6", "--window", "-3", "3", "3", "9", "--format", "json"});
  same_json(m1, m2);
  CHECK(m2.err == "strewn: warning: --window " + kWarning + " --extent; it is read in this release and will be refused in the next\n");
  const Result m3 = run({"map", site, "--cells", "6", "--window", "-3", "3", "3", "9", "--extent", "-3", "3", "3", "9"});
  CHECK(m3.status == 2);
  CHECK_THAT(m3.err, Catch::Contains("--window is the former name of --extent: give --extent only"));
  // solve clearance
  const Result c1 = run({"solve", "clearance", site, "--zone", "bench", "--direction", "1", "0", "--max-move", "20", "--format", "json"});
  const Result c2 = run({"solve", "clearance", site, "--zone", "bench", "--direction", "1", "0", "--window", "20", "--format", "json"});
  same_json(c1, c2);
  CHECK(nlohmann::json::parse(c1.out)["max_move_m"] == 20.0);
  CHECK_THAT(c2.err, Catch::Contains("--window " + kWarning + " --max-move"));
  // solve aim
  const Result a1 = run({"solve", "aim", site, "--search-half-width", "1", "--grid", "5", "--format", "json"});
  const Result a2 = run({"solve", "aim", site, "--window", "1", "--grid", "5", "--format", "json"});
  same_json(a1, a2);
  CHECK_THAT(a2.err, Catch::Contains("--window " + kWarning + " --search-half-width"));
  // solve spread: factors
  const Result s1 = run({"solve", "spread", site, "--min-factor", "0.1", "--max-factor", "10", "--format", "json"});
  const Result s2 = run({"solve", "spread", site, "--min", "0.1", "--max", "10", "--format", "json"});
  same_json(s1, s2);
  CHECK_THAT(s2.err, Catch::Contains("--min " + kWarning + " --min-factor") && Catch::Contains("--max " + kWarning + " --max-factor"));
  CHECK(s1.err.empty());
  // Every renamed option's help names the new spelling only.
  const Result help = run({"solve", "clearance", "--help"});
  CHECK_THAT(help.out, Catch::Contains("--max-move") && !Catch::Contains("--window"));
}

TEST_CASE("fit: --design is the former name of --conservative-spread", "[cli][names]") {
  const std::string marks = STREWN_SOURCE_DIR "/shapes/field_data/lane_marks.csv";
  const std::string a = dir() + "/conservative.toml", b = dir() + "/design.toml";
  const Result r1 = run({"fit", marks, "--conservative-spread", "--out", a});
  const Result r2 = run({"fit", marks, "--design", "--out", b});
  INFO(r1.err << r2.err);
  REQUIRE(r1.status == 0);
  REQUIRE(r2.status == 0);
  CHECK(read_file(a) == read_file(b));
  CHECK(r1.err.empty());
  CHECK_THAT(r2.err, Catch::Contains("--design " + kWarning + " --conservative-spread"));
  CHECK_THAT(read_file(a), Catch::Contains("one-sided"));
}

TEST_CASE("outputs: the error-bound heading, the total row and p_outside_event", "[cli][names]") {
  const std::string site = write("outputs.toml", kSite);
  const Result table = run({"assess", site});
  CHECK_THAT(table.out, Catch::Contains("err bound") && !Catch::Contains(" +- "));
  const Result csv = run({"assess", site, "--format", "csv"});
  CHECK_THAT(csv.out, Catch::Contains(",p_outside_event,") && Catch::Contains(",all sources,") && !Catch::Contains(",*,"));
  const nlohmann::json j = nlohmann::json::parse(run({"assess", site, "--format", "json"}).out);
  const nlohmann::json& s = j["zones"][1]["sources"][0];
  // q = 1 - p, computed directly (not as 1 - p); its former key stays for one release.
  CHECK(s["p_outside_event"].get<double>() == Approx(1.0 - s["p_event"].get<double>()).epsilon(1e-12));
  CHECK(s["q_event"] == s["p_outside_event"]);
  CHECK(s["q_abs_err"] == s["p_outside_abs_err"]);
}

TEST_CASE("map --footprint-params: a former parameter name reads as the new one, with a warning; both are refused",
          "[cli][names]") {
  // The footprint is built by the same registry as a zone (its alias table: rectangle height ->
  // depth), so the map must say so as the scenario reader does, and give the same map.
  const std::string site = write("footprint.toml", kSite);
  const std::vector<std::string> base = {"map", site, "--cells", "6", "--extent", "-3", "3", "3", "9", "--format", "json",
                                         "--footprint", "rectangle"};
  std::vector<std::string> now = base, former = base, both = base;
  now.insert(now.end(), {"--footprint-params", "{\"width\": 0.5, \"depth\": 0.3}"});
  former.insert(former.end(), {"--footprint-params", "{\"width\": 0.5, \"height\": 0.3}"});
  both.insert(both.end(), {"--footprint-params", "{\"width\": 0.5, \"depth\": 0.3, \"height\": 0.3}"});
  const Result a = run(now), b = run(former);
  REQUIRE(a.status == b.status);
  // The same map; the footprint's description repeats the parameters as given.
  nlohmann::json ja = nlohmann::json::parse(a.out), jb = nlohmann::json::parse(b.out);
  CHECK_THAT(jb["footprint"].get<std::string>(), Catch::Contains("height"));
  for (nlohmann::json* j : {&ja, &jb})
    for (const char* key : {"file", "seconds", "footprint"}) j->erase(key);
  CHECK(ja == jb);
  CHECK(a.err.empty());
  CHECK(b.err == "strewn: warning: --footprint-params: shape 'rectangle': parameter 'height' " + kWarning +
                     " 'depth'; it is read in this release and will be refused in the next\n");
  const Result c = run(both);
  CHECK(c.status == 2);
  CHECK(c.out.empty());
  CHECK_THAT(c.err, Catch::Contains("--footprint-params") &&
                        Catch::Contains("parameter 'height' is the former name of 'depth': give 'depth' only"));
}
