// The cubature method: the region is a signed sum of cones, one per boundary edge, from an apex
// of its loop; each cone {P + u (z(s) - P): u in [0, 1], s on the edge} is a smooth image of a
// rectangle, with Jacobian u * (z(s) - P) x z'(s). With the apex at the centre of an ellipse this
// is a polar patch; for straight edges the cones are triangles mapped to the unit square.
// Each piece of a cone is integrated as an iterated integral by hcubature in one dimension
// (Gauss-Kronrod 7-15, h-adaptive) at both levels: the outer rule over s integrates the inner
// integral over u together with the inner error estimate, so that the inner errors enter the
// bound through the outer rule's positive weights. On these smooth integrands the 15-point rule
// reaches 1e-12 with a few thousand evaluations per polygon where the two-dimensional
// Genz-Malik rule needs a hundred thousand.
// Independent of the exact method: it integrates the density itself, not a boundary form.
#include <cubature.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <sstream>
#include <vector>

#include "edge_tail.hpp"
#include "integrators.hpp"
#include "vector_math.hpp"

namespace strewn::detail {
namespace {

constexpr double kOneDivTwoPi = 0.15915494309189533577;
constexpr double kPi = 3.14159265358979323846;
// One Gauss-Kronrod rule: the fewest evaluations hcubature makes in one dimension.
constexpr std::uint64_t kRulePoints = 15;

struct Cone {
  const Edge* edge;
  Vec2 apex;
  double sign;  // -1 when the edge runs backwards in its parameter
  std::uint64_t calls = 0;
  std::uint64_t max_calls = 0;  // the evaluation budget left for the whole call
  // The current piece: u range and the inner tolerances.
  double u0 = 0.0, u1 = 1.0;
  double inner_abs = 0.0, inner_rel = 0.0;
};

// A bundle of rays of a cone, one per outer node s: the apex plus u times the spoke
// z(s) - apex, with the factor sign * (spoke x z'(s)) / (2 pi) of the Jacobian that does not
// depend on u. The inner integrals of a bundle are one vector integrand (one component per ray),
// so that hcubature's bookkeeping is paid once per bundle rather than once per ray.
constexpr std::size_t kBundle = 32;
struct Rays {
  Cone* cone;
  int count;
  double spoke_x[kBundle], spoke_y[kBundle], factor[kBundle];
};

// Inner integrand, vectorised over u and over the rays: the density along each ray times u.
int ray_integrand(unsigned, std::size_t npt, const double* u, void* data, unsigned fdim, double* value) {
  const Rays& r = *static_cast<Rays*>(data);
  r.cone->calls += npt * fdim;
  const double ax = r.cone->apex.x(), ay = r.cone->apex.y();
  for (std::size_t i = 0; i < npt; ++i)
    for (unsigned j = 0; j < fdim; ++j) {
      const double px = ax + u[i] * r.spoke_x[j], py = ay + u[i] * r.spoke_y[j];
      value[i * fdim + j] = -0.5 * (px * px + py * py);
    }
  exp_in_place(value, static_cast<int>(npt * fdim));
  for (std::size_t i = 0; i < npt; ++i)
    for (unsigned j = 0; j < fdim; ++j) value[i * fdim + j] *= r.factor[j] * u[i];
  return 0;
}

// Outer integrand, vectorised over s: for each s the inner integral over u and its error
// estimate (two components). An arc's sines and cosines go through the batched functions.
int cone_integrand(unsigned, std::size_t npt, const double* s, void* data, unsigned, double* value) {
  auto* cone = static_cast<Cone*>(data);
  const Edge& e = *cone->edge;
  double c[kBundle], sn[kBundle], val[kBundle], err[kBundle];
  const double ax = cone->apex.x(), ay = cone->apex.y();
  Rays rays;
  rays.cone = cone;
  for (std::size_t start = 0; start < npt; start += kBundle) {
    const int n = static_cast<int>(std::min(kBundle, npt - start));
    rays.count = n;
    if (e.kind == Edge::Kind::arc) {
      for (int i = 0; i < n; ++i) c[i] = s[start + i];
      cos_sin_in_place(c, sn, n);
    }
    for (int i = 0; i < n; ++i) {
      double sx, sy, dx, dy;
      if (e.kind == Edge::Kind::arc) {
        const Mat2& a = e.axes;
        sx = e.centre.x() + a(0, 0) * c[i] + a(0, 1) * sn[i] - ax;
        sy = e.centre.y() + a(1, 0) * c[i] + a(1, 1) * sn[i] - ay;
        dx = -a(0, 0) * sn[i] + a(0, 1) * c[i];
        dy = -a(1, 0) * sn[i] + a(1, 1) * c[i];
      } else {
        dx = e.to.x() - e.from.x();
        dy = e.to.y() - e.from.y();
        sx = e.from.x() - ax + s[start + i] * dx;
        sy = e.from.y() - ay + s[start + i] * dy;
      }
      rays.spoke_x[i] = sx;
      rays.spoke_y[i] = sy;
      rays.factor[i] = cone->sign * kOneDivTwoPi * (sx * dy - sy * dx);
    }
    const std::uint64_t left = cone->calls < cone->max_calls ? cone->max_calls - cone->calls : 0;
    const int status = hcubature_v(static_cast<unsigned>(n), ray_integrand, &rays, 1, &cone->u0, &cone->u1,
                                   static_cast<size_t>(std::max(left / n, kRulePoints)), cone->inner_abs,
                                   cone->inner_rel, ERROR_INDIVIDUAL, val, err);
    if (status != 0) return status;
    for (int i = 0; i < n; ++i) {
      value[2 * (start + i)] = val[i];
      value[2 * (start + i) + 1] = err[i];
    }
  }
  return 0;
}

// A whole ellipse is one polar patch about its centre. Any other loop is fanned from its first
// vertex: the cones then stay inside the loop's convex hull, whereas cones from an arc's centre
// would overlap and cancel (an annular sector far from the mean would lose eight digits).
Vec2 apex_of(const Loop& loop) {
  if (loop.size() == 1 && loop.front().kind == Edge::Kind::arc) return loop.front().centre;
  return loop.front().from;
}

}  // namespace

namespace {

struct ConeSum {
  double value = 0.0;
  double abs_err = 0.0;
  double l1 = 0.0;  // sum of |piece values|: how much the pieces cancel
  std::uint64_t evaluations = 0;
  bool budget_hit = false;
  bool failed = false;
};

struct Box {
  double u0, u1, s0, s1;
};

double arc_bulge(const Cone& cone, const Box& b);

// Centre and radius of a disk holding the image of a (u, s) box under the cone map.
void box_image_disk(const Cone& cone, const Box& b, Vec2& centre, double& radius) {
  auto at = [&](double u, double s) -> Vec2 { return cone.apex + u * (cone.edge->point(s) - cone.apex); };
  centre = at(0.5 * (b.u0 + b.u1), 0.5 * (b.s0 + b.s1));
  radius = 0.0;
  for (double u : {b.u0, b.u1})
    for (double s : {b.s0, b.s1}) radius = std::max(radius, (at(u, s) - centre).norm());
  radius += arc_bulge(cone, b);
}

// How far the image of a box's curved side may bulge beyond its chord: the arc's
// big * (1 - cos(ds / 2)), scaled by u toward the apex.
double arc_bulge(const Cone& cone, const Box& b) {
  if (cone.edge->kind != Edge::Kind::arc) return 0.0;
  const double big = std::max(cone.edge->axes.col(0).norm(), cone.edge->axes.col(1).norm());
  return b.u1 * big * (1.0 - std::cos(0.5 * (b.s1 - b.s0)));
}

// Splits a cone's box until each piece near the mean is at most a couple of standard deviations
// across, so that hcubature's first rule cannot miss the density's peak inside a large region
// (the failure mode of adaptive cubature). Pieces whose image stays far from the mean are
// dropped, their mass bounded by the density at their nearest possible point times their area.
void split_box(const Cone& cone, const Box& b, double drop_below, int depth, std::vector<Box>& out,
               double& dropped_bound, double& peak) {
  Vec2 centre;
  double radius;
  box_image_disk(cone, b, centre, radius);
  const double nearest = std::max(centre.norm() - radius, 0.0);
  const double mass_bound = kOneDivTwoPi * std::exp(-0.5 * nearest * nearest) * kPi * radius * radius;
  if (mass_bound < drop_below) {
    dropped_bound += mass_bound;
    return;
  }
  // Near the mean a piece must be about two standard deviations across. Farther out, at distance
  // d, the density falls by e per 1/d, so a piece that could hold a noticeable share of the
  // mass (relative to the densest piece seen, `peak`) must be about 6/d across.
  const double size = nearest <= 3.0 ? 2.0 : 6.0 / nearest;
  peak = std::max(peak, mass_bound);
  if (radius <= size || depth >= 24 || (nearest > 3.0 && mass_bound < 1e-12 * peak)) {
    out.push_back(b);
    return;
  }
  // Halve the side whose image is longer.
  auto at = [&](double u, double s) -> Vec2 { return cone.apex + u * (cone.edge->point(s) - cone.apex); };
  const double su = (at(b.u1, 0.5 * (b.s0 + b.s1)) - at(b.u0, 0.5 * (b.s0 + b.s1))).norm();
  const double ss = (at(b.u1, b.s1) - at(b.u1, b.s0)).norm() + 2 * arc_bulge(cone, b);
  if (su >= ss) {
    const double m = 0.5 * (b.u0 + b.u1);
    split_box(cone, {b.u0, m, b.s0, b.s1}, drop_below, depth + 1, out, dropped_bound, peak);
    split_box(cone, {m, b.u1, b.s0, b.s1}, drop_below, depth + 1, out, dropped_bound, peak);
  } else {
    const double m = 0.5 * (b.s0 + b.s1);
    split_box(cone, {b.u0, b.u1, b.s0, m}, drop_below, depth + 1, out, dropped_bound, peak);
    split_box(cone, {b.u0, b.u1, m, b.s1}, drop_below, depth + 1, out, dropped_bound, peak);
  }
}

// Sum over all cones, each piece integrated to the absolute tolerance abs_each (and relative
// tolerance rel_each, 0 for none).
ConeSum sum_cones(const Region& z, double abs_each, double rel_each, std::uint64_t max_evals) {
  ConeSum total;
  std::uint64_t used = 0;
  for (const Loop& loop : z.loops) {
    const Vec2 apex = apex_of(loop);
    for (const Edge& e : loop) {
      double lo = e.param_from(), hi = e.param_to();
      double sign = 1.0;
      if (hi < lo) {
        std::swap(lo, hi);
        sign = -1.0;
      }
      if (e.kind == Edge::Kind::segment) {
        const Vec2 a = e.from - apex, b = e.to - apex;
        if (std::fabs(a.x() * b.y() - a.y() * b.x()) <= 1e-15 * (a.squaredNorm() + b.squaredNorm()))
          continue;  // the edge is collinear with the apex: a cone of no area
      }
      Cone cone{&e, apex, sign};
      std::vector<Box> boxes;
      double dropped = 0.0;
      double peak = 0.0;
      split_box(cone, {0.0, 1.0, lo, hi}, 0.01 * abs_each, 0, boxes, dropped, peak);
      const double share = abs_each / static_cast<double>(std::max<std::size_t>(boxes.size(), 1));
      for (const Box& b : boxes) {
        // The budget is shared by the whole call; every piece gets at least one rule's worth.
        cone.max_calls = used < max_evals ? max_evals - used : 0;
        const std::uint64_t outer_nodes = std::max(cone.max_calls, kRulePoints * kRulePoints) / kRulePoints;
        // The inner errors, summed with the outer rule's positive weights (which add up to the
        // piece's s range), stay a tenth of the piece's share.
        cone.u0 = b.u0;
        cone.u1 = b.u1;
        cone.inner_abs = 0.1 * share / (b.s1 - b.s0);
        cone.inner_rel = 0.1 * rel_each;
        double val[2] = {0.0, 0.0}, err[2] = {0.0, 0.0};
        const int status = hcubature_v(2, cone_integrand, &cone, 1, &b.s0, &b.s1, static_cast<size_t>(outer_nodes),
                                       share, rel_each, ERROR_L1, val, err);
        // Outer error, plus the inner errors as integrated, plus the outer error of that sum.
        double piece_err = err[0] + std::fabs(val[1]) + err[1];
        if (status != 0 || !std::isfinite(val[0]) || !std::isfinite(piece_err)) {
          total.failed = true;
          piece_err = std::numeric_limits<double>::infinity();
        }
        // hcubature returns success when it stops at the evaluation limit; check the estimate.
        if (piece_err > std::max(share, rel_each * std::fabs(val[0]))) total.budget_hit = true;
        total.value += val[0];
        total.l1 += std::fabs(val[0]);
        total.abs_err += piece_err;
        used += cone.calls;
        total.evaluations += cone.calls;
        cone.calls = 0;
      }
      total.abs_err += dropped;
    }
  }
  return total;
}

std::size_t cone_count(const Region& z) {
  std::size_t n = 0;
  for (const Loop& l : z.loops) n += l.size();
  return std::max<std::size_t>(n, 1);
}

}  // namespace

Estimate integrate_cubature(const Region& z, const IntegrateOptions& options) {
  Estimate est;
  est.method = Method::cubature;
  // Beyond 38.5 standard deviations the density underflows double precision: p is 0 to every
  // digit a double holds, and the integrand would be zero everywhere hcubature looks.
  const BoundingBox box = bounds(z);
  const Vec2 gap = (box.min.cwiseMax(Vec2::Zero()) - Vec2::Zero()).cwiseMax(-box.max.cwiseMin(Vec2::Zero()));
  if (gap.norm() > 38.5) {
    est.p = 0.0;
    est.q = 1.0;
    est.abs_err = 1e-300;
    est.message = "region lies beyond 38.5 standard deviations: p underflows to 0";
    return est;
  }
  const double n = static_cast<double>(cone_count(z));
  // Pieces of opposite sign partly cancel, so a relative tolerance per piece bounds the error of
  // the sum only relative to the sum of |pieces| (l1). The first pass asks each piece for a
  // tenth of the relative tolerance; where the pieces cancel so much that this does not bound
  // the sum to rel * |p|, a second pass asks each piece for rel * |p| / l1 (|p| from the first
  // pass, less its error). The absolute floor is shared by the cones. The estimate is reported
  // with a safety factor of 10 (below), so every request is ten times tighter.
  const double abs_each = 0.05 * options.abs_tolerance / n;
  ConeSum fine = sum_cones(z, abs_each, 0.1 * options.rel_tolerance, options.max_evaluations);
  std::uint64_t evaluations = fine.evaluations;
  const double wanted = std::max(options.abs_tolerance, options.rel_tolerance * std::fabs(fine.value));
  if (10 * fine.abs_err > wanted && fine.l1 > std::fabs(fine.value) && !fine.failed && !fine.budget_hit) {
    const double p_low = std::max(std::fabs(fine.value) - fine.abs_err, 0.01 * std::fabs(fine.value));
    const double rel_each = 0.1 * options.rel_tolerance * std::min(p_low / fine.l1, 1.0);
    const std::uint64_t left = options.max_evaluations > evaluations ? options.max_evaluations - evaluations : 0;
    fine = sum_cones(z, abs_each, rel_each, left);
    evaluations += fine.evaluations;
  }
  est.evaluations = evaluations;
  est.p = std::clamp(fine.value, 0.0, 1.0);
  est.q = 1.0 - est.p;  // no direct complement here: q's accuracy is absolute
  // hcubature's error estimate is a heuristic (difference of embedded rules); a safety factor
  // of 10 makes it a bound on every case of the property tests.
  est.abs_err = 10 * fine.abs_err + 4 * std::numeric_limits<double>::epsilon() * est.p +
                approximation_error(z);
  if (fine.failed) {
    est.converged = false;
    est.message = "hcubature failed";
  } else if (fine.budget_hit) {
    est.converged = false;
    std::ostringstream m;
    m << "hcubature stopped at its evaluation limit (" << options.max_evaluations
      << " in all) before reaching the requested tolerance";
    est.message = m.str();
  }
  return est;
}

}  // namespace strewn::detail
