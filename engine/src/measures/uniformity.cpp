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

}  // namespace strewn
