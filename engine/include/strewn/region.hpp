#ifndef STREWN_REGION_HPP
#define STREWN_REGION_HPP

/// \file
/// Regions of the site plan: closed loops of straight segments and elliptic arcs.
///
/// A loop is a closed chain of edges, each starting where the previous one ended. An elliptic
/// arc is the curve  centre + axes * (cos s, sin s)  for the parameter s from s_from to s_to
/// (radians; counter-clockwise when s_to > s_from and det(axes) > 0). A circle of radius r is
/// axes = r * I. Under an affine map x -> M x + t an arc stays an arc (centre -> M centre + t,
/// axes -> M axes), which is what lets the engine whiten a region exactly.
///
/// After normalised(), outer loops run counter-clockwise and holes clockwise, so the region is
/// always on the left of the direction of travel; the region is then the set of points with
/// winding number 1.
///
/// `approximation_area` records how much area (m^2) may differ between this region and the one
/// the user described, because boolean operations work on a polygonisation, and
/// `approximation_width` how far (m) from the boundary that area can lie; integration adds
/// this area times the largest density within that distance of the boundary to its error bound.
///
/// That distance is the region's own boundary only while no boolean operation has been applied:
/// the area a polygonised disk loses lies along the disk's chords, which need not be on the
/// boundary of disk minus rectangle at all (a 5 mm sliver lost whole leaves an empty result with
/// no boundary). So every polygonisation also records where its area lies,
/// `approximation_patches`: boxes, each holding at most its `area` of the moved area. Integration
/// bounds each patch by its area times the largest density over its box, and only the rest of
/// approximation_area (not in a patch: e.g. a reader's stroked arcs, on the region's own
/// boundary) by the boundary distance.

#include <string>
#include <vector>

#include "strewn/export.hpp"
#include "strewn/scatter_model.hpp"

namespace strewn {

struct STREWN_API Edge {
  enum class Kind { segment, arc };
  Kind kind = Kind::segment;
  Vec2 from = Vec2::Zero();
  Vec2 to = Vec2::Zero();
  // Arc only.
  Vec2 centre = Vec2::Zero();
  Mat2 axes = Mat2::Identity();
  double s_from = 0.0;
  double s_to = 0.0;

  static Edge segment(const Vec2& from, const Vec2& to);
  static Edge arc(const Vec2& centre, const Mat2& axes, double s_from, double s_to);
  /// Point at parameter s (arcs) or at fraction s in [0, 1] (segments).
  Vec2 point(double s) const;
  /// Derivative of point(s).
  Vec2 tangent(double s) const;
  double param_from() const { return kind == Kind::arc ? s_from : 0.0; }
  double param_to() const { return kind == Kind::arc ? s_to : 1.0; }
  Edge reversed() const;
};

using Loop = std::vector<Edge>;

struct BoundingBox {
  Vec2 min;
  Vec2 max;
};

/// At most `area` (m^2) of a region's approximation_area, lying inside `box`.
struct ApproximationPatch {
  BoundingBox box;
  double area = 0.0;
};

struct STREWN_API Region {
  std::vector<Loop> loops;
  double approximation_area = 0.0;
  double approximation_width = 0.0;
  /// Where (part of) approximation_area lies; their areas sum to at most approximation_area.
  std::vector<ApproximationPatch> approximation_patches;
  /// How far (m) any vertex may lie from the point it stands for: a boolean operation computes
  /// where edges cross in floating point (a few ulps off, more where they cross at a small
  /// angle). Integration counts every vertex as moved this far in its error bound.
  double vertex_move = 0.0;

  bool empty() const { return loops.empty(); }
};

/// Signed area of a loop (positive when counter-clockwise), exact for arcs.
STREWN_API double signed_area(const Loop& loop);
/// Area of a region whose loops are normalised.
STREWN_API double area(const Region& region);
/// Winding number of the region's boundary around p (points exactly on the boundary count as
/// on either side). For a normalised region: 1 inside, 0 outside.
STREWN_API int winding_number(const Region& region, const Vec2& p);
/// Orientation fixed by nesting depth: even depth counter-clockwise, odd depth clockwise.
/// Throws strewn::input_error when a loop is not closed or has zero length.
STREWN_API Region normalised(Region region);
/// x -> M x + t applied to every loop; orientation is kept (reversed when det M < 0).
STREWN_API Region transformed(const Region& region, const Mat2& M, const Vec2& t);
/// Arcs replaced by chords whose sagitta is at most `sagitta` (metres); the area between arcs and
/// chords is added to approximation_area, and to approximation_patches with the boxes of the
/// chords (every 8 chords of an arc share one box) widened by the sagitta.
STREWN_API Region polygonised(const Region& region, double sagitta);
/// The box of the loops and of the approximation patches (where the region described may lie).
STREWN_API BoundingBox bounds(const Region& region);
/// Total length of the boundary (m).
STREWN_API double perimeter(const Region& region);

}  // namespace strewn

#endif
