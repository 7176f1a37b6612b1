#ifndef STREWN_TESTS_CLI_GOLDEN_SUPPORT_HPP
#define STREWN_TESTS_CLI_GOLDEN_SUPPORT_HPP

// Golden JSON outputs (tests/data/golden/): what may differ between checkouts is stripped, and a
// fresh output is compared with the pinned one number by number.

#include <catch2/catch.hpp>
#include <algorithm>
#include <cmath>
#include <filesystem>
#include <nlohmann/json.hpp>
#include <string>

namespace strewn::test {

// Paths, the version and run times differ between checkouts, releases and runs; everything else
// must not.
inline void strip_local(nlohmann::json& j) {
  if (j.is_object()) {
    for (const char* k : {"file", "geometry_file", "data"})
      if (j.contains(k) && j[k].is_string()) j[k] = std::filesystem::path(j[k].get<std::string>()).filename().string();
    j.erase("strewn_version");
    j.erase("seconds");
  }
  if (j.is_structured())
    for (auto& v : j) strip_local(v);
}

// Numbers agree to 1e-9 relative (room for another libm's last bits), the rest exactly. Error
// bounds and evaluation counts describe how a result was computed, not the result: a bound may
// move with the implementation but must stay within a factor of 10 of the reviewed one (so a
// bound that grows out of proportion still shows), and counts are not compared.
inline void compare_golden(const nlohmann::json& got, const nlohmann::json& want, const std::string& where) {
  INFO(where);
  if (want.is_number() && got.is_number()) {
    const double g = got.get<double>(), w = want.get<double>();
    const std::string key = where.substr(where.rfind('.') + 1);
    if (key == "evaluations") return;
    if (key.find("abs_err") != std::string::npos) {
      CHECK(g <= 10 * w + 1e-300);
      CHECK(w <= 10 * g + 1e-300);
      return;
    }
    CHECK(std::fabs(g - w) <= 1e-9 * std::max(std::fabs(w), 1e-300));
    return;
  }
  REQUIRE(got.type() == want.type());
  if (want.is_object()) {
    for (auto it = want.begin(); it != want.end(); ++it) {
      CHECK(got.contains(it.key()));
      if (got.contains(it.key())) compare_golden(got[it.key()], it.value(), where + "." + it.key());
    }
    for (auto it = got.begin(); it != got.end(); ++it) CHECK(want.contains(it.key()));
  } else if (want.is_array()) {
    REQUIRE(got.size() == want.size());
    for (std::size_t i = 0; i < want.size(); ++i) compare_golden(got[i], want[i], where + "[" + std::to_string(i) + "]");
  } else {
    CHECK(got == want);
  }
}

}  // namespace strewn::test

#endif
