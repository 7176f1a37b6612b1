#ifndef STREWN_CLI_UNCERTAINTY_HPP
#define STREWN_CLI_UNCERTAINTY_HPP

// `assess --uncertainty`: how far the risk could move because the spreads were fitted from a
// finite sample. A parametric bootstrap (Efron & Tibshirani, An Introduction to the Bootstrap,
// 1993, ch. 6): each replicate draws a new data set of the recorded size from the fitted model,
// refits it the way `strewn fit` did, and reassesses every zone; the interval is the central
// `confidence` share of the replicates (percentile interval). Sources without a fit record and
// every wild component stay as they are. Seeded: the same file gives the same interval.

#include <cstdint>
#include <vector>

#include "assessment.hpp"
#include "strewn/fit.hpp"
#include "strewn/work.hpp"

namespace strewn::cli {

struct ZoneUncertainty {
  std::vector<Interval> p_event;  // per source, in scenario order
  Interval p_session, p_year;     // all sources
  Interval limited;               // the value compared with the limit
};

struct Uncertainty {
  double confidence = 0.95;
  int replicates = 0;
  std::vector<std::string> fitted_sources;
  std::vector<ZoneUncertainty> zones;  // in scenario order
};

// `progress` (may be empty) is called after every replicate with the share done.
Uncertainty assess_uncertainty(const Scenario& s, int replicates, double confidence, std::uint64_t seed,
                               const ProgressFn& progress = {});

}  // namespace strewn::cli

#endif
