// The program as a whole (run_cli): version, help, shapes, plugins, command-line mistakes,
// counts given as options, work ceilings and the progress bar.
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
#include "output/progress_bar.hpp"
#include "run_cli.hpp"

namespace {

using strewn::test::data;
using strewn::test::demo;
using strewn::test::read_file;
using strewn::test::Result;
using strewn::test::run;
using strewn::test::scenario_with;
using strewn::test::xml_parses;

}  // namespace

TEST_CASE("validate, shapes, version and help", "[cli]") {
  CHECK(run({"validate", demo}).status == 0);
  const Result shapes = run({"shapes"});
  CHECK(shapes.status == 0);
  CHECK_THAT(shapes.out, Catch::Contains("doorway") && Catch::Contains("ring_sector"));
  CHECK_THAT(run({"--version"}).out, Catch::Contains("0."));
  for (const std::vector<std::string>& cmd :
       std::vector<std::vector<std::string>>{{"assess"}, {"validate"}, {"shapes"}, {"solve"}, {"solve", "clearance"},
                                             {"solve", "spread"}, {"solve", "aim"}, {"solve", "release"}, {"solve", "spacing"}, {"deposition"}, {"fit"}, {"map"}, {"report"}}) {
    std::vector<std::string> args = cmd;
    args.push_back("--help");
    const Result h = run(args);
    INFO(args[0]);
    CHECK(h.status == 0);
    CHECK_THAT(h.out, Catch::Contains("Example"));
  }
}

// Issue 12 item 9: a --plugin-dir module without the entry symbol (or of another ABI) was a
// warning and the command went on with exit 0.
TEST_CASE("--plugin-dir: a broken module is an error naming the file, exit 2", "[cli][plugins]") {
  const Result r = run({"--plugin-dir", STREWN_BROKEN_PLUGIN_DIR, "shapes"});
  CHECK(r.status == 2);
  CHECK_THAT(r.err, Catch::StartsWith("strewn: error: cannot load plugin") && Catch::Contains("constructor_no_entry.so"));
  CHECK(r.out.empty());
}

TEST_CASE("--plugin-dir: a directory that does not exist is an error, not passed over", "[cli][plugins]") {
  // A misspelt directory was ignored without a word, its shapes then "unknown" (a hostile trial).
  const Result r = run({"--plugin-dir", "no_such_plugin_dir", "shapes"});
  CHECK(r.status == 2);
  CHECK_THAT(r.err, Catch::StartsWith("strewn: error: --plugin-dir: Directory does not exist: no_such_plugin_dir"));
  CHECK(r.out.empty());
}

TEST_CASE("command-line counts are whole numbers in their range, never wrapped", "[cli][errors][ranges]") {
  const std::string marks = std::string(STREWN_TEST_BINARY_DIR) + "/range_marks.csv";
  {
    std::ofstream f(marks);
    f << "x,y\n0,0.1\n0.2,0\n-0.1,0.3\n0.3,-0.2\n0,0\n";
  }
  for (const std::vector<std::string>& args : std::vector<std::vector<std::string>>{
           {"fit", marks, "--aim", "0", "0", "--outside", "-1", "--radius", "1"},
           {"fit", marks, "--aim", "0", "0", "--outside", "1e30", "--radius", "1"},
           {"fit", marks, "--aim", "0", "0", "--seed", "-1"},
           {"fit", "--counts", "-1", "5", "--radius", "1", "--aim", "0", "0"},
           {"map", demo, "--cells", "1e30"},
           {"map", demo, "--threads", "-1"},
           {"assess", demo, "--uncertainty", "--replicates", "-5"},
           {"solve", demo, "clearance", "--zone", "bench", "--steps", "-1"}}) {
    const Result r = run(args);
    INFO(args[0] << " " << args[args.size() - 2] << " " << args.back() << ": " << r.err);
    CHECK(r.status == 2);
    CHECK_THAT(r.err, Catch::Contains("must be a whole number from"));
  }
  // An exponent that names a whole number in range is that number.
  const Result cells = run({"map", demo, "--cells", "1e1", "--format", "json"});
  INFO(cells.err);
  REQUIRE(cells.status == 0);
  CHECK(std::max(nlohmann::json::parse(cells.out)["grid"]["columns"].get<int>(),
                 nlohmann::json::parse(cells.out)["grid"]["rows"].get<int>()) == 10);
}

// Issue 12 item 6: a map or a Monte Carlo run of any size started and ran silently (31
// components at 4000 cells: 90 s+; samples = 1e11: for ever). The work is now estimated first
// and refused above the documented ceiling unless --force.
TEST_CASE("work above the ceiling is refused with the estimate unless --force", "[cli][errors][work]") {
  const Result map = run({"map", demo, "--cells", "4000", "--footprint", "rectangle", "--footprint-params",
                          R"({"width": 0.5, "depth": 0.3})"});
  CHECK(map.status == 2);
  CHECK_THAT(map.err, Catch::Contains("map of") && Catch::Contains("units of work") && Catch::Contains("ceiling of 2e+08") &&
                          Catch::Contains("--force"));
  const std::string mc = scenario_with("work_monte_carlo", "method = \"monte_carlo\"\nsamples = 1e11", "{sigma = 1}", "",
                                       "{centre = [1, 0], radius = 0.5}", "");
  const Result r = run({"assess", mc});
  CHECK(r.status == 2);
  CHECK_THAT(r.err, Catch::Contains("100000000000 Monte Carlo samples") && Catch::Contains("ceiling of 2e+09") &&
                        Catch::Contains("--force"));
  // A sample costs a winding number over the zone's edges: a 100,000-vertex polygon at 1e6
  // samples ran for hours with no word when only zones were counted (an adversarial trial).
  std::string outer;
  for (int k = 0; k < 100000; ++k) {
    const double a = 2 * 3.141592653589793 * k / 100000;
    outer += fmt::format("{}[{:.9f}, {:.9f}]", k == 0 ? "" : ", ", 2 * std::cos(a), 2 * std::sin(a));
  }
  const std::string many = scenario_with("work_monte_carlo_edges", "method = \"monte_carlo\"", "{sigma = 1}", "", "{}", "");
  {
    std::ofstream f(many);
    f << "[settings]\nmethod = \"monte_carlo\"\n[[source]]\nmean = [0, 0]\nspread = { sigma = 1 }\n[[zone]]\nname = \"z\"\n"
         "role = \"keep_out\"\nshape = \"polygon\"\nparams = { outer = [" << outer << "] }\n";
  }
  const Result edges = run({"assess", many});
  CHECK(edges.status == 2);
  CHECK_THAT(edges.err, Catch::Contains("1 region(s) of 100000 edge(s)") && Catch::Contains("ceiling of 2e+09"));
}

TEST_CASE("the progress bar draws only on a terminal and only for work of a second or more", "[cli][work]") {
  std::ostringstream quiet, quick, slow;
  {
    strewn::cli::ProgressBar bar(quiet, false, "map", 100.0);
    bar.update(0.5);
    bar.update(1.0);
  }
  CHECK(quiet.str().empty());  // not a terminal
  {
    strewn::cli::ProgressBar bar(quick, true, "map", 0.01);
    bar.callback()(1.0);
  }
  CHECK(quick.str().empty());  // done within the first second
  {
    strewn::cli::ProgressBar bar(slow, true, "map", 5.0);
    bar.callback()(0.5);
    bar.callback()(1.0);
  }
  CHECK_THAT(slow.str(), Catch::StartsWith("\rmap  50% [###############               ]") && Catch::Contains("100%") &&
                             Catch::EndsWith("\n"));
}

TEST_CASE("command-line mistakes: one line, the option or the word, and the nearest command", "[cli][errors]") {
  // Old: two lines without the "strewn: error:" prefix, and "strewn asess" said only "A
  // subcommand is required".
  const Result typo = run({"asess", "site.toml"});
  CHECK(typo.status == 2);
  CHECK(typo.err == "strewn: error: unknown command 'asess' (did you mean 'assess'?) (strewn --help, or strewn COMMAND --help)\n");
  // Within a command: a mistyped option or command under it, with the nearest of its own
  // ("arguments were not expected" and "A subcommand is required" before; an adversarial trial).
  const Result option = run({"assess", demo, "--metod", "exact"});
  CHECK(option.status == 2);
  CHECK_THAT(option.err, Catch::StartsWith("strewn: error: unknown option '--metod' for 'strewn assess' (did you mean '--method'?)"));
  const Result sub = run({"solve", "clearence", demo});
  CHECK(sub.status == 2);
  CHECK_THAT(sub.err, Catch::StartsWith("strewn: error: unknown command 'solve clearence' (did you mean 'clearance'?)"));
  const Result after_option = run({"--plugin-dir", STREWN_TEST_BINARY_DIR, "asess"});
  CHECK_THAT(after_option.err, Catch::Contains("did you mean 'assess'?"));
  const Result bad_value = run({"fit", "--counts", "1", "2", "--radius", "0", "--aim", "0", "0"});
  CHECK(bad_value.status == 2);
  CHECK_THAT(bad_value.err, Catch::StartsWith("strewn: error: --radius:"));
  CHECK(std::count(bad_value.err.begin(), bad_value.err.end(), '\n') == 1);
}

// Issue 15 item 9: the README writes `strewn assess FILE --plugin-dir DIR`, which was refused
// ("The following arguments were not expected") because the option was read only before the
// command. A broken module named after the command must now be loaded, and refused, as before it.
TEST_CASE("--plugin-dir after the command is the program's option, as documented", "[cli][plugins]") {
  const Result after = run({"assess", demo, "--plugin-dir", STREWN_BROKEN_PLUGIN_DIR});
  CHECK(after.status == 2);
  CHECK_THAT(after.err, Catch::StartsWith("strewn: error: cannot load plugin"));
  const std::string empty_dir = std::string(STREWN_TEST_BINARY_DIR) + "/empty_plugin_dir";
  std::filesystem::create_directories(empty_dir);
  // One directory per --plugin-dir: the scenario after it stays the command's FILE.
  const Result before_file = run({"solve", "spread", "--plugin-dir", empty_dir, demo});
  CHECK(before_file.status == 0);
  CHECK(before_file.err.empty());
  CHECK(run({"assess", demo, "--plugin-dir", empty_dir, "--format", "csv"}).status == 3);  // the demo exceeds limits
}

// Issue 15 item 9: "--tolerance 1e-20" said "not in range 0.000000 to 0.500000" while the floor
// is 1e-15; every real-valued range now states its ends as they are.
TEST_CASE("a number outside its range names the accepted range in plain numbers", "[cli][errors][ranges]") {
  const Result tol = run({"assess", demo, "--tolerance", "1e-20"});
  CHECK(tol.status == 2);
  CHECK(tol.err == "strewn: error: --tolerance: must be a number from 1e-15 to 0.5 (got '1e-20') "
                   "(strewn --help, or strewn COMMAND --help)\n");
  CHECK(tol.out.empty());
  const Result conf = run({"assess", demo, "--uncertainty", "--confidence", "0.9999"});
  CHECK(conf.status == 2);
  CHECK_THAT(conf.err, Catch::Contains("from 0.5 to 0.999 (got '0.9999')"));
  CHECK(run({"assess", demo, "--tolerance", "1e-15"}).status == 3);  // the floor itself is accepted
  // Options of --uncertainty without it did nothing, without a word (a hostile trial).
  const Result alone = run({"assess", demo, "--replicates", "50"});
  CHECK(alone.status == 2);
  CHECK_THAT(alone.err, Catch::StartsWith("strewn: error: --replicates requires --uncertainty"));
}

namespace {

// Words of a POSIX shell command line: blanks split, '...' and "..." quote (no escapes inside
// single quotes, as in the shell).
std::vector<std::string> shell_words(const std::string& line) {
  std::vector<std::string> words;
  std::string word;
  bool in_word = false;
  for (std::size_t i = 0; i < line.size(); ++i) {
    const char c = line[i];
    if (c == '\'' || c == '"') {
      const std::size_t end = line.find(c, i + 1);
      in_word = true;
      if (end == std::string::npos) {  // unclosed: the rest is the word (prose, not a command)
        word += line.substr(i + 1);
        break;
      }
      word += line.substr(i + 1, end - i - 1);
      i = end;
    } else if (c == ' ' || c == '\t') {
      if (in_word) words.push_back(word);
      word.clear();
      in_word = false;
    } else {
      word += c;
      in_word = true;
    }
  }
  if (in_word) words.push_back(word);
  return words;
}

// A command as written from "strewn " on, without a trailing "   (comment)".
std::string command_from(const std::string& text) {
  std::string c = text.substr(text.find("strewn "));
  if (const std::size_t note = c.find("  ("); note != std::string::npos) c = c.substr(0, note);
  while (!c.empty() && (c.back() == ' ' || c.back() == '.')) c.pop_back();
  return c;
}

// Every runnable command the documentation shows on a bundled file: backtick spans and indented
// code lines of README.md and docs/*.md, the "#   strewn ..." lines of the demo scenarios, and
// every command's --help example.
std::vector<std::string> documented_commands() {
  std::vector<std::string> found;
  const auto runnable = [](const std::string& c) {
    const std::vector<std::string> words = shell_words(c);
    const std::vector<std::string> commands = {"assess", "validate", "shapes", "solve", "deposition", "fit", "map", "report"};
    if (words.size() < 2 || std::find(commands.begin(), commands.end(), words[1]) == commands.end()) return false;
    return c.find("shapes/") != std::string::npos || c == "strewn shapes" || c.find("--counts 41") != std::string::npos;
  };
  std::vector<std::string> docs = {STREWN_SOURCE_DIR "/README.md"};
  for (const auto& e : std::filesystem::directory_iterator(STREWN_SOURCE_DIR "/docs"))
    if (e.path().extension() == ".md") docs.push_back(e.path().string());
  for (const std::string& doc : docs) {
    const std::string text = read_file(doc);
    std::vector<std::string> pieces;
    std::size_t at = 0;
    for (int k = 0;; ++k) {  // odd pieces between backticks are inline code (a span may wrap)
      const std::size_t tick = text.find('`', at);
      std::string piece = text.substr(at, tick == std::string::npos ? std::string::npos : tick - at);
      if (k % 2 == 1) {
        std::replace(piece.begin(), piece.end(), '\n', ' ');
        pieces.push_back(piece);
      }
      if (tick == std::string::npos) break;
      at = tick + 1;
    }
    std::istringstream lines(text);
    for (std::string l; std::getline(lines, l);)
      if (l.rfind("    ", 0) == 0) pieces.push_back(l);
    for (const std::string& p : pieces)
      if (p.find("strewn ") != std::string::npos && runnable(command_from(p))) found.push_back(command_from(p));
  }
  for (const auto& e : std::filesystem::directory_iterator(STREWN_SOURCE_DIR "/shapes")) {
    if (e.path().extension() != ".toml") continue;
    std::istringstream lines(read_file(e.path().string()));
    for (std::string l; std::getline(lines, l);)
      if (l.rfind("#", 0) == 0 && l.find("strewn ") != std::string::npos && runnable(command_from(l)))
        found.push_back(command_from(l));
  }
  for (const std::vector<std::string>& cmd : std::vector<std::vector<std::string>>{
           {"assess"}, {"validate"}, {"shapes"}, {"solve", "clearance"}, {"solve", "spread"}, {"solve", "aim"}, {"solve", "release"}, {"solve", "spacing"},
           {"deposition"}, {"fit"}, {"map"}, {"report"}}) {
    std::vector<std::string> args = cmd;
    args.push_back("--help");
    std::istringstream lines(run(args).out);
    for (std::string l; std::getline(lines, l);)
      if (l.find("Example: strewn ") != std::string::npos) found.push_back(command_from(l));
  }
  std::sort(found.begin(), found.end());
  found.erase(std::unique(found.begin(), found.end()), found.end());
  return found;
}

}  // namespace

// Issue 15 item 9: the README's `assess FILE --plugin-dir DIR` and a --help example failed as
// written. Every command the documentation shows on a bundled file runs (exit 0, or 3 where a
// demo's limit is exceeded), from a scratch folder so that the files they write land there.
TEST_CASE("every command shown in the README, docs, demo comments and --help runs as written", "[cli][docs]") {
  const std::vector<std::string> commands = documented_commands();
  CHECK(commands.size() >= 15);  // the README's, the docs', the demos' and every command's examples
  const std::filesystem::path scratch = std::string(STREWN_TEST_BINARY_DIR) + "/documented_commands";
  std::filesystem::create_directories(scratch);
  const std::filesystem::path before = std::filesystem::current_path();
  std::filesystem::current_path(scratch);
  for (const std::string& c : commands) {
    std::vector<std::string> words = shell_words(c);
    words.erase(words.begin());  // "strewn"
    for (std::string& w : words)
      if (w.rfind("shapes/", 0) == 0) w = STREWN_SOURCE_DIR "/" + w;
    const Result r = run(words);
    INFO(c << "\n" << r.err);
    CHECK((r.status == 0 || r.status == 3));
    CHECK(r.err.find("error") == std::string::npos);
  }
  std::filesystem::current_path(before);
}
