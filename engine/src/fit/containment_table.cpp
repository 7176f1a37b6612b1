// The Chebyshev table of the elliptical t's containment factor (containment_table.hpp).
#include "containment_table.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "strewn/constants.hpp"
#include "strewn/fit.hpp"
#include "strewn/scatter_model.hpp"

namespace strewn::detail {
namespace {

double log_k(double fraction, double log_rho, double log_nu) {
  const double rho = std::min(1.0, std::exp(log_rho));
  const Gaussian g = Gaussian::from_axes(Vec2::Zero(), 1.0, rho, 0.0).with_family(ScatterFamily::student_t(std::exp(log_nu)));
  return std::log(containment_radius(g, Vec2::Zero(), fraction));
}

// Sum of c_k T_k(x), k < n (Clenshaw's recurrence).
double clenshaw(const double* c, int n, double x) {
  double b1 = 0.0, b2 = 0.0;
  for (int k = n - 1; k >= 1; --k) {
    const double b = 2.0 * x * b1 - b2 + c[k];
    b2 = b1;
    b1 = b;
  }
  return x * b1 - b2 + c[0];
}

}  // namespace

ContainmentTable::ContainmentTable(double fraction, double log_rho_min, double log_nu_min, double log_nu_max)
    : rho_lo_(log_rho_min), nu_lo_(log_nu_min), nu_hi_(log_nu_max) {
  // Degrees: log k turns over about 3 units of log rho next to the circle and is flat beyond
  // (the marginal t's quantile plus O(rho^2)); in log nu it is smooth over the whole range.
  // Doubled once if the checks fail. (Measured: 38 x 20 nodes over log rho in [-3.7, 0] and nu
  // in [1, 100] left 1.5e-9 for CEP and 1e-8 for R95, 76 x 40 left 6e-14; 96 x 26 over
  // [-12.1, 0] 7e-11. In rho^2 instead of log rho the factor converges slowly: 32 x 26 nodes
  // over [0, 1] left 4.5e-4.)
  for (const int scale : {1, 2}) {
    n_rho_ = std::min(96, scale * (24 + static_cast<int>(6.0 * (-log_rho_min))));
    n_nu_ = scale * 26;
    std::vector<double> u(n_rho_), v(n_nu_), values(static_cast<std::size_t>(n_rho_) * n_nu_);
    for (int j = 0; j < n_rho_; ++j) u[j] = std::cos(kPi * (j + 0.5) / n_rho_);
    for (int i = 0; i < n_nu_; ++i) v[i] = std::cos(kPi * (i + 0.5) / n_nu_);
    for (int j = 0; j < n_rho_; ++j)
      for (int i = 0; i < n_nu_; ++i)
        values[j * n_nu_ + i] = log_k(fraction, rho_lo_ + (u[j] + 1.0) * 0.5 * (0.0 - rho_lo_),
                                      nu_lo_ + (v[i] + 1.0) * 0.5 * (nu_hi_ - nu_lo_));
    if (!std::all_of(values.begin(), values.end(), [](double x) { return std::isfinite(x); })) return;
    // c_kl = (2 / n_rho)(2 / n_nu) sum_j sum_i f(u_j, v_i) T_k(u_j) T_l(v_i), halved at k = 0 and l = 0
    // (the discrete orthogonality of T_k on the first-kind nodes).
    std::vector<double> partial(static_cast<std::size_t>(n_rho_) * n_nu_, 0.0);  // over i, for each (j, l)
    for (int j = 0; j < n_rho_; ++j)
      for (int l = 0; l < n_nu_; ++l) {
        double s = 0.0;
        for (int i = 0; i < n_nu_; ++i) s += values[j * n_nu_ + i] * std::cos(kPi * l * (i + 0.5) / n_nu_);
        partial[j * n_nu_ + l] = s * (l == 0 ? 1.0 : 2.0) / n_nu_;
      }
    coefficients_.assign(static_cast<std::size_t>(n_rho_) * n_nu_, 0.0);
    for (int k = 0; k < n_rho_; ++k)
      for (int l = 0; l < n_nu_; ++l) {
        double s = 0.0;
        for (int j = 0; j < n_rho_; ++j) s += partial[j * n_nu_ + l] * std::cos(kPi * k * (j + 0.5) / n_rho_);
        coefficients_[k * n_nu_ + l] = s * (k == 0 ? 1.0 : 2.0) / n_rho_;
      }
    // Checks between the nodes: a 7 x 7 grid at irrational offsets, the domain's corners too.
    checked_error_ = 0.0;
    for (int a = 0; a < 7; ++a)
      for (int b = 0; b < 7; ++b) {
        const double su = a == 0 ? -1.0 : a == 6 ? 1.0 : std::fmod(0.1 + a * 0.6180339887498949, 2.0) - 1.0;
        const double sv = b == 0 ? -1.0 : b == 6 ? 1.0 : std::fmod(0.3 + b * 0.7548776662466927, 2.0) - 1.0;
        const double direct = log_k(fraction, rho_lo_ + (su + 1.0) * 0.5 * (0.0 - rho_lo_),
                                    nu_lo_ + (sv + 1.0) * 0.5 * (nu_hi_ - nu_lo_));
        checked_error_ = std::max(checked_error_, std::fabs(evaluate(su, sv) - direct));
      }
    usable_ = checked_error_ <= kTolerance;
    if (usable_) return;
  }
}

double ContainmentTable::evaluate(double u, double v) const {
  // Clenshaw in v for each row k, then in u over the rows.
  double rows[96];
  for (int k = 0; k < n_rho_; ++k) rows[k] = clenshaw(&coefficients_[static_cast<std::size_t>(k) * n_nu_], n_nu_, v);
  return clenshaw(rows, n_rho_, u);
}

double ContainmentTable::log_factor(double log_rho, double log_nu) const {
  if (!usable_ || !(log_rho >= rho_lo_ && log_rho <= 0.0 && log_nu >= nu_lo_ && log_nu <= nu_hi_))
    return std::numeric_limits<double>::quiet_NaN();
  const double u = 2.0 * (log_rho - rho_lo_) / (0.0 - rho_lo_) - 1.0;
  const double v = nu_hi_ > nu_lo_ ? 2.0 * (log_nu - nu_lo_) / (nu_hi_ - nu_lo_) - 1.0 : 0.0;
  return evaluate(u, v);
}

}  // namespace strewn::detail
