#ifndef STREWN_GEOMETRY_DXF_ARCS_HPP
#define STREWN_GEOMETRY_DXF_ARCS_HPP

// The circular arcs a DXF file draws, read from its text (group codes), for the one case GDAL
// hides: GDAL 3.6 strokes every arc into chords of at most OGR_ARC_STEPSIZE degrees, and an arc
// sweeping less than one step arrives as a single chord, indistinguishable from a straight edge
// (measured: an LWPOLYLINE edge with bulge tan(0.1 deg / 4) on a 10 m chord comes back as the
// straight edge, 2.2 mm inside the arc, at a step of 0.25 deg). Knowing every such arc's ends and
// radius, vector_source.cpp finds the chords GDAL emitted for them and adds each circular
// segment to the region's error bound.
//
// Read: LWPOLYLINE and POLYLINE/VERTEX bulges (group 42, tan(sweep / 4) of the edge to the next
// vertex, closing edge included when flag 70 bit 1 is set), HATCH boundaries (polyline paths
// with bulges, and circular-arc edges, type 2), and ARC entities. In every section, BLOCKS too,
// in the block's own coordinates: an arc placed by an INSERT with a scale, rotation or offset
// is not matched (DEVELOPERS.md). A binary DXF gives none.
#include <string>
#include <vector>

#include "strewn/region.hpp"

namespace strewn::detail {

// An arc by its two ends and its radius (file coordinates). Which side it bulges to does not
// matter: the sliver between the arc and its chord has the same area on either side.
struct DxfArcChord {
  Vec2 from = Vec2::Zero(), to = Vec2::Zero();
  double radius = 0.0;
};

// The arcs of the file's text whose sweep is under `max_sweep_deg` (the others GDAL strokes into
// several chords, which stroked_arc_slivers recognises). Malformed numbers are skipped (GDAL
// reports the file's faults when it reads it).
std::vector<DxfArcChord> dxf_small_arcs(const std::string& dxf_text, double max_sweep_deg);

}  // namespace strewn::detail

#endif
