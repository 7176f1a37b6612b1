#ifndef STREWN_SRC_TRANSLATED_FOOTPRINT_HPP
#define STREWN_SRC_TRANSLATED_FOOTPRINT_HPP

// One Gaussian component integrated over one footprint placed at many points (the cells of a
// risk map). at(x) equals integrate(g, footprint moved by x, options) within the two results'
// error bounds, but what does not depend on x is done once: for a footprint that is one whole
// ellipse (the person, disk and ellipse kinds) the whitened footprint's trapezoid nodes and
// tangents, its chords for the distance bound and its inverse axes are tabled, so a cell costs
// the nodes' exponentials and little else; how many nodes a cell takes comes from an a-priori
// bound on the trapezoidal rule's error (periodic_ellipse_tail_bounded), the doubling rule
// serving the cells near the mean that the bound cannot. Cells the fast path cannot serve to the requested
// accuracy (the mean on or close to the rim, far tails needing more nodes, a footprint within
// one sigma of the mean, other footprints and methods) go to integrate() unchanged.
// A footprint of straight edges only (rectangle, doorway, polygon, a composite of those) has
// its vertices whitened once, W v; a cell adds the whitened offset W (x - mean) to each and sums
// the edges' Owen's T closed forms in one batch (translated_polygon.cpp): no region is copied,
// whitened or checked per cell.

#include <array>
#include <vector>

#include "strewn/integrate.hpp"
#include "integrate/integrators.hpp"
#include "integrate/exact/periodic_ellipse_tail.hpp"

namespace strewn::detail {

class TranslatedFootprint {
 public:
  TranslatedFootprint(const Gaussian& g, const Region& footprint, const IntegrateOptions& options);
  Estimate at(const Vec2& where) const;

 private:
  Estimate general(const Vec2& where) const;
  bool whole_ellipse_at(const Vec2& where, Estimate& out) const;
  // translated_polygon.cpp
  bool table_polygon(const Region& footprint);
  bool polygon_at(const Vec2& where, Estimate& out) const;

  Gaussian g_;
  Region footprint_;
  IntegrateOptions options_;
  WhiteningNoise noise_;
  bool whole_ellipse_ = false;
  // For a whole-ellipse footprint c + A0 (cos s, sin s): whitened axes A = W A0, the offset of
  // the ellipse's centre from the placement point, and the nodes A (cos s_k, sin s_k) and
  // tangents A (-sin s_k, cos s_k) at s_k = s_from + 2 pi k / kTableNodes.
  static constexpr int kTableNodes = 256;
  static constexpr int kChords = 16;
  Vec2 centre_offset_ = Vec2::Zero();
  Mat2 axes_inverse_ = Mat2::Identity();
  Mat2 axes_transpose_ = Mat2::Identity();
  EllipseStrip strip_;  // its cell-independent members
  Vec2 half_extent_ = Vec2::Zero();  // of the whitened ellipse's bounding box
  double a_max_ = 0.0, chord_slack_ = 0.0, length_ = 0.0;
  double orientation_ = 1.0, sign_ = 1.0;
  std::array<Vec2, kTableNodes> node_{}, tangent_{};
  // The same in the nesting order of the a-priori bounded rule (first level kFirstLevel nodes,
  // then each doubling's odd ones), coordinates apart; tangents along the travel.
  static constexpr int kFirstLevel = kBoundedFirstNodes;
  std::array<double, kTableNodes> nested_x_{}, nested_y_{}, nested_tx_{}, nested_ty_{};
  // For a footprint of straight edges, each loop closed exactly: its vertices whitened, W v,
  // loop after loop (loop_end_: one past each loop's last), and the largest |W v|.
  static constexpr std::size_t kPolygonVertices = 256;  // more: the full integrator
  bool polygon_ = false;
  std::vector<Vec2> vertex_;
  std::vector<std::size_t> loop_end_;
  double vertex_reach_ = 0.0;
};

}  // namespace strewn::detail

#endif
