#ifndef STREWN_SRC_INTEGRATORS_HPP
#define STREWN_SRC_INTEGRATORS_HPP

// The three methods, each on a region already whitened (standard normal, mean at the origin).
// integrate.cpp does the whitening, the mixture sums and the options checks.

#include <functional>
#include <optional>

#include "strewn/estimate.hpp"
#include "strewn/integrate.hpp"
#include "strewn/region.hpp"

namespace strewn::detail {

// How far rounding may have moved a whitened point z: absolute + relative * |z| (whitened
// units). The exact method turns this into a bound on p through the density on the boundary.
struct WhiteningNoise {
  double absolute = 0.0;
  double relative = 0.0;
};

// Does e meet the options' tolerance (relative on min(p, q) for exact, on p otherwise)?
bool meets(const Estimate& e, const IntegrateOptions& options);
// Throws input_error for unusable options or a region that is empty or not normalised.
void check_region(const Region& region, const IntegrateOptions& options);
// The whitening's rounding, plus `vertex_move` (m, Region::vertex_move) in whitened units.
WhiteningNoise whitening_noise(const Gaussian& g, double vertex_move = 0.0);
// p and q in [0, 1] and p + q = 1 within e.abs_err, else std::runtime_error; -0 becomes 0.
Estimate checked(Estimate e);

// A mixture over a region with bounding box `box`, component k estimated by
// component_estimate(k); components too far to matter are bounded instead of integrated.
Estimate integrate_components(const ScatterModel& model, const BoundingBox& box, const IntegrateOptions& options,
                              const std::function<Estimate(std::size_t)>& component_estimate);

// Bound on what moving each vertex z of the whitened region by noise.absolute +
// noise.relative * |z| can change in p (exact_integrator.cpp).
// `family`: null for the normal, else the component's other family.
double whitening_error(const Region& whitened, const WhiteningNoise& noise, const char* done = nullptr,
                       const ScatterFamily* family = nullptr);

// `family`: null for the normal (Owen's T closed forms), else the family whose S(r) the edges
// integrate by adaptive quadrature.
Estimate integrate_exact(const Region& whitened, const IntegrateOptions& options,
                         const WhiteningNoise& noise = {}, const ScatterFamily* family = nullptr);
// The exact method's common case in one pass, whitening z = M (x - origin) on the fly: a region of
// straight edges, closed, reaching beyond the near form's radius (after whitening), whose edges
// all pass clear of the mean (the winding number is counted in the same pass). Empty for any
// other region, or when an edge needs quadrature: integrate_exact on the whitened region then
// gives the same answer (to rounding: its loops are summed one at a time).
std::optional<Estimate> integrate_exact_polygon(const Region& region, const Mat2& M, const Vec2& origin,
                                                const IntegrateOptions& options, const WhiteningNoise& noise);
// A part-circle family (ScatterFamily::with_arc) in the exact method: P(zone & wedge) under the
// whole-circle `family`, the wedge running counter-clockwise from `from` by `sweep` (radians,
// whitened directions); not yet divided by the wedge's share (wedge.cpp).
Estimate integrate_exact_wedge(const Region& whitened, const IntegrateOptions& options, const WhiteningNoise& noise,
                               const ScatterFamily& family, double from, double sweep);
// `wedge_from`, `wedge_sweep`: a part-circle family's wedge (whitened directions, radians);
// P(zone & wedge) under the whole-circle `family`, not yet divided by the wedge's share.
Estimate integrate_cubature(const Region& whitened, const IntegrateOptions& options,
                           const ScatterFamily* family = nullptr, double wedge_from = 0.0,
                           double wedge_sweep = 6.283185307179586);
// `wedge_from`, `wedge_sweep`: directions (whitened, radians) that a part-circle profile's
// samples are drawn from; the whole circle by default.
Estimate integrate_monte_carlo(const Region& whitened, const IntegrateOptions& options,
                               const ScatterFamily* family = nullptr, double wedge_from = 0.0,
                               double wedge_sweep = 6.283185307179586);

}  // namespace strewn::detail

#endif
