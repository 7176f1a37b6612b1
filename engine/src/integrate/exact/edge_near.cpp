// J_e, the near form's edge integral (the expm1 form, smooth at the mean).
#include "integrate/exact/edge_tail.hpp"

#include "integrate/exact/gauss_kronrod.hpp"
#include "integrate/exact/periodic_ellipse_tail.hpp"

namespace strewn::detail {

Contribution edge_near(const Edge& edge, double rel_tol) {
  if (is_whole_ellipse(edge)) {
    const Contribution whole = whole_ellipse_near(edge, rel_tol);
    if (whole.converged) return whole;
  }
  return quadrature([&edge](double s) { return near_integrand(edge.point(s), edge.tangent(s)); }, edge.param_from(),
                    edge.param_to(), rel_tol, square(min_radius(edge)));
}

}  // namespace strewn::detail
