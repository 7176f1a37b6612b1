#ifndef STREWN_CLI_HISTOGRAM_SVG_HPP
#define STREWN_CLI_HISTOGRAM_SVG_HPP

// `strewn deposition --histogram`: how many catch cans caught each depth, as an SVG bar chart,
// with the mean, the low-quarter mean and CU/DU in the caption.

#include <string>

#include "strewn/deposition.hpp"

namespace strewn::cli {

std::string can_histogram_svg(const Site& s, const Deposition& d);

}  // namespace strewn::cli

#endif
