#ifndef STREWN_CLI_LENGTHS_HPP
#define STREWN_CLI_LENGTHS_HPP

// Lengths as printed: the engine computes in metres, and every length a renderer prints is
// converted back to the unit the scenario was written in (`[site] units`, strewn/units.hpp) and
// carries that unit's symbol, in text ("4.9 ft") and in JSON and CSV keys ("shift_ft").
#include <string>

#include "strewn/position_text.hpp"
#include "strewn/site.hpp"
#include "strewn/units.hpp"

namespace strewn::cli {

struct Lengths {
  LengthUnit unit = LengthUnit::metre;
  Lengths() = default;
  explicit Lengths(const Site& s) : unit(s.units) {}
  double operator()(double metres) const { return from_metres(metres, unit); }
  Vec2 operator()(const Vec2& metres) const { return metres / metres_per(unit); }
  const char* symbol() const { return strewn::symbol(unit); }
  // A position given in metres as "(x, y)" in this unit, to the millimetre at any distance from
  // the origin (strewn/position_text.hpp): every printed position goes through it.
  std::string point(const Vec2& metres) const { return position_text(metres, unit); }
  // "shift" -> "shift_m" or "shift_ft".
  std::string key(const std::string& base) const { return base + "_" + symbol(); }
  // "area" -> "area_m2" or "area_ft2" (an area is converted with the unit twice: L(L(a))).
  std::string area_key(const std::string& base) const { return key(base) + "2"; }
};

}  // namespace strewn::cli

#endif
