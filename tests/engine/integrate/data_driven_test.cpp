// Data-driven checks: every file in tests/data/cases states a case, its expected probability,
// the tolerance and the source of the expected value; one section per file. The region comes
// from the built-in shape plugins, so these also test the plugins end to end.
#include <dirent.h>

#include <algorithm>
#include <catch2/catch.hpp>
#include <cmath>
#include <sstream>
#include <toml++/toml.h>

#include "strewn/integrate.hpp"
#include "strewn/shape_registry.hpp"

using namespace strewn;

namespace {

std::vector<std::string> case_files() {
  std::vector<std::string> files;
  const std::string dir = STREWN_TEST_DATA_DIR "/cases";
  if (DIR* d = opendir(dir.c_str())) {
    while (const dirent* e = readdir(d)) {
      const std::string name = e->d_name;
      if (name.size() > 5 && name.substr(name.size() - 5) == ".toml") files.push_back(dir + "/" + name);
    }
    closedir(d);
  }
  std::sort(files.begin(), files.end());
  return files;
}

Gaussian spread_of(const toml::table& t) {
  const Vec2 mean(t["mean"][0].value_or(0.0), t["mean"][1].value_or(0.0));
  if (t["covariance"].is_array()) {
    const auto c = t["covariance"];
    Mat2 m;
    m << c[0][0].value_or(0.0), c[0][1].value_or(0.0), c[1][0].value_or(0.0), c[1][1].value_or(0.0);
    return Gaussian::from_covariance(mean, m);
  }
  const auto s = t["spread"];
  if (s["sigma_major"]) return Gaussian::from_axes(mean, s["sigma_major"].value_or(0.0), s["sigma_minor"].value_or(0.0), s["angle_deg"].value_or(0.0));
  if (s["sigma"]) return Gaussian::from_axes(mean, s["sigma"].value_or(0.0), s["sigma"].value_or(0.0), 0.0);
  if (s["cep"]) return Gaussian::from_cep(mean, s["cep"].value_or(0.0));
  if (s["fraction"]) return Gaussian::from_fraction_within(mean, s["fraction"].value_or(0.0), s["radius"].value_or(0.0));
  FAIL("no spread in case file");
  return Gaussian::from_axes(mean, 1, 1, 0);
}

}  // namespace

TEST_CASE("every case file's probability is reproduced within its stated tolerance", "[data]") {
  const auto files = case_files();
  REQUIRE(files.size() >= 6);
  const ShapeRegistry shapes = ShapeRegistry::with_default_search_path();
  for (const std::string& file : files) {
    SECTION(file.substr(file.find_last_of('/') + 1)) {
      const toml::table t = toml::parse_file(file);
      const std::string what = t["case"].value_or(std::string());
      const std::string source = t["source"].value_or(std::string());
      REQUIRE_FALSE(what.empty());
      REQUIRE_FALSE(source.empty());
      std::ostringstream params;
      params << toml::json_formatter{*t["params"].as_table()};
      const Region region = shapes.build(t["shape"].value_or(std::string()), params.str());
      const double expected = t["expected_p"].value_or(-1.0);
      const double tolerance = t["relative_tolerance"].value_or(0.0);
      for (Method m : {Method::exact, Method::cubature}) {
        IntegrateOptions o;
        o.method = m;
        o.rel_tolerance = 1e-10;
        o.abs_tolerance = 1e-300;
        const Estimate e = integrate(spread_of(t), region, o);
        INFO(what << " [" << source << "] by " << to_string(m) << ": p = " << e.p << " expected " << expected);
        CHECK(std::fabs(e.p - expected) <= std::max(tolerance, m == Method::cubature ? 1e-9 : 0.0) * expected);
      }
    }
  }
}
