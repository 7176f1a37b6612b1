// The plugin host: finding modules, refusing broken ones with a clear message, and containing
// plugins that misbehave through the sink.
#include <catch2/catch.hpp>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sys/stat.h>

#include "strewn/error.hpp"
#include "strewn/shape_registry.hpp"

using namespace strewn;

namespace {
const std::string broken = STREWN_BROKEN_PLUGIN_DIR;

ShapeRegistry registry_with(const std::string& module) {
  ShapeRegistry r;
  r.load_module(broken + "/" + module);
  return r;
}
}  // namespace

TEST_CASE("the default search path finds every built-in shape kind", "[plugins]") {
  // ctest points STREWN_PLUGIN_PATH at the build tree's plugins.
  const ShapeRegistry r = ShapeRegistry::with_default_search_path();
  for (const char* kind : {"polygon", "rectangle", "disk", "ellipse", "ring_sector",
                           "composite", "doorway", "person"}) {
    INFO(kind);
    const ShapeKindInfo* info = r.find(kind);
    REQUIRE(info != nullptr);
    CHECK_FALSE(info->summary.empty());
    CHECK_THAT(info->params_json, Catch::Contains("\"params\""));
  }
  CHECK(r.warnings().empty());
}

TEST_CASE("a missing module is refused with the reason", "[plugins][errors]") {
  ShapeRegistry r;
  CHECK_THROWS_WITH(r.load_module(broken + "/does_not_exist.so"),
                    Catch::Contains("cannot load plugin") && Catch::Contains("does_not_exist.so"));
}

TEST_CASE("a module of another ABI version is refused by version", "[plugins][errors]") {
  CHECK_THROWS_WITH(registry_with("wrong_abi.so"),
                    Catch::Contains("ABI version 2") && Catch::Contains("version 1") &&
                        Catch::Contains("wrong_abi.so"));
}

TEST_CASE("a shared object without the entry symbol is not a plugin", "[plugins][errors]") {
  CHECK_THROWS_WITH(registry_with("no_entry.so"), Catch::Contains("no entry symbol"));
  CHECK_THROWS_WITH(registry_with("empty_table.so"), Catch::Contains("offers no shape kinds"));
}

// Issue 12 item 9: a directory's broken module was a warning (exit 0), and a module without the
// entry symbol had its constructors run before it was refused.
TEST_CASE("loading a directory refuses a broken module, naming the file", "[plugins][errors]") {
  ShapeRegistry r;
  // The first broken module in name order is constructor_no_entry.so.
  CHECK_THROWS_WITH(r.load_directory(broken), Catch::Contains("constructor_no_entry.so") &&
                                                  Catch::Contains("no entry symbol"));
  CHECK(r.warnings().empty());
}

TEST_CASE("a module without the entry symbol is refused before its constructors run", "[plugins][errors]") {
  unsetenv("STREWN_TEST_CONSTRUCTOR_RAN");
  CHECK_THROWS_WITH(registry_with("constructor_no_entry.so"),
                    Catch::Contains("constructor_no_entry.so") && Catch::Contains("nothing of it was run"));
  CHECK(std::getenv("STREWN_TEST_CONSTRUCTOR_RAN") == nullptr);
}

TEST_CASE("only regular ELF shared objects are opened", "[plugins][errors]") {
  const std::string dir = std::string(STREWN_TEST_BINARY_DIR) + "/odd_plugins";
  std::filesystem::remove_all(dir);
  std::filesystem::create_directories(dir + "/a_directory.so");
  {
    std::ofstream text(dir + "/text.so");
    text << "not a shared object\n";
  }
  CHECK_THROWS_WITH(registry_with("../odd_plugins/text.so"),
                    Catch::Contains("text.so") && Catch::Contains("not an ELF shared object"));
  CHECK_THROWS_WITH(registry_with("../odd_plugins/a_directory.so"), Catch::Contains("not a regular file"));
  // A FIFO named *.so is passed over in a directory and refused when named, never opened for reading.
  REQUIRE(mkfifo((dir + "/pipe.so").c_str(), 0600) == 0);
  CHECK_THROWS_WITH(registry_with("../odd_plugins/pipe.so"), Catch::Contains("not a regular file"));
  std::filesystem::remove(dir + "/text.so");
  ShapeRegistry r;
  CHECK_NOTHROW(r.load_directory(dir));
  CHECK(r.kinds().empty());
}

TEST_CASE("a plugin's build error comes back as one clear message", "[plugins][errors]") {
  const ShapeRegistry r = registry_with("failing_build.so");
  CHECK_THROWS_WITH(r.build("always_fails", "{}"),
                    Catch::Equals("shape 'always_fails': the survey file for this shape is missing"));
  // An error buffer filled without a terminating NUL is cut, not overrun.
  CHECK_THROWS_AS(r.build("overflows_error", "{}"), input_error);
}

TEST_CASE("plugins that misuse the sink never crash the host", "[plugins][errors]") {
  const ShapeRegistry r = registry_with("bad_geometry.so");
  CHECK_THROWS_WITH(r.build("bow_tie_shape", "{}"), Catch::Contains("self-intersection"));
  CHECK_THROWS_WITH(r.build("nan_shape", "{}"), Catch::Contains("non-finite"));
  CHECK_THROWS_WITH(r.build("line_first_shape", "{}"), Catch::Contains("outside a loop"));
  CHECK_THROWS_WITH(r.build("left_open_shape", "{}"), Catch::Contains("left a loop open"));
}

TEST_CASE("parameters are checked against the plugin's description", "[plugins][errors]") {
  const ShapeRegistry r = ShapeRegistry::with_default_search_path();
  CHECK_THROWS_WITH(r.build("disk", R"({"centre": [0, 0], "radus": 1})"),
                    Catch::Contains("unknown parameter 'radus'") &&
                        Catch::Contains("did you mean 'radius'"));
  // Nothing close to the word: the message names what the shape takes instead.
  CHECK_THROWS_WITH(r.build("polygon", R"({"points": [[0, 0], [1, 0], [0, 1]]})"),
                    Catch::Contains("unknown parameter 'points' (it takes outer, holes)"));
  CHECK_THROWS_WITH(r.build("disk", R"({"centre": [0, 0]})"),
                    Catch::Contains("missing parameter 'radius'"));
  CHECK_THROWS_WITH(r.build("disk", R"({"centre": [0], "radius": 1})"),
                    Catch::Contains("'centre' must be a point"));
  CHECK_THROWS_WITH(r.build("disk", R"({"centre": [0, 0], "radius": -1})"),
                    Catch::Contains("shape 'disk'") && Catch::Contains("positive"));
  CHECK_THROWS_WITH(r.build("dsik", R"({})"), Catch::Contains("did you mean 'disk'"));
  CHECK_THROWS_WITH(r.build("doorway", R"({"hinge": [0, 0], "latch": [1, 0], "swing": "up"})"),
                    Catch::Contains("must be one of"));
  CHECK_THROWS_WITH(r.build("disk", "not json"), Catch::Contains("not valid JSON"));
}

TEST_CASE("a self-intersecting polygon is refused with where it crosses", "[plugins][errors]") {
  const ShapeRegistry r = ShapeRegistry::with_default_search_path();
  CHECK_THROWS_WITH(r.build("polygon", R"({"outer": [[0, 0], [2, 2], [2, 0], [0, 2]]})"),
                    Catch::Contains("self-intersection at (1, 1)"));
  CHECK_THROWS_WITH(
      r.build("polygon", R"({"outer": [[0, 0], [2, 0], [2, 2], [0, 2]], "holes": [[[3, 3], [4, 3], [4, 4]]]})"),
      Catch::Contains("hole 1 lies outside"));
  // An outer ring that crosses itself, with a hole: the crossing is named, not the hole (the
  // even-odd test on a bow tie put a hole inside it "outside").
  CHECK_THROWS_WITH(r.build("polygon", R"({"outer": [[4, 13], [8, 13], [8, 17], [6, 18.5], [9, 12]],
                                           "holes": [[[5.5, 14.5], [6.5, 14.5], [6.5, 15.5], [5.5, 15.5]]]})"),
                    Catch::Contains("self-intersection at (8, 14.167)"));
}

TEST_CASE("did_you_mean offers the closest name, or nothing", "[plugins][errors]") {
  const std::vector<std::string> kinds = {"disk", "ellipse", "polygon"};
  CHECK(did_you_mean("disc", kinds) == " (did you mean 'disk'?)");
  CHECK(did_you_mean("rectangle", kinds).empty());
  CHECK(closest_names("polygn", kinds) == std::vector<std::string>{"polygon"});
}
