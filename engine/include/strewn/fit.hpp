#ifndef STREWN_FIT_HPP
#define STREWN_FIT_HPP

/// \file
/// Calibrating a spread from field data, with the uncertainty the data leave.
///
/// From impact coordinates (fit_normal), for n points x_i with mean m and covariance
/// S = sum (x_i - m)(x_i - m)^T / (n - 1):
/// - the bias m - aim, with Hotelling's T^2 = n (m - aim)^T S^-1 (m - aim) and its test of "no
///   bias": (n - 2) / (2 (n - 1)) T^2 ~ F(2, n - 2) (Hotelling 1931; Anderson, An Introduction to
///   Multivariate Statistical Analysis, 3rd ed., section 5.2); the confidence region for the mean
///   is the ellipse (mu - m)^T S^-1 (mu - m) <= 2 (n - 1) / (n (n - 2)) F_{2, n-2}(confidence);
/// - the circular-equivalent sigma^2 = trace(S) / 2 = (l1 + l2) / 2 (l1, l2 the eigenvalues of
///   S) with the interval from nu s^2 / sigma^2 ~ chi^2_nu, nu = (n - 1) (l1 + l2)^2 / (l1^2 + l2^2)
///   (Satterthwaite 1946: (n - 1) trace(S) is l1 chi^2_{n-1} + l2 chi^2_{n-1} in distribution,
///   matched in mean and variance; nu = 2 (n - 1) and exact for a circular spread, down to n - 1
///   for a very elongated one, approximate in between); CEP and R95 scale with it, their
///   intervals taken at the fitted axis ratio;
/// - sigma_major and sigma_minor with percentile intervals from a seeded parametric bootstrap
///   (the eigenvalues of S have no simple exact interval); (n - 1) S of a normal sample is
///   Wishart(n - 1, Sigma), drawn directly by Bartlett's decomposition, so the bootstrap's work
///   does not grow with n;
/// - squared Mahalanobis distances d_i^2, compared with chi^2 (2 d.o.f.) by the Kolmogorov-
///   Smirnov statistic (asymptotic p-value with Stephens' 1970 small-sample factor; conservative
///   because the parameters were estimated), and outliers by the exact distribution of a distance
///   taken with the point included in the mean and covariance: n d^2 / (n - 1)^2 ~
///   Beta(1, (n - 3) / 2) (Wilks 1963; Gnanadesikan & Kettenring 1972), whose tail is
///   (1 - n d^2 / (n - 1)^2)^((n - 3) / 2). The farthest point is flagged when that tail is
///   below 0.008 / n (Bonferroni over the n points), then removed and the rest tested again, up
///   to n / 3 times (at most 10) at 0.008 / that each (successive deletion, Rosner 1983), so that two or
///   three gross errors together do not mask each other; the outliers are the points removed up
///   to the last step that fired. Measured: 0.8-1.0% of normal data sets get any flag.
///   A chi^2_2 cut-off cannot fire for n <= 16, because d^2 <= (n - 1)^2 / n always; this one
///   can for any n >= 4. Power against one impact from a normal displaced by 6 sigma: 50%, 76%
///   and 89% at n = 12, 20 and 40 (simulated, docs/intervals.md);
/// - a "design" spread: the fitted covariance scaled up by the one-sided upper confidence bound
///   of the circular-equivalent sigma, nu s^2 / chi^2_nu(1 - confidence) (a true one-sided bound
///   at the confidence level, not the upper end of the two-sided interval).

/// From counts (fit_counts): k of n impacts within radius a of the aim, a centred circular spread
/// sigma = a / sqrt(-2 ln(1 - k / n)), with the Clopper-Pearson interval on k / n (Clopper &
/// Pearson 1934) mapped through that monotone relation, and the one-sided upper bound on sigma
/// from the one-sided lower Clopper-Pearson bound on k / n. With k = n the data bound sigma from
/// above only (no point estimate: the maximum-likelihood sigma is 0) and that bound is what
/// `fit` writes; with k = 0 they bound it from below only, and `fit` refuses.
///
/// From censored data (fit_censored): radii r_i of the impacts measured, and m impacts known only
/// to lie beyond radius a; centred circular spread. The likelihood is
/// prod (r_i / s^2) exp(-r_i^2 / (2 s^2)) * exp(-a^2 / (2 s^2))^m, maximised at
/// s^2 = (sum r_i^2 + m a^2) / (2 n_measured); the interval is the likelihood-ratio one
/// (2 (l_max - l(s)) <= chi^2_1(confidence), Wilks 1938), asymptotic: its coverage is below the
/// nominal level for few measured impacts (measured in docs/intervals.md). The one-sided upper
/// bound takes the signed root: 2 (l_max - l(s)) <= chi^2_1(2 confidence - 1) on the upper side.
///
/// fit_two_component: a core normal and a wider circular one about the same mean (wild impacts),
/// by expectation-maximisation (Dempster, Laird & Rubin 1977) in its ECM form, offered when its
/// BIC beats the single normal's.
///
/// Every function throws strewn::input_error when the data cannot support the fit.
/// (Citations are given from memory; the tests check the numbers against scipy.)

#include <cstdint>
#include <utility>
#include <vector>

#include "strewn/export.hpp"
#include "strewn/scatter_model.hpp"

namespace strewn {

struct Interval {
  double low = 0.0;
  double high = 0.0;
};

struct FitOptions {
  double confidence = 0.95;
  int bootstrap_replicates = 2000;
  std::uint64_t seed = 20261202;
};

struct NormalFit {
  std::size_t n = 0;
  double confidence = 0.95;
  Vec2 aim = Vec2::Zero();
  Vec2 mean = Vec2::Zero();
  Mat2 covariance = Mat2::Zero();
  SpreadAxes axes{};
  Interval sigma_major_ci, sigma_minor_ci;
  // Bias and Hotelling's test.
  double t2 = 0.0;
  double no_bias_p_value = 1.0;
  Mat2 mean_region = Mat2::Zero();  ///< mu inside when (mu - mean)^T mean_region (mu - mean) <= 1
  SpreadAxes mean_region_axes{};    ///< that ellipse's semi-axes (m) and major-axis angle (degrees)
  // Circular-equivalent scale and what follows from it.
  double sigma = 0.0;
  Interval sigma_ci;
  double sigma_dof = 0.0;       ///< Satterthwaite's nu (2 (n - 1) for a circular spread)
  double sigma_upper = 0.0;     ///< one-sided upper confidence bound on sigma
  double cep = 0.0, r95 = 0.0;  ///< about the mean impact point
  Interval cep_ci, r95_ci;
  double design_factor = 1.0;   ///< sigma_upper / sigma
  // Goodness of fit.
  std::vector<double> mahalanobis2;
  double ks_statistic = 0.0;
  double ks_p_value = 1.0;
  /// Anderson-Darling tests of normality of the impacts projected on the fitted spread's major
  /// and minor axes (mean and variance estimated; D'Agostino & Stephens 1986): A^2 on each, and
  /// one p-value for both, min(1, 2 min(p_major, p_minor)) (Bonferroni). They see what the KS
  /// check of d^2 can miss: two clusters 12 sd apart at n = 30 (KS p 0.64), a ring.
  double ad_major = 0.0, ad_minor = 0.0;
  double axes_p_value = 1.0;
  double outlier_d2 = 0.0;             ///< d^2 beyond which a point is flagged (infinite for n = 3)
  std::vector<std::size_t> outliers;  ///< indices into the input points

  Gaussian gaussian() const { return Gaussian::from_covariance(mean, covariance); }
  Gaussian design() const { return gaussian().scaled(design_factor); }
  /// Either check (KS of d^2, or the axes' Anderson-Darling) rejects the normal at the 1% level:
  /// the fitted spread may not describe these impacts. On 1.0-1.1% of normal data sets at n = 10,
  /// 20 and 50 (seeded, 3000 each: fit_test "[goodness]"; the KS check is conservative).
  bool normal_rejected() const { return ks_p_value < 0.01 || axes_p_value < 0.01; }
};

STREWN_API NormalFit fit_normal(const std::vector<Vec2>& points, const Vec2& aim, const FitOptions& options = {});

/// The sample mean and the (n - 1)-divisor sample covariance of n >= 2 points, summed about the
/// first point (so that national-grid coordinates lose nothing to the plain sum).
STREWN_API std::pair<Vec2, Mat2> sample_moments(const std::vector<Vec2>& points);

/// Satterthwaite's degrees of freedom for trace(S) / 2 of a sample covariance S of n points:
/// (n - 1) trace(S)^2 / trace(S^2).
STREWN_API double satterthwaite_dof(const Mat2& covariance, std::size_t n);

/// The two-sided interval for the circular-equivalent sigma sqrt(trace(S) / 2) at `confidence`,
/// from nu s^2 / sigma^2 ~ chi^2_nu with nu = satterthwaite_dof(covariance, n).
STREWN_API Interval circular_sigma_interval(const Mat2& covariance, std::size_t n, double confidence);

/// The one-sided upper bound on the same sigma at `confidence`.
STREWN_API double circular_sigma_upper_bound(const Mat2& covariance, std::size_t n, double confidence);

/// Squared Mahalanobis distance (mean and covariance of the same n points, the point included)
/// beyond which a point is an outlier at family-wise level `level`: the Beta(1, (n - 3) / 2)
/// quantile at 1 - level / n, times (n - 1)^2 / n. Infinite for n = 3 (every d^2 is 4 / 3).
STREWN_API double outlier_cutoff_d2(std::size_t n, double level = 0.01);

/// The level of fit_normal's outlier search: the first step's Bonferroni level over the
/// impacts; each later step takes kOutlierLevel / outlier_steps(n).
constexpr double kOutlierLevel = 0.008;
/// How many impacts fit_normal's search may remove one by one: n / 3, at least 1, at most 10.
STREWN_API std::size_t outlier_steps(std::size_t n);

struct CountFit {
  std::uint64_t k = 0, n = 0;
  double radius = 0.0;
  double confidence = 0.95;
  double fraction = 0.0;
  Interval fraction_ci;
  double sigma = 0.0;  ///< infinite when k = 0, zero when k = n
  Interval sigma_ci;
  double sigma_upper = 0.0;  ///< one-sided upper bound on sigma (infinite when k = 0)
  double sigma_lower = 0.0;  ///< one-sided lower bound on sigma (zero when k = n)
};

/// The sigma of a centred circular normal with `fraction` of its impacts within `radius`:
/// P(r <= a) = 1 - exp(-a^2 / (2 sigma^2)) solved for sigma (Rayleigh); infinite for a fraction
/// of 0, zero for 1.
STREWN_API double sigma_for_fraction(double radius, double fraction);

STREWN_API CountFit fit_counts(std::uint64_t k, std::uint64_t n, double radius, double confidence = 0.95);

struct CensoredFit {
  std::size_t measured = 0;
  std::uint64_t outside = 0;
  double radius = 0.0;
  double confidence = 0.95;
  double sigma = 0.0;
  /// Exact (CensoredConfidence below, 20000 seeded reference samples, fewer for n above 200):
  /// the central interval and the one-sided upper bound at `confidence`.
  Interval sigma_ci;
  double sigma_upper = 0.0;
  /// The likelihood-ratio interval (Wilks 1938) and the signed-root upper bound: asymptotic,
  /// 92.7% two-sided with about 6 measured of 200 (docs/intervals.md); kept for comparison.
  Interval lr_ci;
  double lr_upper = 0.0;
  /// How sigma_ci and sigma_upper were found, for outputs.
  static constexpr const char* method = "exact: the test on the likelihood estimate inverted over 20000 seeded reference samples";
};

/// `reference`: the reference samples of the exact bounds (0: about 4e6 / n, 2000 to 20000).
STREWN_API CensoredFit fit_censored(const std::vector<double>& radii, std::uint64_t outside, double radius,
                                    double confidence = 0.95, int reference = 0);

/// The confidence distribution of sigma from a censored record (a centred circular normal; the
/// distances of `measured` impacts within `radius` known, `outside` more beyond it), by inverting
/// the exact test on the maximum-likelihood estimate: H(sigma) = P_sigma(theta* > theta_obs | at
/// least one impact measured), theta = sigma^2 and theta_obs = sigma_hat^2 (Fisher 1930; Schweder
/// & Hjort 2016, ch. 3). H^-1(u) is an exact one-sided confidence bound at level u: under sigma_0
/// it lies above sigma_0 with probability u, for every sample size and censoring. The
/// probability is taken over `reference` simulated samples of n standard exponentials (r^2 =
/// 2 sigma^2 E), seeded, so the bounds are exact up to that simulation (a level's standard
/// error sqrt(u (1 - u) / reference)). For each sample the estimate rises with sigma, so it meets
/// theta_obs at one sigma found in closed form; H is counted over those crossings in O(log).
class STREWN_API CensoredConfidence {
 public:
  CensoredConfidence(std::uint64_t measured, std::uint64_t outside, double radius, double sigma_hat,
                     std::uint64_t seed = 1, int reference = 20000);
  /// H(sigma): the confidence that the true sigma is below `sigma`.
  double level(double sigma) const;
  /// The sigma at which H reaches u in (0, 1): the one-sided upper bound at level u (a lower
  /// bound at level 1 - u). Infinite where H never reaches u: with one measured impact at
  /// radius r, H levels off at 1 - r^2 / a^2 (one measured impact rules out no sigma above, at
  /// that confidence); and where H is still below u when fewer than 100 reference samples have
  /// an impact measured, so that H cannot be told there (no bound is claimed).
  double quantile(double u) const;

 private:
  std::vector<double> crossing_, crossing_end_, end_;  // sorted
  double sigma_hat_ = 0.0;
  double h_infinity_ = 1.0;  // H's limit at large sigma
};

struct MixtureFit {
  double wide_weight = 0.0;
  Vec2 core_mean = Vec2::Zero(), wide_mean = Vec2::Zero();
  Mat2 core_covariance = Mat2::Zero(), wide_covariance = Mat2::Zero();
  double log_likelihood = 0.0, single_log_likelihood = 0.0;
  double bic = 0.0, single_bic = 0.0;  ///< -2 log L + parameters * ln n; lower is better
  bool preferred = false;
  int iterations = 0;
  std::size_t point_evaluations = 0;  ///< densities evaluated (points x passes): the fit's work

  ScatterModel model() const;
};

STREWN_API MixtureFit fit_two_component(const std::vector<Vec2>& points, const NormalFit& single);

/// Radius about `centre` holding `fraction` of the model's impacts (CEP for 1/2, R95 for 0.95),
/// closed form for a circular single normal centred there, a one-dimensional integral for an
/// elliptical one centred there (to 1e-13 relative), else by root finding on exact disk
/// probabilities to 1e-10 relative.
STREWN_API double containment_radius(const ScatterModel& model, const Vec2& centre, double fraction);

}  // namespace strewn

#endif
