// Whole ellipses: the periodic trapezoidal rule (periodic_ellipse_tail.hpp) on nodes taken from
// one table of the unit circle.
#include <Eigen/LU>
#include <Eigen/SVD>
#include <cmath>
#include <utility>

#include "integrate/exact/edge_tail.hpp"
#include "integrate/exact/periodic_ellipse_tail.hpp"
#include "strewn/constants.hpp"

namespace strewn::detail {

// A whole ellipse: the periodic trapezoidal rule (periodic_ellipse_tail.hpp), its nodes
// computed here from their sines and cosines.
const UnitCircleNodes& unit_circle_nodes() {
  static const UnitCircleNodes nodes = [] {
    UnitCircleNodes u{};
    for (int k = 0; k < kPeriodicMaxNodes; ++k) {
      u.cos[k] = std::cos(2 * kPi * k / kPeriodicMaxNodes);
      u.sin[k] = std::sin(2 * kPi * k / kPeriodicMaxNodes);
    }
    return u;
  }();
  return nodes;
}

// Trapezoid nodes of a whole ellipse at s_from + 2 pi k / n: the unit-circle table rotated by
// s_from (a couple of ulps from a direct sine and cosine), then mapped by the axes.
static auto computed_nodes(const Edge& arc) {
  const UnitCircleNodes& unit = unit_circle_nodes();
  const double c0 = std::cos(arc.s_from), s0 = std::sin(arc.s_from);
  return [&arc, &unit, c0, s0](int k, int n) {
    const int i = k * (kPeriodicMaxNodes / n);
    const double cs = c0 * unit.cos[i] - s0 * unit.sin[i], sn = s0 * unit.cos[i] + c0 * unit.sin[i];
    return std::pair<Vec2, Vec2>(arc.centre + arc.axes * Vec2(cs, sn), arc.axes * Vec2(-sn, cs));
  };
}

bool is_whole_ellipse(const Edge& e) {
  return e.kind == Edge::Kind::arc && std::fabs(std::fabs(e.s_to - e.s_from) - 2 * kPi) <= 1e-14 * 2 * kPi;
}

Contribution whole_ellipse_tail(const Edge& arc, double rel_tol) {
  EllipseView view;
  view.range = radius_range(arc, 32);
  view.a_max = Eigen::JacobiSVD<Mat2>(arc.axes).singularValues()(0);
  view.inside = (arc.axes.inverse() * (-arc.centre)).squaredNorm();
  view.orientation = (arc.axes.determinant() > 0) == (arc.s_to > arc.s_from) ? 1.0 : -1.0;
  view.sign = arc.s_to > arc.s_from ? 1.0 : -1.0;
  return periodic_ellipse_tail(view, computed_nodes(arc), rel_tol);
}

Contribution whole_ellipse_near(const Edge& edge, double rel_tol) {
  const double sign = edge.s_to > edge.s_from ? 1.0 : -1.0;
  return periodic_ellipse_near(sign, computed_nodes(edge), rel_tol);
}

}  // namespace strewn::detail
