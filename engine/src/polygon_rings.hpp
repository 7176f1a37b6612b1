#ifndef STREWN_SRC_POLYGON_RINGS_HPP
#define STREWN_SRC_POLYGON_RINGS_HPP

#include <string>
#include <vector>

#include "strewn/region.hpp"

namespace strewn {

using Ring = std::vector<Vec2>;

// A region from polygon rings as geometry files give them (closing point repeated or not, any
// orientation, holes after their outer ring): validated, then normalised. `what` names the source
// in error messages.
Region region_from_rings(const std::vector<Ring>& rings, const std::string& what);

}  // namespace strewn

#endif
