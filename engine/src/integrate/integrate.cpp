#include "strewn/integrate.hpp"

#include <algorithm>
#include <Eigen/LU>
#include <cmath>
#include <limits>
#include <optional>
#include <sstream>
#include <stdexcept>

#include "integrate/exact/edge_tail.hpp"
#include "integrate/integrators.hpp"
#include "geometry/region_internal.hpp"
#include "strewn/constants.hpp"
#include "strewn/error.hpp"
#include "strewn/region_ops.hpp"

namespace strewn {
namespace {

// The builders and readers refuse an invalid region (a bow-tie, a hole outside its ring, a
// non-finite coordinate) before it gets here; one assembled by hand is checked only when
// something has already gone wrong with it (no area, or a result that fails the final check),
// so that it is reported as the input error it is. The validity test costs about four times an
// 8-vertex polygon's integration (4 us): never on every call.
void refuse_if_invalid(const Region& region) {
  const Validity v = check_validity(region);
  if (!v.valid) throw input_error("invalid region: " + v.fault);
}

void require_loops(const Region& region) {
  // A boolean may leave no loops of a region that is not empty (a thin sliver polygonised
  // away): it is integrated as p = 0 with the bound of its approximation patches.
  if (region.empty() && region.approximation_patches.empty()) throw input_error("the region has no loops");
}

// The area pass costs about as much as the one-pass polygon path's own walk over the edges, which
// proves the area positive itself (integrate_exact_polygon): integrate() asks only the others.
void require_normalised(const Region& region) {
  if (region.empty()) return;
  if (!(area(region) > 0.0)) {
    refuse_if_invalid(region);
    throw input_error("the region is not normalised (outer loops counter-clockwise, holes "
                      "clockwise); pass it through strewn::normalised()");
  }
}

void require_usable(const Region& region) {
  require_loops(region);
  require_normalised(region);
}

// The covariance's larger eigenvalue (closed form for a symmetric 2 x 2 matrix).
double largest_variance(const Mat2& c) {
  const double tr = c(0, 0) + c(1, 1), det = c(0, 0) * c(1, 1) - c(0, 1) * c(1, 0);
  return 0.5 * (tr + std::sqrt(std::max(tr * tr - 4 * det, 0.0)));
}

}  // namespace

namespace {

// The message of a result whose bound exceeds the requested tolerance.
std::string tolerance_message(double abs_err, const Region& region) {
  std::ostringstream m;
  m << "error bound " << abs_err << " exceeds the requested tolerance";
  // Polygonised for a boolean operation, or read as chords of arcs (DXF through GDAL).
  if (region.approximation_area > 0) m << " (it includes the area by which the region's polygons may differ from its curves)";
  return m.str();
}

}  // namespace

namespace detail {

// exact promises relative accuracy for p and for q; cubature computes p only (q = 1 - p), so
// its request is judged on p. A tiny q (the normal's tail of 1e-15, an edge a hair inside a
// compact support) is judged relative to q; only a 0 that the geometry proves (a compact
// support wholly inside or outside the region, settled_by_support below) is judged on its
// other side, which is 1 (with_status).
bool meets(const Estimate& e, const IntegrateOptions& o) {
  const double scale = e.method == Method::exact ? std::min(e.p, e.q) : e.p;
  return e.abs_err <= std::max(o.abs_tolerance, o.rel_tolerance * scale);
}

void check_region(const Region& region, const IntegrateOptions& options) {
  if (const std::string why = options.invalid_reason(); !why.empty()) throw input_error(why);
  require_usable(region);
}

// Rounding in z = L^{-1}(x - mean): x - mean is exact to eps |x - mean|, and the product with
// L^{-1} (and the Cholesky factor itself, computed to a few eps per entry) adds a few eps
// |L^{-1}| |x - mean|, which is at most eps * cond(L) * |z|: a move proportional to each
// vertex's own |z|.
// The input itself: a coordinate typed as a decimal is stored to half an ulp, eps / 2 |x|, and
// so is the mean; at national-grid coordinates (|x| ~ 5e6, ulp ~ 1e-9 m) under a 0.1 mm spread
// that is 1e-5 sigma, whatever the arithmetic does afterwards. With |x| <= |mean| + sigma_major
// |z|, the move in whitened units is at most eps |mean| / sigma_minor (absolute) plus
// eps / 2 cond(L) |z| (relative).
WhiteningNoise whitening_noise(const Gaussian& g, double vertex_move) {
  const double eps = std::numeric_limits<double>::epsilon();
  // Singular values of L from its entries (no covariance formed: at 1e6:1 its smaller
  // eigenvalue is lost to rounding).
  // For the lower triangular L: s_max^2 = (F + sqrt(F^2 - 4 det^2)) / 2 with F = |L|_F^2, where
  // F - 2 det = (a - d)^2 + c^2 (no cancellation), and s_min = det / s_max.
  const Mat2& l = g.cholesky();
  const double a = l(0, 0), c = l(1, 0), d = l(1, 1);
  const double f = a * a + c * c + d * d, det = std::fabs(a * d);
  const double s_max2 = 0.5 * (f + std::sqrt(((a - d) * (a - d) + c * c) * (f + 2 * det)));
  const double cond = s_max2 / det;  // s_max / s_min
  const double m2 = g.mean().squaredNorm();
  WhiteningNoise n;
  // eps |mean| / s_min = eps sqrt(|mean|^2 s_max^2) / det
  n.absolute = eps + (m2 > 0.0 ? eps * std::sqrt(m2 * s_max2) / det * (1 + 1e-6) : 0.0);
  n.relative = 4.5 * eps * cond * (1 + 1e-6);
  // A region's own vertex move (Region::vertex_move, metres) is at most that over s_min whitened.
  if (vertex_move > 0.0) n.absolute += vertex_move * std::sqrt(s_max2) / det * (1 + 1e-6);
  return n;
}

Estimate integrate_components(const ScatterModel& model, const BoundingBox& box, const IntegrateOptions& options,
                              const std::function<Estimate(std::size_t)>& component_estimate) {
  Estimate total;
  total.p = 0.0;
  total.q = 0.0;
  total.method = options.method;
  total.interval_low = 0.0;
  total.interval_high = 0.0;
  // Components far from the region next to others that are near it cannot matter: whitened, the
  // region lies outside the ball of radius d / sigma_major about the component's mean (d the
  // distance from the mean to the region's bounding box), so the component's probability is at
  // most exp(-(d / sigma_major)^2 / 2) (the chi-square tail with 2 degrees of freedom). Taking
  // components by decreasing bound, one whose weighted bound is below a thousandth of the
  // relative tolerance times what the others already give is counted as p = 0, q = 1 with that
  // bound as its error, and so are all after it. Monte Carlo keeps every component.
  const auto& components = model.components();
  std::vector<std::pair<double, std::size_t>> order;
  order.reserve(components.size());
  for (std::size_t k = 0; k < components.size(); ++k) {
    const Gaussian& g = components[k].gaussian;
    const Vec2 m = g.mean();
    const double d = (m - m.cwiseMax(box.min).cwiseMin(box.max)).norm() / std::sqrt(largest_variance(g.covariance()));
    // The family's survival at d bounds the mass beyond d: exp(-d^2/2) for the normal, a power
    // law for the t (heavy tails keep far components in).
    order.push_back({components[k].weight * g.family().survival(d), k});
  }
  // Insertion sort, stable and without the buffer std::stable_sort allocates: mixtures are small.
  for (std::size_t i = 1; i < order.size(); ++i)
    for (std::size_t j = i; j > 0 && order[j - 1].first < order[j].first; --j) std::swap(order[j - 1], order[j]);
  const bool may_skip = options.method != Method::monte_carlo;
  for (const auto& [bound, k] : order) {
    const WeightedGaussian& c = components[k];
    if (may_skip && total.p > 0.0 && bound <= 1e-3 * options.rel_tolerance * total.p) {
      total.q += c.weight;
      total.abs_err += bound;
      continue;
    }
    const Estimate e = component_estimate(k);
    total.p += c.weight * e.p;
    total.q += c.weight * e.q;
    total.abs_err += c.weight * e.abs_err;
    total.evaluations += e.evaluations;
    total.interval_low += c.weight * e.interval_low;
    total.interval_high += c.weight * e.interval_high;
    total.converged = total.converged && e.converged;
    if (!e.message.empty() && total.message.empty()) {
      total.message = e.message;
      total.status = e.status;
    } else if (total.status == Status::converged) {
      total.status = e.status;
    }
  }
  total.p = std::min(total.p, 1.0);
  total.q = std::min(total.q, 1.0);
  return total;
}

// The last check before a number leaves the engine: p and q in [0, 1] and p + q = 1, each within
// the error bound (and a few ulps). A result outside is a fault of the engine, reported as an
// error (std::runtime_error, which the CLI reports as an internal error naming the zone), never
// returned as a probability. Within the bound, p and q are clamped to [0, 1], and -0 becomes 0.
Estimate checked(Estimate e) { return checked_estimate(e); }

}  // namespace detail

Estimate checked_estimate(Estimate e) {
  const double slack = 8 * std::numeric_limits<double>::epsilon();
  const double tol = e.abs_err + slack;
  const bool finite = std::isfinite(e.p) && std::isfinite(e.q) && std::isfinite(e.abs_err) && e.abs_err >= 0.0;
  if (!finite || e.p < -tol || e.p > 1.0 + tol || e.q < -tol || e.q > 1.0 + tol ||
      !(std::fabs((e.p + e.q) - 1.0) <= 2 * e.abs_err + slack)) {
    std::ostringstream m;
    m.precision(17);
    m << "numerical check failed (" << to_string(e.method) << "): p = " << e.p << ", q = " << e.q
      << ", error bound " << e.abs_err
      << "; p and q must lie in [0, 1] and sum to 1 within the bound. Please report this with the input";
    throw std::runtime_error(m.str());
  }
  e.p = std::clamp(e.p, 0.0, 1.0) + 0.0;  // + 0.0 turns -0 into +0
  e.q = std::clamp(e.q, 0.0, 1.0) + 0.0;
  return e;
}

const char* to_string(Method method) noexcept {
  switch (method) {
    case Method::exact: return "exact";
    case Method::cubature: return "cubature";
    case Method::monte_carlo: return "monte_carlo";
  }
  return "unknown";
}

Method method_from_string(const std::string& name) {
  if (name == "exact") return Method::exact;
  if (name == "cubature") return Method::cubature;
  if (name == "monte_carlo") return Method::monte_carlo;
  throw input_error("unknown method '" + name + "' (use exact, cubature or monte_carlo)");
}

std::string IntegrateOptions::invalid_reason() const {
  if (!(rel_tolerance > 0.0 && rel_tolerance < 1.0)) return "rel_tolerance must be in (0, 1)";
  if (!(abs_tolerance > 0.0 && abs_tolerance < 1.0)) return "abs_tolerance must be in (0, 1)";
  if (method == Method::monte_carlo && samples == 0) return "samples must be at least 1";
  if (!(confidence > 0.0 && confidence < 1.0)) return "confidence must be in (0, 1)";
  return {};
}

namespace {

// A part-circle profile (ScatterFamily::with_arc): the density on the wedge of directions from
// the mean, divided by the wedge's share of the whole, so P(zone) = P_full(zone & wedge) / share.
// The share is the wedge's angle after whitening, where the density is circular (a linear map
// with det > 0 carries rays to rays and keeps a sweep on its side of a half turn). The exact
// method clips the zone's edges to the wedge (wedge.cpp); Monte Carlo samples directions in the
// wedge only; cubature cuts its rays where they cross the wedge's rays (cubature_integrator.cpp).
// The wedge of a part-circle family after whitening: its first ray's angle and its sweep
// (radians), and its share of the whole turn.
struct WhitenedWedge {
  double from = 0.0, sweep = 0.0, share = 1.0;
};

// The rounding of the whitened region, which no method can undo: of input coordinates far from
// the origin (eps |mean| / sigma_minor in whitened units) and of each vertex's own whitening
// (relative, eps |z| times the spread's condition), as the exact method counts it. Cubature and
// Monte Carlo integrate the rounded region, so their own estimates cannot see it (a half-plane
// 1e6 sigma across, the mean 0.5 sigma outside: cubature 4.7e-12 off, its estimate 4.4e-13,
// where the exact method's bound, with the relative term, was 6.4e-10).
double input_rounding_error(const Region& whitened, const Gaussian& g, const ScatterFamily* family) {
  detail::WhiteningNoise input = detail::whitening_noise(g);
  // (z.vertex_move is already whitened: transformed_about scales it by the largest stretch)
  input.absolute += whitened.vertex_move - std::numeric_limits<double>::epsilon();
  return detail::whitening_error(whitened, input, nullptr, family);
}

WhitenedWedge whitened_wedge(const Gaussian& g) {
  const ScatterFamily& family = g.family();
  const double from = family.arc_from_deg() * kPi / 180.0, sweep = family.arc_sweep_deg() * kPi / 180.0;
  const Vec2 wa = g.whitening() * Vec2(std::cos(from), std::sin(from));
  const Vec2 wb = g.whitening() * Vec2(std::cos(from + sweep), std::sin(from + sweep));
  double whitened = std::atan2(wa.x() * wb.y() - wa.y() * wb.x(), wa.dot(wb));
  if (whitened < 0.0) whitened += kTwoPi;
  if (sweep > kPi && whitened < kPi) whitened += kTwoPi;  // rounding at a whole turn
  return {std::atan2(wa.y(), wa.x()), whitened, std::clamp(whitened / kTwoPi, 0.0, 1.0)};
}

Estimate integrate_wedge(const Gaussian& g, const Region& region, const IntegrateOptions& options) {
  const ScatterFamily& family = g.family();
  const WhitenedWedge w = whitened_wedge(g);
  const Region z = transformed_about(region, g.whitening(), g.mean());
  const ScatterFamily whole = family.without_arc();
  // Monte Carlo draws its directions from the wedge itself: already renormalised.
  if (options.method == Method::monte_carlo) {
    Estimate m = detail::integrate_monte_carlo(z, options, &whole, w.from, w.sweep);
    m.abs_err += input_rounding_error(z, g, &whole);  // as cubature's (below)
    return m;
  }
  Estimate e;
  if (options.method == Method::cubature) {
    e = detail::integrate_cubature(z, options, &whole, w.from, w.sweep);
    e.abs_err += input_rounding_error(z, g, &whole);
  } else {
    e = detail::integrate_exact_wedge(z, options, detail::whitening_noise(g, region.vertex_move), whole, w.from, w.sweep);
  }
  e.p = std::min(e.p / w.share, 1.0);
  e.abs_err /= w.share;
  e.q = 1.0 - e.p;
  return e;
}

// A probability lies in [0, 1], so no estimate p is further than max(p, 1 - p) from it: a bound
// above that (the polygonisation's area times a density bound can reach 1e5 on a large zone,
// issue 16) says less than this one.
Estimate capped(Estimate e) {
  if (std::isfinite(e.p)) e.abs_err = std::min(e.abs_err, std::max(e.p, 1.0 - e.p));
  return e;
}

// --- A compact support wholly inside or outside the region ---------------------------------
// The uniform and the profile families put no mass beyond the whitened radius 2 (their S(2) is
// exactly 0), a part circle none outside its wedge. When no point of the region's boundary lies
// in the support's interior (the open disk, or the open sector of a part circle), that interior
// is connected and lies wholly inside the region or wholly outside it, so P is exactly 1 or
// exactly 0 (a head whose arc fills a corner of its zone: p = 1, q = 0, where the quadrature's
// bound of 1e-14 could never meet a relative request on q = 0).
//
// In floating point a boundary can only be shown to stay within rounding of the support's edge:
// a zone's edge that touches the wetted circle (heads at head-to-head spacing), or runs along a
// wedge's ray (a corner head). So the answer is 1 or 0 with a bound on the mass of such slivers,
// each counted in full (never argued away):
//  - a straight edge whose closest approach d to the mean lies within rounding (m, the
//    whitening's: strewn's WhiteningNoise at radius 2) of the radius 2 cuts at most the circular
//    segment of depth h = 2 - d + m, of area at most (4/3) sqrt(2 * 2 h) h, where the density is
//    at most density_bound(d - m);
//  - an edge inside the disk of a part circle must keep out of the wedge except within
//    kRayAngle (64 ulps of an angle; the rays' own directions carry a few from degrees to
//    radians, cos, sin and the whitening) of its rays: the angle it enters by, alpha, holds at
//    most alpha * 2^2 / 2 of area at the peak density density_bound(0), and its rounding m
//    sweeps at most 2 * 2 * m more.
// Such a 0 is exact up to the rounding of the input, which no method can resolve: the request
// is judged on the other side, 1 (with_status), while the bound still counts the slivers.
// Any other edge inside the support, an arc of the region within reach of it (arcs are tested by
// a distance bound only), or a region polygonised for a boolean operation leaves the estimate
// as computed; so does a sliver bound that is not below the computed bound. A tiny q that is not
// 0 (an edge a hair, more than rounding, inside the support) keeps its own bound and is judged
// relative to q (meets above).
constexpr double kSupportRadius = 2.0;
constexpr double kRayAngle = 64 * std::numeric_limits<double>::epsilon();

// The short angular interval between directions a1 and a2 (radians, seen from the mean)
// against the open wedge: `entry` the measure of its part inside the wedge, `gap` its angular
// distance from the closed wedge (0 when they meet); nullopt when it reaches more than
// kRayAngle inside both rays (it crosses the wedge's interior).
struct WedgeEntry {
  double entry = 0.0, gap = 0.0;
};

std::optional<WedgeEntry> wedge_entry(double a1, double a2, const WhitenedWedge& w) {
  const auto rel = [&w](double a) {
    a -= w.from;
    return a - kTwoPi * std::floor(a / kTwoPi);
  };
  const double b1 = rel(a1), b2 = rel(a2), lo = std::min(b1, b2), hi = std::max(b1, b2);
  const double first = kRayAngle, last = w.sweep - kRayAngle;
  const bool wraps = hi - lo > kPi;  // then the interval is [hi, 2 pi) and [0, lo]
  if (last > first && (wraps ? (lo > first || hi < last) : (lo < last && hi > first))) return std::nullopt;
  if (wraps) return WedgeEntry{std::max(0.0, std::min(lo, w.sweep)) + std::max(0.0, w.sweep - hi), 0.0};
  return WedgeEntry{std::max(0.0, std::min(hi, w.sweep) - lo), std::max(0.0, std::min(lo - w.sweep, kTwoPi - hi))};
}

struct SupportSlivers {
  const ScatterFamily& family;
  const WhitenedWedge* wedge;  // null for a whole circle
  double noise;                // the whitening's rounding of a boundary point, whitened units
  double mass = 0.0;           // bound on the support's mass the boundary may cut off
};

// Adds a whitened segment's sliver bound; false when it enters the support's interior.
bool add_segment(SupportSlivers& s, const Vec2& a, const Vec2& b) {
  const Vec2 v = b - a;
  const double vv = v.squaredNorm();
  const double tc = vv > 0.0 ? std::clamp(-a.dot(v) / vv, 0.0, 1.0) : 0.0;
  const Vec2 c = a + tc * v;  // the closest point to the mean
  const double d = c.norm(), outer = kSupportRadius + s.noise;
  if (d >= outer) return true;
  if (d >= kSupportRadius - s.noise) {
    const double h = outer - d;
    s.mass += s.family.density_bound(std::max(d - s.noise, 0.0)) * 4.0 / 3.0 * std::sqrt(2 * kSupportRadius * h) * h;
    return true;
  }
  if (!s.wedge) return false;
  // The part within the disk of radius `outer`, cut at c into two straight halves, along each
  // of which the direction from the mean turns monotonically, by less than a half turn.
  const double half = vv > 0.0 ? std::sqrt(std::max(outer * outer - d * d, 0.0) / vv) : 0.0;
  for (const double te : {std::max(0.0, tc - half), std::min(1.0, tc + half)}) {
    const Vec2 e = a + te * v;
    if ((e - c).norm() <= s.noise) continue;  // no length on this side
    // A half starting at the mean has the direction of its travel there.
    const double a1 = d > s.noise ? std::atan2(c.y(), c.x()) : std::atan2(e.y() - c.y(), e.x() - c.x());
    const std::optional<WedgeEntry> w = wedge_entry(a1, std::atan2(e.y(), e.x()), *s.wedge);
    if (!w) return false;
    // The rounding m moves the piece into the wedge only where it runs within m of it: all of
    // it when it meets the wedge, else only its part within m / sin(gap) of the mean.
    const double reach = w->gap > 0.0 ? std::min(outer, s.noise / std::sin(std::min(w->gap, kPi / 2))) : outer;
    s.mass += s.family.density_bound(0.0) * (w->entry * outer * outer / 2 + 2 * reach * s.noise);
  }
  return true;
}

// The least distance from the origin to an arc's whole ellipse: |c| - s_max or s_min - |c|.
double arc_distance_bound(const Edge& e) {
  const Mat2& m = e.axes;
  const double f = m.squaredNorm(), det = std::fabs(m.determinant());
  const double s_max = std::sqrt(0.5 * (f + std::sqrt(std::max(f * f - 4 * det * det, 0.0))));
  const double s_min = s_max > 0.0 ? det / s_max : 0.0;
  const double c = e.centre.norm();
  return std::max(c - s_max, s_min - c);
}

// p and q as 1 and 0 (or 0 and 1) with the slivers' bound when the support is clear of the
// region's boundary (see above); nullopt otherwise. The computed estimate says which: its bound
// is far below 1/2 whenever it is usable.
std::optional<Estimate> settled_by_support(Estimate e, const Gaussian& g, const Region& region) {
  const ScatterFamily& family = g.family();
  if (family.is_normal() || family.survival(kSupportRadius) != 0.0) return std::nullopt;
  if (region.approximation_area > 0.0 || !(e.abs_err > 0.0 && e.abs_err < 0.25) || !std::isfinite(e.p)) return std::nullopt;
  const detail::WhiteningNoise noise = detail::whitening_noise(g, region.vertex_move);
  std::optional<WhitenedWedge> wedge;
  if (family.has_arc()) wedge = whitened_wedge(g);
  // The density on a wedge is the whole circle's over the wedge's share.
  const ScatterFamily whole = family.without_arc();
  SupportSlivers slivers{whole, wedge ? &*wedge : nullptr, noise.absolute + noise.relative * kSupportRadius};
  const Region z = transformed_about(region, g.whitening(), g.mean());
  for (const Loop& loop : z.loops)
    for (const Edge& edge : loop) {
      if (edge.kind == Edge::Kind::arc) {
        if (arc_distance_bound(edge) < kSupportRadius + slivers.noise) return std::nullopt;
      } else if (!add_segment(slivers, edge.from, edge.to)) {
        return std::nullopt;
      }
    }
  const double bound = slivers.mass / (wedge ? wedge->share : 1.0);
  if (!(bound < e.abs_err)) return std::nullopt;
  const bool inside = e.p > 0.5;
  e.p = inside ? 1.0 : 0.0;
  e.q = inside ? 0.0 : 1.0;
  e.abs_err = bound;
  return e;
}

// How a component's estimate ended: its budget, or a bound above the request, then checked. A
// p or q that settled_by_support proved 0 is judged on the other side, 1.
Estimate with_status(Estimate e, const IntegrateOptions& options, const Region& region, bool settled = false) {
  e = capped(e);
  if (!e.converged) e.status = Status::budget_exhausted;
  const bool met = settled ? e.abs_err <= std::max(options.abs_tolerance, options.rel_tolerance * std::max(e.p, e.q))
                           : detail::meets(e, options);
  // Monte Carlo is judged as the others are: a sampled bound above the request is "not met"
  // (an assessment once said "every result met the request" with a bound 0.15 of p at 1e-8).
  if (e.converged && !met) {
    e.converged = false;
    e.status = Status::tolerance_not_met;
    const std::string sampled = options.method == Method::monte_carlo ? e.message : std::string();
    e.message = tolerance_message(e.abs_err, region);
    if (!sampled.empty()) e.message += "; more samples would narrow it (" + sampled + ")";
  }
  try {
    return detail::checked(e);
  } catch (const std::runtime_error&) {  // the final check failed: an invalid region is the input's fault
    refuse_if_invalid(region);
    throw;
  }
}

}  // namespace

Estimate integrate(const Gaussian& g, const Region& region, const IntegrateOptions& options) {
  if (const std::string why = options.invalid_reason(); !why.empty()) throw input_error(why);
  require_loops(region);
  if (region.empty()) {
    // Only approximation patches (require_usable): p = 0, and what the patches may hold is the
    // bound. A part-circle profile's density over its wedge is not bounded here: 1, not met.
    Estimate e;
    e.method = options.method;
    e.p = 0.0;
    e.q = 1.0;
    const Region z = transformed_about(region, g.whitening(), g.mean());
    const ScatterFamily* family = g.family().is_normal() ? nullptr : &g.family();
    e.abs_err = g.family().has_arc() ? 1.0 : std::min(detail::approximation_error(z, family), 1.0);
    e.interval_low = 0.0;
    e.interval_high = e.abs_err;
    return with_status(e, options, region);
  }
  // Monte Carlo keeps its sampled interval; the others are settled exactly where they can be.
  const auto finish = [&](const Estimate& e) {
    if (options.method != Method::monte_carlo)
      if (const std::optional<Estimate> s = settled_by_support(e, g, region)) return with_status(*s, options, region, true);
    return with_status(e, options, region);
  };
  // Whitening: z = L^{-1} (x - mean) is standard normal; segments stay segments, arcs stay arcs.
  // In the local frame of the mean: the difference x - mean first (exact for nearby x by
  // Sterbenz's lemma), then the product, so that national-grid coordinates lose nothing.
  const Mat2& w = g.whitening();
  const detail::WhiteningNoise noise = detail::whitening_noise(g, region.vertex_move);
  // The normal's closed forms need no family; any other is passed down.
  const ScatterFamily* family = g.family().is_normal() ? nullptr : &g.family();
  Estimate e;
  std::optional<Estimate> polygon;
  if (options.method == Method::exact && !family &&
      (polygon = detail::integrate_exact_polygon(region, w, g.mean(), options, noise))) {
    e = *polygon;  // (its pass proved the region normalised)
  } else {
    require_normalised(region);
    if (g.family().has_arc()) return finish(integrate_wedge(g, region, options));
    const Region z = transformed_about(region, w, g.mean());
    switch (options.method) {
      case Method::exact: e = detail::integrate_exact(z, options, noise, family); break;
      case Method::cubature:
        e = detail::integrate_cubature(z, options, family);
        e.abs_err += input_rounding_error(z, g, family);
        break;
      // The samples' count is exact but the zone they fall in is the rounded one: the input's
      // rounding is added as for cubature (a numerical trial: sigma 1e-11 m at x = 5e5 m, the
      // mean on an edge, gave 0.977 +- 5e-4 for 0.5).
      case Method::monte_carlo:
        e = detail::integrate_monte_carlo(z, options, family);
        e.abs_err += input_rounding_error(z, g, family);
        break;
    }
  }
  return finish(e);
}

Estimate integrate(const ScatterModel& model, const Region& region,
                   const IntegrateOptions& options) {
  // A lone component needs neither the bounds nor the ordering.
  if (model.components().size() == 1 && model.components().front().weight == 1.0)
    return integrate(model.components().front().gaussian, region, options);
  // Progress (Monte Carlo): each component one equal share, in the order they are taken.
  double started = 0.0;
  const double count = static_cast<double>(model.components().size());
  std::vector<long long> counted_hits(model.components().size(), 0);  // Monte Carlo: each component's hits
  Estimate total = detail::integrate_components(model, bounds(region), options, [&](std::size_t k) {
    IntegrateOptions own = options;
    if (options.progress)
      own.progress = [&options, share = started++, count](double done) { options.progress((share + done) / count); };
    const Estimate e = integrate(model.components()[k].gaussian, region, own);
    // p = hits / samples exactly as sampled (before the clamp to [0, 1], which leaves it as is).
    if (options.method == Method::monte_carlo) counted_hits[k] = std::llround(e.p * static_cast<double>(options.samples));
    return e;
  });
  // A component's "error bound X exceeds the request" speaks for the whole mixture with the
  // mixture's bound.
  total = capped(total);
  if (options.method == Method::monte_carlo) {
    // Each component is sampled on its own; the mixture is judged on its own bound, and its
    // message counts every component's hits (one component's count beside the mixture's p read
    // as the mixture's).
    std::ostringstream m;
    m << "components sampled separately, " << options.samples << " samples each, seed " << options.seed << ": hits";
    for (std::size_t k = 0; k < model.components().size(); ++k)
      m << (k == 0 ? " " : ", ") << counted_hits[k];
    m << "; p is their sum weighted by the components' weights, the interval the weighted "
      << options.confidence * 100 << "% Clopper-Pearson intervals";
    const bool met = detail::meets(total, options);
    total.converged = met && total.status != Status::budget_exhausted;
    if (total.status != Status::budget_exhausted) total.status = met ? Status::converged : Status::tolerance_not_met;
    total.message = met ? m.str()
                        : tolerance_message(total.abs_err, region) + "; more samples would narrow it (" + m.str() + ")";
  } else if (total.status == Status::tolerance_not_met) {
    total.message = tolerance_message(total.abs_err, region);
  }
  return detail::checked(total);
}

Verification verify(const ScatterModel& model, const Region& region,
                    const IntegrateOptions& options) {
  IntegrateOptions second = options;
  second.method = options.method == Method::exact ? Method::cubature : Method::exact;
  return verify(integrate(model, region, options), integrate(model, region, second));
}

Verification verify(const Estimate& primary, const Estimate& secondary) {
  Verification v;
  v.primary = primary;
  v.secondary = secondary;
  const double allowed = v.primary.abs_err + v.secondary.abs_err;
  const double dp = std::fabs(v.primary.p - v.secondary.p);
  const double dq = std::fabs(v.primary.q - v.secondary.q);
  // A small slack for the last bits of two independent roundings. Written so that a NaN
  // anywhere (value or bound) disagrees.
  const double slack = 1e-14 * std::max(v.primary.p, v.secondary.p) + 1e-300;
  v.agree = dp <= allowed + slack && dq <= allowed + 1e-14;
  std::ostringstream m;
  m << to_string(v.primary.method) << " p = " << v.primary.p << ", "
    << to_string(v.secondary.method) << " p = " << v.secondary.p << ", difference " << dp
    << (v.agree ? " within " : " exceeds ") << "the combined bound " << allowed;
  v.message = m.str();
  return v;
}

double probability_of_any(double p, double events) {
  if (!(p >= 0.0 && p <= 1.0)) throw input_error("probability must be in [0, 1]");
  if (!(events >= 0.0)) throw input_error("events must be >= 0");
  // Endless exposure: any chance at all of a hit makes one certain.
  if (std::isinf(events)) return p > 0.0 ? 1.0 : 0.0;
  if (p == 1.0) return events > 0 ? 1.0 : 0.0;
  return -std::expm1(events * std::log1p(-p));
}

}  // namespace strewn
