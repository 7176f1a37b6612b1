#include "strewn/units.hpp"

namespace strewn {

const char* symbol(LengthUnit u) noexcept { return u == LengthUnit::foot ? "ft" : "m"; }

const std::vector<std::string>& length_unit_spellings() {
  static const std::vector<std::string> spellings = {"m", "metres", "meters", "ft", "feet"};
  return spellings;
}

std::optional<LengthUnit> length_unit_from(const std::string& spelling) {
  if (spelling == "m" || spelling == "metres" || spelling == "meters") return LengthUnit::metre;
  if (spelling == "ft" || spelling == "feet") return LengthUnit::foot;
  return std::nullopt;
}

}  // namespace strewn
