#ifndef STREWN_PHYSICS_CLOUD_MIXTURE_HPP
#define STREWN_PHYSICS_CLOUD_MIXTURE_HPP

// Private: the mixture a drop's scatter becomes when its Monte Carlo landings are not close to
// normal (strewn/drop.hpp). Unlike fit_two_component (a core and a wide part about one mean),
// every component has its own mean and full covariance, so a curved cloud (a crescent, from a
// wind direction that is uncertain) is followed by components placed along it.
//
// Fit: expectation-maximisation for a normal mixture (Dempster, Laird & Rubin 1977; the
// updates of McLachlan & Peel 2000, ch. 2.8) with K = 2 and 3 components, started from the
// cloud cut into K equal groups along its principal axis, each covariance kept above 1e-9 of
// the cloud's (no collapse onto a point); the K with the lower BIC, -2 log L + (6 K - 1) ln n,
// is kept.
// Check: on landings the fit did not see, the Rosenblatt transform (Rosenblatt 1952) under the
// mixture, u1 = F(x), u2 = F(y | x), both closed forms for a normal mixture, makes
// z = Phi^-1(u1)^2 + Phi^-1(u2)^2 chi-square with 2 d.o.f. when the mixture is right; the
// Kolmogorov-Smirnov test compares 1 - exp(-z/2) with the uniform.

#include <vector>

#include "strewn/scatter_model.hpp"

namespace strewn::detail {

struct CloudMixture {
  ScatterModel model = Gaussian::from_axes({0, 0}, 1, 1, 0);
  int components = 0;
  double bic = 0.0;
  double ks_statistic = 0.0, ks_p_value = 1.0;  ///< the check on the held-out landings
  std::size_t fitted = 0, checked = 0;
};

/// Fits to `fit` and checks on `check` (each at least 20 points).
CloudMixture fit_cloud_mixture(const std::vector<Vec2>& fit, const std::vector<Vec2>& check);

/// The KS check of a mixture on points (the part "Check" above): statistic and p-value.
std::pair<double, double> rosenblatt_ks(const ScatterModel& model, const std::vector<Vec2>& points);

}  // namespace strewn::detail

#endif
