#include "strewn/thrower.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <string>

#include <fmt/format.h>

#include "strewn/constants.hpp"
#include "strewn/error.hpp"

namespace strewn {

void check_thrower(const Thrower& t) {
  if (!(t.spread_angle_deg > 0.0 && t.spread_angle_deg < 45.0))
    throw input_error(fmt::format("spread_angle_deg must be in (0, 45) degrees (got {:g})", t.spread_angle_deg));
  if (t.range_fraction.has_value() == t.range_sigma.has_value())
    throw input_error("give the spread along the throw as range_fraction (of the distance) or range_sigma (m), one of them");
  if (t.range_fraction && !(*t.range_fraction > 0.0 && *t.range_fraction < 1.0))
    throw input_error(fmt::format("range_fraction must be in (0, 1) (got {:g})", *t.range_fraction));
  if (t.range_sigma && !(*t.range_sigma > 0.0))
    throw input_error(fmt::format("range_sigma must be positive (got {:g})", *t.range_sigma));
  if (t.release_height && !(*t.release_height > 0.0))
    throw input_error(fmt::format("release_height must be positive (got {:g})", *t.release_height));
  if (t.line_components < 2 || t.line_components > 256 || t.line_components % 2 != 0)
    throw input_error(fmt::format("line_components must be an even number from 2 to 256 (got {})", t.line_components));
  if (t.line_end && (*t.line_end - t.position).norm() == 0.0)
    throw input_error("the throwing line's two ends are the same point");
  if (t.line_end) {
    // A line through its aim stands someone on the aim, where the spread (proportional to the
    // distance) is 0 and the line's discretisation bound (line_bound.hpp, 1 / D^2) has no value:
    // every zone of the source came out with a NaN bound (a hostile trial). Within the
    // coordinates' rounding counts as through; a line passing nearer still gets a bound that
    // holds (and says "not met" when it is large).
    const Vec2 line = *t.line_end - t.position;
    const double u = std::clamp((t.toward - t.position).dot(line) / line.squaredNorm(), 0.0, 1.0);
    const double reach = std::max({t.position.cwiseAbs().maxCoeff(), t.line_end->cwiseAbs().maxCoeff(), t.toward.cwiseAbs().maxCoeff()});
    const double gap = (t.position + u * line - t.toward).norm();
    if (gap <= 8 * std::numeric_limits<double>::epsilon() * reach)
      throw input_error("the aim (toward) lies on the throwing line: a throw from there has no distance; move toward off the line");
    // Nearer than where a throw's spread (the distance times tan(angle) across, times
    // range_fraction along) falls below the 1e-12 m every spread must keep: the line's pieces
    // next to the aim failed later as a bare "sigma_major must be between ..." (a hostile trial,
    // a line 1e-11 m from its aim).
    const double shrink = std::min(std::tan(t.spread_angle_deg * kPi / 180.0), t.range_fraction ? *t.range_fraction : 1.0);
    if (gap * shrink < 1e-12)
      throw input_error(fmt::format("the throwing line passes {:.3g} m from its aim (toward): throws from there would have a "
                                    "spread below 1e-12 m; move toward off the line",
                                    gap));
  }
  for (const Vec2& p : standing_points(t))
    if (!((t.toward - p).norm() > 0.0))
      throw input_error("the aim (toward) is on the thrower's position: a throw needs a distance");
}

ThrowerSpread thrower_spread(const Thrower& t, const Vec2& position) {
  ThrowerSpread s;
  s.position = position;
  const Vec2 d = t.toward - position;
  s.distance = d.norm();
  s.direction_deg = std::atan2(d.y(), d.x()) * 180.0 / kPi;
  // Small-angle geometry: a direction error of sigma_angle moves the impact D tan(sigma_angle)
  // across the throw; a length error of a share f of the distance moves it D f along it.
  s.sigma_across = s.distance * std::tan(t.spread_angle_deg * kPi / 180.0);
  s.sigma_along = t.range_sigma ? *t.range_sigma : s.distance * *t.range_fraction;
  const Vec2 mean = t.toward + t.bias;
  s.gaussian = s.sigma_along >= s.sigma_across
                   ? Gaussian::from_axes(mean, s.sigma_along, s.sigma_across, s.direction_deg)
                   : Gaussian::from_axes(mean, s.sigma_across, s.sigma_along, s.direction_deg + 90.0);
  return s;
}

std::vector<Vec2> standing_points(const Thrower& t) {
  if (!t.line_end) return {t.position};
  std::vector<Vec2> out;
  const int n = t.line_components;
  for (int k = 0; k < n; ++k) out.push_back(t.position + (k + 0.5) / n * (*t.line_end - t.position));
  return out;
}

ScatterModel thrower_model(const Thrower& t) {
  check_thrower(t);
  const std::vector<Vec2> points = standing_points(t);
  std::vector<WeightedGaussian> parts;
  for (const Vec2& p : points) parts.push_back({1.0 / static_cast<double>(points.size()), thrower_spread(t, p).gaussian});
  return ScatterModel::mixture(parts);
}

}  // namespace strewn
