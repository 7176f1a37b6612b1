// A leg test (strewn/leg_test.hpp): reading it, and the radial profile with its volume balance.
#include "strewn/leg_test.hpp"

#include <cmath>
#include <fmt/format.h>

#include "field_csv.hpp"
#include "strewn/constants.hpp"
#include "strewn/error.hpp"
#include "strewn/input_file.hpp"
#include "strewn/units.hpp"

namespace strewn {

LegTest parse_leg_test_csv(const std::string& text, const std::string& name) {
  using namespace field_csv;
  const Table t = parse(text, name,
                        {"duration_min", "duration_h", "opening_diameter_mm", "opening_area_cm2", "opening_diameter_in",
                         "opening_area_in2", "flow_l_per_min", "flow_m3_per_h", "flow_gpm"});
  LegTest out;
  out.file = name;
  const auto key = [&](const char* k) { return t.keys.count(k) ? &t.keys.at(k) : nullptr; };
  // One of each pair at most; returns the given one.
  const auto one_of = [&](std::vector<const char*> names) -> std::pair<const Key*, std::string> {
    std::pair<const Key*, std::string> found{nullptr, ""};
    for (const char* n : names)
      if (const Key* k = key(n)) {
        if (found.first) fail_at(name, k->line, k->column, "give " + found.second + " or " + n + ", not both");
        found = {k, n};
      }
    return found;
  };
  const auto [duration, duration_name] = one_of({"duration_min", "duration_h"});
  if (!duration)
    fail_at(name, t.header_line, 1, "the test's duration is missing: add a line '# duration_min = 30' before the header");
  out.duration_h = duration_name == "duration_min" ? duration->value / 60.0 : duration->value;
  if (!(out.duration_h > 0.0 && out.duration_h <= 1e4))
    fail_at(name, duration->line, duration->column, "the duration must be above 0 and at most 10000 h");
  const auto [opening, opening_name] = one_of({"opening_diameter_mm", "opening_area_cm2", "opening_diameter_in", "opening_area_in2"});
  if (opening) {
    if (!(opening->value > 0.0 && opening->value <= 1e5))
      fail_at(name, opening->line, opening->column, "the opening must be above 0 and at most 1e5");
    // mm of diameter or cm^2 of area; an inch is 25.4 mm (2.54 cm) exactly.
    const bool inches = opening_name.find("_in") != std::string::npos, is_area = opening_name.find("area") != std::string::npos;
    const double v = opening->value * (inches ? (is_area ? 2.54 * 2.54 : kMillimetresPerInch) : 1.0);
    out.opening_diameter_m = is_area ? 2.0 * std::sqrt(v * 1e-4 / kPi) : v / 1000.0;
  }
  const auto [flow, flow_name] = one_of({"flow_l_per_min", "flow_m3_per_h", "flow_gpm"});
  if (flow) {
    if (!(flow->value > 0.0 && flow->value <= 1e7)) fail_at(name, flow->line, flow->column, "the flow must be above 0 and at most 1e7");
    out.flow_l_per_h = flow_name == "flow_l_per_min" ? 60.0 * flow->value
                       : flow_name == "flow_m3_per_h" ? 1000.0 * flow->value
                                                      : 60.0 * kLitresPerUsGallon * flow->value;
  }

  const std::vector<std::string> known = {"distance_m", "distance_ft", "depth_mm", "depth_in", "volume_ml"};
  check_columns(t, known, "the columns are distance_m or distance_ft, and depth_mm, depth_in or volume_ml");
  const auto dm = column_of(t, {"distance_m"}), dft = column_of(t, {"distance_ft"});
  const auto depth_mm = column_of(t, {"depth_mm"}), depth_in = column_of(t, {"depth_in"}), volume_col = column_of(t, {"volume_ml"});
  const auto depth_col = depth_mm ? depth_mm : depth_in;
  if (bool(dm) == bool(dft)) fail_at(name, t.header_line, 1, "give one distance column: distance_m or distance_ft");
  if (int(bool(depth_mm)) + int(bool(depth_in)) + int(bool(volume_col)) != 1)
    fail_at(name, t.header_line, 1, "give one catch column: depth_mm, depth_in or volume_ml");
  out.units = dft ? LengthUnit::foot : LengthUnit::metre;
  const double mm_per_depth = depth_in ? kMillimetresPerInch : 1.0;
  if (volume_col && !out.opening_diameter_m)
    fail_at(name, t.header_line, t.header_columns[*volume_col],
            "volume_ml needs the cans' opening: add '# opening_diameter_mm = 100' (or opening_diameter_in, opening_area_cm2, "
            "opening_area_in2) before the header");
  const std::size_t dc = dm ? *dm : *dft, vc = depth_col ? *depth_col : *volume_col;
  const double metres = dm ? 1.0 : metres_per(LengthUnit::foot);
  const double opening_cm2 = out.opening_diameter_m ? kPi * std::pow(*out.opening_diameter_m * 100.0, 2) / 4.0 : 0.0;
  for (const Row& r : t.rows) {
    const double d = metres * number(t, r, dc, t.header[dc]);
    if (!(d >= 0.0 && d <= 1e4)) fail_at(name, r.line, r.columns[dc], "the distance must be from 0 to 1e4 m");
    if (!out.distance_m.empty() && !(d > out.distance_m.back()))
      fail_at(name, r.line, r.columns[dc], "distances must increase from can to can");
    const double v = number(t, r, vc, t.header[vc]);
    if (!(v >= 0.0 && v <= 1e9)) fail_at(name, r.line, r.columns[vc], t.header[vc] + " must be from 0 to 1e9");
    out.distance_m.push_back(d);
    out.depth_mm.push_back(depth_col ? v * mm_per_depth : v * 10.0 / opening_cm2);
  }
  if (out.distance_m.size() < 2) fail_at(name, t.header_line, 1, "a leg test needs at least two cans");
  bool any = false;
  for (double v : out.depth_mm) any = any || v > 0.0;
  if (!any) fail_at(name, t.header_line, 1, "no can caught anything: there is no profile to make");
  return out;
}

LegTest read_leg_test_csv(const std::string& path) { return parse_leg_test_csv(read_input_file(path), path); }

LegTestProfile profile_from_leg_test(const LegTest& leg) {
  std::vector<double> rate;
  for (double d : leg.depth_mm) rate.push_back(d / leg.duration_h);
  LegTestProfile out{RadialProfile(leg.distance_m, rate, leg.file), 0.0, std::nullopt, std::nullopt};
  // volume_rate() integrates rate x 2 pi r dr: (mm/h) x m^2 = L/h; over the test, litres.
  out.caught_l = out.profile.volume_rate() * leg.duration_h;
  if (leg.flow_l_per_h) {
    out.delivered_l = *leg.flow_l_per_h * leg.duration_h;
    out.balance = out.caught_l / *out.delivered_l;
  }
  return out;
}

}  // namespace strewn
