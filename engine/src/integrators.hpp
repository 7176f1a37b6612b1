#ifndef STREWN_SRC_INTEGRATORS_HPP
#define STREWN_SRC_INTEGRATORS_HPP

// The three methods, each on a region already whitened (standard normal, mean at the origin).
// integrate.cpp does the whitening, the mixture sums and the options checks.

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

Estimate integrate_exact(const Region& whitened, const IntegrateOptions& options,
                         const WhiteningNoise& noise = {});
Estimate integrate_cubature(const Region& whitened, const IntegrateOptions& options);
Estimate integrate_monte_carlo(const Region& whitened, const IntegrateOptions& options);

}  // namespace strewn::detail

#endif
