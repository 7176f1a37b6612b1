// The model against a measured catch-can test (strewn/catch_can_test.hpp).
#include <cmath>
#include <limits>

#include "strewn/catch_can_test.hpp"
#include "strewn/error.hpp"

namespace strewn {

CatchCanComparison compare_catch_cans(const Site& site, const CatchCanTest& test, double sc_share) {
  if (!site.deposition || !site.deposition->grid)
    throw input_error(site.file + ": comparing with measured cans needs a catch grid ([deposition] grid = ...)");
  // The model over the test's time, in cans like the test's.
  Site scaled = site;
  scaled.deposition->hours = test.duration_h;
  if (test.opening_diameter_m) scaled.deposition->grid->can_diameter = *test.opening_diameter_m;
  CatchCanComparison out;
  out.test = test;
  out.sc_share = sc_share;
  out.model = compute_deposition(scaled, sc_share);
  const CatchGrid& g = *scaled.deposition->grid;
  out.opening_diameter_m = g.can_diameter;
  const std::size_t n = static_cast<std::size_t>(g.rows) * static_cast<std::size_t>(g.columns);
  const double nan = std::numeric_limits<double>::quiet_NaN();
  std::vector<double> measured_grid(n, nan), model_grid(n, nan);
  for (const MeasuredCan& m : test.cans) {
    const std::size_t k = static_cast<std::size_t>(m.row) * static_cast<std::size_t>(g.columns) + static_cast<std::size_t>(m.column);
    measured_grid[k] = m.depth_mm;
    model_grid[k] = out.model.cans[k].depth;
  }
  std::vector<double> measured, model;
  double sum = 0.0, squares = 0.0;
  for (std::size_t k = 0; k < n; ++k) {
    if (std::isnan(measured_grid[k])) {
      ++out.missing;
      continue;
    }
    CanDifference c;
    c.row = static_cast<int>(k / static_cast<std::size_t>(g.columns));
    c.column = static_cast<int>(k % static_cast<std::size_t>(g.columns));
    c.centre = out.model.cans[k].centre;
    c.model_mm = out.model.cans[k].depth;
    c.model_err_mm = out.model.cans[k].depth_err;
    c.measured_mm = measured_grid[k];
    c.difference_mm = c.model_mm - c.measured_mm;
    sum += c.difference_mm;
    squares += c.difference_mm * c.difference_mm;
    out.largest_mm = std::max(out.largest_mm, std::fabs(c.difference_mm));
    measured.push_back(c.measured_mm);
    model.push_back(c.model_mm);
    out.cans.push_back(c);
  }
  const double count = static_cast<double>(out.cans.size());
  out.bias_mm = sum / count;
  out.rms_mm = std::sqrt(squares / count);
  for (std::size_t k = 0; k < measured.size(); ++k) {
    out.measured_mean_mm += measured[k] / count;
    out.model_mean_mm += model[k] / count;
  }
  const auto named = [&](const char* what, auto f) {
    try {
      return f();
    } catch (const input_error& e) {
      throw input_error(test.file + ": " + what + ": " + e.what());
    }
  };
  out.measured_cu = named("measured cans", [&] { return christiansen_cu(measured); });
  out.measured_du = named("measured cans", [&] { return low_quarter_du(measured); });
  out.measured_sc = named("measured cans", [&] { return scheduling_coefficient(measured_grid, g.rows, g.columns, out.sc_share); });
  out.model_cu = named("the model at the measured cans", [&] { return christiansen_cu(model); });
  out.model_du = named("the model at the measured cans", [&] { return low_quarter_du(model); });
  out.model_sc =
      named("the model at the measured cans", [&] { return scheduling_coefficient(model_grid, g.rows, g.columns, out.sc_share); });
  return out;
}

}  // namespace strewn
