#include "output/lengths.hpp"
#include "output/deposition_output.hpp"

#include <fmt/format.h>
#include <fmt/ostream.h>

#include <nlohmann/json.hpp>
#include <ostream>

#include "output/assess_output.hpp"
#include "output/deposition_units.hpp"
#include "strewn/version.hpp"

namespace strewn::cli {


namespace {

const char* const kConventions =
    "CU: Christiansen (1942), 100 (1 - sum |x - mean| / sum x). DU: mean of the lowest\n"
    "quarter over the mean; the lowest quarter is exactly n/4 cans, the boundary can\n"
    "weighted by the fraction.";

// The scheduling coefficient's rule (strewn/uniformity.hpp), printed with its value.
const char* const kScConvention =
    "SC: mean / mean of the driest block of adjacent cans holding the share of the area\n"
    "(at least that share: the smallest block no longer than twice its width, both ways\n"
    "round; from memory, irrigation practice). Rows count from the grid origin along y,\n"
    "columns along x, from 1.";

using Water = DepositionUnits;

const char* const kRunTimeNote =
    "Run time: target depth / rate. With the allowance: divided by DU (low quarter) / 100, so\n"
    "that the driest quarter gets about the target (common practice).";

std::string arc_text(const HeadRate& h) {
  return h.sweep_deg >= 360.0 ? std::string("full") : fmt::format("{:.0f} deg", h.sweep_deg);
}

void write_heads_table(std::ostream& out, const Site& s, const Deposition& d, const Water& w) {
  const Lengths L(s);
  fmt::print(out, "{} sprinkler heads ({} {} in all)\n", d.heads.size(),
             [&] { double q = 0; for (const HeadRate& h : d.heads) q += h.flow_l_per_min; return fmt::format("{:.4g}", w.flow(q)); }(),
             flow_symbol(w.u));
  fmt::print(out, "{:<22} {:>9} {:>9} {:>7} {:>8} {:>9} {:>10} {:>10}\n", "head", L.key("x"), L.key("y"), L.key("r"), "arc",
             flow_symbol(w.u), std::string("own ") + rate_symbol(w.u), std::string("share ") + rate_symbol(w.u));
  for (const HeadRate& h : d.heads)
    fmt::print(out, "{:<22.22} {:>9.3f} {:>9.3f} {:>7.2f} {:>8} {:>9.4g} {:>10.4g} {:>10.4g}\n", h.name, L(h.position.x()),
               L(h.position.y()), L(h.radius_m), arc_text(h), w.flow(h.flow_l_per_min), w.depth(h.own_rate_mm_per_h),
               w.depth(h.share_mm_per_h));
  out << wrapped("own: the head's flow over its wetted sector, 60 Q / (arc/360 pi r^2); share: its flow over the area", "");
  if (d.area_m2 > 0.0)
    fmt::print(out, "mean precipitation rate (flow over area) {:.4g} {} over {} ({:.6g} {}2)\n", w.depth(d.rate_mm_per_h),
               rate_symbol(w.u), d.area_from, L(L(d.area_m2)), L.symbol());
  if (!d.cans.empty())
    fmt::print(out, "precipitation rate the cans catch (mean) {:.4g} {} (+- {:.1g})\n", w.depth(d.catch_rate_mm_per_h),
               rate_symbol(w.u), w.depth(d.catch_rate_err));
  if (d.run_time) {
    const RunTime& t = *d.run_time;
    std::string line = fmt::format("run time for {:g} {}: {:.1f} min (+- {:.1g}, from the {})",
                                   w.depth(*s.deposition->target_depth_mm), w.depth_unit, 60 * t.hours, 60 * t.hours_err, t.basis);
    if (t.with_allowance_hours)
      line += fmt::format("; with the uniformity allowance {:.1f} min (+- {:.1g})", 60 * *t.with_allowance_hours,
                          60 * *t.with_allowance_err);
    else
      line += "; with the uniformity allowance: needs a catch grid";
    out << wrapped(line, "");
    fmt::print(out, "{}\n", kRunTimeNote);
  }
  fmt::print(out, "\n");
}

}  // namespace

std::string scheduling_text(const std::optional<SchedulingCoefficient>& sc, double share) {
  if (!sc) return fmt::format("SC ({:g}%) not available: the driest window caught nothing", 100 * share);
  return fmt::format("SC ({:g}%) {:.2f}: driest {} x {} cans ({:.1f}% of the cans), rows {}-{}, columns {}-{}",
                     100 * share, sc->sc, sc->window_rows, sc->window_columns, 100 * sc->window.share,
                     sc->first_row + 1, sc->first_row + sc->window_rows, sc->first_column + 1,
                     sc->first_column + sc->window_columns);
}

nlohmann::json scheduling_json(const std::optional<SchedulingCoefficient>& sc, double share) {
  if (!sc) return {{"share_asked", share}, {"value", nullptr}, {"why", "the driest window caught nothing"}};
  return {{"share_asked", share},
          {"value", sc->sc},
          {"window_share", sc->window.share},
          {"window_mean_depth", sc->window_mean},
          {"window_rows", sc->window_rows},
          {"window_columns", sc->window_columns},
          {"first_row", sc->first_row + 1},
          {"first_column", sc->first_column + 1},
          {"conventions", kScConvention}};
}

void write_deposition_table(std::ostream& out, const Site& s, const Deposition& d) {
  const DepositionSettings& set = *s.deposition;
  const Water w(s, d);
  fmt::print(out, "strewn {} deposition: {}\nscenario: {}\nrun of {} h; amounts in {}, depths in {}\n\n",
             STREWN_VERSION_STRING, s.site_name, s.file, set.hours, w.volume_unit, w.depth_unit);
  if (!d.heads.empty()) write_heads_table(out, s, d, w);
  fmt::print(out, "emitted                 {:>14.6g} {}\n", w.volume(d.emitted), w.volume_unit);
  if (set.grid) {
    const CatchGrid& g = *set.grid;
    fmt::print(out, "on the catch grid       {:>14.6g} {} (+- {:.1g})\n", w.volume(d.on_grid), w.volume_unit, w.volume(d.on_grid_err));
    fmt::print(out, "outside the grid        {:>14.6g} {} (+- {:.1g})\n\n", w.volume(d.off_grid), w.volume_unit, w.volume(d.off_grid_err));
    const Lengths L(s);
    fmt::print(out, "catch grid: {} x {} cans, {:g} {} apart, opening {:g} {} across\n", g.columns, g.rows, L(g.spacing),
               L.symbol(), L(g.can_diameter), L.symbol());
    fmt::print(out, "can depth: mean {:.4g}, min {:.4g}, max {:.4g} {}\n", w.depth(d.mean_depth), w.depth(d.min_depth),
               w.depth(d.max_depth), w.depth_unit);
    fmt::print(out, "CU {:.1f}%   DU (low quarter) {:.1f}%\n", d.cu, d.du);
    if (d.cans_outside_site > 0)
      fmt::print(out, "NOTE: {} of the {} cans lie outside the site '{}' and are counted in CU, DU and the run time;\n"
                      "place the catch grid within the watered area for the area's own uniformity.\n",
                 d.cans_outside_site, d.cans.size(), set.site_boundary);
    fmt::print(out, "{}\n{}\n{}\n\n", scheduling_text(d.sc, d.sc_share), kConventions, kScConvention);
  }
  fmt::print(out, "{:<26} {:<10} {:>14} {:>10}\n", "zone", "role", "amount (" + w.volume_unit + ")", "share");
  fmt::print(out, "{}\n", std::string(78, '-'));
  for (const ZoneShare& z : d.zones)
    fmt::print(out, "{:<26.26} {:<10} {:>14.6g} {:>9.4f}%\n", z.zone, z.role, w.volume(z.amount), 100 * z.fraction);
  if (d.has_site)
    fmt::print(out, "{:<26} {:<10} {:>14.6g} {:>9.4f}%\n", "off site", "", w.volume(d.off_site), 100 * d.off_site / d.emitted);
  fmt::print(out, "{}\n\n{}\n", std::string(78, '-'), kCaution);
}

void write_deposition_csv(std::ostream& out, const Site& s, const Deposition& d) {
  const Lengths L(s);
  const Water w(s, d);
  // Heads first, one commented line each, so that the can rows stay one table.
  for (const HeadRate& h : d.heads)
    fmt::print(out, "# head,{},{}={:.17g},{}={:.17g},{}={:.17g},arc_deg={:g},flow_{}={:.17g},rate_{}={:.6g}\n", h.name, L.key("x"),
               L(h.position.x()), L.key("y"), L(h.position.y()), L.key("radius"), L(h.radius_m), h.sweep_deg,
               w.u == LengthUnit::foot ? "gpm" : "l_per_min", w.flow(h.flow_l_per_min), w.u == LengthUnit::foot ? "in_per_h" : "mm_per_h",
               w.depth(h.own_rate_mm_per_h));
  const std::string du = w.depth_key();
  fmt::print(out, "{2},{3},depth_{0},depth_err_{0},cell_mean_depth_{0},cell_amount_{1},cell_amount_err_{1},in_sc_window\n", du,
             w.volume_unit, L.key("x"), L.key("y"));
  // in_sc_window: 1 for the cans of the scheduling coefficient's driest window.
  const int columns = s.deposition->grid ? s.deposition->grid->columns : 1;
  for (std::size_t k = 0; k < d.cans.size(); ++k) {
    const Can& c = d.cans[k];
    const int row = static_cast<int>(k) / columns, column = static_cast<int>(k) % columns;
    const bool in_window = d.sc && row >= d.sc->first_row && row < d.sc->first_row + d.sc->window_rows &&
                           column >= d.sc->first_column && column < d.sc->first_column + d.sc->window_columns;
    fmt::print(out, "{:.17g},{:.17g},{:.17g},{:.3g},{:.17g},{:.17g},{:.3g},{}\n", L(c.centre.x()), L(c.centre.y()), w.depth(c.depth),
               w.depth(c.depth_err), w.depth(c.cell_depth), w.volume(c.cell_amount), w.volume(c.cell_amount_err), in_window ? 1 : 0);
  }
}

void write_deposition_json(std::ostream& out, const Site& s, const Deposition& d) {
  const Water w(s, d);
  nlohmann::json j = {{"strewn_version", STREWN_VERSION_STRING}, {"site", s.site_name}, {"file", s.file},
                      {"hours", s.deposition->hours}, {"amount_unit", w.volume_unit}, {"depth_unit", w.depth_unit},
                      {"units", {{"length", symbol(s.units)}}}, {"emitted", w.volume(d.emitted)}, {"caution", kCaution}};
  const Lengths L(s);
  if (!d.heads.empty()) {
    j["units"]["flow"] = flow_symbol(w.u);
    j["units"]["rate"] = rate_symbol(w.u);
    for (const HeadRate& h : d.heads)
      j["heads"].push_back({{"name", h.name}, {"layout", h.layout}, {"x", L(h.position.x())}, {"y", L(h.position.y())},
                            {"radius", L(h.radius_m)}, {"arc_deg", h.sweep_deg}, {"flow", w.flow(h.flow_l_per_min)},
                            {"own_rate", w.depth(h.own_rate_mm_per_h)}, {"share_rate", w.depth(h.share_mm_per_h)}});
    if (d.area_m2 > 0.0)
      j["precipitation"] = {{"area_from", d.area_from}, {"area", L(L(d.area_m2))}, {"rate", w.depth(d.rate_mm_per_h)}};
    if (!d.cans.empty())
      j["precipitation"]["catch_rate"] = w.depth(d.catch_rate_mm_per_h), j["precipitation"]["catch_rate_err"] = w.depth(d.catch_rate_err);
    if (d.run_time) {
      const RunTime& t = *d.run_time;
      j["run_time"] = {{"target_depth", w.depth(*s.deposition->target_depth_mm)}, {"basis", t.basis}, {"minutes", 60 * t.hours},
                       {"minutes_err", 60 * t.hours_err}, {"note", kRunTimeNote}};
      if (t.with_allowance_hours)
        j["run_time"]["with_allowance_minutes"] = 60 * *t.with_allowance_hours,
        j["run_time"]["with_allowance_minutes_err"] = 60 * *t.with_allowance_err;
    }
  }
  if (s.deposition->grid) {
    j["grid"] = {{"on_grid", w.volume(d.on_grid)}, {"on_grid_err", w.volume(d.on_grid_err)}, {"off_grid", w.volume(d.off_grid)},
                 {"off_grid_err", w.volume(d.off_grid_err)}, {"cu_percent", d.cu}, {"du_low_quarter_percent", d.du}, {"cans_outside_site", d.cans_outside_site},
                 {"mean_depth", w.depth(d.mean_depth)}, {"min_depth", w.depth(d.min_depth)}, {"max_depth", w.depth(d.max_depth)},
                 {"conventions", kConventions}, {"scheduling_coefficient", scheduling_json(d.sc, d.sc_share)}};
    if (d.sc) j["grid"]["scheduling_coefficient"]["window_mean_depth"] = w.depth(d.sc->window_mean);
    for (const Can& c : d.cans)
      j["cans"].push_back({{"x", L(c.centre.x())}, {"y", L(c.centre.y())}, {"depth", w.depth(c.depth)}, {"depth_err", w.depth(c.depth_err)},
                           {"cell_mean_depth", w.depth(c.cell_depth)}, {"cell_amount", w.volume(c.cell_amount)},
                           {"cell_amount_err", w.volume(c.cell_amount_err)}});
  }
  for (const ZoneShare& z : d.zones)
    j["zones"].push_back({{"name", z.zone}, {"role", z.role}, {"amount", w.volume(z.amount)}, {"amount_err", w.volume(z.amount_err)},
                          {"fraction", z.fraction}});
  if (d.has_site)
    j["off_site"] = {{"amount", w.volume(d.off_site)}, {"amount_err", w.volume(d.off_site_err)}, {"fraction", d.off_site / d.emitted}};
  out << j.dump(2) << "\n";
}

}  // namespace strewn::cli
