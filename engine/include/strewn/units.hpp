#ifndef STREWN_UNITS_HPP
#define STREWN_UNITS_HPP

/// \file
/// The length unit a scenario is written in. The engine computes in metres only: a scenario in
/// feet is converted when it is read (strewn/site_io.hpp) and a tool converts back when it prints
/// (every printed length carries its unit). Probabilities do not depend on the unit.
///
/// The foot is the international foot, 0.3048 m exactly (NIST SP 811, 2008, appendix B.8; the
/// US survey foot, 1200/3937 m, differs by 2 parts per million and is not offered).
///
/// Example:
///   const strewn::LengthUnit u = strewn::length_unit_from("feet").value();  // LengthUnit::foot
///   double metres = strewn::to_metres(10.0, u);                            // 3.048
///   double feet = strewn::from_metres(metres, u);                          // 10 (to rounding)

#include <optional>
#include <string>
#include <vector>

#include "strewn/export.hpp"

namespace strewn {

enum class LengthUnit { metre, foot };

/// Metres in one international foot, exactly (NIST SP 811 B.8).
constexpr double kMetresPerFoot = 0.3048;

/// Metres in one unit: 1 or 0.3048.
constexpr double metres_per(LengthUnit u) noexcept { return u == LengthUnit::foot ? kMetresPerFoot : 1.0; }
constexpr double to_metres(double value, LengthUnit u) noexcept { return value * metres_per(u); }
constexpr double from_metres(double metres, LengthUnit u) noexcept { return metres / metres_per(u); }

/// "m" or "ft": the symbol printed after every length.
STREWN_API const char* symbol(LengthUnit u) noexcept;

/// The accepted spellings: "m", "metres", "meters", "ft", "feet"; nullopt for any other.
STREWN_API std::optional<LengthUnit> length_unit_from(const std::string& spelling);

/// The accepted spellings, for a message's "did you mean".
STREWN_API const std::vector<std::string>& length_unit_spellings();

}  // namespace strewn

#endif
