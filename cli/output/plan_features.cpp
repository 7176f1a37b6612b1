#include "output/plan_features.hpp"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "strewn/barrier.hpp"
#include "strewn/constants.hpp"
#include "strewn/region_builders.hpp"
#include "strewn/region_ops.hpp"

namespace strewn::cli {

std::vector<ShadowFeature> plan_shadows(const Site& s, const BoundingBox& extent) {
  std::vector<ShadowFeature> out;
  const Region plan = rectangle(extent.min, extent.max);
  for (const Source& src : s.sources) {
    if (src.positions.empty()) continue;
    std::vector<Vec2> from{src.positions.front()};
    if (src.thrower && src.thrower->line_end) from = {src.thrower->position, *src.thrower->line_end};
    for (const Barrier& b : s.barriers)
      for (const Vec2& at : from) {
        // Far enough that every point of the extent seen from `at` is covered.
        double reach = 1.0;
        for (const Vec2& c : {extent.min, extent.max, Vec2(extent.min.x(), extent.max.y()), Vec2(extent.max.x(), extent.min.y())})
          reach = std::max(reach, 1.01 * (c - at).norm() + 1.0);
        const Region h = shadow(b, at, reach, src.release_height);
        if (h.empty()) continue;
        Region seen = combine(h, plan, BooleanOp::intersect, 1e-6 * reach);
        if (seen.empty()) continue;
        out.push_back({b.name, src.name, at, std::move(seen)});
      }
  }
  return out;
}

std::vector<DropFeature> plan_drops(const Site& s) {
  std::vector<DropFeature> out;
  for (const Source& src : s.sources) {
    if (!src.drop) continue;
    const DropParameters& d = src.drop->parameters;
    const FallResult& f = src.drop->spread.nominal;
    // The heading is a compass bearing (clockwise from +y): its unit vector is (sin, cos).
    const double b = d.heading_deg * kPi / 180.0;
    const Vec2 along(std::sin(b), std::cos(b));
    const double run = std::max(d.ground_speed * f.time, 1.0);
    DropFeature x;
    x.source = src.name;
    x.release = d.release;
    x.track_start = d.release - run * along;
    x.track_end = d.release + run * along;
    x.landing = f.landing;
    x.release_label = fmt::format("{}: release at {:g} m", src.name, d.height);
    x.track_label = fmt::format("{}: flight track, bearing {:g} deg at {:g} m/s", src.name, d.heading_deg, d.ground_speed);
    x.landing_label = fmt::format("{}: nominal landing after {:.3g} s", src.name, f.time);
    out.push_back(std::move(x));
  }
  return out;
}

bool clip_segment(Vec2& a, Vec2& b, const BoundingBox& box) {
  const Vec2 d = b - a;
  double t0 = 0.0, t1 = 1.0;
  const double p[4] = {-d.x(), d.x(), -d.y(), d.y()};
  const double q[4] = {a.x() - box.min.x(), box.max.x() - a.x(), a.y() - box.min.y(), box.max.y() - a.y()};
  for (int k = 0; k < 4; ++k) {
    if (p[k] == 0.0) {
      if (q[k] < 0.0) return false;
      continue;
    }
    const double r = q[k] / p[k];
    if (p[k] < 0.0) t0 = std::max(t0, r);
    else t1 = std::min(t1, r);
  }
  if (t0 > t1) return false;
  const Vec2 start = a + t0 * d;
  b = a + t1 * d;
  a = start;
  return true;
}

}  // namespace strewn::cli
