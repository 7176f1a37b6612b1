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
// INSERTs composed), as GDAL inlines blocks. Each entity and INSERT is drawn in its object
// frame (OCS: extrusion 210/220/230 and elevation, by the DXF Reference's arbitrary axis
// algorithm), as GDAL 3.6 draws it (measured with ogrinfo): extrusion (0, 0, -1) mirrors x, and a
// tilted one projects the entity's plane onto the plan, which turns its circles into ellipses
// (kept as chains, like an unequal placement's). An entity whose plane stands upright has no area
// in the plan: it is noted (DxfUpright) for the caller to refuse. Not read: binary DXF
// (is_binary_dxf: refused upstream).
#include <string>
#include <vector>

#include "strewn/region.hpp"

namespace strewn::detail {

// An arc placed in file coordinates. An INSERT's placement, and the plan of an object frame, are
// affine, so the sliver between the
// placed arc and its chords is the drawn one's image: its area is the drawn sliver's times |det|
// of the placement (elliptical for unequal scales), and the placed arc's point farthest from its
// chord is the image of the drawn arc's midpoint (the tangent there stays parallel to the
// chord). Which side the arc bulges to does not matter: the sliver has the same area and depth
// on either side.
//
// Under a conformal placement (equal scales, in an object frame with extrusion (0, 0, 1) or
// (0, 0, -1)) the arcs kept are the ones GDAL emits as one chord
// (`chain` false). Under an unequal one, GDAL's chords of an arc, equal in the block's frame, are
// stretched unequally and stroked_arc_slivers cannot recognise them, so every arc and circle is
// kept (`chain` true; so too in a tilted object frame, whose plan is a stretch): its ends are the first and last vertices of GDAL's chain of chords (a
// circle's both at its placed point at angle 0, where GDAL starts stroking it).
struct DxfArcChord {
  Vec2 from = Vec2::Zero(), to = Vec2::Zero();  // the arc's ends (file coordinates)
  Vec2 far = Vec2::Zero();                      // its point farthest from the chord (one side)
  double radius = 0.0, sweep = 0.0;             // of the drawn circle (radians), in the frame it is drawn in
  double area_scale = 1.0;                      // |det| of the placement's linear part
  double stretch = 1.0;                         // the placement's largest stretch of a length
  bool chain = false;                           // any number of chords (an unequal placement)
};

// An entity (LWPOLYLINE, POLYLINE, ARC, CIRCLE, HATCH; directly or in an INSERTed block) whose
// plane stands upright in the world (its placed normal has no z): seen from above it is a line.
struct DxfUpright {
  std::size_t line = 0;    // of its (0, TYPE) pair in the file, from 1
  std::string type;        // ARC, CIRCLE, ...
  std::string handle;      // group 5 of the file's entity GDAL makes a feature of (for a block's
                           // entities the INSERT's); empty when the file gives no handles
  std::string extrusion;   // its own 210/220/230 as written, "x, y, z"
};

// A HATCH boundary edge GDAL strokes but strewn cannot bound: an elliptical arc (edge type 3)
// or a spline (type 4) (AutoCAD DXF Reference, HATCH "Edge type data"). GDAL draws them as
// polylines whose distance from the curve is not known here, as it does the ELLIPSE and SPLINE
// entities that vector_source.cpp refuses; the caller refuses these the same way.
struct DxfCurvedEdge {
  std::size_t line = 0;    // of the edge's (72, type) pair in the file, from 1
  std::string kind;        // "elliptical arc" or "spline"
  std::string handle;      // as DxfUpright's: the HATCH's (or its INSERT's) group 5, or empty
};

struct DxfArcs {
  std::vector<DxfArcChord> arcs;
  std::vector<DxfUpright> upright;
  std::vector<DxfCurvedEdge> curved_edges;
};

// The arcs of the file's text whose sweep is under `max_sweep_deg` (the others GDAL strokes into
// several chords, which stroked_arc_slivers recognises), and every arc and circle of a block
// placed with unequal scales or of a tilted object frame; the upright entities; and the HATCH
// edges that are elliptical arcs or splines. Malformed
// numbers are skipped (GDAL reports the file's faults when it reads it).
DxfArcs dxf_small_arcs(const std::string& dxf_text, double max_sweep_deg);

// The largest |a u| over unit vectors u: a's largest singular value, from its Frobenius norm and
// determinant (s1^2 + s2^2 = F^2, s1 s2 = |det|).
double largest_stretch(const Mat2& a);

// Whether a file's first bytes are a binary DXF's sentinel "AutoCAD Binary DXF" (AutoCAD DXF
// Reference, "Binary DXF Files"), which dxf_small_arcs cannot read.
bool is_binary_dxf(const std::string& head);

}  // namespace strewn::detail

#endif
