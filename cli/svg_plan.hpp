#ifndef STREWN_CLI_SVG_PLAN_HPP
#define STREWN_CLI_SVG_PLAN_HPP

// A site plan as SVG: zones by role, sources' aim points, and a field of cells coloured on a
// sequential ramp whose lightness falls steadily (pale sand to deep blue), so that it reads in
// greyscale and for the common colour-vision deficiencies.

#include <string>

#include "deposition.hpp"

namespace strewn::cli {

std::string deposition_svg(const Scenario& s, const Deposition& d);

}  // namespace strewn::cli

#endif
