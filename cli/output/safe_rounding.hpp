#ifndef STREWN_CLI_SAFE_ROUNDING_HPP
#define STREWN_CLI_SAFE_ROUNDING_HPP

// A design answer as printed: rounded towards the side where the limits hold, never past it.
// "Largest factor 0.36832" printed from 0.3683165372 with the limit failing at 0.3683165372
// was a figure on the failing side; the largest factor, spacing, height or wind speed is
// rounded down, the smallest move up.
#include <cmath>
#include <fmt/format.h>
#include <string>

namespace strewn::cli {

enum class Towards { down, up };

// x with `decimals` digits after the point, rounded down or up (the printed text's value is
// on that side of x, whatever the binary rounding of the scaling).
inline std::string fixed_towards(double x, int decimals, Towards way) {
  if (!std::isfinite(x)) return fmt::format("{}", x);
  const double scale = std::pow(10.0, decimals);
  double r = way == Towards::down ? std::floor(x * scale) / scale : std::ceil(x * scale) / scale;
  const std::string text = fmt::format("{:.{}f}", r, decimals);
  const double printed = std::stod(text);
  if (way == Towards::down && printed > x) r -= 1.0 / scale;
  if (way == Towards::up && printed < x) r += 1.0 / scale;
  return fmt::format("{:.{}f}", r, decimals);
}

// x with `significant` significant digits, rounded down or up (fixed notation for the
// magnitudes design answers take; x = 0 prints "0").
inline std::string significant_towards(double x, int significant, Towards way) {
  if (x == 0.0 || !std::isfinite(x)) return fmt::format("{}", x);
  const int exponent = static_cast<int>(std::floor(std::log10(std::fabs(x))));
  const int decimals = std::max(0, significant - 1 - exponent);
  return fixed_towards(x, decimals, way);
}

}  // namespace strewn::cli

#endif
