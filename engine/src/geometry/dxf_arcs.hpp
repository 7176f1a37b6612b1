#ifndef STREWN_GEOMETRY_DXF_ARCS_HPP
#define STREWN_GEOMETRY_DXF_ARCS_HPP

// The circular arcs a DXF file draws, read from its text (group codes), for the one case GDAL
// hides: GDAL 3.6 strokes every arc into chords of at most OGR_ARC_STEPSIZE degrees, and an arc
// sweeping less than one step arrives as a single chord, indistinguishable from a straight edge
// (measured: an LWPOLYLINE edge with bulge tan(0.1 deg / 4) on a 10 m chord comes back as the
// straight edge, 2.2 mm inside the arc, at a step of 0.25 deg). Knowing every such arc's ends and
// segment, vector_source.cpp finds the chords GDAL emitted for them and adds each segment to the
// region's error bound.
//
// Read: LWPOLYLINE and POLYLINE/VERTEX bulges (group 42, tan(sweep / 4) of the edge to the next
// vertex, closing edge included when flag 70 bit 1 is set), HATCH boundaries (polyline paths
// with bulges, and circular-arc edges, type 2), and ARC entities; in the file's entities, and in
// BLOCKs through every INSERT that places them (insertion point 10/20, scales 41/42, rotation
// 50, MINSERT columns and rows 70/71 spaced 44/45, less the BLOCK's base point 10/20; nested
// INSERTs composed), as GDAL inlines blocks. Not read: extrusion directions (210/220/230, an
// entity drawn in a mirrored object frame) and binary DXF (is_binary_dxf: refused upstream).
#include <string>
#include <vector>

#include "strewn/region.hpp"

namespace strewn::detail {

// An arc GDAL emits as one chord, placed in file coordinates. An INSERT's placement is affine,
// so the sliver between the placed arc and its chord is the drawn circular segment's image: its
// area is the segment's times |det| of the placement (an elliptical sliver for unequal scales),
// and the placed arc's point farthest from the chord is the image of the drawn arc's midpoint
// (the tangent there stays parallel to the chord). Which side the arc bulges to does not matter:
// the sliver has the same area and depth on either side.
struct DxfArcChord {
  Vec2 from = Vec2::Zero(), to = Vec2::Zero();  // the arc's ends (file coordinates)
  Vec2 far = Vec2::Zero();                      // its point farthest from the chord (one side)
  double radius = 0.0, sweep = 0.0;             // of the drawn circle (radians), in the frame it is drawn in
  double area_scale = 1.0;                      // |det| of the placement's linear part
};

// The arcs of the file's text whose sweep is under `max_sweep_deg` (the others GDAL strokes into
// several chords, which stroked_arc_slivers recognises). Malformed numbers are skipped (GDAL
// reports the file's faults when it reads it).
std::vector<DxfArcChord> dxf_small_arcs(const std::string& dxf_text, double max_sweep_deg);

// Whether a file's first bytes are a binary DXF's sentinel "AutoCAD Binary DXF" (AutoCAD DXF
// Reference, "Binary DXF Files"), which dxf_small_arcs cannot read.
bool is_binary_dxf(const std::string& head);

}  // namespace strewn::detail

#endif
