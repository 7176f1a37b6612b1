#ifndef STREWN_UNCERTAINTY_HPP
#define STREWN_UNCERTAINTY_HPP

// The uncertainty of an assessment (what the command `strewn assess` reports when asked for it): how far the risk could move because the spreads were fitted from a
// finite sample. Each replicate draws every fitted source's parameters and reassesses every zone;
// the interval is the central `confidence` share of the replicates and the one-sided upper bound
// their `confidence` quantile (quantiles at p (R + 1), Hyndman & Fan 1996 type 6, so that with R
// replicates the expected tail share is p and not larger). How a source's parameters are drawn:
//
//  - impacts, one normal (the core; wild components stay as written): generalised pivotal
//    quantities (Weerahandi 1993; Krishnamoorthy & Mathew, Statistical Tolerance Regions, 2009,
//    section 10.1). With m, S the recorded mean and covariance of n impacts, Sz the covariance of
//    n fresh standard normal points and z a standard normal pair, Sigma* = L Sz^-1 L^T and
//    mu* = m - chol(Sigma*) z / sqrt(n) (L the Cholesky factor of S): the data fix the
//    parameters, rather than the parameters the data (the percentile bootstrap used before
//    under-covered on the unsafe side: 82-94% two-sided at n = 12 and 40). The draws do not
//    depend on the frame; for a half-plane zone the interval is the exact noncentral-t one with
//    n - 2 degrees of freedom in place of n - 1 (conservative). For other zones read at the
//    nominal levels they under-covered on the unsafe side (a disk about the mean: 85% for the
//    one-sided bound at n = 12), so the levels at which the draws are read are calibrated by a
//    double bootstrap (Beran 1987; Loh 1987; Hall & Martin 1988; see assess_uncertainty in
//    uncertainty.cpp): inner worlds, each with a truth drawn from the pivotal distribution and
//    n impacts drawn from it and refitted, each given its own pivotal draws, show at which
//    levels the draws cover their world's truth.
//  - impacts fitted as a mixture (a core and one wide circular component about the same mean, as
//    the mixture fit of strewn/fit.hpp writes it): parametric bootstrap of the whole mixture (Efron &
//    Tibshirani 1993, ch. 6): n impacts drawn from the mixture, refitted (the single normal, then
//    the two-component EM fit, kept when it is preferred as `fit` does), weights and every
//    component taken from the refit; the levels calibrated by the same double bootstrap (the
//    mixture as written is each inner world's truth). Bias-corrected percentiles (Efron 1981)
//    read at the nominal levels left the one-sided bound at 89.5-91.1% at n = 100.
//  - impacts fitted as a Student-t (one component of the student_t family, as `fit --student-t`
//    writes it): parametric bootstrap of the t as written, the same way: n impacts drawn from it
//    (a normal over sqrt(chi^2_nu / nu)), refitted (location, scale and nu by profile likelihood,
//    strewn/student_t_fit.hpp), the levels calibrated by the same double bootstrap (the t as
//    written is each inner world's truth). Every replicate refits nu: the interval carries the
//    tails' uncertainty, not only the scale's.
//  - counts (k of n within a radius): Clopper-Pearson draws of the share within the radius
//    (Clopper & Pearson 1934): below their median the quantiles of Beta(k, n - k + 1), above it
//    those of Beta(k + 1, n - k), so that each percentile bound is the exact one-sided bound on
//    the share (at least the nominal coverage for a zone whose p is monotone in sigma);
//  - censored radii: draws from the exact confidence distribution of sigma (CensoredConfidence
//    in fit.hpp: the test on the likelihood estimate inverted over seeded reference samples),
//    so each percentile is the one-sided bound at its level (for a zone whose p is monotone in
//    sigma). The parametric bootstrap used before covered 90.9% two-sided at n = 12.
// With one fitted source of these two kinds (sigma its only parameter), an output not monotone
// in sigma over the draws (a zone where p peaks as sigma varies) gets its range over sigma's
// central interval instead: conservative, and it covers at the peak, where percentiles cannot.
// The calibration runs when every fitted source is an impacts record (one normal or a mixture).
// Otherwise Clopper-Pearson and censored draws are read as they are (exact), and a scenario that
// mixes them with impacts records gets plain percentiles and says so.
// Seeded: the same file gives the same interval.

#include <cstdint>
#include <string>
#include <vector>

#include "strewn/assess.hpp"
#include "strewn/export.hpp"
#include "strewn/fit.hpp"
#include "strewn/status.hpp"
#include "strewn/work.hpp"

namespace strewn {

struct ZoneUncertainty {
  std::vector<Interval> p_event;  // per source, in scenario order
  Interval p_session, p_year;     // all sources
  Interval limited;               // the value compared with the limit
  // One-sided upper confidence bounds at `confidence` (the figure a safety decision needs):
  // the true value lies below it with that confidence.
  std::vector<double> p_event_upper;
  double p_session_upper = 0.0, p_year_upper = 0.0, limited_upper = 0.0;
  // True where the level of that upper bound lies beyond the replicates (a calibrated level
  // above R / (R + 1)): the figure is then the largest replicate, and the bound the level asks
  // for is at least that (more replicates raise it). No limit is shown to hold on such a bound.
  std::vector<bool> p_event_upper_at_least;
  bool p_session_upper_at_least = false, p_year_upper_at_least = false, limited_upper_at_least = false;
};

/// How a fitted source's parameters are drawn (the list above).
enum class DrawMethod { pivotal, mixture_bootstrap, clopper_pearson, censored_inversion, student_t_bootstrap };

struct Uncertainty {
  double confidence = 0.95;
  int replicates = 0;
  std::vector<std::string> fitted_sources;
  std::vector<std::string> source_methods;  // per fitted source: how its parameters are drawn
  std::vector<DrawMethod> source_draws;     // the same as values
  std::string method;                       // one line for the output
  std::vector<ZoneUncertainty> zones;       // in scenario order
  /// budget_exhausted when some bound is the extreme replicate (more replicates would move it;
  /// `method` says so), else converged.
  Status status = Status::converged;
};

// `progress` (may be empty) is called after every replicate with the share done.
// `calibration` (impacts records only; 0 turns it off): the double bootstrap that sets the levels
// at which the draws are read, `calibration` data sets x min(calibration, 100) draws each; by
// default calibration_for(replicates).
STREWN_API Uncertainty assess_uncertainty(const Site& s, int replicates, double confidence, std::uint64_t seed,
                               const ProgressFn& progress = {}, int calibration = -1);

/// The double bootstrap's number of worlds for `replicates` outer draws: max(100, replicates /
/// 10), so that more replicates steady the calibrated levels, which otherwise move with the
/// seed: the level is a quantile of the worlds' shares, its standard error about
/// sqrt(c (1 - c) / worlds), 0.022 for a 95% bound at 100 (at n = 12 the one-sided bound on a
/// half-plane ranged 0.34-0.53 over 30 seeds at 1000 replicates).
STREWN_API int calibration_for(int replicates);

/// The extra assessments of every zone the calibration of assess_uncertainty makes for `s`
/// (calibration x min(calibration, 100) when every fitted source is an impacts record, else 0).
STREWN_API double calibration_work(const Site& s, int calibration);

/// Whether a fitted source is the two-component mixture the mixture fit writes: an impacts
/// record, a core and exactly one wild component, circular, about the core's mean.
STREWN_API bool fitted_as_mixture(const Source& src);

/// Whether a fitted source is a Student-t fit (strewn/student_t_fit.hpp): an impacts record and
/// one component of the student_t family.
STREWN_API bool fitted_as_student_t(const Source& src);

}  // namespace strewn

#endif
