#ifndef STREWN_WORK_HPP
#define STREWN_WORK_HPP

/// \file
/// Bounded work: every long computation (a risk map, Monte Carlo samples, bootstrap replicates)
/// states what it will cost before it starts, is refused above a ceiling unless the caller forces
/// it, and reports its progress while it runs; work shared among threads stops at the first
/// failure and that failure reaches the caller as an ordinary exception.
///
/// The cost is counted in units: one component integrated over one footprint edge in one map
/// cell (about a microsecond on one core), one Monte Carlo sample of one component in one zone
/// (about 0.1 us), one bootstrap replicate of one component in one zone. Each ceiling below is a
/// few minutes of work on one core, not a memory limit.
///
/// Example:
/// \code
///   strewn::WorkEstimate w{"map of 4000 x 3000 cells x 31 components", 4000.0 * 3000 * 31, 1e-6};
///   strewn::check_work(w, strewn::kMapWorkCeiling, force, "ask for fewer cells, or force the request");
///   strewn::parallel_for(rows, threads, [&](std::size_t j) { fill_row(j); }, progress);
/// \endcode

#include <cstddef>
#include <cstdint>
#include <functional>
#include <string>

#include "strewn/error.hpp"
#include "strewn/export.hpp"

namespace strewn {

/// What a computation will cost, before it starts.
struct WorkEstimate {
  std::string what;                 ///< e.g. "map of 200 x 150 cells x 3 components"
  double units = 0.0;               ///< work units (component-integrations or samples)
  double seconds_per_unit = 1e-6;   ///< rough cost of one unit on one core
  double seconds(int threads = 1) const { return units * seconds_per_unit / (threads > 0 ? threads : 1); }
};

/// Ceilings in work units; above them a computation is refused unless forced (a request's `force`).
/// cells x components x footprint edges of a risk map (a few minutes on one core):
constexpr double kMapWorkCeiling = 2e8;
/// Monte Carlo samples x components x zones of one assessment:
constexpr double kSampleWorkCeiling = 2e9;
/// bootstrap replicates x components x zones of an uncertainty run:
constexpr double kReplicateWorkCeiling = 2e7;

/// Work refused above its ceiling: an input_error whose what() is summary() followed by "; " and
/// the caller's `how_to_proceed`. A caller that knows better words for the way out (a command's
/// options) catches this type and words its own message from summary().
class STREWN_API work_error : public input_error {
 public:
  work_error(const WorkEstimate& w, double ceiling, const std::string& how_to_proceed);
  /// "WHAT: about N units of work (roughly T on one core), above the ceiling of C"
  const std::string& summary() const noexcept { return summary_; }
  double units() const noexcept { return units_; }
  double ceiling() const noexcept { return ceiling_; }

 private:
  std::string summary_;
  double units_, ceiling_;
};

/// The work of a Monte Carlo run: `samples` samples of each of `components` components counted
/// in `regions` regions whose boundaries have `edges` edges in all. A sample inside a region's
/// box costs a winding number over its edges, so a region counts 1 + edges / 8 units a sample
/// (a rectangle's sample about 0.15 us): a 100,000-vertex polygon at a million samples is
/// about 1.3e10 units, above kSampleWorkCeiling, where counting regions alone let it run for
/// hours without a word.
STREWN_API WorkEstimate monte_carlo_work(std::uint64_t samples, std::size_t components, std::size_t regions,
                                         std::size_t edges);
/// Throws strewn::work_error when `w.units > ceiling` and not `force`: the message states the
/// estimate, the ceiling and `how_to_proceed` (e.g. "ask for fewer cells, or force the request").
STREWN_API void check_work(const WorkEstimate& w, double ceiling, bool force, const std::string& how_to_proceed);

/// Called with the share of the work done, in [0, 1], now and then and from one thread only.
using ProgressFn = std::function<void(double)>;

/// Called once, early, with what a search whose length is known only by its count of steps will
/// cost: the steps it usually takes (units) times the measured cost of its first few steps
/// (seconds_per_unit), so a tool can say how long it will take before most of it runs.
using EstimateFn = std::function<void(const WorkEstimate&)>;

/// Runs body(0) ... body(count - 1) on `threads` threads (0: all cores; the calling thread works
/// too and is the one that calls `progress`). Items are handed out one at a time. The first
/// exception thrown by any body stops the other threads (they finish the item in hand and take
/// no more) and is rethrown on the calling thread after every thread has joined; later
/// exceptions are dropped. Never calls std::terminate for a body's exception.
STREWN_API void parallel_for(std::size_t count, int threads, const std::function<void(std::size_t)>& body,
                             const ProgressFn& progress = {});

/// A count read from a file or the command line: a whole number in [least, most] (most at most
/// 2^53, so that every value is exact in a double), else
/// strewn::input_error "NAME must be a whole number from LEAST to MOST (got TEXT)". Refuses
/// negatives, fractions, exponents beyond the range, NaN and infinity instead of wrapping.
STREWN_API std::uint64_t checked_count(double value, std::uint64_t least, std::uint64_t most, const std::string& name);

}  // namespace strewn

#endif
