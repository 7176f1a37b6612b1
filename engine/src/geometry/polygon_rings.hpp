#ifndef STREWN_SRC_POLYGON_RINGS_HPP
#define STREWN_SRC_POLYGON_RINGS_HPP

#include <string>
#include <vector>

#include "strewn/region.hpp"

namespace strewn {

using Ring = std::vector<Vec2>;

// One polygon as geometry files give it: the outer ring first, then its holes.
using PolygonRings = std::vector<Ring>;

// A region from polygons as geometry files give them (closing point repeated or not, any
// orientation): validated, every hole checked to lie inside its own outer ring (a hole outside
// would otherwise be taken, by nesting, for more area), then normalised. `what` names the source
// in error messages.
Region region_from_polygons(const std::vector<PolygonRings>& polygons, const std::string& what);

// One polygon whose rings may hold arcs: the outer loop first, then its holes, each closed.
using PolygonLoops = std::vector<Loop>;

// The same checks for polygons whose rings are loops already (curved geometry).
Region region_from_polygon_loops(std::vector<PolygonLoops> polygons, const std::string& what);

}  // namespace strewn

#endif
