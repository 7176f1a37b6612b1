#include "strewn/units.hpp"

namespace strewn {

const char* symbol(LengthUnit u) noexcept { return u == LengthUnit::foot ? "ft" : "m"; }

const char* depth_symbol(LengthUnit u) noexcept { return u == LengthUnit::foot ? "in" : "mm"; }
const char* volume_symbol(LengthUnit u) noexcept { return u == LengthUnit::foot ? "gal" : "L"; }
const char* flow_symbol(LengthUnit u) noexcept { return u == LengthUnit::foot ? "gpm" : "L/min"; }
const char* rate_symbol(LengthUnit u) noexcept { return u == LengthUnit::foot ? "in/h" : "mm/h"; }
const char* per_area_symbol(LengthUnit u) noexcept { return u == LengthUnit::foot ? "per ft^2" : "per m^2"; }

const std::vector<std::string>& flow_unit_spellings() {
  static const std::vector<std::string> spellings = {"L/min", "m3/h", "gpm"};
  return spellings;
}

std::optional<double> litres_per_minute_in(const std::string& flow_unit) {
  if (flow_unit == "L/min" || flow_unit == "l/min") return 1.0;
  if (flow_unit == "m3/h") return 1000.0 / 60.0;
  if (flow_unit == "gpm") return kLitresPerUsGallon;
  return std::nullopt;
}

const std::vector<std::string>& length_unit_spellings() {
  static const std::vector<std::string> spellings = {"m", "metres", "meters", "metric", "ft", "feet", "us"};
  return spellings;
}

std::optional<LengthUnit> length_unit_from(const std::string& spelling) {
  if (spelling == "m" || spelling == "metres" || spelling == "meters" || spelling == "metric") return LengthUnit::metre;
  if (spelling == "ft" || spelling == "feet" || spelling == "us") return LengthUnit::foot;
  return std::nullopt;
}

}  // namespace strewn
