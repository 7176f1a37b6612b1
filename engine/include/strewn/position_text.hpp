#ifndef STREWN_POSITION_TEXT_HPP
#define STREWN_POSITION_TEXT_HPP

/// \file
/// How a position on the site is printed in messages, tables and reports: fixed-point, to the
/// millimetre, in the scenario's length unit. Six significant figures ("%g") are plenty near
/// the origin but print a projected (UTM) northing of 5403712.25 m as 5.40371e+06, 3.75 m
/// off and useless for finding the place; a fixed number of decimals is right at every
/// distance from the origin. Three decimals resolve 1 mm in metres and 0.3 mm in feet
/// (1 ft = 0.3048 m, strewn/units.hpp). Trailing zeros are dropped, so a whole number prints
/// as one ("(0, 6)").
///
/// Example:
///   strewn::position_text({512350.5, 5403712.25}, strewn::LengthUnit::metre)  // "(512350.5, 5403712.25)"
///   strewn::coordinate_text(0.3048, strewn::LengthUnit::foot)                 // "1"

#include <string>

#include "strewn/export.hpp"
#include "strewn/scatter_model.hpp"  // Vec2
#include "strewn/units.hpp"

namespace strewn {

/// Decimals printed for a coordinate: 3 (a millimetre in metres, 0.3 mm in feet).
constexpr int kCoordinateDecimals = 3;

/// One coordinate given in metres, printed in `unit` with kCoordinateDecimals, trailing zeros
/// (and a bare point) dropped; never "-0".
STREWN_API std::string coordinate_text(double metres, LengthUnit unit = LengthUnit::metre);

/// "(x, y)" of a point given in metres, each as coordinate_text prints it (no unit symbol: the
/// caller adds it where the sentence needs it).
STREWN_API std::string position_text(const Vec2& metres, LengthUnit unit = LengthUnit::metre);

}  // namespace strewn

#endif
