// I_e of straight segments: Owen's T closed forms per end, pieces with a quadrature fallback where
// the ends cancel, and the batched sum over many segments (the exact method's hot path).
#include "integrate/exact/edge_tail.hpp"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <cstring>
#include <optional>

#include "integrate/exact/gauss_kronrod.hpp"
#include "integrate/exact/short_edge_rule.hpp"
#include "special/fma_clones.hpp"
#include "special/four_lanes.hpp"
#include "special/owens_t_batch.hpp"
#include "special/vector_math.hpp"
#include "strewn/constants.hpp"
#include "strewn/owens_t.hpp"

namespace strewn::detail {
namespace {

// Relative accuracy of strewn::owens_t as measured against boost::math::owens_t over a dense
// grid (tests/engine/special/owens_t_test.cpp asserts it), with a safety factor.
constexpr double kOwensTRel = 4e-15;
// Above this ratio of term size to result, the closed form would lose more than 4 of its 16
// digits (the loss is in the error bound either way), so the edge is integrated by quadrature
// instead. Large h makes the closed form cancel like exp(h^2/2), so this is common far out.
constexpr double kMaxCancellation = 1e4;

// Quantities that depend on h alone, computed once per edge and shared by its pieces.
struct EdgeShared {
  double h = 0.0;
  double q_h = 0.0;         // Q(h)
  double half_erf_h = 0.0;  // 1/2 - Q(h), accurate for small h
  double t_h_one = 0.0;     // T(h, 1) = Phi(h) Q(h) / 2 (Owen 1956)
  bool straddles = false;   // the edge reaches |t| = h, where the pieces meet
};

EdgeShared shared_for(double h, bool straddles) {
  EdgeShared e;
  e.h = h;
  e.straddles = straddles;
  if (straddles) {
    const double q = normal_upper_tail(h);
    e.q_h = q;
    // 1/2 - Q(h) cancels only for small h (Q(1) = 0.159: at most one ulp lost beyond).
    e.half_erf_h = h >= 1.0 ? 0.5 - q : 0.5 * std::erf(h * kOneDivRootTwo);
    e.t_h_one = 0.5 * (1.0 - q) * q;
  }
  return e;
}

// T(x, a), taking T(h, +-1) from the shared values: the pieces of an edge meet at |t| = h,
// where both the direct form T(h, t/h) and the reflected T(t, h/t) are T(h, 1).
double owens_t_at(const EdgeShared& e, double x, double a) {
  if (e.straddles && x == e.h && (a == 1.0 || a == -1.0)) return a * e.t_h_one;
  return owens_t(x, a);
}

// Q(x), taking Q(h) from the shared values: a reflected piece starts or ends at t = h.
double upper_tail_at(const EdgeShared& e, double x) {
  return e.straddles && x == e.h ? e.q_h : normal_upper_tail(x);
}

// Where the quadrature of a piece whose ends cancel may stop: |t| = sqrt(t_near^2 + 2
// kReachExponent), t_near the piece's point nearest the foot. exp(-(h^2 + t^2) / 2) has fallen
// there by exp(-kReachExponent) (3e-20) from its value at t_near, and beyond it the pieces add
// a bound of what is left. Without the cut a piece far along its line and thousands of sigma
// long (a thin strip 20 sigma out reaching to 7000 sigma) put all its mass within 1/t of its
// near end, where the first Gauss-Kronrod rule has no node: the rule saw zeros, estimated
// 0 +- 0 and the edge was lost (p 36% low under a bound of 1e-7 of it).
constexpr double kReachExponent = 45.0;
double quadrature_reach(double t_near) { return std::sqrt(t_near * t_near + 2.0 * kReachExponent); }

// T(h, b/h) - T(h, a/h) for |a|, |b| <= h by the direct form.
Contribution direct_piece(const EdgeShared& e, double a, double b, double rel_tol) {
  const double h = e.h;
  double ta, tb;
  if (e.straddles && (std::fabs(a) == h || std::fabs(b) == h)) {
    ta = owens_t_at(e, h, a / h);
    tb = owens_t_at(e, h, b / h);
  } else {
    owens_t_two(h, a / h, h, b / h, ta, tb);  // both ends share h
  }
  Contribution c;
  c.value = tb - ta;
  c.evaluations = 2;
  const double terms = std::fabs(ta) + std::fabs(tb);
  if (terms > kMaxCancellation * std::fabs(c.value)) {
    // dtheta form: 1/(2 pi) integral of exp(-h^2 / (2 cos^2 phi)) dphi, phi = atan(t / h),
    // between the cuts at |t| = t_cut on either side of the point nearest the foot
    // (quadrature_reach), where exp(-h^2 / (2 cos^2 phi)) = exp(-(h^2 + t^2) / 2) has fallen by
    // exp(-kReachExponent); beyond a cut the integrand is at most its value there.
    const double near = a < 0.0 && b > 0.0 ? 0.0 : std::min(std::fabs(a), std::fabs(b));
    const double reach = quadrature_reach(near);
    const double lo = std::max(a, -reach), hi = std::min(b, reach);
    Contribution q = quadrature(
        [h](double phi) {
          const double c2 = std::cos(phi);
          return kOneDivTwoPi * std::exp(-0.5 * h * h / (c2 * c2));
        },
        std::atan(lo / h), std::atan(hi / h), rel_tol, h * h + near * near);
    const double at_cut = kOneDivTwoPi * std::exp(-0.5 * (h * h + reach * reach)) * (1.0 + 1e-12);
    if (hi < b) q.abs_err += (std::atan(b / h) - std::atan(hi / h)) * at_cut;
    if (lo > a) q.abs_err += (std::atan(lo / h) - std::atan(a / h)) * at_cut;
    q.evaluations += 2;
    return q;
  }
  c.abs_err = kOwensTRel * terms + 2 * kEps * terms;
  return c;
}

// T(h, b/h) - T(h, a/h) for h <= a < b, by Owen's reflection
//   T(h, t/h) = Q(h)/2 + Q(t)/2 - Q(h) Q(t) - T(t, h/t),
// whose a-independent Q(h)/2 cancels between the ends:
//   = (1/2 - Q(h)) (Q(b) - Q(a)) - [T(b, h/b) - T(a, h/a)].
Contribution reflected_piece(const EdgeShared& e, double a, double b, double rel_tol) {
  const double h = e.h;
  const double half_erf_h = e.half_erf_h;
  double q[2] = {a, b};
  if (e.straddles && (a == h || b == h)) {
    q[0] = upper_tail_at(e, a);
    q[1] = upper_tail_at(e, b);
  } else {
    normal_upper_tails(q, 2);
  }
  const double qa = q[0], qb = q[1];
  double ta, tb;
  if (e.straddles && (a == h || b == h)) {
    ta = owens_t_at(e, a, h / a);
    tb = owens_t_at(e, b, h / b);
  } else {
    owens_t_two(a, h / a, b, h / b, ta, tb);
  }
  Contribution c;
  c.value = half_erf_h * (qb - qa) - (tb - ta);
  c.evaluations = 2;
  const double terms = half_erf_h * (qa + qb) + std::fabs(ta) + std::fabs(tb);
  if (terms > kMaxCancellation * std::fabs(c.value)) {
    // dt form: 1/(2 pi) integral of h exp(-(h^2 + t^2)/2) / (h^2 + t^2) dt, on [a, t_cut] only
    // (quadrature_reach: a long piece's mass lies within 1/a of a, where a first rule sees none).
    const double cut = std::min(b, quadrature_reach(a));
    Contribution q = quadrature(
        [h](double t) {
          const double r2 = h * h + t * t;
          return kOneDivTwoPi * h * std::exp(-0.5 * r2) / r2;
        },
        a, cut, rel_tol, h * h + a * a);
    if (cut < b) {
      // The rest: h / (2 pi) exp(-(h^2 + t^2) / 2) / (h^2 + t^2) <= that at t_cut times
      // exp(-(t^2 - t_cut^2) / 2), whose integral beyond t_cut is at most 1 / t_cut (Mills).
      const double r2 = h * h + cut * cut;
      q.abs_err += kOneDivTwoPi * h * std::exp(-0.5 * r2) / (r2 * cut) * (1.0 + 1e-12);
    }
    q.evaluations += 2;
    return q;
  }
  c.abs_err = kOwensTRel * (std::fabs(ta) + std::fabs(tb)) + 4 * kEps * terms;
  return c;
}

// F(t2) - F(t1) for F(t) = T(h, t/h), one Owen's T per end: T(h, |t|/h) where |t| <= h, else
// Owen's reflection
//   T(h, t/h) = Q(h)/2 + (1/2 - Q(h)) Q(t) - T(t, h/t)   (t > h; F is odd),
// whose Q(h)/2 cancels between two ends on the same side and is not formed then.
// EndArguments are the (h, a) of the two T's and the arguments of the Q's; combine_ends takes
// their values. Empty when the terms cancel beyond kMaxCancellation (the caller then splits
// the edge into pieces with their own quadrature fallbacks).
struct EndArguments {
  double g[2], b[2];  // T(g[k], b[k]) at end k
  double q[3];        // Q(h), Q(|t1|), Q(|t2|), wanted when an end is reflected
  bool reflected;
};

EndArguments end_arguments(double h, double t1, double t2) {
  const double at1 = std::fabs(t1), at2 = std::fabs(t2);
  const bool r1 = at1 > h, r2 = at2 > h;
  return {{r1 ? at1 : h, r2 ? at2 : h}, {r1 ? h / at1 : at1 / h, r2 ? h / at2 : at2 / h}, {h, at1, at2}, r1 || r2};
}

// ta, tb: T at the two ends (with |a|, as end_arguments gives them); q: the Q values.
std::optional<Contribution> combine_ends(double h, double t1, double t2, double ta, double tb, const double* q) {
  const double s1 = t1 < 0 ? -1.0 : 1.0, s2 = t2 < 0 ? -1.0 : 1.0;
  const bool r1 = std::fabs(t1) > h, r2 = std::fabs(t2) > h;
  Contribution c;
  c.evaluations = 2;
  double terms;
  if (!r1 && !r2) {
    c.value = s2 * tb - s1 * ta;
    terms = std::fabs(ta) + std::fabs(tb);
  } else {
    const double qh = q[0];
    // 1/2 - Q(h) cancels only for small h (Q(1) = 0.159: at most one ulp lost beyond).
    const double half_erf_h = h >= 1.0 ? 0.5 - qh : 0.5 * std::erf(h * kOneDivRootTwo);
    if (r1 && r2 && s1 == s2) {
      c.value = s2 * (half_erf_h * (q[2] - q[1]) - (tb - ta));
      terms = half_erf_h * (q[1] + q[2]) + std::fabs(ta) + std::fabs(tb);
    } else {
      const double f1 = r1 ? s1 * (0.5 * qh + half_erf_h * q[1] - ta) : s1 * ta;
      const double f2 = r2 ? s2 * (0.5 * qh + half_erf_h * q[2] - tb) : s2 * tb;
      c.value = f2 - f1;
      terms = (r1 ? 0.5 * qh + half_erf_h * q[1] : 0.0) + (r2 ? 0.5 * qh + half_erf_h * q[2] : 0.0) +
              std::fabs(ta) + std::fabs(tb);
    }
  }
  if (!(terms <= kMaxCancellation * std::fabs(c.value))) return std::nullopt;
  c.abs_err = kOwensTRel * (std::fabs(ta) + std::fabs(tb)) + 4 * kEps * terms;
  return c;
}

std::optional<Contribution> segment_ends(double h, double t1, double t2) {
  EndArguments e = end_arguments(h, t1, t2);
  if (e.reflected) normal_upper_tails(e.q, 3);
  double ta, tb;
  owens_t_two(e.g[0], e.b[0], e.g[1], e.b[1], ta, tb);
  return combine_ends(h, t1, t2, ta, tb, e.q);
}

// The line of a segment in the coordinates of the edge_tail.hpp comment: distance h from the
// origin (sign: which side), and the ends t1 < t2 along it.
struct SegmentLine {
  double h, sign, t1, t2;
  bool zero;        // no tail: a point, or a line through the origin (dtheta = 0)
  bool negligible;  // beyond 37.5 standard deviations
};

SegmentLine segment_line(const Vec2& z1, const Vec2& z2) {
  SegmentLine l{0.0, 1.0, 0.0, 0.0, false, false};
  const Vec2 d = z2 - z1;
  const double length = d.norm();
  if (length == 0.0) {
    l.zero = true;
    return l;
  }
  const double inverse = 1.0 / length;
  const Vec2 u = d * inverse;
  const double hs = accurate_cross(z1, z2) * inverse;  // signed distance of the line
  l.h = std::fabs(hs);
  l.zero = l.h == 0.0;
  l.sign = hs > 0 ? 1.0 : -1.0;
  l.t1 = z1.dot(u);
  l.t2 = z2.dot(u);
  // Beyond 37.5 standard deviations exp(-r^2/2) < 1e-305: the edge adds nothing a double holds,
  // and quadrature on denormal values would chase rounding noise.
  const double t_near = l.t1 > 0 ? l.t1 : (l.t2 < 0 ? l.t2 : 0.0);
  l.negligible = l.h * l.h + t_near * t_near > kNegligibleR2;
  return l;
}

// The lines of a block of segments, a field an array (the layout short_edge_rule() reads);
// `open`: neither zero nor negligible (what short_edge_rule() may serve).
struct LineBlock {
  double h[kShortEdgeBlock], sign[kShortEdgeBlock], t1[kShortEdgeBlock], t2[kShortEdgeBlock];
  bool zero[kShortEdgeBlock], negligible[kShortEdgeBlock], open[kShortEdgeBlock];
  SegmentLine at(int i) const { return {h[i], sign[i], t1[i], t2[i], zero[i], negligible[i]}; }
};

// Four lanes' flags as four bools, one store.
inline __attribute__((always_inline)) void store_flags4(bool* out, M4 mask) {
  const auto word = static_cast<std::uint32_t>((mask[0] & 0x1) | (mask[1] & 0x100) | (mask[2] & 0x10000) |
                                               (mask[3] & 0x1000000));
  std::memcpy(out, &word, sizeof word);
}

// segment_line() of four segments at once on four-lane vectors, lane by lane the same
// arithmetic, into lanes i .. i + 3 of `lines` (`open` false past the first `lanes`), and for
// each the factor and exponent of the moved-ends bound of segment_tails() (the bound is
// factor * exp(exponent)); with `checks`, the first `lanes` lanes' share of them.
void segment_lines4(const Vec2* from, const Vec2* to, LineBlock& lines, int i, int lanes, double* factor,
                    double* exponent, double moved_absolute, double moved_relative, PolygonChecks* checks) {
  const V4 x1{from[0].x(), from[1].x(), from[2].x(), from[3].x()};
  const V4 y1{from[0].y(), from[1].y(), from[2].y(), from[3].y()};
  const V4 x2{to[0].x(), to[1].x(), to[2].x(), to[3].x()};
  const V4 y2{to[0].y(), to[1].y(), to[2].y(), to[3].y()};
  const V4 dx = x2 - x1, dy = y2 - y1;
  const V4 length2 = dx * dx + dy * dy;
  const V4 length = sqrt4(length2);
  const M4 empty = length == splat(0.0);
  const V4 inverse = 1.0 / length;
  const V4 ux = dx * inverse, uy = dy * inverse;
  const V4 w = x2 * y1;  // accurate_cross(z1, z2)
  const V4 cross = fma4(x1, y2, -w) + fma4(-x2, y1, w);
  const V4 hs = cross * inverse;
  // A point (empty) is as segment_line leaves it: h = t1 = t2 = 0, sign 1.
  const V4 h = blend(empty, splat(0.0), abs4(hs));
  const V4 t1 = blend(empty, splat(0.0), x1 * ux + y1 * uy);
  const V4 t2 = blend(empty, splat(0.0), x2 * ux + y2 * uy);
  const V4 sign = blend((hs > splat(0.0)) | empty, splat(1.0), splat(-1.0));
  const V4 t_near = blend(t1 > splat(0.0), t1, blend(t2 < splat(0.0), t2, splat(0.0)));
  const M4 negligible = h * h + t_near * t_near > splat(kNegligibleR2);
  const V4 h2 = h * h, t1s = t1 * t1, t2s = t2 * t2;
  const V4 d2 = blend((t1 <= splat(0.0)) & (t2 >= splat(0.0)), h2, h2 + min4(t1s, t2s));
  // |z| at the farther end from the ends themselves, not through h and t: off the chain of the
  // length's square root and division, so that the two square roots overlap.
  const V4 r_far = sqrt4(max4(x1 * x1 + y1 * y1, x2 * x2 + y2 * y2));
  const V4 moved = moved_absolute + moved_relative * r_far;
  store4(factor, moved * min4((t2 - t1) * kOneDivTwoPi, splat(kOneDivRootTwoPi)));
  store4(exponent, -0.5 * d2);
  store4(lines.h + i, h);
  store4(lines.sign + i, sign);
  store4(lines.t1 + i, t1);
  store4(lines.t2 + i, t2);
  const M4 zero = h == splat(0.0);
  const M4 real = M4{0, 1, 2, 3} < lanes;
  store_flags4(lines.zero + i, zero);
  store_flags4(lines.negligible + i, negligible);
  store_flags4(lines.open + i, real & ~zero & ~negligible);
  if (!checks) return;
  // Twice the area, sum of cross(z1, z2); each cross within 2 ulp (Kahan's FMA form), and
  // moving each end by at most `moved` (|z| <= r_far) changes it by at most (2 r_far + moved)
  // moved. The sum's rounding is the caller's (it knows the count).
  const V4 area = masked(cross, real);
  const V4 error = masked((2.0 * r_far + moved) * moved + 0x1p-51 * abs4(cross), real);
  checks->twice_area += (area[0] + area[1]) + (area[2] + area[3]);
  checks->twice_area_error += (error[0] + error[1]) + (error[2] + error[3]);
  if (checks->near_tolerance < 0.0) return;
  // As integrate_exact_polygon's test before: an edge within the rounding allowance of the
  // mean, or the winding number by loop_winding()'s half-open crossing rule, the side of the
  // mean from the same accurate cross product.
  const double tol = checks->near_tolerance;
  const M4 near = real & (cross * cross <= 2 * tol * tol * length2);
  if (near[0] | near[1] | near[2] | near[3]) checks->near = true;
  const M4 up = real & (y1 <= splat(0.0)) & (splat(0.0) < y2) & (cross > splat(0.0));
  const M4 down = real & (y2 <= splat(0.0)) & (splat(0.0) < y1) & (cross < splat(0.0));
  const M4 turns = down - up;  // masks are -1: up counts +1, down -1
  checks->winding += static_cast<int>((turns[0] + turns[1]) + (turns[2] + turns[3]));
}

// I_e of a segment's line: F(t2) - F(t1) from its two ends, or, where they cancel, by pieces.
Contribution line_tail(const SegmentLine& l, double rel_tol) {
  Contribution total;
  if (l.zero) return total;
  if (l.negligible) {
    total.abs_err = kNegligible;
    return total;
  }
  const double h = l.h, t1 = l.t1, t2 = l.t2, sign = l.sign;
  // With the line x = h n + t u, dtheta = h dt / (h^2 + t^2), and (Owen 1956)
  // I_e = sign * [F(t2) - F(t1)], F(t) = T(h, t/h).
  if (const auto fast = segment_ends(h, t1, t2)) {
    Contribution c = *fast;
    c.value *= sign;
    return c;
  }
  // The ends cancel: split at t = -h and t = h so that each piece is wholly in |a| <= 1
  // (direct) or |a| >= 1 (reflected), each with its own check and quadrature; T is odd in a.
  const EdgeShared shared = shared_for(h, t1 < -h || t2 > h);
  if (t1 < -h) add(total, reflected_piece(shared, -std::min(t2, -h), -t1, rel_tol), sign);
  const double lo = std::max(t1, -h), hi = std::min(t2, h);
  if (lo < hi) add(total, direct_piece(shared, lo, hi, rel_tol), sign);
  if (t2 > h) add(total, reflected_piece(shared, std::max(t1, h), t2, rel_tol), sign);
  return total;
}

}  // namespace

Contribution segment_tail(const Vec2& z1, const Vec2& z2, double rel_tol) {
  const SegmentLine l = segment_line(z1, z2);
  return line_tail(l, rel_tol);
}

STREWN_FMA_CLONES ContributionSum segment_tails(const Vec2* from, const Vec2* to, int n, double rel_tol,
                                                double moved_absolute, double moved_relative,
                                                PolygonChecks* checks) {
  ContributionSum sum;
  const auto add_one = [&sum](const Contribution& c) {
    sum.value += c.value;
    sum.magnitude += std::fabs(c.value);
    sum.abs_err += c.abs_err;
    sum.evaluations += c.evaluations;
    sum.converged = sum.converged && c.converged;
    sum.quadrature = sum.quadrature || c.evaluations > 8;
  };
  constexpr int kBlock = kShortEdgeBlock;
  for (int start = 0; start < n; start += kBlock) {
    const int m = std::min(kBlock, n - start);
    LineBlock line;
    EndArguments ends[kBlock];
    double g[2 * kBlock], b[2 * kBlock], t[2 * kBlock], q[3 * kBlock + 3];
    double density[kBlock], factor[kBlock];
    int q_slot[kBlock][3];
    int nt = 0, nq = 0;
    // The lines four at a time, a short last group padded by repeating its last segment.
    // As whitening_error(), each segment's share of the moved-ends bound: the larger move of the
    // ends times the density's integral along the edge, at most
    // min(length / (2 pi), 1 / sqrt(2 pi)) exp(-d^2 / 2), d the distance from the mean (h, or
    // the nearer end's when the foot of the perpendicular is outside).
    for (int i = 0; i < m; i += 4) {
      if (i + 4 <= m) {
        segment_lines4(from + start + i, to + start + i, line, i, 4, factor + i, density + i, moved_absolute,
                       moved_relative, checks);
        continue;
      }
      Vec2 a[4], b[4];
      for (int k = 0; k < 4; ++k) {
        a[k] = from[start + std::min(i + k, m - 1)];
        b[k] = to[start + std::min(i + k, m - 1)];
      }
      // The padding lanes (past m) hold copies of the last segment, which nothing reads but
      // short_edge_rule() (whose lanes past m are ignored).
      segment_lines4(a, b, line, i, m - i, factor + i, density + i, moved_absolute, moved_relative, checks);
    }
    if (checks && checks->near) return sum;  // the caller takes the general path
    // Short edges by the Gauss-Legendre rule where its bound settles them with few nodes
    // (short_edge_rule.hpp); the rest by their ends' Owen's T values.
    double rule_value[kBlock], rule_err[kBlock], near_density[kBlock];  // (set by short_edge_rule)
    bool* by_rule = line.open;
    int rule_nodes[kBlock];
    short_edge_rule(line.h, line.t1, line.t2, m, by_rule, rule_value, rule_err, rule_nodes, near_density);
    for (int i = 0; i < m; ++i) {
      if (line.zero[i] || line.negligible[i] || by_rule[i]) continue;
      const SegmentLine l = line.at(i);
      ends[i] = end_arguments(l.h, l.t1, l.t2);
      for (int k = 0; k < 2; ++k) {
        g[nt] = ends[i].g[k];
        b[nt++] = ends[i].b[k];
      }
      // Q(h) when an end is reflected, and Q(|t|) at each reflected end (slot -1: not wanted).
      for (int k = 0; k < 3; ++k) {
        const bool wanted = ends[i].reflected && (k == 0 || ends[i].q[k] > l.h);
        q_slot[i][k] = wanted ? nq : -1;
        if (wanted) q[nq++] = ends[i].q[k];
      }
    }
    while (nq % 4 != 0) q[nq++] = 0.0;  // whole vectors for the batched erfc
    owens_t_many(g, b, t, nt);
    normal_upper_tails(q, nq);
    if (moved_absolute > 0.0 || moved_relative > 0.0) {
      // exp(-d^2 / 2) from the series' own exponential where it served the edge, else here.
      int slot[kBlock], nd = 0;
      for (int i = 0; i < m; ++i)
        if (near_density[i] < 0.0) {
          density[nd] = density[i];
          slot[nd++] = i;
        }
      exp_in_place(density, nd);
      for (int k = 0; k < nd; ++k) near_density[slot[k]] = density[k];
      V4 moved = splat(0.0);
      for (int i = 0; i < m; i += 4)
        moved += masked(load4(factor + i) * load4(near_density + i), M4{0, 1, 2, 3} < m - i);
      sum.moved += (moved[0] + moved[1]) + (moved[2] + moved[3]);
    }
    // The served edges four at a time into vector sums (one sum kept in memory made each edge
    // wait for the one before), as add_one but a fixed rule is no adaptive quadrature (its bound
    // needs no tightening); lanes past m are not `open`, so not served.
    V4 value = splat(0.0), magnitude = splat(0.0), abs_err = splat(0.0);
    for (int i = 0; i < m; i += 4) {
      std::uint32_t flags = 0;
      std::memcpy(&flags, by_rule + i, sizeof flags);
      const M4 served = ((M4{flags, flags, flags, flags} >> M4{0, 8, 16, 24}) & 0xff) != 0;
      const V4 v = load4(rule_value + i);
      value += masked(load4(line.sign + i) * v, served);
      magnitude += masked(abs4(v), served);
      abs_err += masked(load4(rule_err + i), served);
    }
    sum.value += (value[0] + value[1]) + (value[2] + value[3]);
    sum.magnitude += (magnitude[0] + magnitude[1]) + (magnitude[2] + magnitude[3]);
    sum.abs_err += (abs_err[0] + abs_err[1]) + (abs_err[2] + abs_err[3]);
    int it = 0, rule_evaluations = 0;
    for (int i = 0; i < m; ++i) {
      if (by_rule[i]) {
        rule_evaluations += rule_nodes[i];
        continue;
      }
      const SegmentLine l = line.at(i);
      if (l.zero || l.negligible) {
        add_one(line_tail(l, rel_tol));
        continue;
      }
      double qi[3];
      for (int k = 0; k < 3; ++k) qi[k] = q_slot[i][k] >= 0 ? q[q_slot[i][k]] : 0.0;
      const auto c = combine_ends(l.h, l.t1, l.t2, t[it], t[it + 1], qi);
      it += 2;
      if (c) {
        Contribution signed_c = *c;
        signed_c.value *= l.sign;
        add_one(signed_c);
      } else {
        add_one(line_tail(l, rel_tol));
      }
    }
    sum.evaluations += static_cast<std::uint64_t>(rule_evaluations);
  }
  return sum;
}

}  // namespace strewn::detail
