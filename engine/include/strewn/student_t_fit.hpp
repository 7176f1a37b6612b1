#ifndef STREWN_STUDENT_T_FIT_HPP
#define STREWN_STUDENT_T_FIT_HPP

/// \file
/// A bivariate Student-t fitted to impact coordinates by maximum likelihood, and its comparison
/// with the normal and the two-component mixture.
///
/// Model: x = mu + L z / sqrt(W / nu), z standard normal, W ~ chi^2_nu, L L^T = Sigma (the scale
/// matrix; the covariance is nu / (nu - 2) Sigma for nu > 2). Its log-density in two dimensions,
///     log f(x) = -log(2 pi) - (1/2) log det Sigma - (nu + 2)/2 log(1 + d^2 / nu),
/// d^2 = (x - mu)^T Sigma^-1 (x - mu) (Gamma((nu + 2)/2) / Gamma(nu/2) = nu/2 cancels the
/// constant; Kotz & Nadarajah, "Multivariate t distributions", 2004, ch. 1).
///
/// Location and scale for a fixed nu: EM (Liu & Rubin 1995, "ML estimation of the t distribution
/// using EM and its extensions, ECM and ECME", Statistica Sinica 5:19-39). Each impact gets the
/// weight w_i = (nu + 2) / (nu + d_i^2) (the conditional mean of W / nu given x_i), then
///     mu = sum w_i x_i / sum w_i,   Sigma = sum w_i (x_i - mu)(x_i - mu)^T / sum w_i.
/// Dividing by sum w_i instead of n (Kent, Tyler & Vardi 1994) has the same fixed point (there
/// sum w_i = n: add up w_i (nu + d_i^2) = nu + 2 and use sum w_i d_i^2 = 2 n from the scale's
/// score) and converges faster; the likelihood never falls.
///
/// nu: profile likelihood l_p(nu) = max over (mu, Sigma) at fixed nu, maximised over the bounded
/// range [nu_min, nu_max] (1 .. 100 by default) in log nu: a grid of 7 points, then golden-section
/// search to 1e-3 in log nu around the best. At the ends:
///  - nu_max (100): the data show no tails heavier than the normal's; a t with nu = 100 and the
///    normal differ by less than the data can tell, and the normal, with one parameter fewer,
///    is as good (its BIC is then the lower);
///  - nu_min (1, the Cauchy): tails at least as heavy as the Cauchy's, often a second population
///    (the mixture) or gross errors in the data; the fit is kept at 1 and says so.
///
/// Intervals: seeded parametric bootstrap (Efron & Tibshirani 1993, ch. 6 and 13): B data sets of
/// n impacts from the fitted t, each refitted the same way (nu profiled).
///
/// nu: the bootstrap test of nu = nu0 inverted (Hall 1987, "On the bootstrap and likelihood-based
/// confidence regions", Biometrika 74): nu0 is in the interval when the data's profile
/// likelihood-ratio statistic W(nu0) = 2 (l_max - l_p(nu0)) is within c(nu0), the `confidence`
/// quantile of W over refits of data drawn at nu0. W's law depends only on nu0 and n (the fit is
/// affine-equivariant), so the test has its level at every nu0 up to the bootstrap's noise, the
/// range's ends included. c is drawn at nu-hat and at the profile grid's points met while
/// walking out from nu-hat (a world only where 1 < W <= 25), linear in log nu between them. When no
/// nu up to nu_max is ruled out the interval is one-sided, "nu >= nu_ci.low"
/// (nu_ci_open_above): the data rule out tails heavier than the t's at nu_ci.low but not the
/// normal's; with nu_ci.low at nu_min too, nu is not identified from these impacts.
///
/// Scale figures psi (the circular-equivalent scale sqrt(trace(Sigma) / 2), the axes, CEP and
/// R95): the profile likelihood interval {psi : W(psi) <= c}, W(psi) = 2 (l_max - l_p(psi)),
/// l_p(psi) the largest log-likelihood of a t whose figure is psi with nu and everything else
/// maximised out (Cox & Hinkley 1974, section 9.3), so nu's uncertainty enters through the
/// likelihood itself. W is close to chi^2_1 whatever nu is; its cut-off c is the `confidence`
/// quantile of W over the refits (each refit's W at its world's own figure), from the world at
/// nu-hat and the world at nu_ci.low pooled (Hall 1987 above).
/// Measured coverage: docs/intervals.md.
///
/// Example:
/// \code
///   strewn::StudentTFit t = strewn::fit_student_t(points, aim);
///   strewn::Gaussian spread = t.spread();  // scale matrix, family student_t(nu)
/// \endcode

#include <array>
#include <cstdint>
#include <vector>

#include "strewn/export.hpp"
#include "strewn/fit.hpp"
#include "strewn/scatter_model.hpp"
#include "strewn/work.hpp"

namespace strewn {

struct StudentTFitOptions {
  double nu_min = 1.0;    ///< range of the profile search (0 < nu_min < nu_max <= 1e6)
  double nu_max = 100.0;
  double confidence = 0.95;
  int bootstrap_replicates = 400;  ///< 0: the point fit only (no intervals)
  std::uint64_t seed = 20261202;
  /// Called with the share done, 0 to 1: the refits that profile the scale figures (the bulk of
  /// the work: one world at nu-hat and one at nu's lower end), in order; 1 at the end.
  ProgressFn progress;
};

/// Where the profile likelihood's maximum lies in the range searched.
enum class NuAt { interior, lower_end, upper_end };

/// One bootstrap refit: its figures (for callers that plot the bootstrap; the intervals read lr
/// and figure_lr).
struct StudentTDraw {
  double nu = 0.0, sigma = 0.0, sigma_major = 0.0, sigma_minor = 0.0, cep = 0.0, r95 = 0.0;
  double lr = 0.0;  ///< the refit's profile likelihood-ratio statistic at the fitted nu it was drawn with
  /// The refit's profile likelihood-ratio statistic of sigma, sigma_major, sigma_minor, CEP and
  /// R95 at its world's own values (nu and the rest maximised out).
  std::array<double, 5> figure_lr{};
};

struct StudentTFit {
  std::size_t n = 0;
  double confidence = 0.95;
  Vec2 mean = Vec2::Zero();   ///< location mu (m)
  Mat2 scale = Mat2::Zero();  ///< scale matrix Sigma (m^2)
  double nu = 0.0;
  NuAt nu_at = NuAt::interior;
  double nu_min = 1.0, nu_max = 100.0;
  double log_likelihood = 0.0;
  double aic = 0.0, bic = 0.0;  ///< 6 parameters: mean 2, scale 3, nu 1
  int em_iterations = 0;        ///< EM passes over the impacts, all profile points together
  SpreadAxes axes{};            ///< of the scale matrix
  double sigma = 0.0;           ///< circular-equivalent scale sqrt(trace(Sigma) / 2)
  double cep = 0.0, r95 = 0.0;  ///< about the location
  // Parametric-bootstrap intervals at `confidence` (empty with 0 replicates).
  Interval nu_ci, sigma_ci, sigma_major_ci, sigma_minor_ci, cep_ci, r95_ci;
  /// nu_ci.high is the range's cap nu_max, reached because no nu up there is rejected: the
  /// interval is the one-sided statement "nu >= nu_ci.low" (heavier tails than the normal's are
  /// not shown by the data). Then nu_ci.high holds nu_max only as the end of the search.
  bool nu_ci_open_above = false;
  double nu_lr_cutoff = 0.0;      ///< c(nu-hat): the likelihood ratio's bootstrap quantile in the world at nu-hat
  double nu_lr_cutoff_low = 0.0;  ///< c(nu_ci.low), interpolated in log nu between the worlds drawn
  /// The cut-offs of the scale figures' intervals (sigma, sigma_major, sigma_minor, CEP, R95).
  std::array<double, 5> figure_lr_cutoff{};
  std::vector<StudentTDraw> draws;  ///< the bootstrap's refits at the fitted nu, in order (not the second world's)

  /// The fitted spread as a scatter component: the scale matrix with the student_t family.
  STREWN_API Gaussian spread() const;
};

/// Fewer impacts than this say nothing about the tails; fit_student_t refuses them.
inline constexpr std::size_t kMinStudentTImpacts = 10;

/// How the intervals are made, in one line (what `strewn fit --format json` and the Python
/// module print as "interval_method").
inline constexpr const char* kStudentTIntervalMethod =
    "profile likelihood, bootstrap-calibrated: for each scale figure the values whose profile likelihood-ratio "
    "statistic (nu profiled) is within its cut-off, drawn from seeded refits of worlds at the fitted nu and at nu's "
    "lower bound, pooled; for nu the likelihood-ratio test inverted, its cut-off drawn from worlds at each nu tested "
    "(one-sided, nu above the lower end, when the range's cap is not ruled out)";

/// The bootstrap replicates that `strewn fit` and the Python module ask for at n impacts: 400,
/// fewer above 2500 impacts (1e6 / n, at least 100) so that the work stays bounded.
STREWN_API int student_t_default_replicates(std::size_t n);

/// Throws strewn::input_error for fewer than kMinStudentTImpacts impacts, non-finite
/// coordinates, collinear impacts, a likelihood without a maximum (the scale collapsing onto a
/// line through some impacts) or a bad option.
STREWN_API StudentTFit fit_student_t(const std::vector<Vec2>& points, const StudentTFitOptions& options = {});

/// Location and scale by EM at a fixed nu (see above), from the sample mean and covariance;
/// returns {mu, Sigma}. For tests and for callers that know nu.
STREWN_API std::pair<Vec2, Mat2> fit_student_t_fixed_nu(const std::vector<Vec2>& points, double nu);

/// The scale figures of a t fit, as its intervals name them.
enum class TScaleFigure { sigma, sigma_major, sigma_minor, cep, r95 };

/// The profile log-likelihood of one scale figure, l_p(psi): the largest log-likelihood of a t
/// whose figure equals psi, the location, the scale's shape and nu (within options' range)
/// maximised out. The figure's interval in fit_student_t is {psi : 2 (l_max - l_p(psi)) <= c},
/// c in StudentTFit::figure_lr_cutoff; with this a caller can draw the profile or check the ends.
/// Throws strewn::input_error as fit_student_t does, and for psi not a positive number.
STREWN_API double student_t_profile_log_likelihood(const std::vector<Vec2>& points, TScaleFigure figure, double psi,
                                                   const StudentTFitOptions& options = {});

/// The t's log-likelihood of the points, sum of log f(x_i) above.
STREWN_API double student_t_log_likelihood(const std::vector<Vec2>& points, const Vec2& mean, const Mat2& scale,
                                           double nu);

/// The normal, the two-component mixture and the t side by side: -2 log L plus 2 k (AIC, Akaike
/// 1974) and plus k ln n (BIC, Schwarz 1978), k = 5, 7 and 6 parameters.
struct FitCandidate {
  enum class Model { normal, mixture, student_t };
  Model model = Model::normal;
  double log_likelihood = 0.0;
  int parameters = 0;
  double aic = 0.0, bic = 0.0;
  /// The mixture takes part only as the fit offers it (a core with a wider, minor companion
  /// that beats the normal's BIC); the normal and the t always.
  bool offered = true;
};

struct FitComparison {
  std::vector<FitCandidate> candidates;  ///< normal, mixture, student_t
  /// The candidate each criterion picks among those offered (index into candidates).
  std::size_t by_aic = 0, by_bic = 0;
  /// The one recommended: BIC's choice. BIC is consistent (it picks the true model as n grows)
  /// and asks ln n per parameter, so on normal data it picks the normal unless 2 (l_t - l_n)
  /// exceeds ln n (at n = 100, 4.6); AIC's 2 per parameter picks the t or the mixture on normal
  /// data more often, and a spread with heavier tails than needed overstates far risks.
  std::size_t recommended = 0;
};

STREWN_API FitComparison compare_fits(const NormalFit& normal, const MixtureFit& mixture, const StudentTFit& t);

}  // namespace strewn

#endif
