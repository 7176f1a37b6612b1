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
/// A scenario's unit system (`[site] units = "metric"` or `"us"`) is its length unit: metric is
/// metres, with depths in mm, volumes in litres, flows in L/min and precipitation rates in mm/h;
/// us is feet, with inches, US gallons, US gallons per minute (gpm) and in/h. The inch is
/// 25.4 mm and the US gallon 231 cubic inches = 3.785411784 L, both exact (NIST SP 811, 2008,
/// appendix B.8). Flows and volumes, like lengths, are converted where a file is read and where
/// a tool prints; the engine computes in metres, litres and mm (a litre on a square metre is a
/// depth of 1 mm).
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

/// Litres in one US gallon (231 in^3), exactly.
constexpr double kLitresPerUsGallon = 3.785411784;
/// Millimetres in one inch, exactly.
constexpr double kMillimetresPerInch = 25.4;

/// A depth in mm printed in the system's unit: mm, or inches for feet.
constexpr double depth_from_mm(double mm, LengthUnit u) noexcept { return u == LengthUnit::foot ? mm / kMillimetresPerInch : mm; }
constexpr double depth_to_mm(double value, LengthUnit u) noexcept { return u == LengthUnit::foot ? value * kMillimetresPerInch : value; }
/// A volume in litres printed in the system's unit: litres, or US gallons for feet.
constexpr double volume_from_litres(double litres, LengthUnit u) noexcept {
  return u == LengthUnit::foot ? litres / kLitresPerUsGallon : litres;
}
/// An amount per square metre that is not water (a count of impacts, a mass) per square unit of
/// the system: per m^2, or per ft^2 (times 0.3048^2).
constexpr double per_area_from_per_m2(double value, LengthUnit u) noexcept { return value * metres_per(u) * metres_per(u); }
/// "per m^2" or "per ft^2".
STREWN_API const char* per_area_symbol(LengthUnit u) noexcept;
/// "mm" or "in"; "L" or "gal"; "L/min" or "gpm"; "mm/h" or "in/h".
STREWN_API const char* depth_symbol(LengthUnit u) noexcept;
STREWN_API const char* volume_symbol(LengthUnit u) noexcept;
STREWN_API const char* flow_symbol(LengthUnit u) noexcept;
STREWN_API const char* rate_symbol(LengthUnit u) noexcept;

/// Litres per minute in one unit of a flow: "L/min" (1), "m3/h" (1000/60) or "gpm" (US gallons
/// per minute, 3.785411784); nullopt for any other spelling.
STREWN_API std::optional<double> litres_per_minute_in(const std::string& flow_unit);
/// The accepted flow units, for a message's "did you mean".
STREWN_API const std::vector<std::string>& flow_unit_spellings();

/// "m" or "ft": the symbol printed after every length.
STREWN_API const char* symbol(LengthUnit u) noexcept;

/// The accepted spellings: "m", "metres", "meters", "metric", "ft", "feet", "us"; nullopt for
/// any other.
STREWN_API std::optional<LengthUnit> length_unit_from(const std::string& spelling);

/// The accepted spellings, for a message's "did you mean".
STREWN_API const std::vector<std::string>& length_unit_spellings();

}  // namespace strewn

#endif
