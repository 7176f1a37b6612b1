#include "output/leg_test_output.hpp"

#include <fmt/format.h>
#include <fmt/ostream.h>
#include <nlohmann/json.hpp>
#include <ostream>

#include "strewn/version.hpp"

namespace strewn::cli {
namespace {

const char* const kAssumes =
    "The balance assumes a full-circle head and no wind: the leg stands for every direction,\n"
    "caught = integral of depth(r) 2 pi r dr (the profile's rates: linear between cans, the\n"
    "first can's rate in to the head, 0 beyond the last can). A part-circle head of arc a\n"
    "reads low by a/360; below 100% the cans missed water (drift, evaporation, a short leg).";

std::string balance_text(const LegTestProfile& p) {
  if (!p.balance) return "no flow given (add '# flow_l_per_min = ...'): no volume balance";
  return fmt::format("the cans account for {:.1f}% of the flow ({:.4g} L of {:.4g} L delivered)", 100 * *p.balance, p.caught_l,
                     *p.delivered_l);
}

}  // namespace

void write_leg_test_table(std::ostream& out, const LegTest& leg, const LegTestProfile& p) {
  fmt::print(out, "strewn {} fit --profile: {}\nleg test of {:g} min, {} cans to {:g} m\n\n", STREWN_VERSION_STRING, leg.file,
             60 * leg.duration_h, leg.distance_m.size(), leg.distance_m.back());
  fmt::print(out, "{:>12} {:>12} {:>14}\n", "distance m", "depth mm", "rate mm/h");
  fmt::print(out, "{}\n", std::string(40, '-'));
  for (std::size_t k = 0; k < leg.distance_m.size(); ++k)
    fmt::print(out, "{:>12.3f} {:>12.3f} {:>14.4f}\n", leg.distance_m[k], leg.depth_mm[k], p.profile.rate()[k]);
  fmt::print(out, "{}\n", std::string(40, '-'));
  fmt::print(out, "wetted radius {:g} m; the profile applies {:.4g} L/h\n", p.profile.wetted_radius(), p.profile.volume_rate());
  fmt::print(out, "volume balance: {}\n{}\n", balance_text(p), kAssumes);
}

void write_leg_test_json(std::ostream& out, const LegTest& leg, const LegTestProfile& p) {
  nlohmann::json j = {{"strewn_version", STREWN_VERSION_STRING},
                      {"leg_test", leg.file},
                      {"duration_h", leg.duration_h},
                      {"units", {{"distance", "m"}, {"depth", "mm"}, {"rate", "mm/h"}, {"volume", "L"}}},
                      {"wetted_radius_m", p.profile.wetted_radius()},
                      {"volume_rate_l_per_h", p.profile.volume_rate()},
                      {"caught_l", p.caught_l},
                      {"delivered_l", p.delivered_l ? nlohmann::json(*p.delivered_l) : nlohmann::json(nullptr)},
                      {"balance", p.balance ? nlohmann::json(*p.balance) : nlohmann::json(nullptr)},
                      {"assumes", kAssumes}};
  j["profile"] = nlohmann::json::array();
  for (std::size_t k = 0; k < leg.distance_m.size(); ++k)
    j["profile"].push_back({{"distance_m", leg.distance_m[k]}, {"depth_mm", leg.depth_mm[k]}, {"rate_mm_per_h", p.profile.rate()[k]}});
  out << j.dump(2) << "\n";
}

std::string radial_profile_csv(const LegTest& leg, const LegTestProfile& p) {
  std::string csv = fmt::format(
      "# Radial profile made by strewn {} fit --profile from {}:\n"
      "# rate = caught depth / the test's {:g} min; {}.\n"
      "# Use it as a source's profile (docs/scenario-format.md).\n"
      "distance_m,rate_mm_per_h\n",
      STREWN_VERSION_STRING, leg.file, 60 * leg.duration_h, balance_text(p));
  for (std::size_t k = 0; k < leg.distance_m.size(); ++k)
    csv += fmt::format("{:.17g},{:.17g}\n", leg.distance_m[k], p.profile.rate()[k]);
  return csv;
}

}  // namespace strewn::cli
