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
// with bulges, and circular-arc edges, type 2), ARC and CIRCLE entities; in the file's entities, and in
// BLOCKs through every INSERT that places them (insertion point 10/20, scales 41/42, rotation
// 50, MINSERT columns and rows 70/71 spaced 44/45, less the BLOCK's base point 10/20; nested
// INSERTs composed), as GDAL inlines blocks. Not read: extrusion directions (210/220/230, an
// entity drawn in a mirrored object frame) and binary DXF (is_binary_dxf: refused upstream).
#include <string>
#include <vector>

#include "strewn/region.hpp"

namespace strewn::detail {

// An arc placed in file coordinates. An INSERT's placement is affine, so the sliver between the
// placed arc and its chords is the drawn one's image: its area is the drawn sliver's times |det|
// of the placement (elliptical for unequal scales), and the placed arc's point farthest from its
// chord is the image of the drawn arc's midpoint (the tangent there stays parallel to the
// chord). Which side the arc bulges to does not matter: the sliver has the same area and depth
// on either side.
//
// Under a conformal placement (equal scales) the arcs kept are the ones GDAL emits as one chord
// (`chain` false). Under an unequal one, GDAL's chords of an arc, equal in the block's frame, are
// stretched unequally and stroked_arc_slivers cannot recognise them, so every arc and circle is
// kept (`chain` true): its ends are the first and last vertices of GDAL's chain of chords (a
// circle's both at its placed point at angle 0, where GDAL starts stroking it).
struct DxfArcChord {
  Vec2 from = Vec2::Zero(), to = Vec2::Zero();  // the arc's ends (file coordinates)
  Vec2 far = Vec2::Zero();                      // its point farthest from the chord (one side)
  double radius = 0.0, sweep = 0.0;             // of the drawn circle (radians), in the frame it is drawn in
  double area_scale = 1.0;                      // |det| of the placement's linear part
  double stretch = 1.0;                         // the placement's largest stretch of a length
  bool chain = false;                           // any number of chords (an unequal placement)
};

// The arcs of the file's text whose sweep is under `max_sweep_deg` (the others GDAL strokes into
// several chords, which stroked_arc_slivers recognises), and every arc and circle of a block
// placed with unequal scales. Malformed numbers are skipped (GDAL
// reports the file's faults when it reads it).
std::vector<DxfArcChord> dxf_small_arcs(const std::string& dxf_text, double max_sweep_deg);

// The largest |a u| over unit vectors u: a's largest singular value, from its Frobenius norm and
// determinant (s1^2 + s2^2 = F^2, s1 s2 = |det|).
double largest_stretch(const Mat2& a);

// Whether a file's first bytes are a binary DXF's sentinel "AutoCAD Binary DXF" (AutoCAD DXF
// Reference, "Binary DXF Files"), which dxf_small_arcs cannot read.
bool is_binary_dxf(const std::string& head);

}  // namespace strewn::detail

#endif
