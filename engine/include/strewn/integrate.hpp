#ifndef STREWN_INTEGRATE_HPP
#define STREWN_INTEGRATE_HPP

/// \file
/// Probability that an impact lands in a region: P = integral over the region of the scatter
/// model's density.
///
/// Methods (see DESIGN.md, "Integration methods"):
///  - exact: whitening plus Green's theorem with the 1-form (1 - exp(-r^2/2))/(2 pi) dtheta;
///    straight edges in closed form through Owen's T function, arcs by adaptive Gauss-Kronrod.
///    Relative accuracy is kept for p and for q = 1 - p down to 1e-15 and beyond.
///  - cubature: hcubature over cones from an apex of each loop (polar patches for disks,
///    ellipses and annular sectors; mapped triangles for polygons).
///  - monte_carlo: seeded sampling with a Clopper-Pearson interval.
///
/// Example:
/// \code
///   strewn::Region door = ...;                       // from a shape plugin
///   strewn::Estimate e = strewn::integrate(model, door, {});
///   // e.p, e.q, e.abs_err
/// \endcode

#include <cstdint>
#include <functional>
#include <string>

#include "strewn/estimate.hpp"
#include "strewn/export.hpp"
#include "strewn/region.hpp"
#include "strewn/scatter_model.hpp"

namespace strewn {

/// Options with their defaults. A request is met when abs_err <= max(abs_tolerance,
/// rel_tolerance * min(p, q)) for exact, and abs_err <= max(abs_tolerance, rel_tolerance * p)
/// for cubature (which computes q as 1 - p, so q's accuracy is absolute). One exception: a
/// compact support (the uniform, a profile, a part-circle head) whose interior no zone edge
/// enters, beyond rounding, lies wholly inside or outside the zone, so p and q are exactly 1 and
/// 0 (or 0 and 1); abs_err then bounds the slivers that rounding-level contact (a zone edge
/// touching the wetted circle or running along the head's arc's ray) may cut, and the request is
/// judged on the side that is 1. A tiny q that is not exactly 0 (a normal's tail, an edge a hair
/// inside the support) is always judged relative to q.
struct STREWN_API IntegrateOptions {
  Method method = Method::exact;
  double rel_tolerance = 1e-8;
  double abs_tolerance = 1e-15;
  /// cubature: most integrand evaluations in one call (each of its two passes).
  std::uint64_t max_evaluations = 5000000;
  /// monte_carlo: number of samples, random seed and confidence of the interval.
  std::uint64_t samples = 1000000;
  std::uint64_t seed = 20261201;
  double confidence = 0.999;

  /// monte_carlo: called now and then with the share of the samples done (0 to 1), from the
  /// calling thread; empty for none.
  std::function<void(double)> progress;

  /// Empty when the options are usable, else a one-line reason.
  std::string invalid_reason() const;
};

/// P(impact in region) under a single Gaussian.
STREWN_API Estimate integrate(const Gaussian& gaussian, const Region& region,
                              const IntegrateOptions& options = {});
/// P(impact in region) under a mixture: weighted sums of p, q and abs_err.
STREWN_API Estimate integrate(const ScatterModel& model, const Region& region,
                              const IntegrateOptions& options = {});

/// The last check every integrate() result passes: p and q finite and in [0, 1], and p + q = 1,
/// each within the error bound (plus a few ulps). Passing, p and q come back clamped to [0, 1]
/// (and -0 as +0); failing, it throws std::runtime_error with the numbers, so that an engine
/// fault is never printed as a probability (the command line reports it, naming the zone, with
/// exit 1).
STREWN_API Estimate checked_estimate(Estimate e);

/// Two methods side by side.
struct Verification {
  Estimate primary;
  Estimate secondary;
  bool agree = false;  ///< |p1 - p2| <= abs_err1 + abs_err2 (and likewise for q); set only by verify()
  std::string message;
};

/// Runs options.method and a second, independent method (cubature for exact, exact otherwise;
/// Monte Carlo for exact when a component is of the uniform family, which cubature refuses)
/// and reports whether they agree within their combined error bounds.
STREWN_API Verification verify(const ScatterModel& model, const Region& region,
                               const IntegrateOptions& options = {});
/// The judgement verify() makes, on two estimates already computed: agree when p and q each
/// differ by no more than the combined bounds (plus the last bits of two roundings).
STREWN_API Verification verify(const Estimate& primary, const Estimate& secondary);

/// Probability of at least one impact in N independent events each of probability p:
/// -expm1(N log1p(-p)), which keeps relative accuracy when N p is tiny. N may be +inf (1 if p > 0).
STREWN_API double probability_of_any(double p, double events);

}  // namespace strewn

#endif
