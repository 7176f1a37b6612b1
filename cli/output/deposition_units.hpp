#ifndef STREWN_CLI_DEPOSITION_UNITS_HPP
#define STREWN_CLI_DEPOSITION_UNITS_HPP

// Deposited amounts as every deposition output prints them (table, CSV, JSON, pictures): water in
// litres and mm in a metric site, US gallons and inches in a US one; any other amount (a count of
// impacts) stays in its own unit, per m^2 or per ft^2 by the site's length unit. The engine
// computes in litres, mm and m^2 only (strewn/units.hpp has the exact factors).

#include <string>

#include "strewn/deposition.hpp"
#include "strewn/site.hpp"
#include "strewn/units.hpp"

namespace strewn::cli {

struct DepositionUnits {
  DepositionUnits(const Site& s, const Deposition& d)
      : litres(d.unit == "L"), u(s.units), volume_unit(litres ? volume_symbol(u) : d.unit),
        depth_unit(litres ? depth_symbol(u) : per_area_symbol(u)) {}
  double volume(double l) const { return litres ? volume_from_litres(l, u) : l; }
  // A depth from the engine (mm, or an amount per m^2) in the printed unit.
  double depth(double per_m2) const { return litres ? depth_from_mm(per_m2, u) : per_area_from_per_m2(per_m2, u); }
  double flow(double l_per_min) const { return volume_from_litres(l_per_min, u); }
  // The depth unit as a CSV column suffix: mm, in, per_m2 or per_ft2.
  std::string depth_key() const {
    return litres ? depth_unit : u == LengthUnit::foot ? "per_ft2" : "per_m2";
  }
  bool litres;
  LengthUnit u;
  std::string volume_unit, depth_unit;
};

}  // namespace strewn::cli

#endif
