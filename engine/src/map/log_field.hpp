#ifndef STREWN_SRC_MAP_LOG_FIELD_HPP
#define STREWN_SRC_MAP_LOG_FIELD_HPP

// A risk map seen as f = log10(max(value, floor)) against one level, for the marching squares of
// contours.cpp and risk_area.cpp. Only the squares a line crosses need f itself; every other
// corner only needs to know its side of the level. So f is computed where it is asked for, not
// tabled over the whole grid (a million log10 calls per level on a 1000 x 1000 map, most of
// the contours' time), and high() decides the side from the value directly unless the value is
// within 1e-9 (relative) of the level. There log10, accurate to a few ulps, could round either
// way, so it is asked, and the answer is always the one f >= log10(level) gives.

#include <algorithm>
#include <cmath>
#include <cstddef>

#include "strewn/risk_map.hpp"

namespace strewn::detail {

class LogField {
 public:
  // Requires level > floor.
  LogField(const RiskMap& map, double level, double floor)
      : map_(map), columns_(map.grid.columns), level_(level), floor_(floor), log_level_(std::log10(level)) {}

  double log_level() const { return log_level_; }
  // log10 of the value at node (i, j), at least log10(floor).
  double at(int i, int j) const { return std::log10(std::max(value(i, j), floor_)); }
  // at(i, j) >= log_level().
  bool high(int i, int j) const {
    const double v = std::max(value(i, j), floor_);
    if (v >= level_ * (1.0 + 1e-9)) return true;
    if (v <= level_ * (1.0 - 1e-9)) return false;
    return std::log10(v) >= log_level_;
  }

 private:
  double value(int i, int j) const { return map_.value[static_cast<std::size_t>(j) * columns_ + i]; }

  const RiskMap& map_;
  int columns_;
  double level_, floor_, log_level_;
};

}  // namespace strewn::detail

#endif
