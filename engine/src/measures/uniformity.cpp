#include "strewn/uniformity.hpp"

#include <algorithm>
#include <cmath>
#include <numeric>

#include "strewn/error.hpp"

namespace strewn {
namespace {

double checked_total(const std::vector<double>& x) {
  if (x.empty()) throw input_error("uniformity needs at least one can");
  for (double v : x)
    if (!std::isfinite(v) || v < 0.0) throw input_error("can catches must be finite and not negative");
  const double total = std::accumulate(x.begin(), x.end(), 0.0);
  if (!(total > 0.0)) throw input_error("uniformity is undefined when no can catches anything");
  return total;
}

}  // namespace

double christiansen_cu(const std::vector<double>& catches) {
  const double total = checked_total(catches);
  const double mean = total / static_cast<double>(catches.size());
  double deviation = 0.0;
  for (double v : catches) deviation += std::fabs(v - mean);
  return 100.0 * (1.0 - deviation / total);
}

double low_quarter_du(const std::vector<double>& catches) {
  const double total = checked_total(catches);
  std::vector<double> sorted = catches;
  std::sort(sorted.begin(), sorted.end());
  const double quarter = static_cast<double>(sorted.size()) / 4.0;
  const auto whole = static_cast<std::size_t>(std::floor(quarter));
  double low = std::accumulate(sorted.begin(), sorted.begin() + static_cast<long>(whole), 0.0);
  if (whole < sorted.size()) low += (quarter - static_cast<double>(whole)) * sorted[whole];
  const double mean = total / static_cast<double>(sorted.size());
  return 100.0 * (low / quarter) / mean;
}

SchedulingWindow scheduling_window(int rows, int columns, double share) {
  if (rows < 1 || columns < 1) throw input_error("the scheduling coefficient needs a grid of at least one can");
  if (!(share > 0.0 && share <= 1.0))
    throw input_error("the scheduling coefficient's share of the area must be in (0, 1], e.g. 0.05 for 5%");
  const long n = static_cast<long>(rows) * columns;
  // A hair under the exact product, so 5% of 400 cans is 20, not 21 from rounding.
  const long k = std::max(1L, static_cast<long>(std::ceil(share * static_cast<double>(n) - 1e-9)));
  // Rank (not square-ish, area, side difference): the smallest rank wins.
  long best_rank[3] = {0, 0, 0};
  SchedulingWindow best;
  const int longest = std::max(rows, columns);
  for (int h = 1; h <= longest; ++h)
    for (int w = h; w <= longest; ++w) {
      const bool fits = (h <= rows && w <= columns) || (w <= rows && h <= columns);
      if (!fits || static_cast<long>(h) * w < k) continue;
      const long rank[3] = {w > 2 * h ? 1 : 0, static_cast<long>(h) * w, w - h};
      if (best.rows == 0 || std::lexicographical_compare(rank, rank + 3, best_rank, best_rank + 3)) {
        std::copy(rank, rank + 3, best_rank);
        best.rows = h;
        best.columns = w;
      }
    }
  best.share = static_cast<double>(best.rows) * best.columns / static_cast<double>(n);
  return best;
}

std::optional<SchedulingCoefficient> scheduling_coefficient(const std::vector<double>& depths, int rows, int columns,
                                                            double share) {
  const SchedulingWindow window = scheduling_window(rows, columns, share);
  if (depths.size() != static_cast<std::size_t>(rows) * static_cast<std::size_t>(columns))
    throw input_error("the scheduling coefficient needs rows x columns depths");
  std::vector<double> present;
  for (double v : depths)
    if (!std::isnan(v)) present.push_back(v);
  const double mean = checked_total(present) / static_cast<double>(present.size());
  std::optional<SchedulingCoefficient> out;
  const auto at = [&](int r, int c) { return depths[static_cast<std::size_t>(r) * static_cast<std::size_t>(columns) + static_cast<std::size_t>(c)]; };
  for (int turn = 0; turn < 2; ++turn) {
    const int h = turn == 0 ? window.rows : window.columns, w = turn == 0 ? window.columns : window.rows;
    if (h > rows || w > columns || (turn == 1 && h == w)) continue;
    for (int r0 = 0; r0 + h <= rows; ++r0)
      for (int c0 = 0; c0 + w <= columns; ++c0) {
        double sum = 0.0;
        bool whole = true;
        for (int r = r0; r < r0 + h && whole; ++r)
          for (int c = c0; c < c0 + w; ++c) {
            if (std::isnan(at(r, c))) {
              whole = false;
              break;
            }
            sum += at(r, c);
          }
        const double window_mean = sum / (static_cast<double>(h) * w);
        if (whole && (!out || window_mean < out->window_mean)) {
          out = SchedulingCoefficient{};
          out->window = window;
          out->window_mean = window_mean;
          out->first_row = r0;
          out->first_column = c0;
          out->window_rows = h;
          out->window_columns = w;
        }
      }
  }
  if (!out || !(out->window_mean > 0.0)) return std::nullopt;
  out->sc = mean / out->window_mean;
  return out;
}

}  // namespace strewn
