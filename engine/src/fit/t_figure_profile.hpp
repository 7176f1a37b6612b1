#ifndef STREWN_FIT_T_FIGURE_PROFILE_HPP
#define STREWN_FIT_T_FIGURE_PROFILE_HPP

// The profile likelihood of one scale figure of a bivariate t (sigma, sigma_major, sigma_minor,
// CEP or R95), every other parameter, nu included, maximised out:
//     l_p(psi) = max { l(mu, Sigma, nu) : figure(Sigma, nu) = psi, nu_min <= nu <= nu_max },
// and the interval {psi : W(psi) = 2 (l_max - l_p(psi)) <= c} (Cox & Hinkley 1974, "Theoretical
// Statistics", section 9.3; the cut-off c calibrated by parametric bootstrap as in Hall 1987,
// Biometrika 74, and Davison & Hinkley 1997, section 5.2.3). W is close to pivotal: its law
// hardly depends on nu, which the scale figures' own ratio estimate / truth does (docs/intervals.md,
// "Student-t fit").
//
// Every figure is the overall scale s times a function of the shape and nu (Sigma = s^2 S with
// det S = 1), so the constraint fixes s, and l_p is a free maximum over the location, the shape
// S = exp([[p, q], [q, -p]]) and log nu, found by NLopt's BOBYQA (Powell 2009, "The BOBYQA
// algorithm for bound constrained optimization without derivatives", Cambridge DAMTP 2009/NA06).
#include <vector>

#include "containment_table.hpp"
#include "strewn/fit.hpp"
#include "strewn/scatter_model.hpp"

namespace strewn::detail {

enum class TFigure { sigma, sigma_major, sigma_minor, cep, r95 };
inline constexpr int kTFigureCount = 5;

/// The figure of a t with scale matrix `scale` and `nu` degrees of freedom: sqrt(trace / 2), the
/// scale's axes, or the radius about the location holding 50% or 95% (containment_radius).
double t_figure(const Mat2& scale, double nu, TFigure figure);

/// A point of the search: location (p, q below: v[0], v[1]) and shape (v[2], v[3]) in the
/// problem's frame, log nu (v[4]).
struct TShapePoint {
  double v[5] = {0, 0, 0, 0, 0};
};

/// The t's log-likelihood of x, sum of log f(x_i), f = (1 + d^2 / nu)^(-(nu + 2) / 2) / (2 pi |Sigma|^(1/2)).
double t_log_likelihood(const std::vector<Vec2>& x, const Vec2& mu, const Mat2& scale, double nu);

/// What the profile search is given. It runs in the frame of a reference t (the fit's own):
/// z = F^-1 (x - origin) with F F^T the reference scale, where the reference is the unit circle
/// about 0 whatever its axis ratio and orientation (at 1e4:1 in the data's frame the search
/// crawled along the thin ellipse's ridge: most of 4,100 searches still gained after eight
/// restarts). The likelihood of x is that of z less n log det F.
struct TProfileProblem {
  std::vector<Vec2> z;
  Vec2 origin = Vec2::Zero();
  Mat2 frame = Mat2::Identity();
  double log_det_frame = 0.0;
  double nu_min = 1.0, nu_max = 100.0;
  /// CEP's and R95's containment factors, tabled (containment_table.hpp); null, unusable or
  /// outside their domain: containment_radius itself.
  const ContainmentTable* cep = nullptr;
  const ContainmentTable* r95 = nullptr;
};

TProfileProblem t_profile_problem(const std::vector<Vec2>& x, const Vec2& origin, const Mat2& reference_scale,
                                  double nu_min, double nu_max, const ContainmentTable* cep = nullptr,
                                  const ContainmentTable* r95 = nullptr);

/// The search's coordinates of a t in the problem's frame.
TShapePoint t_shape_point(const TProfileProblem& problem, const Vec2& mu, const Mat2& scale, double nu);

/// l_p(psi) from `start`, left at the maximiser (the next call's warm start); NaN when the
/// search fails (NLopt's error codes other than a stop at rounding or at its evaluation cap).
double t_figure_profile(const TProfileProblem& problem, TFigure figure, double psi, TShapePoint& start);

/// The interval {psi : 2 (l_max - l_p(psi)) <= cutoff}, walking out from psi_hat (the fit's
/// figure, at l_max) by growing steps in log psi until W exceeds the cut-off, then TOMS 748
/// (Alefeld, Potra & Shi 1995) to 1e-4 in log psi. An end not reached within a factor e^40 of
/// psi_hat is 0 or infinity (the data bound the figure on that side not at all).
Interval t_figure_interval(const TProfileProblem& problem, TFigure figure, double psi_hat, double l_max,
                           const TShapePoint& at_max, double cutoff);

}  // namespace strewn::detail

#endif
