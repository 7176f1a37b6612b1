// The cubature method: the region is a signed sum of cones, one per boundary edge, from an apex
// of its loop; each cone {P + u (z(s) - P): u in [0, 1], s on the edge} is a smooth image of a
// rectangle, integrated by hcubature (Genz-Malik, h-adaptive) with Jacobian
// u * (z(s) - P) x z'(s). With the apex at the centre of an arc these are polar patches (disks,
// ellipses, annular sectors); for straight edges they are triangles mapped to the unit square.
// Independent of the exact method: it integrates the density itself, not a boundary form.
#include <cubature.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <sstream>

#include "integrators.hpp"

namespace strewn::detail {
namespace {

constexpr double kOneDivTwoPi = 0.15915494309189533577;

struct Cone {
  const Edge* edge;
  Vec2 apex;
  double sign;  // -1 when the edge runs backwards in its parameter
  std::uint64_t calls = 0;
};

int cone_integrand(unsigned, const double* x, void* data, unsigned, double* value) {
  auto* cone = static_cast<Cone*>(data);
  ++cone->calls;
  const double u = x[0], s = x[1];
  const Vec2 z = cone->edge->point(s);
  const Vec2 spoke = z - cone->apex;
  const Vec2 p = cone->apex + u * spoke;
  const Vec2 dz = cone->edge->tangent(s);
  const double jac = u * (spoke.x() * dz.y() - spoke.y() * dz.x());
  *value = cone->sign * kOneDivTwoPi * std::exp(-0.5 * p.squaredNorm()) * jac;
  return 0;
}

Vec2 apex_of(const Loop& loop) {
  for (const Edge& e : loop)
    if (e.kind == Edge::Kind::arc) return e.centre;
  return loop.front().from;
}

}  // namespace

namespace {

struct ConeSum {
  double value = 0.0;
  double abs_err = 0.0;
  std::uint64_t evaluations = 0;
  bool budget_hit = false;
  bool failed = false;
};

// Sum over all cones, each integrated to the absolute tolerance abs_each (and relative
// tolerance rel_each, 0 for none).
ConeSum sum_cones(const Region& z, double abs_each, double rel_each, std::uint64_t max_evals) {
  ConeSum total;
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
      const double xmin[2] = {0.0, lo}, xmax[2] = {1.0, hi};
      double val = 0.0, err = 0.0;
      const int status = hcubature(1, cone_integrand, &cone, 2, xmin, xmax,
                                   static_cast<size_t>(max_evals), abs_each, rel_each,
                                   ERROR_INDIVIDUAL, &val, &err);
      total.evaluations += cone.calls;
      if (status != 0 || !std::isfinite(val) || !std::isfinite(err)) {
        total.failed = true;
        err = std::numeric_limits<double>::infinity();
      }
      // hcubature returns success when it stops at the evaluation limit; check the estimate.
      if (err > std::max(abs_each, rel_each * std::fabs(val))) total.budget_hit = true;
      total.value += val;
      total.abs_err += err;
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
  const double n = static_cast<double>(cone_count(z));
  // Cones of opposite sign partly cancel, so a relative tolerance per cone would not bound the
  // relative error of the sum. A coarse first pass sizes p; the second asks every cone for an
  // absolute error of rel_tolerance * p / n, so that the sum's error is at most rel * p.
  const ConeSum rough = sum_cones(z, 0.0, 1e-3, options.max_evaluations);
  const double target = std::max(options.abs_tolerance,
                                 options.rel_tolerance * std::max(std::fabs(rough.value) - rough.abs_err,
                                                                  0.01 * std::fabs(rough.value)));
  const ConeSum fine = sum_cones(z, 0.5 * target / n, 0.0, options.max_evaluations);
  est.evaluations = rough.evaluations + fine.evaluations;
  est.p = std::clamp(fine.value, 0.0, 1.0);
  est.q = 1.0 - est.p;  // no direct complement here: q's accuracy is absolute
  est.abs_err = fine.abs_err + 4 * std::numeric_limits<double>::epsilon() * est.p +
                z.approximation_area * kOneDivTwoPi;
  if (fine.failed) {
    est.converged = false;
    est.message = "hcubature failed";
  } else if (fine.budget_hit) {
    est.converged = false;
    std::ostringstream m;
    m << "hcubature stopped at its evaluation limit (" << options.max_evaluations
      << " per edge) before reaching the requested tolerance";
    est.message = m.str();
  }
  return est;
}

}  // namespace strewn::detail
