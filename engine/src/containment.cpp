// containment_radius: the radius about a point that holds a given share of the impacts.
#include <cmath>

#include "strewn/error.hpp"
#include "strewn/fit.hpp"
#include "strewn/integrate.hpp"
#include "strewn/solve.hpp"

namespace strewn {

double containment_radius(const ScatterModel& model, const Vec2& centre, double fraction) {
  if (!(fraction > 0.0 && fraction < 1.0)) throw input_error("the contained fraction must be in (0, 1)");
  const auto& parts = model.components();
  const SpreadAxes a = parts.front().gaussian.axes();
  // Circular and centred: P(r <= R) = 1 - exp(-R^2 / (2 sigma^2)) (Rayleigh distribution).
  if (parts.size() == 1 && a.sigma_major == a.sigma_minor && parts.front().gaussian.mean() == centre)
    return a.sigma_major * std::sqrt(-2.0 * std::log1p(-fraction));
  double reach = 0.0;
  for (const WeightedGaussian& c : parts)
    reach = std::max(reach, c.gaussian.axes().sigma_major + (c.gaussian.mean() - centre).norm());
  IntegrateOptions options;
  options.rel_tolerance = 1e-12;
  const Margin short_of = [&](double r) {
    Region disk;
    disk.loops.push_back({Edge::arc(centre, r * Mat2::Identity(), 0.0, 2.0 * M_PI)});
    return fraction - integrate(model, disk, options).p;
  };
  // P(within r) grows with r; 40 radii up to 12 reaches always pass any fraction below 1 - 1e-30.
  const Crossing c = first_holding(short_of, 1e-12 * reach, 12.0 * reach, 40, 1e-10 * reach);
  if (!c.found) throw input_error("containment radius not found within 12 spreads of the centre");
  return c.x;
}

}  // namespace strewn
