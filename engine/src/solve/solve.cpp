#include "strewn/solve.hpp"

#include <boost/math/tools/toms748_solve.hpp>
#include <cmath>
#include <cstdint>
#include <limits>
#include <vector>

#include "strewn/constants.hpp"

namespace strewn {
namespace {

// Narrows [a, b] (margin of opposite signs at the ends) to width `tolerance` and returns the end
// where the limit holds first, the failing end second.
std::pair<double, double> close_bracket(const Margin& margin, double a, double fa, double b, double fb,
                                        double tolerance, int& evaluations) {
  const auto counted = [&](double x) {
    ++evaluations;
    return margin(x);
  };
  const auto narrow_enough = [tolerance](double lo, double hi) { return std::fabs(hi - lo) <= tolerance; };
  std::uintmax_t max_iter = 200;
  const auto r = boost::math::tools::toms748_solve(counted, a, b, fa, fb, narrow_enough, max_iter);
  // The ends of the final bracket keep opposite signs, unless the solver landed on an exact zero
  // and collapsed it; then the failing end is one tolerance further towards the original one.
  const double f_first = counted(r.first);
  const double holds = f_first <= 0.0 ? r.first : r.second;
  double fails = f_first <= 0.0 ? r.second : r.first;
  const double original_fails = fa > 0.0 ? a : b;
  if (counted(fails) <= 0.0) {
    const double nearer = holds + std::copysign(tolerance, original_fails - holds);
    fails = (nearer - holds) / (original_fails - holds) < 1.0 && counted(nearer) > 0.0 ? nearer : original_fails;
  }
  return {holds, fails};
}

bool bad_window(double lo, double hi, int steps, double tolerance, Crossing& c) {
  if (!(std::isfinite(lo) && std::isfinite(hi) && hi > lo && steps >= 1 && tolerance > 0.0)) {
    c.why = "the search window must be finite and non-empty, with a positive tolerance";
    return true;
  }
  return false;
}

}  // namespace

namespace {

// Scans lo..hi for the first point whose side of the limit (holds: margin <= 0) differs from
// lo's, and closes the bracket there. Returns false in `c.found` when the side never changes.
Crossing scan_for_change(const Margin& margin, double lo, double hi, int steps, double tolerance) {
  Crossing c;
  if (bad_window(lo, hi, steps, tolerance, c)) return c;
  double x_prev = lo, f_prev = margin(lo);
  c.evaluations = 1;
  const bool holds_at_lo = f_prev <= 0.0;
  for (int k = 1; k <= steps; ++k) {
    const double x = lo + (hi - lo) * k / steps;
    const double f = margin(x);
    ++c.evaluations;
    if ((f <= 0.0) != holds_at_lo) {
      const auto [holds, fails] = close_bracket(margin, x_prev, f_prev, x, f, tolerance, c.evaluations);
      c.found = true;
      c.x = holds;
      c.x_fails = fails;
      return c;
    }
    x_prev = x;
    f_prev = f;
  }
  return c;
}

}  // namespace

Crossing first_holding(const Margin& margin, double lo, double hi, int steps, double tolerance) {
  Crossing c;
  if (bad_window(lo, hi, steps, tolerance, c)) return c;
  if (margin(lo) <= 0.0) {
    c.found = true;
    c.evaluations = 1;
    c.x = c.x_fails = lo;
    return c;
  }
  c = scan_for_change(margin, lo, hi, steps, tolerance);
  if (!c.found) c.why = "the limit does not hold anywhere in the window";
  return c;
}

Crossing last_holding(const Margin& margin, double lo, double hi, int steps, double tolerance) {
  Crossing c;
  if (bad_window(lo, hi, steps, tolerance, c)) return c;
  if (margin(lo) > 0.0) {
    c.evaluations = 1;
    c.why = "the limit fails already at the start of the window";
    return c;
  }
  c = scan_for_change(margin, lo, hi, steps, tolerance);
  if (!c.found) {
    c.found = true;
    c.holds_to_end = true;
    c.x = c.x_fails = hi;
  }
  return c;
}

BestPoint best_point(const std::function<double(const Vec2&)>& objective,
                     const std::function<double(const Vec2&)>& margin, const Vec2& centre, double half_width,
                     int grid, double tolerance) {
  BestPoint best;
  if (!(half_width > 0.0 && std::isfinite(half_width) && grid >= 2 && tolerance > 0.0)) {
    best.why = "the search window must be finite and non-empty, with at least 2 x 2 points";
    return best;
  }
  best.objective = -std::numeric_limits<double>::infinity();
  best.least_margin = std::numeric_limits<double>::infinity();
  const auto consider = [&](const Vec2& x) {
    ++best.evaluations;
    const double m = margin(x);
    if (m < best.least_margin) {
      best.least_margin = m;
      best.least_margin_x = x;
    }
    if (!(m <= 0.0)) return false;
    const double v = objective(x);
    if (!(v > best.objective)) return false;
    best.found = true;
    best.objective = v;
    best.x = x;
    return true;
  };
  const double h = 2.0 * half_width / (grid - 1);
  for (int i = 0; i < grid; ++i)
    for (int j = 0; j < grid; ++j) consider(centre + Vec2(-half_width + i * h, -half_width + j * h));
  if (!best.found) {
    best.why = "no point of the search grid meets every limit";
    return best;
  }
  // Compass search: try moves in 16 directions; move on improvement, halve the step otherwise.
  // Axis moves alone stall where a constraint boundary runs diagonally; 16 directions let the
  // search slide along any boundary that is straight on the scale of the step.
  double step = h / 2;
  std::vector<Vec2> moves;
  for (int k = 0; k < 16; ++k) moves.emplace_back(std::cos(k * kPi / 8), std::sin(k * kPi / 8));
  while (step > tolerance && best.evaluations < 100000) {
    bool moved = false;
    for (const Vec2& m : moves) moved = consider(best.x + step * m) || moved;
    if (!moved) step /= 2;
  }
  best.step = step;
  return best;
}

}  // namespace strewn
