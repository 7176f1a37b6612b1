#ifndef STREWN_ESTIMATE_HPP
#define STREWN_ESTIMATE_HPP

/// \file
/// The result of every probability computation.

#include <cstdint>
#include <string>

#include "strewn/export.hpp"
#include "strewn/status.hpp"

namespace strewn {

enum class Method { exact, cubature, monte_carlo };

STREWN_API const char* to_string(Method method) noexcept;
/// Parses "exact", "cubature" or "monte_carlo"; throws strewn::input_error otherwise.
STREWN_API Method method_from_string(const std::string& name);

/// P(impact in region) = p, its complement q = 1 - p, each computed so that a tiny value keeps
/// its relative accuracy, and a bound abs_err on the absolute error of both before their final
/// rounding to double. That rounding matters only for the larger of the two, near 1, where a
/// double is 1.1e-16 apart from the next: p_abs_err() and q_abs_err() add it (a p of 3e-14 with a
/// bound of 3e-27 has q = 1 - 3e-14 only to 5.6e-17).
/// For monte_carlo, [interval_low, interval_high] is the Clopper-Pearson interval at the
/// requested confidence and abs_err the larger distance from p to its ends.
struct Estimate {
  double p = 0.0;
  double q = 1.0;
  double abs_err = 0.0;
  Method method = Method::exact;
  std::uint64_t evaluations = 0;  ///< integrand or special-function evaluations, or samples
  bool converged = true;          ///< false when the requested tolerance was not reached
  std::string message;            ///< why it did not converge, or notes; empty when all is well
  /// How it ended: converged; budget_exhausted when the method stopped short of its own
  /// tolerance (recursion or evaluation limit); tolerance_not_met when the method finished but
  /// its bound exceeds the request. Decide on this, never on `message`.
  Status status = Status::converged;
  double interval_low = 0.0;
  double interval_high = 1.0;

  /// Bounds on the errors of p and q as stored: abs_err plus, for a value of 1/4 or more, half
  /// its unit in the last place (2^-53 covers every value below 1 and 1 itself).
  double p_abs_err() const { return abs_err + (p >= 0.25 ? 0x1p-53 : 0.0); }
  double q_abs_err() const { return abs_err + (q >= 0.25 ? 0x1p-53 : 0.0); }
};

}  // namespace strewn

#endif
