#ifndef STREWN_CLI_SVG_PLAN_HPP
#define STREWN_CLI_SVG_PLAN_HPP

// The deposition plan as SVG (drawn on an SvgCanvas).

#include <string>

#include "deposition.hpp"

namespace strewn::cli {

// The extent of the zones and the aim points.
BoundingBox plan_extent(const Scenario& s);
std::string deposition_svg(const Scenario& s, const Deposition& d);

}  // namespace strewn::cli

#endif
