#include "output/design_output.hpp"

#include <algorithm>
#include <cmath>
#include <fmt/format.h>
#include <fmt/ostream.h>
#include <nlohmann/json.hpp>
#include <optional>
#include <ostream>

#include "output/assess_output.hpp"
#include "output/lengths.hpp"
#include "output/safe_rounding.hpp"
#include "strewn/constants.hpp"
#include "strewn/version.hpp"

namespace strewn::cli {
namespace {

const char* const kBoundNote =
    "Probabilities are compared with their upper bounds (p + error bound), so the\n"
    "answer holds whatever the integration error.";

const char* const kAimGuarantee =
    "every limit holds at the answer on upper bounds, and no point one final step away in 16 directions "
    "is better; the distance to the true optimum is not bounded";

void header(std::ostream& out, const Site& s, const std::string& what) {
  fmt::print(out, "strewn {} solve {}: {}\nscenario: {}\n\n", STREWN_VERSION_STRING, what, s.site_name, s.file);
}

nlohmann::json json_header(const Site& s, const std::string& what) {
  return {{"strewn_version", STREWN_VERSION_STRING}, {"site", s.site_name}, {"file", s.file}, {"problem", what},
          {"units", {{"length", symbol(s.units)}}}, {"caution", kCaution}};
}

}  // namespace

void write_clearance(std::ostream& out, const Site& s, const ClearanceQuery& q, const ClearanceAnswer& a, bool json) {
  const Crossing& c = a.crossing;
  const Lengths L(s);
  const char* u = L.symbol();
  if (json) {
    nlohmann::json j = json_header(s, "clearance");
    j["subject"] = a.subject;
    j["direction"] = {a.direction.x(), a.direction.y()};
    j["direction_reason"] = a.direction_reason;
    j["zones_checked"] = a.limited_zones;
    j[L.key("max_move")] = L(q.max_move);
    j[L.key("window")] = L(q.max_move);  // former name of max_move_*, kept for one release
    j["found"] = c.found;
    j["start"] = {L(a.start.x()), L(a.start.y())};
    if (q.person) j["person_limit"] = {{"value", q.person_limit}, {"per", to_string(q.person_per)}};
    if (c.found) {
      j["moved_to"] = {L(a.moved_to.x()), L(a.moved_to.y())};
      j[L.key("shift")] = L(c.x);
      j[L.key("shift_fails")] = L(c.x_fails);
      j[L.key("bracket_width")] = L(std::fabs(c.x - c.x_fails));  // of the upper bound's crossing, not the exact one
      j["risk_over_limit_at_shift"] = a.risk_at_answer;
      j["risk_over_limit_just_short"] = a.risk_at_fail;
    } else {
      j["why"] = c.why;
      if (!a.failing_limit.empty()) {
        j["failing_limit"] = a.failing_limit;
        j["failing_ratio"] = a.failing_ratio;
      }
    }
    j["evaluations"] = c.evaluations;
    out << j.dump(2) << "\n";
    return;
  }
  header(out, s, "clearance");
  fmt::print(out, "moving {} along ({:.4f}, {:.4f}),\n{}\n", a.subject, a.direction.x(), a.direction.y(),
             a.direction_reason);
  fmt::print(out, "limits checked: {}\n", fmt::join(a.limited_zones, ", "));
  if (q.person)
    fmt::print(out, "limit used for the person: {:g} per {} (set with --limit and --per)\n", q.person_limit,
               to_string(q.person_per));
  fmt::print(out, "\n");
  // As many decimals as the answer's tolerance carries (1e-4 m: four), never nine; in the scenario's unit.
  const int decimals = static_cast<int>(std::clamp(std::ceil(-std::log10(L(q.tolerance))), 0.0, 9.0));
  const auto at = [&](const Vec2& v) { return fmt::format("({:.{}f}, {:.{}f})", L(v.x()), decimals, L(v.y()), decimals); };
  if (!c.found) {
    out << wrapped(fmt::format("No answer: {} (moves from 0 to {:g} {} considered; a longer --max-move, or another "
                               "--direction, may find one).", c.why, L(q.max_move), u), "", 78);
  } else if (c.x == 0.0) {
    fmt::print(out, "No move needed: the limits already hold (worst risk/limit {:.3g}).\n", a.risk_at_answer);
  } else {
    // Not "within W of the exact crossing": the bracket locates where the upper bound p + abs_err
    // meets the limit; the exact p meets it elsewhere by up to its error bound over the slope
    // (a crossing printed "within 2e-12 m" was 1.2e-11 m from the exact one).
    // The move rounded up (the limits hold from it on), and the position from that move.
    const std::string move = fixed_towards(L(c.x), decimals, Towards::up);
    const Vec2 moved = a.start + to_metres(std::stod(move), s.units) * a.direction;
    fmt::print(out, "Move {} {}: from {} to {}.\n", move, u, at(a.start), at(moved));
    // Both ratios are 1 to four digits at a tight bracket (printed "1" and "1" they said
    // nothing): near 1, as 1 minus or plus their difference.
    const auto ratio = [](double r) {
      return std::fabs(r - 1.0) < 1e-3 && r != 1.0 ? fmt::format("1 {} {:.2g}", r < 1.0 ? '-' : '+', std::fabs(r - 1.0))
                                                    : fmt::format("{:.4g}", r);
    };
    fmt::print(out, "There risk / limit = {} (upper bound); at {:.{}f} {} it is {}: the limit,\n",
               ratio(a.risk_at_answer), L(c.x_fails), decimals + 2, u, ratio(a.risk_at_fail));
    fmt::print(out, "judged on upper bounds, starts to hold between these two points, {:.2g} {} apart\n"
                    "(scan of {} steps over {:g} {}, then TOMS 748).\n",
               L(std::fabs(c.x - c.x_fails)), u, q.steps, L(q.max_move), u);
    fmt::print(out, "The exact risk meets the limit at or before the answer; how far before depends on\n"
                    "the error bound of p there, which can exceed this bracket.\n");
  }
  fmt::print(out, "{}\n\n{}\n", kBoundNote, kCaution);
}

namespace {

// A thrower's own settings that give its spread times `factor`: its spread is
// sigma_across = D tan(angle) and sigma_along = D range_fraction (or range_sigma) from each
// standing point (strewn/thrower.hpp), so the angle becomes atan(factor tan(angle)) and the
// range setting is scaled; a thrower's file takes these, not sigma factors. Empty angle when
// the result reaches the 45 degrees a thrower allows. Rounded down, as the factor is.
struct ThrowerSettings {
  std::optional<double> angle_deg;
  std::optional<double> range_fraction, range_sigma;
};
ThrowerSettings thrower_settings(const Thrower& t, double factor) {
  ThrowerSettings out;
  const double angle = std::atan(factor * std::tan(t.spread_angle_deg * kPi / 180.0)) * 180.0 / kPi;
  if (angle < 45.0) out.angle_deg = angle;
  if (t.range_fraction) out.range_fraction = *t.range_fraction * factor;
  if (t.range_sigma) out.range_sigma = *t.range_sigma * factor;
  return out;
}
const Source* source_named(const Site& s, const std::string& name) {
  const auto it = std::find_if(s.sources.begin(), s.sources.end(), [&](const Source& x) { return x.name == name; });
  return it == s.sources.end() ? nullptr : &*it;
}

}  // namespace

void write_spread(std::ostream& out, const Site& s, const SpreadQuery& q, const SpreadAnswer& a, bool json) {
  const Crossing& c = a.crossing;
  const Lengths L(s);
  if (json) {
    nlohmann::json j = json_header(s, "spread");
    j["sources"] = q.source.empty() ? "all" : q.source;
    j["found"] = c.found;
    if (c.found) {
      j["factor"] = a.factor;
      j["factor_fails"] = a.factor_fails;
      j["holds_over_whole_window"] = c.holds_to_end;
      j["limiting_zone"] = a.worst_zone;
      for (const ScaledSpread& sp : a.spreads) {
        nlohmann::json sj = {{"source", sp.source}, {L.key("cep"), L(sp.cep)}};
        for (const SpreadAxes& ax : sp.components)
          sj["components"].push_back({{L.key("sigma_major"), L(ax.sigma_major)}, {L.key("sigma_minor"), L(ax.sigma_minor)},
                                      {"angle_deg", ax.angle_deg}});
        if (const Source* src = source_named(s, sp.source); src && src->thrower) {
          const ThrowerSettings t = thrower_settings(*src->thrower, a.factor);
          nlohmann::json tj;
          tj["spread_angle_deg"] = t.angle_deg ? nlohmann::json(*t.angle_deg) : nlohmann::json(nullptr);
          if (t.range_fraction) tj["range_fraction"] = *t.range_fraction;
          if (t.range_sigma) tj[L.key("range_sigma")] = L(*t.range_sigma);
          sj["thrower"] = tj;
        }
        j["spreads"].push_back(sj);
      }
    } else {
      j["why"] = c.why;
      if (!a.failing_limit.empty()) {
        j["failing_limit"] = a.failing_limit;
        j["failing_ratio"] = a.failing_ratio;
      }
    }
    j["evaluations"] = c.evaluations;
    out << j.dump(2) << "\n";
    return;
  }
  header(out, s, "spread");
  if (!c.found) {
    out << wrapped(fmt::format("No answer: {} (factors {:g} to {:g} on the spread).", c.why, q.min_factor,
                               q.max_factor), "", 78);
  } else {
    // The factor is found to a relative 1e-6 (tolerance on its logarithm): five digits say it.
    if (c.holds_to_end)
      fmt::print(out, "Every limit holds up to the largest factor considered: {} (or more).\n",
                 significant_towards(a.factor, 4, Towards::down));
    else  // rounded down: 0.3683165372 printed "0.36832" was past the failing 0.3683165
      fmt::print(out, "Largest factor on the spread of {}: {}\n(at {} the limit of zone '{}' fails).\n",
                 q.source.empty() ? std::string("every source") : "'" + q.source + "'",
                 significant_towards(a.factor, 5, Towards::down), significant_towards(a.factor_fails, 7, Towards::up),
                 a.worst_zone);
    fmt::print(out, "\n{:<24} {:>12} {:>12} {:>9} {:>10}\n", "source / component", "sigma_major", "sigma_minor",
               "angle", "CEP");
    for (const ScaledSpread& sp : a.spreads) {
      if (sp.source.size() > 24) fmt::print(out, "{}\n", sp.source);  // never cut
      fmt::print(out, "{:<24} {:>12} {:>12} {:>9} {:>8.4f} {}\n", sp.source.size() > 24 ? "" : sp.source, "", "", "",
                 L(sp.cep), L.symbol());
      // Each component by the label the scenario gives it ("core" and "component N" otherwise).
      const auto source = std::find_if(s.sources.begin(), s.sources.end(), [&](const Source& x) { return x.name == sp.source; });
      const auto label = [&](std::size_t i) {
        if (source != s.sources.end() && i < source->component_labels.size() && !source->component_labels[i].empty())
          return source->component_labels[i];
        return i == 0 ? std::string("core") : "component " + std::to_string(i + 1);
      };
      // A thrower's spread differs from point to point of a throwing line: its own settings say it.
      const bool thrower = source != s.sources.end() && source->thrower;
      for (std::size_t i = 0; i < sp.components.size() && !(thrower && i > 0 && source->thrower->line_end); ++i)
        fmt::print(out, "  {:<22} {:>10.4f} {:<2} {:>9.4f} {:<2} {:>6.1f} deg\n", label(i),
                   L(sp.components[i].sigma_major), L.symbol(), L(sp.components[i].sigma_minor), L.symbol(),
                   sp.components[i].angle_deg);
      if (thrower) {
        const ThrowerSettings t = thrower_settings(*source->thrower, a.factor);
        std::string range = t.range_fraction ? "range_fraction = " + significant_towards(*t.range_fraction, 5, Towards::down)
                                             : fmt::format("range_sigma = {} {}",
                                                           significant_towards(L(*t.range_sigma), 5, Towards::down), L.symbol());
        if (t.angle_deg)
          fmt::print(out, "  as the thrower's own settings: spread_angle_deg = {}, {}\n",
                     significant_towards(*t.angle_deg, 5, Towards::down), range);
        else
          fmt::print(out, "  as the thrower's own settings: {}; the angle would reach 45 degrees, more than a\n"
                          "  thrower allows (describe the spread as a plain source instead)\n", range);
      }
    }
  }
  fmt::print(out, "\n{}\n\n{}\n", kBoundNote, kCaution);
}

void write_aim(std::ostream& out, const Site& s, const AimQuery& q, const AimAnswer& a, bool json) {
  const BestPoint& b = a.best;
  const Lengths L(s);
  if (json) {
    nlohmann::json j = json_header(s, "aim");
    j["objective"] = a.objective;
    j["current_aim"] = {L(a.current_aim.x()), L(a.current_aim.y())};
    j["current_target_p"] = a.current_target_p;
    j["current_keep_out_total_p"] = a.current_keep_out_total;
    j["found"] = b.found;
    if (b.found) {
      j["aim"] = {L(b.x.x()), L(b.x.y())};
      // The last step of the compass search is not an accuracy (an answer was once 0.013 m
      // from the optimum after a 0.001 m step): say what the search guarantees instead.
      j[L.key("final_step")] = L(b.step);
      j["search_guarantee"] = kAimGuarantee;
      j["target_p"] = a.target_p;
      j["target_abs_err"] = a.target_abs_err;
      j["keep_out_total_p"] = a.keep_out_total;
    } else {
      j["why"] = b.why;
      if (!a.failing_limit.empty()) {
        j["failing_limit"] = a.failing_limit;
        j["failing_at"] = {L(a.failing_at.x()), L(a.failing_at.y())};
        j["failing_ratio"] = a.failing_ratio;
      }
    }
    j["evaluations"] = b.evaluations;
    out << j.dump(2) << "\n";
    return;
  }
  header(out, s, "aim");
  fmt::print(out, "objective: {}\nsearch: {} x {} grid, then compass search until its step is below {} {}\n", a.objective,
             q.grid, q.grid, L(q.tolerance), L.symbol());
  out << wrapped(fmt::format("({})", kAimGuarantee), "", 78) << "\n";
  fmt::print(out, "{:<16} {:>22} {:>14} {:>18}\n", "", fmt::format("aim ({})", L.symbol()), "P(target)", "keep-out p (sum)");
  fmt::print(out, "{:<16} {:>22} {:>14.6g} {:>18.4g}\n", "now",
             L.point(a.current_aim), a.current_target_p,
             a.current_keep_out_total);
  if (b.found)
    fmt::print(out, "{:<16} {:>22} {:>14.6g} {:>18.4g}\n", "best", L.point(b.x),
               a.target_p, a.keep_out_total);
  else
    fmt::print(out, "No answer: {}.\n", b.why);
  fmt::print(out, "\nPer event, for this source; keep-out sums use upper bounds.\n{}\n\n{}\n", kBoundNote, kCaution);
}

}  // namespace strewn::cli

namespace strewn::cli {
namespace {

// A limit as printed: CU and DU in percent; water on a zone in the site's volume unit (litres,
// or US gallons in a US site), converted from the engine's litres.
struct ShownLimit {
  std::string name, unit;
  double value, target, margin;
};

ShownLimit shown(const SpacingLimit& l, LengthUnit u) {
  if (l.zone.empty()) return {l.name, "%", l.value, l.target, l.margin};
  const auto v = [u](double litres) { return volume_from_litres(litres, u); };
  return {fmt::format("{} on zone '{}'", u == LengthUnit::foot ? "US gallons" : "litres", l.zone), volume_symbol(u), v(l.value),
          v(l.target), v(l.margin)};
}

nlohmann::json spacing_json(const Lengths& L, const SpacingCheck& c) {
  nlohmann::json j = {{L.key("spacing"), L(c.spacing_m)}, {"heads", c.heads}, {"run_hours", c.run_hours}, {"cu_percent", c.cu}, {"du_percent", c.du}};
  if (c.row_spacing_m > 0.0) j[L.key("row_spacing")] = L(c.row_spacing_m);
  for (const SpacingLimit& l : c.limits) {
    const ShownLimit s = shown(l, L.unit);
    j["limits"].push_back({{"limit", s.name}, {"unit", s.unit}, {"value", s.value}, {"target", s.target}, {"margin", s.margin},
                           {"holds", l.holds()}});
  }
  return j;
}

// `way`: the answer (largest spacing meeting the limits) is rounded down, the failing one up.
void spacing_table(std::ostream& out, const Lengths& L, const char* title, const SpacingCheck& c,
                   Towards way = Towards::down) {
  fmt::print(out, "{} {} {}", title, fixed_towards(L(c.spacing_m), 4, way), L.symbol());
  if (c.row_spacing_m > 0.0) fmt::print(out, " (rows {} {})", fixed_towards(L(c.row_spacing_m), 4, way), L.symbol());
  fmt::print(out, ", {} heads, CU {:.2f}%, DU {:.2f}%, run {:.1f} min\n", c.heads, c.cu, c.du, 60.0 * c.run_hours);
  if (c.limits.empty()) return;
  fmt::print(out, "  {:<36} {:>12} {:>12} {:>12}  {}\n", "limit", "value", "target", "margin", "");
  for (const SpacingLimit& l : c.limits) {
    const ShownLimit s = shown(l, L.unit);
    fmt::print(out, "  {:<36} {:>12.6g} {:>12.6g} {:>12.4g}  {}\n", s.name, s.value, s.target, s.margin, l.holds() ? "holds" : "FAILS");
  }
}

}  // namespace

void write_spacing(std::ostream& out, const Site& s, const SpacingQuery& q, const SpacingAnswer& a, bool json) {
  const Lengths L(s);
  if (json) {
    nlohmann::json j = json_header(s, "spacing");
    j["layout"] = a.layout;
    j["found"] = a.found;
    j["window"] = {L(a.least_m), L(a.most_m)};
    j["judged_on"] = "water on its upper bound (amount + error bound); CU and DU on the cans' central depths";
    if (a.found) {
      j["answer"] = spacing_json(L, a.at);
      j["holds_over_whole_window"] = a.holds_to_end;
      if (a.beyond) j["beyond"] = spacing_json(L, *a.beyond);
    } else {
      j["why"] = a.why;
      j["smallest_tried"] = spacing_json(L, a.at);
    }
    j["evaluations"] = a.evaluations;
    out << j.dump(2) << "\n";
    return;
  }
  header(out, s, "spacing");
  fmt::print(out, "layout '{}': spacings from {:.4g} to {:.4g} {} ({:g} to {:g} x the radius)\n", a.layout, L(a.least_m), L(a.most_m),
             L.symbol(), q.least_of_radius, q.most_of_radius);
  if (!a.found) {
    out << wrapped("No answer: " + a.why + ".", "", 78);
    spacing_table(out, L, "smallest spacing tried:", a.at);
  } else {
    if (a.holds_to_end) fmt::print(out, "Every limit holds up to the largest spacing considered (or more).\n");
    spacing_table(out, L, "Largest spacing meeting every limit:", a.at);
    if (a.beyond) spacing_table(out, L, "Just beyond it, a limit fails at", *a.beyond, Towards::up);
  }
  out << "\n"
      << wrapped(fmt::format("Water on keep-out zones is per run ({}) and judged on its upper bound (amount + error "
                             "bound); CU and DU on the cans' central depths (their bounds are about 1e-10 of the depths). "
                             "{} deposition runs.",
                             s.deposition && s.deposition->target_depth_mm ? "the run that applies the target depth" : "the scenario's hours",
                             a.evaluations),
                 "", 78);
}

}  // namespace strewn::cli
