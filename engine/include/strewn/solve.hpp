#ifndef STREWN_SOLVE_HPP
#define STREWN_SOLVE_HPP

/// \file
/// Design answers: where along one parameter a limit starts or stops holding, and the best point
/// of the plane under constraints.
///
/// A constraint is a margin function: margin(x) <= 0 means every limit holds at x. Callers make
/// it conservative by comparing each probability's upper bound (p + abs_err) with its limit, so
/// that an answer that "holds" holds whatever the integration error.
///
/// One-parameter answers scan the window in equal steps (a limit may be met, lost and met again,
/// e.g. while a zone is moved past the mean impact point) and then close the bracket around the
/// first change with boost::math::tools::toms748_solve (Alefeld, Potra & Shi 1995, algorithm
/// 748) until it is narrower than the tolerance. The answer is always the end of that bracket
/// where the limit holds, and `x_fails` the end where it does not: |x - x_fails| <= tolerance
/// bounds the answer's error. A change between two scan points that reverts before the next one
/// can be missed; `steps` sets how fine the scan is.

#include <functional>
#include <string>

#include "strewn/export.hpp"
#include "strewn/scatter_model.hpp"

namespace strewn {

struct Crossing {
  bool found = false;
  double x = 0.0;        ///< where the limit holds
  double x_fails = 0.0;  ///< the nearest point found where it does not (equals x if none)
  bool holds_to_end = false;  ///< last_holding only: the limit holds over the whole window
  int evaluations = 0;
  std::string why;  ///< when not found
};

using Margin = std::function<double(double)>;

/// The smallest x in [lo, hi] at which margin(x) <= 0.
STREWN_API Crossing first_holding(const Margin& margin, double lo, double hi, int steps, double tolerance);

/// The largest x such that margin <= 0 on the whole scan of [lo, x]; not found if the limit fails
/// already at lo. If it holds over the whole window, x = hi and holds_to_end is set.
STREWN_API Crossing last_holding(const Margin& margin, double lo, double hi, int steps, double tolerance);

struct BestPoint {
  bool found = false;
  Vec2 x = Vec2::Zero();
  double objective = 0.0;
  /// Final step of the compass search. Not a distance to the optimum: it only says that no
  /// feasible point at this distance from x, in any of the 16 directions, is better. The search
  /// certifies no distance to the true optimum (a bound would need Lipschitz constants of the
  /// objective and of every constraint, which the integrals do not supply).
  double step = 0.0;
  int evaluations = 0;
  std::string why;
  /// The point of the grid (and search) with the smallest margin, and that margin: where the
  /// limits come closest to holding; when nothing is feasible, the caller names the limit
  /// that fails there.
  Vec2 least_margin_x = Vec2::Zero();
  double least_margin = 0.0;
};

/// Maximises objective(x) subject to margin(x) <= 0 over the square centre +- half_width:
/// a grid of grid x grid points, then a compass search in 16 directions (Kolda, Lewis & Torczon
/// 2003, SIAM Review 45(3)) from the best feasible grid point, halving its step down to `tolerance`. The result is
/// never worse than the best feasible grid point, and margin(x) <= 0 was evaluated at x itself.
/// What it guarantees beyond that is local: no feasible point at the final step in the 16
/// directions improves on it. It is not located to `tolerance` (a flat objective or a curved
/// constraint boundary can leave it farther from the optimum than the last step).
STREWN_API BestPoint best_point(const std::function<double(const Vec2&)>& objective,
                                const std::function<double(const Vec2&)>& margin, const Vec2& centre,
                                double half_width, int grid, double tolerance);

}  // namespace strewn

#endif
