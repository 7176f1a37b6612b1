#ifndef STREWN_CONSTANTS_HPP
#define STREWN_CONSTANTS_HPP

/// \file
/// Mathematical constants shared by the engine, the plugins and the tools, each the double
/// nearest the exact value (the literals carry 20 digits; the compiler rounds them once).

#include <limits>

namespace strewn {

inline constexpr double kPi = 3.14159265358979323846;
inline constexpr double kTwoPi = 2.0 * kPi;                          // exact: a power-of-two multiple
inline constexpr double kOneDivTwoPi = 0.15915494309189533577;       // 1 / (2 pi)
inline constexpr double kOneDivRootTwoPi = 0.39894228040143267794;   // 1 / sqrt(2 pi), the normal density at 0
inline constexpr double kOneDivRootTwo = 0.70710678118654752440;     // 1 / sqrt(2)
/// Machine epsilon of double, 2^-52.
inline constexpr double kEps = std::numeric_limits<double>::epsilon();

}  // namespace strewn

#endif
