#include "output/lengths.hpp"
#include "output/deposition_output.hpp"

#include <fmt/format.h>
#include <fmt/ostream.h>

#include <nlohmann/json.hpp>
#include <ostream>

#include "output/assess_output.hpp"
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
  fmt::print(out, "strewn {} deposition: {}\nscenario: {}\nrun of {} h; amounts in {}, depths in {}\n\n",
             STREWN_VERSION_STRING, s.site_name, s.file, set.hours, d.unit, d.depth_unit);
  fmt::print(out, "emitted                 {:>14.6g} {}\n", d.emitted, d.unit);
  if (set.grid) {
    const CatchGrid& g = *set.grid;
    fmt::print(out, "on the catch grid       {:>14.6g} {} (+- {:.1g})\n", d.on_grid, d.unit, d.on_grid_err);
    fmt::print(out, "outside the grid        {:>14.6g} {} (+- {:.1g})\n\n", d.off_grid, d.unit, d.off_grid_err);
    const Lengths L(s);
    fmt::print(out, "catch grid: {} x {} cans, {:g} {} apart, opening {:g} {} across\n", g.columns, g.rows, L(g.spacing),
               L.symbol(), L(g.can_diameter), L.symbol());
    fmt::print(out, "can depth: mean {:.4g}, min {:.4g}, max {:.4g} {}\n", d.mean_depth, d.min_depth, d.max_depth,
               d.depth_unit);
    fmt::print(out, "CU {:.1f}%   DU (low quarter) {:.1f}%\n{}\n{}\n{}\n\n", d.cu, d.du,
               scheduling_text(d.sc, d.sc_share), kConventions, kScConvention);
  }
  fmt::print(out, "{:<26} {:<10} {:>14} {:>10}\n", "zone", "role", "amount", "share");
  fmt::print(out, "{}\n", std::string(78, '-'));
  for (const ZoneShare& z : d.zones)
    fmt::print(out, "{:<26.26} {:<10} {:>14.6g} {:>9.4f}%\n", z.zone, z.role, z.amount, 100 * z.fraction);
  if (d.has_site)
    fmt::print(out, "{:<26} {:<10} {:>14.6g} {:>9.4f}%\n", "off site", "", d.off_site, 100 * d.off_site / d.emitted);
  fmt::print(out, "{}\n\n{}\n", std::string(78, '-'), kCaution);
}

void write_deposition_csv(std::ostream& out, const Site& s, const Deposition& d) {
  const Lengths L(s);
  fmt::print(out, "{2},{3},depth_{0},depth_err_{0},cell_mean_depth_{0},cell_amount_{1},cell_amount_err_{1},in_sc_window\n",
             d.depth_unit == "mm" ? "mm" : "per_m2", d.unit, L.key("x"), L.key("y"));
  // in_sc_window: 1 for the cans of the scheduling coefficient's driest window.
  const int columns = s.deposition->grid ? s.deposition->grid->columns : 1;
  for (std::size_t k = 0; k < d.cans.size(); ++k) {
    const Can& c = d.cans[k];
    const int row = static_cast<int>(k) / columns, column = static_cast<int>(k) % columns;
    const bool in_window = d.sc && row >= d.sc->first_row && row < d.sc->first_row + d.sc->window_rows &&
                           column >= d.sc->first_column && column < d.sc->first_column + d.sc->window_columns;
    fmt::print(out, "{:.17g},{:.17g},{:.17g},{:.3g},{:.17g},{:.17g},{:.3g},{}\n", L(c.centre.x()), L(c.centre.y()), c.depth,
               c.depth_err, c.cell_depth, c.cell_amount, c.cell_amount_err, in_window ? 1 : 0);
  }
}

void write_deposition_json(std::ostream& out, const Site& s, const Deposition& d) {
  nlohmann::json j = {{"strewn_version", STREWN_VERSION_STRING}, {"site", s.site_name}, {"file", s.file},
                      {"hours", s.deposition->hours}, {"amount_unit", d.unit}, {"depth_unit", d.depth_unit},
                      {"units", {{"length", symbol(s.units)}}}, {"emitted", d.emitted}, {"caution", kCaution}};
  const Lengths L(s);
  if (s.deposition->grid) {
    j["grid"] = {{"on_grid", d.on_grid}, {"on_grid_err", d.on_grid_err}, {"off_grid", d.off_grid},
                 {"off_grid_err", d.off_grid_err}, {"cu_percent", d.cu}, {"du_low_quarter_percent", d.du},
                 {"mean_depth", d.mean_depth}, {"min_depth", d.min_depth}, {"max_depth", d.max_depth},
                 {"conventions", kConventions}, {"scheduling_coefficient", scheduling_json(d.sc, d.sc_share)}};
    for (const Can& c : d.cans)
      j["cans"].push_back({{"x", L(c.centre.x())}, {"y", L(c.centre.y())}, {"depth", c.depth}, {"depth_err", c.depth_err},
                           {"cell_mean_depth", c.cell_depth}, {"cell_amount", c.cell_amount},
                           {"cell_amount_err", c.cell_amount_err}});
  }
  for (const ZoneShare& z : d.zones)
    j["zones"].push_back({{"name", z.zone}, {"role", z.role}, {"amount", z.amount}, {"amount_err", z.amount_err},
                          {"fraction", z.fraction}});
  if (d.has_site) j["off_site"] = {{"amount", d.off_site}, {"amount_err", d.off_site_err}, {"fraction", d.off_site / d.emitted}};
  out << j.dump(2) << "\n";
}

}  // namespace strewn::cli
