#ifndef STREWN_FIT_CONTAINMENT_TABLE_HPP
#define STREWN_FIT_CONTAINMENT_TABLE_HPP

// The containment factor of a centred elliptical t, k(rho, nu) = R_p / a: the radius holding a
// share p of a t with scale semi-axes a >= b = rho a and nu degrees of freedom, over a. The t
// fit's profile search (t_figure_profile.hpp) needs CEP and R95 at thousands of shapes and nu
// per fit, where one containment_radius costs 3 us at 1.5:1, 20-35 us at 10:1 and 0.2-0.8 ms
// beyond 100:1. log k is analytic in (log rho, log nu) (the share is an integral of a t's
// radial distribution over an ellipse), so a two-dimensional Chebyshev interpolant converges
// geometrically (Trefethen, "Approximation Theory and Approximation Practice", 2013, ch. 8).
// The table is built on first-kind Chebyshev nodes over log rho in [log_rho_min, 0] and log nu
// in the fit's range, then checked against containment_radius at points between the nodes; it
// is used only if every check agrees to kTolerance in log k (a relative 1e-9 in the figure,
// which moves the likelihood-ratio statistic by far less than its cut-off's bootstrap noise).
#include <vector>

namespace strewn::detail {

class ContainmentTable {
 public:
  static constexpr double kTolerance = 1e-9;

  ContainmentTable() = default;
  ContainmentTable(double fraction, double log_rho_min, double log_nu_min, double log_nu_max);

  /// Whether the checks passed (else every lookup is NaN and callers compute the radius).
  bool usable() const { return usable_; }
  /// log k at (log rho, log nu) inside the table's domain; NaN outside it or when not usable.
  double log_factor(double log_rho, double log_nu) const;
  /// The largest difference in log k found by the checks.
  double checked_error() const { return checked_error_; }

 private:
  double evaluate(double u, double v) const;  // on [-1, 1]^2, no checks
  int n_rho_ = 0, n_nu_ = 0;
  double rho_lo_ = 0.0, nu_lo_ = 0.0, nu_hi_ = 0.0;
  std::vector<double> coefficients_;  // n_rho x n_nu, row k holds T_k(u) T_l(v)
  bool usable_ = false;
  double checked_error_ = 0.0;
};

}  // namespace strewn::detail

#endif
