#include "strewn/barrier_effect.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <tuple>

#include <fmt/format.h>

#include "geometry/region_internal.hpp"
#include "strewn/error.hpp"
#include "strewn/region_ops.hpp"

#include "line_bound.hpp"

namespace strewn {
namespace {

constexpr std::size_t kMaxBarriers = kMaxActiveBarriers;

// Sums of weighted estimates: p, q (computed from its own terms), bound, status.
struct Sum {
  Estimate e;
  Sum(Method m) { e.method = m; e.p = 0.0; e.q = 0.0; }  // NOLINT
  void note(const Estimate& x) {
    e.evaluations += x.evaluations;
    if (!x.converged) {
      e.converged = false;
      e.status = x.status;
      if (e.message.empty()) e.message = x.message;
    }
  }
};

std::vector<const Barrier*> active_barriers(const Source& s) {
  std::vector<const Barrier*> out;
  for (const Barrier& b : s.barriers)
    if (b.catch_share > 0.0) out.push_back(&b);
  return out;
}

enum class Cover { outside, inside, partial };

double cross2(const Vec2& a, const Vec2& b) { return a.x() * b.y() - a.y() * b.x(); }

// The box against a union of convex polygons: inside one of them (all four corners strictly
// inside, which for a convex polygon holds the whole box), separated from all of them (by one of
// a polygon's edges or one of the box's sides), or neither.
Cover classify(const BoundingBox& box, const std::vector<std::vector<Vec2>>& pieces) {
  const Vec2 corners[4] = {box.min, box.max, Vec2(box.min.x(), box.max.y()), Vec2(box.max.x(), box.min.y())};
  bool partial = false;
  for (const std::vector<Vec2>& poly : pieces) {
    double twice_area = 0.0;
    for (std::size_t i = 0; i < poly.size(); ++i) twice_area += cross2(poly[i], poly[(i + 1) % poly.size()]);
    const double sign = twice_area > 0 ? 1.0 : -1.0;
    bool all_in = true, separated = false;
    for (std::size_t i = 0; i < poly.size() && !separated; ++i) {
      const Vec2 p = poly[i], q = poly[(i + 1) % poly.size()];
      int out = 0;
      for (const Vec2& c : corners) {
        const double side = sign * cross2(q - p, c - p);
        if (!(side > 0.0)) all_in = false;
        if (side < 0.0) ++out;
      }
      separated = out == 4;
    }
    if (all_in) return Cover::inside;
    if (!separated) {
      bool left = true, right = true, below = true, above = true;
      for (const Vec2& v : poly) {
        left = left && v.x() < box.min.x();
        right = right && v.x() > box.max.x();
        below = below && v.y() < box.min.y();
        above = above && v.y() > box.max.y();
      }
      separated = left || right || below || above;
    }
    partial = partial || !separated;
  }
  return partial ? Cover::partial : Cover::outside;
}

double sagitta_for(const Region& region) {
  const BoundingBox box = bounds(region);
  return std::max(1e-9, 1e-6 * (box.max - box.min).norm());
}

// A component and a barrier moved by t (the frame of a standing point, component_past).
Gaussian moved_by(const Gaussian& g, const Vec2& t) {
  return Gaussian::from_parts(g.mean() + t, g.covariance(), g.cholesky()).with_family(g.family());
}

Barrier moved_by(const Barrier& b, const Vec2& t) {
  Barrier m = b;
  for (Vec2& v : m.points) v += t;
  return m;
}

// One component from position `at`, past the barriers, by inclusion-exclusion over the shadows.
Estimate component_past_here(const Gaussian& g, const Vec2& at, std::optional<double> release_height,
                             const std::vector<const Barrier*>& barriers, const Region& zone,
                             const IntegrateOptions& options);

// The same in the frame of the standing point: at national-grid coordinates (x ~ 5e5 m,
// y ~ 5e6 m) Boost.Geometry's intersections in site coordinates lose digits that no error bound
// counts (1e-8 relative on a 4 cm zone, measured). The shift is exact for points within a factor
// of two of `at` (Sterbenz), so every difference the integrals see is unchanged.
Estimate component_past(const Gaussian& g, const Vec2& at, std::optional<double> release_height,
                        const std::vector<const Barrier*>& barriers, const Region& zone, const IntegrateOptions& options) {
  if (barriers.empty()) return integrate(g, zone, options);
  const Gaussian local = moved_by(g, -at);
  std::vector<Barrier> moved;
  moved.reserve(barriers.size());
  for (const Barrier* b : barriers) moved.push_back(moved_by(*b, -at));
  std::vector<const Barrier*> pointers;
  for (const Barrier& b : moved) pointers.push_back(&b);
  return component_past_here(local, Vec2::Zero(), release_height, pointers, transformed(zone, Mat2::Identity(), -at),
                             options);
}

Estimate component_past_here(const Gaussian& g, const Vec2& at, std::optional<double> release_height,
                             const std::vector<const Barrier*>& barriers, const Region& zone,
                             const IntegrateOptions& options) {
  const Estimate whole = integrate(g, zone, options);
  if (barriers.empty()) return whole;
  // Every point of the zone is within `reach` of the position: the cut shadows lose nothing here.
  const BoundingBox box = bounds(zone);
  double reach = 0.0;
  for (const Vec2& c : {box.min, box.max, Vec2(box.min.x(), box.max.y()), Vec2(box.max.x(), box.min.y())})
    reach = std::max(reach, (c - at).norm());
  reach = reach * 1.01 + 1.0;
  // Each shadow against the zone's box: wholly outside (the terms with it vanish), wholly
  // inside (intersecting with it changes nothing), or across its edge (polygon intersection).
  std::vector<Cover> cover;
  std::vector<Region> shadows;
  for (const Barrier* b : barriers) {
    const auto pieces = shadow_pieces(*b, at, reach, release_height);
    cover.push_back(classify(box, pieces));
    shadows.push_back(cover.back() == Cover::partial ? shadow(*b, at, reach, release_height) : Region{});
  }
  const double sagitta = sagitta_for(zone);
  Sum s(options.method);
  s.e.p = whole.p;
  s.e.q = whole.q;
  s.e.abs_err = whole.abs_err;
  s.note(whole);
  // Depth-first over subsets in increasing index order: T's region is zone n H_T, and `same`
  // says it is still the whole zone (whose estimate is known).
  struct Frame {
    Region region;
    double coefficient;
    std::size_t next;
    bool same;
  };
  std::vector<Frame> stack{{zone, 1.0, 0, true}};
  while (!stack.empty()) {
    Frame f = std::move(stack.back());
    stack.pop_back();
    for (std::size_t j = f.next; j < barriers.size(); ++j) {
      if (cover[j] == Cover::outside) continue;
      Region r;
      bool same = f.same;
      if (cover[j] == Cover::inside) {
        r = f.region;
      } else {
        r = combine(f.region, shadows[j], BooleanOp::intersect, sagitta);
        same = false;
        // Nothing left of the polygons may still be a thin part of the exact intersection, lost
        // to the chords: its term is then 0 with the patches' bound, never skipped as exact.
        if (r.empty() || area(r) <= 0.0) {
          if (r.approximation_patches.empty()) continue;
          r.loops.clear();
        }
      }
      const double c = -f.coefficient * barriers[j]->catch_share;
      const Estimate e = same ? whole : integrate(g, r, options);
      s.e.p += c * e.p;
      s.e.q -= c * e.p;  // 1 - P(pass) = q(zone) + sum of the subtracted terms
      s.e.abs_err += std::fabs(c) * e.abs_err;
      s.note(e);
      stack.push_back({std::move(r), c, j + 1, same});
    }
  }
  // The sum is a probability in [0, P(zone)]; rounding of the alternating terms may step out.
  s.e.p = std::clamp(s.e.p, 0.0, whole.p);
  s.e.q = std::clamp(s.e.q, whole.q, 1.0);
  return s.e;
}

Estimate past_barriers(const Source& src, const Region& zone, const IntegrateOptions& options) {
  const std::vector<const Barrier*> barriers = active_barriers(src);
  if (!barriers.empty() && src.positions.size() != src.model.components().size())
    throw input_error("source '" + src.name + "': barriers need the source's position (give position = [x, y])");
  if (barriers.size() > kMaxBarriers)
    throw input_error(fmt::format("source '{}': at most {} barriers with a catch above 0 (got {})", src.name,
                                  kMaxBarriers, barriers.size()));
  Sum s(options.method);
  for (std::size_t k = 0; k < src.model.components().size(); ++k) {
    const WeightedGaussian& c = src.model.components()[k];
    const Estimate e = component_past(c.gaussian, src.positions.empty() ? Vec2::Zero() : src.positions[k],
                                      src.release_height, barriers, zone, options);
    s.e.p += c.weight * e.p;
    s.e.q += c.weight * e.q;
    s.e.abs_err += c.weight * e.abs_err;
    s.note(e);
  }
  return s.e;
}

bool is_line(const Source& s) {
  return s.thrower && s.thrower->line_end && s.model.components().size() >= 2 &&
         s.positions.size() == s.model.components().size();
}

// A throwing line by the midpoint rule on pieces of [0, 1] (u along the line), each piece with
// its proven error (line_bound.hpp); the piece with the largest bound is halved until the sum
// meets the request or `max_pieces` is reached.
struct LinePiece {
  double ua, ub;
  Estimate e;     // p at the midpoint standing point
  double bound;   // the midpoint rule's error on this piece, as a share of the line
};

Estimate line_past_barriers(const Source& src, const Region& zone, const IntegrateOptions& options, int max_pieces) {
  const std::vector<const Barrier*> barriers = active_barriers(src);
  if (barriers.size() > kMaxBarriers)
    throw input_error(fmt::format("source '{}': at most {} barriers with a catch above 0 (got {})", src.name,
                                  kMaxBarriers, barriers.size()));
  const Thrower& t = *src.thrower;
  const Vec2 mean = t.toward + t.bias, line = *t.line_end - t.position;
  const BoundingBox box = bounds(zone);
  const double sagitta = sagitta_for(zone);
  // Envelopes N(mean, S^2 I), S^2 above every variance on the line: a close one (tight
  // densities) and a wide one (small polynomial factor); each piece takes the better.
  const double top = detail::line_max_variance(t);
  const double widths[2] = {1.25 * top, 2.0 * top};
  Gaussian envelope[2] = {Gaussian::from_axes(mean, std::sqrt(widths[0]), std::sqrt(widths[0]), 0.0),
                          Gaussian::from_axes(mean, std::sqrt(widths[1]), std::sqrt(widths[1]), 0.0)};
  double whole_env[2];
  Sum s(options.method);
  for (int k = 0; k < 2; ++k) {
    const Estimate e = integrate(envelope[k], zone, options);
    whole_env[k] = std::min(1.0, e.p + e.abs_err);
    s.e.evaluations += e.evaluations;
  }
  const auto evaluate = [&](double ua, double ub) {
    LinePiece piece{ua, ub, {}, 0.0};
    const double h = ub - ua, uc = 0.5 * (ua + ub);
    const Vec2 at = t.position + uc * line;
    piece.e = component_past(thrower_spread(t, at).gaussian, at, src.release_height, barriers, zone, options);
    double smooth = std::numeric_limits<double>::infinity();
    for (int k = 0; k < 2; ++k)
      smooth = std::min(smooth, detail::line_piece_bound(t, ua, ub, widths[k]).second_derivative * whole_env[k]);
    piece.bound = h * h * h / 24.0 * smooth;
    if (!barriers.empty()) {
      // Where the transmission may differ between standing points of the piece, under the wide
      // envelope (line_bound.hpp, part 2).
      double changed = 0.0;
      const Vec2 sa = t.position + ua * line, sb = t.position + ub * line;
      for (const Barrier* b : barriers) {
        const detail::ShadowChanges c = detail::shadow_changes(*b, sa, sb, box, src.release_height);
        if (c.touches) {
          changed = whole_env[1];
          break;
        }
        for (const std::vector<Vec2>& poly : c.polygons) {
          if (classify(box, {poly}) == Cover::outside) continue;
          const Region r = combine(zone, unchecked_polygon(poly), BooleanOp::intersect, sagitta);
          if (r.empty()) continue;
          const Estimate e = integrate(envelope[1], r, options);
          changed += e.p + e.abs_err;
        }
      }
      piece.bound += h * detail::line_piece_bound(t, ua, ub, widths[1]).density * std::min(changed, whole_env[1]);
    }
    return piece;
  };
  std::vector<LinePiece> pieces;
  const int n = t.line_components;
  for (int k = 0; k < n; ++k) pieces.push_back(evaluate(static_cast<double>(k) / n, static_cast<double>(k + 1) / n));
  const auto total = [&] {
    Sum sum(options.method);
    double discretisation = 0.0;
    for (const LinePiece& piece : pieces) {
      const double h = piece.ub - piece.ua;
      sum.e.p += h * piece.e.p;
      sum.e.q += h * piece.e.q;
      sum.e.abs_err += h * piece.e.abs_err;
      sum.note(piece.e);
      discretisation += piece.bound;
    }
    return std::make_pair(sum.e, discretisation);
  };
  auto [e, discretisation] = total();
  const auto request = [&](const Estimate& x) { return std::max(options.rel_tolerance * std::min(x.p, x.q), options.abs_tolerance); };
  while (discretisation > 0.5 * request(e) && static_cast<int>(pieces.size()) < max_pieces) {
    const auto worst = std::max_element(pieces.begin(), pieces.end(),
                                        [](const LinePiece& a, const LinePiece& b) { return a.bound < b.bound; });
    const double ua = worst->ua, ub = worst->ub, uc = 0.5 * (ua + ub);
    *worst = evaluate(ua, uc);
    pieces.push_back(evaluate(uc, ub));
    std::tie(e, discretisation) = total();
  }
  for (const LinePiece& piece : pieces) s.e.evaluations += piece.e.evaluations;
  e.evaluations = s.e.evaluations;
  e.abs_err += discretisation;
  if (!std::isfinite(e.abs_err)) e.abs_err = std::max(e.p, e.q);  // claims nothing (covers [0, 1]), never NaN
  if (discretisation > 0.5 * request(e) && e.converged && e.abs_err > request(e)) {
    e.converged = false;
    e.status = Status::tolerance_not_met;
    e.message = fmt::format("the throwing line's {} pieces leave a proven discretisation bound of {:.2g} (at most {} "
                            "pieces here): loosen the tolerance, or raise line_components",
                            pieces.size(), discretisation, max_pieces);
  }
  return e;
}

}  // namespace

bool needs_barrier_integration(const Source& source) { return !active_barriers(source).empty() || is_line(source); }

Estimate integrate_source(const Source& source, const Region& region, const IntegrateOptions& options,
                          int line_pieces_limit) {
  if (!needs_barrier_integration(source)) return integrate(source.model, region, options);
  if (is_line(source)) return line_past_barriers(source, region, options, std::max(line_pieces_limit, source.thrower->line_components));
  return past_barriers(source, region, options);
}

Verification verify_source(const Source& source, const Region& region, const IntegrateOptions& options) {
  if (!needs_barrier_integration(source)) return verify(source.model, region, options);
  IntegrateOptions second = options;
  second.method = options.method == Method::exact ? Method::cubature : Method::exact;
  for (const WeightedGaussian& c : source.model.components())
    if (second.method == Method::cubature && c.gaussian.family().kind() == FamilyKind::uniform)
      second.method = Method::monte_carlo;
  second.progress = nullptr;
  return verify(integrate_source(source, region, options), integrate_source(source, region, second));
}

std::vector<BarrierStop> barrier_stops(const Site& site) {
  std::vector<BarrierStop> out;
  for (const Barrier& b : site.barriers)
    for (const Source& src : site.sources) {
      if (src.positions.size() != src.model.components().size()) continue;
      BarrierStop row;
      row.barrier = b.name;
      row.source = src.name;
      Sum s(site.options.method);
      for (std::size_t k = 0; k < src.model.components().size(); ++k) {
        const WeightedGaussian& c = src.model.components()[k];
        const Gaussian& g = c.gaussian;
        const Vec2 at = src.positions[k];
        // Cut the shadow where the component's radial tail beyond is below 1e-12 (at most a
        // million sigmas out, for the heaviest tails); what lies beyond goes into the bound.
        // The largest principal sigma: of a 2 x 2 covariance [[a, b], [b, d]], the eigenvalue
        // (a + d) / 2 + sqrt((a - d)^2 / 4 + b^2).
        const Mat2& v = g.covariance();
        const double sigma = std::sqrt(0.5 * (v(0, 0) + v(1, 1)) + std::hypot(0.5 * (v(0, 0) - v(1, 1)), v(0, 1)));
        double rho = 40.0;
        for (double r : {8.0, 16.0, 40.0, 1e2, 1e3, 1e4, 1e5, 1e6}) {
          rho = r;
          if (g.family().survival(r) <= 1e-12) break;
        }
        const double offset = (g.mean() - at).norm();
        const double reach = offset + rho * sigma;
        row.reach = std::max(row.reach, reach);
        // In the standing point's frame, as component_past: exact shifts, no digits lost at
        // national-grid coordinates.
        const Region h = shadow(moved_by(b, -at), Vec2::Zero(), reach, src.release_height);
        const Estimate e = h.empty() ? Estimate{} : integrate(moved_by(g, -at), h, site.options);
        const double tail = g.family().survival(rho);  // P(|X - at| > reach) <= P(|z| > rho)
        s.e.p += c.weight * b.catch_share * e.p;
        s.e.abs_err += c.weight * b.catch_share * (e.abs_err + tail);
        s.note(e);
      }
      s.e.q = 1.0 - s.e.p;
      row.stopped = s.e;
      out.push_back(std::move(row));
    }
  return out;
}

}  // namespace strewn
