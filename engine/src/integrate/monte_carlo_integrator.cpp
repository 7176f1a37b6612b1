// The Monte Carlo method: seeded samples of the family in whitened coordinates (standard normal;
// a t as a normal pair over sqrt(W / nu), W ~ chi-square(nu); the uniform as a uniform angle and
// radius 2 sqrt(U); a profile by the inverse of its G, in a uniform direction of its wedge), counted by the winding number of the region's boundary; Clopper-Pearson
// interval (Clopper & Pearson 1934).
#include <boost/math/special_functions/beta.hpp>
#include <cmath>
#include <random>
#include <sstream>

#include "integrate/exact/edge_tail.hpp"
#include "integrate/integrators.hpp"
#include "strewn/constants.hpp"

namespace strewn::detail {
namespace {

struct Interval {
  double low, high;
};

Interval clopper_pearson(std::uint64_t k, std::uint64_t n, double confidence) {
  const double alpha = 1.0 - confidence;
  const double kd = static_cast<double>(k), nd = static_cast<double>(n);
  Interval ci{0.0, 1.0};
  if (k > 0) ci.low = boost::math::ibeta_inv(kd, nd - kd + 1.0, alpha / 2);
  if (k < n) ci.high = boost::math::ibeta_inv(kd + 1.0, nd - kd, 1.0 - alpha / 2);
  return ci;
}

}  // namespace

Estimate integrate_monte_carlo(const Region& z, const IntegrateOptions& options, const ScatterFamily* family,
                               double wedge_from, double wedge_sweep) {
  Estimate est;
  est.method = Method::monte_carlo;
  const BoundingBox box = bounds(z);
  std::mt19937_64 rng(options.seed);
  std::normal_distribution<double> normal;
  std::chi_squared_distribution<double> chi2(family && family->kind() == FamilyKind::student_t ? family->nu() : 1.0);
  std::uniform_real_distribution<double> unit;
  const auto sample = [&]() -> Vec2 {
    if (!family) return Vec2(normal(rng), normal(rng));
    if (family->kind() == FamilyKind::student_t) {
      const Vec2 p(normal(rng), normal(rng));
      return p / std::sqrt(chi2(rng) / family->nu());
    }
    if (family->kind() == FamilyKind::profile) {
      // Inverse CDF of G: the radius at a uniform share of the mass, in a uniform direction.
      const double angle = wedge_from + wedge_sweep * unit(rng), u = unit(rng);
      const double r = u > 0.0 ? family->radius_quantile(u) : 0.0;
      return Vec2(r * std::cos(angle), r * std::sin(angle));
    }
    const double angle = 2.0 * kPi * unit(rng), r = 2.0 * std::sqrt(unit(rng));
    return Vec2(r * std::cos(angle), r * std::sin(angle));
  };
  std::uint64_t hits = 0;
  for (std::uint64_t i = 0; i < options.samples; ++i) {
    if (options.progress && (i & ((1u << 20) - 1)) == 0 && i > 0)
      options.progress(static_cast<double>(i) / static_cast<double>(options.samples));
    const Vec2 p = sample();
    if (p.x() < box.min.x() || p.x() > box.max.x() || p.y() < box.min.y() || p.y() > box.max.y())
      continue;
    if (winding_number(z, p) != 0) ++hits;
  }
  const std::uint64_t n = options.samples;
  est.p = static_cast<double>(hits) / static_cast<double>(n);
  est.q = static_cast<double>(n - hits) / static_cast<double>(n);
  const Interval ci = clopper_pearson(hits, n, options.confidence);
  est.interval_low = ci.low;
  est.interval_high = ci.high;
  est.abs_err = std::max(est.p - ci.low, ci.high - est.p);
  // The samples judge the polygonised region; the region described may differ by the moved area
  // (a wedge's density is the family's over its share of the turn).
  if (z.approximation_area > 0.0) {
    const double share = wedge_sweep / (2.0 * kPi);
    const double moved = approximation_error(z, family) / (share > 0.0 ? share : 1.0);
    est.abs_err += moved;
    est.interval_low = std::max(est.interval_low - moved, 0.0);
    est.interval_high = std::min(est.interval_high + moved, 1.0);
  }
  est.evaluations = n;
  std::ostringstream m;
  m << hits << " hits in " << n << " samples, seed " << options.seed << ", "
    << options.confidence * 100 << "% Clopper-Pearson interval";
  est.message = m.str();
  return est;
}

}  // namespace strewn::detail
