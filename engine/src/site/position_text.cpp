#include "strewn/position_text.hpp"

#include <cstdio>

namespace strewn {

std::string coordinate_text(double metres, LengthUnit unit) {
  char text[64];
  std::snprintf(text, sizeof text, "%.*f", kCoordinateDecimals, from_metres(metres, unit));
  std::string s = text;
  if (s.find('.') != std::string::npos) {
    while (s.back() == '0') s.pop_back();
    if (s.back() == '.') s.pop_back();
  }
  if (s == "-0") s = "0";  // a coordinate that rounds to zero has no sign worth printing
  return s;
}

std::string position_text(const Vec2& metres, LengthUnit unit) {
  return "(" + coordinate_text(metres.x(), unit) + ", " + coordinate_text(metres.y(), unit) + ")";
}

}  // namespace strewn
