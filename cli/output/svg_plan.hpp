#ifndef STREWN_CLI_SVG_PLAN_HPP
#define STREWN_CLI_SVG_PLAN_HPP

// The deposition plan as SVG (drawn on an SvgCanvas).

#include <string>

#include "strewn/deposition.hpp"

namespace strewn::cli {

std::string deposition_svg(const Site& s, const Deposition& d);

}  // namespace strewn::cli

#endif
