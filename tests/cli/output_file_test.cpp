// Files in and out of the strewn command, in-process through run_cli(): outputs are replaced
// atomically through an O_EXCL temporary, keep their mode, never replace a device or FIFO, never
// overwrite an input, and a run writes all of its outputs or none; inputs are regular files
// under a size cap, nested no deeper than the pre-scan allows; messages say what went wrong.
//
// Every case failed on the code before cli/output_file.cpp and cli/input_file.cpp were rewritten
// (the old behaviour is named beside each). No test touches a real device: /dev/null and
// /dev/full are reached only through symbolic links in a scratch directory, so even the old
// code (which renamed over the path it was given) replaced only the link.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cstdlib>
#include <fcntl.h>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <regex>
#include <sstream>
#include <sys/stat.h>
#include <unistd.h>

#include "cli_run.hpp"
#include "run_cli.hpp"

namespace fs = std::filesystem;

namespace {

using strewn::test::Result;
using strewn::test::run;

const std::string data = STREWN_TEST_DATA_DIR "/cli/";
const std::string marks = STREWN_SOURCE_DIR "/shapes/field_data/lane_marks.csv";
const std::string disk = data + "closed_form_disk.toml";  // self-contained, maps in milliseconds

// A fresh scratch directory per test.
std::string scratch(const std::string& name) {
  const std::string dir = std::string(STREWN_TEST_BINARY_DIR) + "/output_file_test/" + name;
  fs::remove_all(dir);
  fs::create_directories(dir);
  return dir;
}

std::string read_file(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  return std::string((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
}

void write_file(const std::string& path, const std::string& text) {
  std::ofstream(path, std::ios::binary) << text;
}

// Names strewn leaves behind in a directory besides the ones expected (temporaries).
std::vector<std::string> leftovers(const std::string& dir) {
  std::vector<std::string> names;
  for (const auto& e : fs::directory_iterator(dir)) {
    const std::string n = e.path().filename().string();
    if (n.find(".strewn-") != std::string::npos || n.find(".part-") != std::string::npos) names.push_back(n);
  }
  return names;
}

bool one_line(const std::string& s) { return std::count(s.begin(), s.end(), '\n') == 1; }

}  // namespace

TEST_CASE("output: a symbolic link planted at the old predictable temporary name is not followed", "[files][output]") {
  // Old: the temporary was OUT.part-PID, opened with truncation and following links, so the
  // victim was overwritten with the output and OUT became a link to it.
  const std::string dir = scratch("planted_link");
  const std::string victim = dir + "/victim.txt", out = dir + "/out.csv";
  write_file(victim, "precious\n");
  fs::create_symlink(victim, out + ".part-" + std::to_string(::getpid()));
  const Result r = run({"map", disk, "--cells", "4", "--csv", out});
  INFO(r.err);
  REQUIRE(r.status == 0);
  CHECK(read_file(victim) == "precious\n");
  CHECK(fs::is_regular_file(fs::symlink_status(out)));
  CHECK_THAT(read_file(out), Catch::StartsWith("x"));
  // The planted link is left alone and no temporary of ours remains.
  CHECK(fs::is_symlink(out + ".part-" + std::to_string(::getpid())));
  const std::vector<std::string> left = leftovers(dir);
  CHECK(std::none_of(left.begin(), left.end(),
                     [](const std::string& n) { return n.find(".strewn-") != std::string::npos; }));
}

TEST_CASE("output: a rewritten file keeps its mode; a new one gets 0666 less the umask", "[files][output]") {
  // Old: the temporary was created 0666 & ~umask and renamed over the file: 0600 became 0644.
  const std::string dir = scratch("mode");
  const std::string out = dir + "/private.toml";
  write_file(out, "old\n");
  fs::permissions(out, fs::perms::owner_read | fs::perms::owner_write);
  const Result r = run({"fit", marks, "--out", out});
  INFO(r.err);
  REQUIRE(r.status == 0);
  CHECK_THAT(read_file(out), Catch::Contains("[[source]]"));
  CHECK(fs::status(out).permissions() == (fs::perms::owner_read | fs::perms::owner_write));
  const mode_t mask = ::umask(0);
  ::umask(mask);
  const std::string fresh = dir + "/fresh.toml";
  REQUIRE(run({"fit", marks, "--out", fresh}).status == 0);
  struct stat st {};
  REQUIRE(::stat(fresh.c_str(), &st) == 0);
  CHECK((st.st_mode & 07777) == (0666 & ~mask));
}

TEST_CASE("output: a link to /dev/null is written through, never replaced", "[files][output]") {
  // Old: the output was renamed over the path, replacing the link (or, given /dev/null itself
  // as root, the device) with a regular file.
  const std::string dir = scratch("dev_null");
  const std::string link = dir + "/null.svg";
  fs::create_symlink("/dev/null", link);
  const Result r = run({"map", disk, "--cells", "4", "--svg", link});
  INFO(r.err);
  CHECK(r.status == 0);
  CHECK(fs::is_symlink(link));
  CHECK(fs::is_character_file("/dev/null"));
  CHECK(leftovers(dir).empty());
}

TEST_CASE("output: a FIFO is written in place; without a reader it is refused, not waited on", "[files][output]") {
  // Old: the FIFO was replaced by a regular file, and the reader got nothing.
  const std::string dir = scratch("fifo");
  const std::string fifo = dir + "/pipe.toml";
  REQUIRE(::mkfifo(fifo.c_str(), 0600) == 0);
  const int reader = ::open(fifo.c_str(), O_RDONLY | O_NONBLOCK);
  REQUIRE(reader >= 0);
  const Result r = run({"fit", marks, "--out", fifo});  // about 1 kB: fits in the pipe's buffer
  INFO(r.err);
  CHECK(r.status == 0);
  std::string got;
  char buffer[4096];
  for (ssize_t n; (n = ::read(reader, buffer, sizeof buffer)) > 0;) got.append(buffer, static_cast<std::size_t>(n));
  ::close(reader);
  CHECK_THAT(got, Catch::Contains("[[source]]"));
  CHECK(fs::is_fifo(fifo));
  // Nobody reading: a clear refusal, exit 2, the FIFO still there.
  const Result none = run({"fit", marks, "--out", fifo});
  CHECK(none.status == 2);
  CHECK_THAT(none.err, Catch::Contains("cannot write '" + fifo + "'") && Catch::Contains("nothing reads from it"));
  CHECK(fs::is_fifo(fifo));
}

TEST_CASE("output: a write error gives the path and the system's reason", "[files][output]") {
  // Old: /dev/full reported nothing (the link was replaced by a regular file, exit 0); a missing
  // directory gave "cannot write 'X'" without a reason.
  const std::string dir = scratch("dev_full");
  const std::string full = dir + "/full.svg";
  fs::create_symlink("/dev/full", full);
  const Result r = run({"map", disk, "--cells", "4", "--svg", full});
  CHECK(r.status == 2);
  CHECK(r.out.empty());
  CHECK_THAT(r.err, Catch::Contains("cannot write '" + full + "': No space left on device"));
  CHECK(one_line(r.err));
  CHECK(fs::is_symlink(full));
  const Result missing = run({"fit", marks, "--out", dir + "/nodir/x.toml"});
  CHECK(missing.status == 2);
  CHECK_THAT(missing.err, Catch::Contains("No such file or directory"));
}

TEST_CASE("output: an output that is an input of the run is refused before any work", "[files][output]") {
  // Old: `fit marks.csv --out marks.csv` replaced the field data with TOML, `map f.toml --svg
  // f.toml` the scenario with SVG.
  const std::string dir = scratch("same_as_input");
  const std::string csv = dir + "/marks.csv";
  fs::copy_file(marks, csv);
  const std::string before = read_file(csv);
  for (const std::vector<std::string>& args :
       {std::vector<std::string>{"fit", csv, "--out", csv}, {"fit", csv, "--plot", dir + "/./marks.csv"},
        {"fit", csv, "--out", dir + "/../same_as_input/marks.csv"}}) {
    const Result r = run(args);
    INFO(args.back() << ": " << r.err);
    CHECK(r.status == 2);
    CHECK_THAT(r.err, Catch::Contains("is the input"));
    CHECK(read_file(csv) == before);
  }
  // A hard link and a symbolic link are the same file under another name.
  fs::create_hard_link(csv, dir + "/hard.csv");
  fs::create_symlink(csv, dir + "/soft.csv");
  CHECK(run({"fit", csv, "--out", dir + "/hard.csv"}).status == 2);
  CHECK(run({"fit", csv, "--out", dir + "/soft.csv"}).status == 2);
  CHECK(read_file(csv) == before);
  // The scenario and every file it reads: a template, a WKT and a GeoJSON file.
  fs::copy_file(data + "placed_zones.toml", dir + "/placed.toml");
  fs::create_directories(dir + "/geometry");
  for (const char* f : {"strip_template.toml", "strip.wkt", "strip.geojson"})
    fs::copy_file(data + "geometry/" + f, dir + "/geometry/" + f);
  for (const std::string& input : {std::string("placed.toml"), std::string("geometry/strip_template.toml"),
                                   std::string("geometry/strip.wkt"), std::string("geometry/strip.geojson")}) {
    const std::string path = dir + "/" + input, kept = read_file(path);
    const Result r = run({"map", dir + "/placed.toml", "--cells", "4", "--svg", dir + "/ok.svg", "--geojson", path});
    INFO(input << ": " << r.err);
    CHECK(r.status == 2);
    CHECK(read_file(path) == kept);
    CHECK_FALSE(fs::exists(dir + "/ok.svg"));
    const Result report = run({"report", dir + "/placed.toml", "--out", path, "--cells", "4"});
    CHECK(report.status == 2);
    CHECK(read_file(path) == kept);
  }
  // deposition --svg: the same rule.
  fs::copy_file(data + "deposition_uniform.toml", dir + "/lawn.toml");
  const std::string lawn = read_file(dir + "/lawn.toml");
  CHECK(run({"deposition", dir + "/lawn.toml", "--svg", dir + "/lawn.toml"}).status == 2);
  CHECK(read_file(dir + "/lawn.toml") == lawn);
  // Two outputs naming one file.
  const Result twice = run({"map", disk, "--cells", "4", "--svg", dir + "/a.out", "--csv", dir + "/./a.out"});
  CHECK(twice.status == 2);
  CHECK_THAT(twice.err, Catch::Contains("name the same file"));
  CHECK_FALSE(fs::exists(dir + "/a.out"));
}

TEST_CASE("output: a run writes all of its outputs or none", "[files][output]") {
  // Old: `map --svg ok.svg --geojson nodir/c.geojson` wrote ok.svg, then failed.
  const std::string dir = scratch("all_or_none");
  const Result r = run({"map", disk, "--cells", "4", "--svg", dir + "/ok.svg", "--geojson", dir + "/nodir/c.geojson"});
  CHECK(r.status == 2);
  CHECK_THAT(r.err, Catch::Contains("nodir") && Catch::Contains("No such file or directory"));
  CHECK_FALSE(fs::exists(dir + "/ok.svg"));
  // A failure found only while writing (a FIFO nobody reads): the earlier output is not replaced
  // and its temporary is removed.
  write_file(dir + "/ok.toml", "old\n");
  REQUIRE(::mkfifo((dir + "/plot.svg").c_str(), 0600) == 0);
  const Result late = run({"fit", marks, "--out", dir + "/ok.toml", "--plot", dir + "/plot.svg"});
  CHECK(late.status == 2);
  CHECK(read_file(dir + "/ok.toml") == "old\n");
  CHECK(leftovers(dir).empty());
}

TEST_CASE("input: only regular files under the size cap are read", "[files][input]") {
  // Old: a directory as scenario said "at least one [[source]]"; /dev/zero was read until memory
  // ran out; a FIFO hung.
  const std::string dir = scratch("inputs");
  const Result d = run({"assess", dir});
  CHECK(d.status == 2);
  CHECK_THAT(d.err, Catch::Contains(dir + ": is a directory"));
  CHECK_THAT(d.err, !Catch::Contains("[[source]]"));
  const Result zero = run({"validate", "/dev/zero"});
  CHECK(zero.status == 2);
  CHECK_THAT(zero.err, Catch::Contains("/dev/zero: is a character device"));
  const std::string fifo = dir + "/scenario.toml";
  REQUIRE(::mkfifo(fifo.c_str(), 0600) == 0);
  const Result f = run({"validate", fifo});  // no writer: would block in a plain open
  CHECK(f.status == 2);
  CHECK_THAT(f.err, Catch::Contains("FIFO"));
  const std::string csv_fifo = dir + "/marks.csv";
  REQUIRE(::mkfifo(csv_fifo.c_str(), 0600) == 0);
  CHECK(run({"fit", csv_fifo}).status == 2);
  // The cap, and the variable that raises it.
  ::setenv("STREWN_MAX_INPUT_BYTES", "200", 1);
  const Result big = run({"validate", disk});
  ::unsetenv("STREWN_MAX_INPUT_BYTES");
  CHECK(big.status == 2);
  CHECK_THAT(big.err, Catch::Contains("larger than the input limit of 200 bytes") &&
                          Catch::Contains("STREWN_MAX_INPUT_BYTES"));
  CHECK(run({"validate", disk}).status == 0);
}

TEST_CASE("input: a FIFO named *.so in --plugin-dir is skipped, not opened", "[files][input]") {
  // Old: dlopen on the FIFO waited for a writer for ever.
  const std::string dir = scratch("plugin_fifo");
  REQUIRE(::mkfifo((dir + "/trap.so").c_str(), 0600) == 0);
  const Result r = run({"--plugin-dir", dir, "shapes"});
  CHECK(r.status == 0);
  CHECK_THAT(r.err, Catch::Contains("trap.so") && Catch::Contains("not a regular file"));
  CHECK_THAT(r.out, Catch::Contains("disk:"));
}

TEST_CASE("input: nesting is limited before parsing, with the file and line", "[files][input]") {
  // Old: toml++ overflowed the stack (SIGSEGV) on ~40,000 dotted-key parts, nlohmann::json on
  // ~200,000 nested brackets.
  const std::string dir = scratch("nesting");
  std::string key = "a";
  for (int i = 0; i < 40000; ++i) key += ".b";
  write_file(dir + "/dotted.toml", "[site]\nname = \"x\"\n" + key + " = 1\n");
  const Result dotted = run({"validate", dir + "/dotted.toml"});
  CHECK(dotted.status == 2);
  CHECK_THAT(dotted.err, Catch::Contains(dir + "/dotted.toml:3: a dotted key of more than 256 parts"));
  CHECK(one_line(dotted.err));
  // Dots in strings, comments and numbers are not key parts.
  write_file(dir + "/dots_elsewhere.toml", "# " + std::string(300, '.') + "\n[site]\nname = \"" + std::string(300, '.') +
                                               "\"\n[[source]]\nspread = { sigma = 1.5 }\n[[zone]]\nname = \"z\"\nrole = \"watch\"\n"
                                               "shape = \"disk\"\nparams = { centre = [1.5, 2.5], radius = 0.5 }\n");
  const Result fine = run({"validate", dir + "/dots_elsewhere.toml"});
  INFO(fine.err);
  CHECK(fine.status == 0);
  const int depth = 200000;
  write_file(dir + "/deep.geojson", "{\"type\": \"Polygon\", \"coordinates\": " + std::string(depth, '[') +
                                        std::string(depth, ']') + "}");
  write_file(dir + "/deep.toml", "[[source]]\nspread = { sigma = 1 }\n[[zone]]\nname = \"g\"\nrole = \"watch\"\n"
                                 "geometry = \"deep.geojson\"\npositions = \"site_metres\"\n");
  const Result geo = run({"validate", dir + "/deep.toml"});
  CHECK(geo.status == 2);
  CHECK_THAT(geo.err, Catch::Contains("deep.geojson: GeoJSON: line 1: arrays or objects nested more than 256 deep"));
  CHECK(one_line(geo.err));
  const Result params = run({"map", disk, "--cells", "4", "--footprint-params",
                             "{\"radius\": 0.3, \"x\": " + std::string(depth, '[') + std::string(depth, ']') + "}"});
  CHECK(params.status == 2);
  CHECK_THAT(params.err, Catch::Contains("nested more than 256 deep"));
}

TEST_CASE("input: a CSV with a UTF-8 byte-order mark is read like one without", "[files][input]") {
  // Old: "unknown column '\ufeff# Invented demo data...'" (the mark glued to the first line).
  const std::string dir = scratch("bom");
  write_file(dir + "/bom.csv", "\xEF\xBB\xBF" + read_file(marks));
  write_file(dir + "/bom_header.csv", "\xEF\xBB\xBFx,y\n1,2\n2,1.5\n0.5,0.25\n1.5,3\n");
  const Result with = run({"fit", dir + "/bom.csv", "--format", "json"});
  const Result without = run({"fit", marks, "--format", "json"});
  INFO(with.err);
  REQUIRE(with.status == 0);
  auto a = nlohmann::json::parse(with.out), b = nlohmann::json::parse(without.out);
  CHECK(a["groups"] == b["groups"]);
  const Result header = run({"fit", dir + "/bom_header.csv", "--aim", "1", "2"});
  INFO(header.err);
  CHECK(header.status == 0);
}

TEST_CASE("messages: ranges, sizes and reasons are stated, long values cut", "[files][messages]") {
  const std::string dir = scratch("messages");
  // samples = 1e30: old "settings: samples must be at least 1" (the conversion wrapped to 0).
  std::string text = read_file(disk);
  text.replace(text.find("[[source]]"), 0, "[settings]\nmethod = \"monte_carlo\"\nsamples = 1e30\n\n");
  write_file(dir + "/samples.toml", text);
  const Result samples = run({"validate", dir + "/samples.toml"});
  CHECK(samples.status == 2);
  CHECK_THAT(samples.err, Catch::Contains("settings.samples: must be a whole number from 1 to") &&
                              Catch::Contains("found 1e+30"));
  // A 10 MB cell: old the whole cell was echoed into a 10 MB line.
  write_file(dir + "/big.csv", "# aim = 0, 6\nx,y\n1,2\n\"" + std::string(10000000, 'a') + "\",3\n");
  const Result big = run({"fit", dir + "/big.csv"});
  CHECK(big.status == 2);
  CHECK(big.err.size() < 200);
  CHECK_THAT(big.err, Catch::Contains("big.csv:4: column 'x': 'aaaa") && Catch::Contains("... (10000000 bytes)"));
  // --radius 0: old "Value 0 not in range 0.000000 to 17976931348623157...000.000000".
  const Result radius = run({"fit", "--counts", "3", "10", "--radius", "0", "--aim", "0", "0"});
  CHECK(radius.status == 2);
  CHECK_THAT(radius.err, Catch::Contains("--radius: must be a positive length (in the data's unit), at most 1e12, found '0'"));
  CHECK_FALSE(std::regex_search(radius.err, std::regex("[0-9]{16}")));
  // Other options still checked by CLI11's ranges show at most a few digits.
  const Result window = run({"solve", "clearance", disk, "--window", "0"});
  CHECK(window.status == 2);
  CHECK_FALSE(std::regex_search(window.err, std::regex("[0-9]{16}")));
  // A 1 nm square at (1, 1): old "spike: an edge doubles back on the previous one", which it
  // does not. Either the zone is accepted or the message says it is too small.
  write_file(dir + "/tiny.toml", "[[source]]\nspread = { sigma = 1 }\n[[zone]]\nname = \"sq\"\nrole = \"watch\"\n"
                                 "shape = \"rectangle\"\nparams = { centre = [1.0, 1.0], width = 1e-9, depth = 1e-9 }\n");
  const Result tiny = run({"validate", dir + "/tiny.toml"});
  INFO(tiny.err);
  CHECK((tiny.status == 0 || tiny.err.find("too small") != std::string::npos));
}
