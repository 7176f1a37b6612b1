// J_e, the near form's edge integral (the expm1 form, smooth at the mean).
#include "integrate/exact/edge_tail.hpp"

#include "integrate/exact/gauss_kronrod.hpp"
#include "integrate/exact/periodic_ellipse_tail.hpp"

namespace strewn::detail {

Contribution edge_near(const Edge& edge, double rel_tol) {
  // The trapezoid's convergence test compares it with itself on half the nodes: on an ellipse
  // hundreds of sigma round, next to the mean, both miss the few sigma where G < 1 (a disk of
  // 182 sigma radius, the mean 1.4e-9 sigma outside it at a national-grid site: 0.49999999994
  // "converged" for 0.49891). Only about a region of a few sigma, the near form's own use.
  if (is_whole_ellipse(edge) && radius_range(edge, 8).farthest <= 8.0) {
    const Contribution whole = whole_ellipse_near(edge, rel_tol);
    if (whole.converged) return whole;
  }
  if (edge.kind == Edge::Kind::arc) return arc_near(edge, rel_tol);
  return quadrature([&edge](double s) { return near_integrand(edge.point(s), edge.tangent(s)); }, edge.param_from(),
                    edge.param_to(), rel_tol, square(min_radius(edge)));
}

}  // namespace strewn::detail
