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

std::string balance_text(const LegTestProfile& p, LengthUnit u) {
  if (!p.balance) return "no flow given (add '# flow_l_per_min = ...'): no volume balance";
  return fmt::format("the cans account for {:.1f}% of the flow ({:.4g} {u} of {:.4g} {u} delivered)", 100 * *p.balance,
                     volume_from_litres(p.caught_l, u), volume_from_litres(*p.delivered_l, u), fmt::arg("u", volume_symbol(u)));
}

// The rate's CSV and JSON key: rate_mm_per_h or rate_in_per_h.
std::string rate_key(LengthUnit u) { return fmt::format("rate_{}_per_h", depth_symbol(u)); }

}  // namespace

void write_leg_test_table(std::ostream& out, const LegTest& leg, const LegTestProfile& p, LengthUnit u) {
  const char* length = symbol(u);
  const char* depth = depth_symbol(u);
  const int dp = u == LengthUnit::foot ? 4 : 3;  // a thousandth of a mm, a ten-thousandth of an inch
  fmt::print(out, "strewn {} fit --profile: {}\nleg test of {:g} min, {} cans to {:g} {}\n\n", STREWN_VERSION_STRING, leg.file,
             60 * leg.duration_h, leg.distance_m.size(), from_metres(leg.distance_m.back(), u), length);
  fmt::print(out, "{:>12} {:>12} {:>14}\n", fmt::format("distance {}", length), fmt::format("depth {}", depth), fmt::format("rate {}", rate_symbol(u)));
  fmt::print(out, "{}\n", std::string(40, '-'));
  for (std::size_t k = 0; k < leg.distance_m.size(); ++k)
    fmt::print(out, "{:>12.3f} {:>12.{}f} {:>14.{}f}\n", from_metres(leg.distance_m[k], u), depth_from_mm(leg.depth_mm[k], u), dp,
               depth_from_mm(p.profile.rate()[k], u), dp + 1);
  fmt::print(out, "{}\n", std::string(40, '-'));
  fmt::print(out, "wetted radius {:g} {}; the profile applies {:.4g} {}/h\n", from_metres(p.profile.wetted_radius(), u), length,
             volume_from_litres(p.profile.volume_rate(), u), volume_symbol(u));
  fmt::print(out, "volume balance: {}\n{}\n", balance_text(p, u), kAssumes);
}

void write_leg_test_json(std::ostream& out, const LegTest& leg, const LegTestProfile& p, LengthUnit u) {
  // Keys carry their unit: _m or _ft, _mm or _in, _l or _gal.
  const std::string l = symbol(u), d = depth_symbol(u), v = u == LengthUnit::foot ? "gal" : "l";
  const auto volume = [u](double litres) { return volume_from_litres(litres, u); };
  nlohmann::json j = {{"strewn_version", STREWN_VERSION_STRING},
                      {"leg_test", leg.file},
                      {"duration_h", leg.duration_h},
                      {"units", {{"distance", l}, {"depth", d}, {"rate", rate_symbol(u)}, {"volume", volume_symbol(u)}}},
                      {"wetted_radius_" + l, from_metres(p.profile.wetted_radius(), u)},
                      {"volume_rate_" + v + "_per_h", volume(p.profile.volume_rate())},
                      {"caught_" + v, volume(p.caught_l)},
                      {"delivered_" + v, p.delivered_l ? nlohmann::json(volume(*p.delivered_l)) : nlohmann::json(nullptr)},
                      {"balance", p.balance ? nlohmann::json(*p.balance) : nlohmann::json(nullptr)},
                      {"assumes", kAssumes}};
  j["profile"] = nlohmann::json::array();
  for (std::size_t k = 0; k < leg.distance_m.size(); ++k)
    j["profile"].push_back({{"distance_" + l, from_metres(leg.distance_m[k], u)}, {"depth_" + d, depth_from_mm(leg.depth_mm[k], u)},
                            {rate_key(u), depth_from_mm(p.profile.rate()[k], u)}});
  out << j.dump(2) << "\n";
}

std::string radial_profile_csv(const LegTest& leg, const LegTestProfile& p, LengthUnit u) {
  std::string csv = fmt::format(
      "# Radial profile made by strewn {} fit --profile from {}:\n"
      "# rate = caught depth / the test's {:g} min; {}.\n"
      "# Use it as a source's profile (docs/scenario-format.md).\n"
      "distance_{},{}\n",
      STREWN_VERSION_STRING, leg.file, 60 * leg.duration_h, balance_text(p, u), symbol(u), rate_key(u));
  for (std::size_t k = 0; k < leg.distance_m.size(); ++k)
    csv += fmt::format("{:.17g},{:.17g}\n", from_metres(leg.distance_m[k], u), depth_from_mm(p.profile.rate()[k], u));
  return csv;
}

}  // namespace strewn::cli
