// Reading a catch-can test (strewn/catch_can_test.hpp) for a site's catch grid.
#include <cmath>
#include <fmt/format.h>

#include "field_csv.hpp"
#include "strewn/catch_can_test.hpp"
#include "strewn/constants.hpp"
#include "strewn/error.hpp"
#include "strewn/input_file.hpp"
#include "strewn/units.hpp"

namespace strewn {

CatchCanTest parse_catch_can_csv(const std::string& text, const std::string& name, const Site& site) {
  if (!site.deposition || !site.deposition->grid)
    throw input_error(site.file + ": comparing with measured cans needs a catch grid ([deposition] grid = ...)");
  if (site.deposition->amount_unit != "litre")
    throw input_error(site.file + ": measured cans hold water: the scenario's [deposition] amount_unit must be litre");
  const CatchGrid& g = *site.deposition->grid;
  using namespace field_csv;
  const Table t = parse(text, name,
                        {"duration_min", "duration_h", "opening_diameter_mm", "opening_area_cm2", "opening_diameter_in",
                         "opening_area_in2", "opening_diameter", "opening_area"});
  CatchCanTest out;
  out.file = name;
  const auto key = [&](const char* k) { return t.keys.count(k) ? &t.keys.at(k) : nullptr; };
  const Key* minutes = key("duration_min");
  const Key* hours = key("duration_h");
  if (minutes && hours) fail_at(name, hours->line, hours->column, "give duration_min or duration_h, not both");
  if (!minutes && !hours)
    fail_at(name, t.header_line, 1, "the test's duration is missing: add a line '# duration_min = 45' before the header");
  const Key* duration = minutes ? minutes : hours;
  out.duration_h = minutes ? minutes->value / 60.0 : hours->value;
  if (!(out.duration_h > 0.0 && out.duration_h <= 1e4))
    fail_at(name, duration->line, duration->column, "the duration must be above 0 and at most 10000 h");
  // The opening in mm / cm^2, in / in^2, or bare: the site's depth unit (mm and cm^2, or in and
  // in^2 in a US site).
  const bool us = site.units == LengthUnit::foot;
  const Key* opening = nullptr;
  std::string opening_name;
  for (const char* n : {"opening_diameter_mm", "opening_area_cm2", "opening_diameter_in", "opening_area_in2", "opening_diameter",
                        "opening_area"})
    if (const Key* k = key(n)) {
      if (opening) fail_at(name, k->line, k->column, "give the opening once (" + opening_name + " is also given)");
      opening = k;
      opening_name = n;
    }
  if (opening) {
    if (!(opening->value > 0.0 && opening->value <= 1e5))
      fail_at(name, opening->line, opening->column, "the opening must be above 0 and at most 1e5");
    const bool bare = opening_name == "opening_diameter" || opening_name == "opening_area";
    const bool inches = bare ? us : opening_name.find("_in") != std::string::npos;
    const bool is_area = opening_name.find("area") != std::string::npos;
    // mm of diameter, or cm^2 of area; an inch is 25.4 mm exactly (2.54 cm).
    const double v = opening->value * (inches ? (is_area ? 2.54 * 2.54 : kMillimetresPerInch) : 1.0);
    out.opening_diameter_m = is_area ? 2.0 * std::sqrt(v * 1e-4 / kPi) : v / 1000.0;
  }

  // Columns: a position pair and one value, in any order.
  const std::vector<std::string> known = {"row", "col", "column", "x", "y", "x_m", "y_m", "x_ft", "y_ft", "depth_mm", "depth_in", "depth",
                                          "volume_ml"};
  check_columns(t, known, "the columns are row,col or x,y, and depth_mm, depth_in, depth or volume_ml");
  const auto row_col = column_of(t, {"row"}), col_col = column_of(t, {"col", "column"});
  std::optional<std::size_t> x_col, y_col;
  double metres = metres_per(site.units);
  for (const auto& [xs, ys, unit] : {std::make_tuple("x", "y", site.units), std::make_tuple("x_m", "y_m", LengthUnit::metre),
                                     std::make_tuple("x_ft", "y_ft", LengthUnit::foot)}) {
    const auto xc = column_of(t, {xs}), yc = column_of(t, {ys});
    if (!xc && !yc) continue;
    if (x_col || !xc || !yc)
      fail_at(name, t.header_line, 1, "give the can's position once, as x,y (or x_m,y_m or x_ft,y_ft) or as row,col");
    x_col = xc;
    y_col = yc;
    metres = metres_per(unit);
  }
  if (bool(row_col) != bool(col_col)) fail_at(name, t.header_line, 1, "row needs col, and col needs row");
  if (row_col && x_col) fail_at(name, t.header_line, 1, "give each can by row,col or by x,y, not both");
  if (!row_col && !x_col) fail_at(name, t.header_line, 1, "no position columns: give row,col (grid indices from 1) or x,y");
  // A depth in mm, in inches, or bare in the site's depth unit (mm, or inches in a US site).
  std::optional<std::size_t> depth_col;
  double mm_per_depth = 1.0;
  for (const auto& [n, inches] : {std::make_pair("depth_mm", false), std::make_pair("depth_in", true), std::make_pair("depth", us)})
    if (const auto c = column_of(t, {n})) {
      if (depth_col) fail_at(name, t.header_line, t.header_columns[*c], "give one depth column: depth_mm, depth_in or depth");
      depth_col = c;
      mm_per_depth = inches ? kMillimetresPerInch : 1.0;
    }
  const auto volume_col = column_of(t, {"volume_ml"});
  if (depth_col && volume_col) fail_at(name, t.header_line, t.header_columns[*volume_col], "give a depth or volume_ml, not both");
  if (!depth_col && !volume_col) fail_at(name, t.header_line, 1, "no catch column: give depth_mm, depth_in, depth or volume_ml");
  if (volume_col && !out.opening_diameter_m)
    fail_at(name, t.header_line, t.header_columns[*volume_col],
            "volume_ml needs the cans' opening: add '# opening_diameter_mm = 100' (or opening_diameter_in, opening_area_cm2, "
            "opening_area_in2) before the header");
  const double opening_cm2 = out.opening_diameter_m ? kPi * std::pow(*out.opening_diameter_m * 100.0, 2) / 4.0 : 0.0;

  std::vector<std::size_t> seen(static_cast<std::size_t>(g.rows) * static_cast<std::size_t>(g.columns), 0);
  for (const Row& r : t.rows) {
    MeasuredCan can;
    can.line = r.line;
    if (row_col) {
      const double row = number(t, r, *row_col, "row"), col = number(t, r, *col_col, "col");
      if (!(row == std::floor(row) && row >= 1 && row <= g.rows))
        fail_at(name, r.line, r.columns[*row_col], fmt::format("row must be a whole number from 1 to {} (the grid's rows)", g.rows));
      if (!(col == std::floor(col) && col >= 1 && col <= g.columns))
        fail_at(name, r.line, r.columns[*col_col], fmt::format("col must be a whole number from 1 to {} (the grid's columns)", g.columns));
      can.row = static_cast<int>(row) - 1;
      can.column = static_cast<int>(col) - 1;
    } else {
      const Vec2 p(metres * number(t, r, *x_col, t.header[*x_col]), metres * number(t, r, *y_col, t.header[*y_col]));
      const Vec2 grid = (p - g.origin) / g.spacing;
      const double i = std::round(grid.x()), j = std::round(grid.y());
      const double off = (grid - Vec2(i, j)).norm() * g.spacing;
      if (!(i >= 0 && i < g.columns && j >= 0 && j < g.rows && off <= g.spacing / 4))
        fail_at(name, r.line, r.columns[*x_col],
                fmt::format("({}, {}) is not on the catch grid: a can must stand within a quarter of the spacing "
                            "({:g} m) of a grid node",
                            r.cells[*x_col], r.cells[*y_col], g.spacing / 4));
      can.column = static_cast<int>(i);
      can.row = static_cast<int>(j);
    }
    const std::size_t index = static_cast<std::size_t>(can.row) * static_cast<std::size_t>(g.columns) + static_cast<std::size_t>(can.column);
    if (seen[index])
      fail_at(name, r.line, r.columns[row_col ? *row_col : *x_col],
              fmt::format("can row {}, col {} is given twice (also on line {})", can.row + 1, can.column + 1, seen[index]));
    seen[index] = r.line;
    const std::size_t vc = depth_col ? *depth_col : *volume_col;
    const double v = number(t, r, vc, t.header[vc]);
    if (!(v >= 0.0 && v <= 1e9)) fail_at(name, r.line, r.columns[vc], t.header[vc] + " must be from 0 to 1e9");
    can.depth_mm = depth_col ? v * mm_per_depth : v * 10.0 / opening_cm2;
    out.cans.push_back(can);
  }
  if (out.cans.empty()) fail_at(name, t.header_line, 1, "no cans: the header is followed by no rows");
  return out;
}

CatchCanTest read_catch_can_csv(const std::string& path, const Site& site) {
  return parse_catch_can_csv(read_input_file(path), path, site);
}

}  // namespace strewn
