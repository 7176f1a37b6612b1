#include "integrate/exact/edge_tail.hpp"

#include <boost/math/quadrature/gauss.hpp>
#include <boost/math/quadrature/gauss_kronrod.hpp>
#include <Eigen/LU>
#include <Eigen/SVD>
#include <algorithm>
#include <vector>
#include <cmath>
#include <limits>
#include <optional>

#include "special/fma_clones.hpp"
#include "special/owens_t_batch.hpp"
#include "integrate/exact/periodic_ellipse_tail.hpp"
#include "special/vector_math.hpp"
#include "strewn/owens_t.hpp"


namespace strewn::detail {
namespace {

constexpr double kOneDivTwoPi = 0.15915494309189533577;
constexpr double kOneDivRootTwo = 0.70710678118654752440;
constexpr double kEps = std::numeric_limits<double>::epsilon();
// Relative accuracy of strewn::owens_t as measured against boost::math::owens_t over a dense
// grid (tests/engine/special/owens_t_test.cpp asserts it), with a safety factor.
constexpr double kOwensTRel = 4e-15;
// Above this ratio of term size to result, the closed form would lose more than 4 of its 16
// digits (the loss is in the error bound either way), so the edge is integrated by quadrature
// instead. Large h makes the closed form cancel like exp(h^2/2), so this is common far out.
constexpr double kMaxCancellation = 1e4;

using GK = boost::math::quadrature::gauss_kronrod<double, 31>;


// Adaptive Gauss-Kronrod of f over [a, b]. `r2_min`, the smallest squared radius on the path,
// sets the noise floor: exp(-r^2/2) carries a relative rounding error of about eps r^2/2, and
// since r^2 exp(-r^2/2) decreases beyond r^2 = 2, the integral's rounding is at most
// eps (1 + max(r2_min/2, 1)) times its L1 norm. A tolerance below that would never be met.
struct Piece {
  double a, b, value, err, l1;
  bool operator<(const Piece& o) const { return err < o.err; }
};

// Boost's 31-point Gauss-Kronrod rule on one interval, its abscissae and weights from
// boost::math::quadrature::gauss_kronrod<double, 31> and gauss<double, 15>, combined as Boost's
// integrate_non_adaptive_m1_1 does (value, |Kronrod - Gauss| error, L1 norm), but with the 31
// integrand values asked for at once, so that arcs can take their sines, cosines and
// exponentials in batches. Boost 1.74's own version returns the error without the interval's
// scale (b - a) / 2; here every output is scaled. An interval with b < a is integrated over
// [b, a] and negated, as Boost does.
template <class Batch>
Piece rule(Batch& f, double a, double b) {
  using Gauss = boost::math::quadrature::gauss<double, 15>;
  static const auto& x = GK::abscissa();
  static const auto& wk = GK::weights();
  static const auto& wg = Gauss::weights();
  const double lo = std::min(a, b), hi = std::max(a, b);
  const double mid = 0.5 * (lo + hi), half = 0.5 * (hi - lo);
  double s[31], v[31];
  s[0] = mid;
  for (int i = 1; i < 16; ++i) {
    s[2 * i - 1] = mid + half * x[i];
    s[2 * i] = mid - half * x[i];
  }
  f(s, v, 31);
  double kronrod = v[0] * wk[0], gauss = v[0] * wg[0], l1 = std::fabs(kronrod);
  for (int i = 1; i < 16; ++i) {
    const double fp = v[2 * i - 1], fm = v[2 * i];
    kronrod += (fp + fm) * wk[i];
    l1 += (std::fabs(fp) + std::fabs(fm)) * wk[i];
    if (i % 2 == 0) gauss += (fp + fm) * wg[i / 2];
  }
  const double err = std::max(std::fabs(kronrod - gauss), std::fabs(kronrod) * 2 * kEps);
  const double sign = b < a ? -1.0 : 1.0;
  return Piece{a, b, sign * half * kronrod, half * err, half * l1};
}

// A scalar integrand as a batch one.
template <class F>
auto batched(F& f) {
  return [&f](const double* s, double* v, int n) {
    for (int i = 0; i < n; ++i) v[i] = f(s[i]);
  };
}

// Globally adaptive Gauss-Kronrod (the QUADPACK QAG strategy): split the interval with the
// largest error estimate until the total meets abs_tol or kMaxPieces intervals are in use.
// Boost's own recursive driver measures its tolerance against the integral, which never
// converges when the integrand changes sign and the integral cancels (an arc seen from a mean
// outside it); here the tolerance is absolute, chosen relative to the L1 norm.
constexpr std::size_t kMaxPieces = 4000;

// f(s, v, n) fills v[i] with the integrand at s[i]; quadrature() takes scalar integrands.
template <class Batch>
Contribution batch_quadrature(Batch f, double a, double b, double rel_tol, double r2_min) {
  Contribution c;
  std::uint64_t calls = 0;
  auto counted = [&](const double* s, double* v, int n) {
    calls += static_cast<std::uint64_t>(n);
    f(s, v, n);
  };
  const double noise = 8 * kEps * (1.0 + std::max(0.5 * r2_min, 1.0));
  const double tol = std::max({rel_tol, kMinQuadTolerance, noise});
  std::vector<Piece> heap{rule(counted, a, b)};
  const double abs_tol = tol * heap.front().l1;
  double total_err = heap.front().err;
  while (total_err > abs_tol && heap.size() < kMaxPieces) {
    std::pop_heap(heap.begin(), heap.end());
    const Piece worst = heap.back();
    heap.pop_back();
    const double mid = 0.5 * (worst.a + worst.b);
    if (mid <= std::min(worst.a, worst.b) || mid >= std::max(worst.a, worst.b)) {
      heap.push_back(worst);  // cannot split further in double precision
      std::push_heap(heap.begin(), heap.end());
      break;
    }
    const Piece left = rule(counted, worst.a, mid), right = rule(counted, mid, worst.b);
    total_err += left.err + right.err - worst.err;
    heap.push_back(left);
    std::push_heap(heap.begin(), heap.end());
    heap.push_back(right);
    std::push_heap(heap.begin(), heap.end());
  }
  double value = 0.0, err = 0.0, l1 = 0.0;
  for (const Piece& p : heap) {
    value += p.value;
    err += p.err;
    l1 += p.l1;
  }
  c.value = value;
  c.abs_err = err + noise * l1;
  // Whether the request is met is judged on the final bound; here only failures count.
  c.converged = std::isfinite(value) && std::isfinite(err);
  c.evaluations = calls;
  return c;
}

template <class F>
Contribution quadrature(F f, double a, double b, double rel_tol, double r2_min) {
  return batch_quadrature(batched(f), a, b, rel_tol, r2_min);
}

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
    // dtheta form: 1/(2 pi) integral of exp(-h^2 / (2 cos^2 phi)) dphi, phi = atan(t / h).
    Contribution q = quadrature(
        [h](double phi) {
          const double c2 = std::cos(phi);
          return kOneDivTwoPi * std::exp(-0.5 * h * h / (c2 * c2));
        },
        std::atan(a / h), std::atan(b / h), rel_tol, h * h + (a < 0 && b > 0 ? 0.0 : std::min(a * a, b * b)));
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
    // dt form: 1/(2 pi) integral of h exp(-(h^2 + t^2)/2) / (h^2 + t^2) dt.
    Contribution q = quadrature(
        [h](double t) {
          const double r2 = h * h + t * t;
          return kOneDivTwoPi * h * std::exp(-0.5 * r2) / r2;
        },
        a, b, rel_tol, h * h + a * a);
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

double square(double x) { return x * x; }

void add(Contribution& total, const Contribution& piece, double sign) {
  total.value += sign * piece.value;
  total.abs_err += piece.abs_err;
  total.evaluations += piece.evaluations;
  total.converged = total.converged && piece.converged;
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

RadiusRange radius_range(const Edge& e, int chords) {
  RadiusRange r;
  if (e.kind == Edge::Kind::segment) {
    const Vec2 d = e.to - e.from;
    const double l2 = d.squaredNorm();
    const double t = l2 > 0 ? std::clamp(-e.from.dot(d) / l2, 0.0, 1.0) : 0.0;
    r.closest = (e.from + t * d).norm();
    r.farthest = std::max(e.from.norm(), e.to.norm());
    return r;
  }
  // The arc lies within big * (1 - cos(ds/2)) of its chords, big >= the largest singular value
  // of the axes (the Frobenius norm: the larger column's norm falls short of it when the columns
  // are not orthogonal, as in a whitened ellipse, and let a closest distance of 30.18 pass for
  // 30.58, understating bounds by 1e5 in the far tail); the chords' ends are taken with
  // batched sines and cosines (a few ulps each, allowed for in the slack).
  const double big = e.axes.norm();
  const double ds = (e.s_to - e.s_from) / chords;
  const double slack = big * (1.0 - std::cos(0.5 * ds)) + 16 * kEps * (big + e.centre.norm());
  constexpr int kMaxChords = 32;
  if (chords > kMaxChords)
    return chord_range([&](int k) { return e.point(e.s_from + k * ds); }, chords, slack);
  double c[kMaxChords + 1], sn[kMaxChords + 1];
  for (int k = 0; k <= chords; ++k) c[k] = e.s_from + k * ds;
  cos_sin_in_place(c, sn, chords + 1);
  return chord_range([&](int k) { return Vec2(e.centre + e.axes * Vec2(c[k], sn[k])); }, chords, slack);
}

double min_radius(const Edge& e) { return radius_range(e).closest; }

double approximation_error(const Region& z) {
  if (z.approximation_area <= 0.0) return 0.0;
  double boundary = std::numeric_limits<double>::infinity();
  for (const Loop& loop : z.loops)
    for (const Edge& e : loop) boundary = std::min(boundary, radius_range(e, 8).closest);
  const double d = std::max(boundary - z.approximation_width, 0.0);
  return z.approximation_area * kOneDivTwoPi * std::exp(-0.5 * d * d);
}


Contribution segment_tail(const Vec2& z1, const Vec2& z2, double rel_tol) {
  const SegmentLine l = segment_line(z1, z2);
  return line_tail(l, rel_tol);
}

STREWN_FMA_CLONES ContributionSum segment_tails(const Vec2* from, const Vec2* to, int n, double rel_tol,
                                                double moved_absolute, double moved_relative) {
  constexpr double kOneDivRootTwoPi = 0.39894228040143267794;
  ContributionSum sum;
  const auto add_one = [&sum](const Contribution& c) {
    sum.value += c.value;
    sum.magnitude += std::fabs(c.value);
    sum.abs_err += c.abs_err;
    sum.evaluations += c.evaluations;
    sum.converged = sum.converged && c.converged;
    sum.quadrature = sum.quadrature || c.evaluations > 8;
  };
  constexpr int kBlock = 32;
  for (int start = 0; start < n; start += kBlock) {
    const int m = std::min(kBlock, n - start);
    SegmentLine line[kBlock];
    EndArguments ends[kBlock];
    double g[2 * kBlock], b[2 * kBlock], t[2 * kBlock], q[3 * kBlock + 3];
    double density[kBlock], factor[kBlock];
    int q_slot[kBlock][3];
    int nt = 0, nq = 0;
    for (int i = 0; i < m; ++i) {
      const SegmentLine& l = line[i] = segment_line(from[start + i], to[start + i]);
      // As whitening_error(): the larger move of the ends times the density's integral along
      // the edge, at most min(length / (2 pi), 1 / sqrt(2 pi)) exp(-d^2 / 2), d the distance
      // from the mean (h, or the nearer end's when the foot of the perpendicular is outside).
      const double h2 = l.h * l.h, t1s = l.t1 * l.t1, t2s = l.t2 * l.t2;
      const double d2 = l.t1 <= 0.0 && l.t2 >= 0.0 ? h2 : h2 + std::min(t1s, t2s);
      factor[i] = (moved_absolute + moved_relative * std::sqrt(h2 + std::max(t1s, t2s))) *
                  std::min((l.t2 - l.t1) * kOneDivTwoPi, kOneDivRootTwoPi);
      density[i] = -0.5 * d2;
      if (l.zero || l.negligible) continue;
      ends[i] = end_arguments(line[i].h, line[i].t1, line[i].t2);
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
      exp_in_place(density, m);
      for (int i = 0; i < m; ++i) sum.moved += factor[i] * density[i];
    }
    int it = 0;
    for (int i = 0; i < m; ++i) {
      const SegmentLine& l = line[i];
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
  }
  return sum;
}

// A whole ellipse: the periodic trapezoidal rule (periodic_ellipse_tail.hpp), its nodes
// computed here from their sines and cosines.
const UnitCircleNodes& unit_circle_nodes() {
  static const UnitCircleNodes nodes = [] {
    UnitCircleNodes u{};
    for (int k = 0; k < kPeriodicMaxNodes; ++k) {
      u.cos[k] = std::cos(2 * M_PI * k / kPeriodicMaxNodes);
      u.sin[k] = std::sin(2 * M_PI * k / kPeriodicMaxNodes);
    }
    return u;
  }();
  return nodes;
}

// Trapezoid nodes of a whole ellipse at s_from + 2 pi k / n: the unit-circle table rotated by
// s_from (a couple of ulps from a direct sine and cosine), then mapped by the axes.
static auto computed_nodes(const Edge& arc) {
  const UnitCircleNodes& unit = unit_circle_nodes();
  const double c0 = std::cos(arc.s_from), s0 = std::sin(arc.s_from);
  return [&arc, &unit, c0, s0](int k, int n) {
    const int i = k * (kPeriodicMaxNodes / n);
    const double cs = c0 * unit.cos[i] - s0 * unit.sin[i], sn = s0 * unit.cos[i] + c0 * unit.sin[i];
    return std::pair<Vec2, Vec2>(arc.centre + arc.axes * Vec2(cs, sn), arc.axes * Vec2(-sn, cs));
  };
}

bool is_whole_ellipse(const Edge& e) {
  return e.kind == Edge::Kind::arc && std::fabs(std::fabs(e.s_to - e.s_from) - 2 * M_PI) <= 1e-14 * 2 * M_PI;
}

static Contribution whole_ellipse_tail(const Edge& arc, double rel_tol) {
  EllipseView view;
  view.range = radius_range(arc, 32);
  view.a_max = Eigen::JacobiSVD<Mat2>(arc.axes).singularValues()(0);
  view.inside = (arc.axes.inverse() * (-arc.centre)).squaredNorm();
  view.orientation = (arc.axes.determinant() > 0) == (arc.s_to > arc.s_from) ? 1.0 : -1.0;
  view.sign = arc.s_to > arc.s_from ? 1.0 : -1.0;
  return periodic_ellipse_tail(view, computed_nodes(arc), rel_tol);
}

namespace {

// Points z and tangents z' of an arc at the parameters s[0..n), n <= 31, from batched sines
// and cosines.
struct ArcNodes {
  double x[31], y[31], tx[31], ty[31];
};
void arc_nodes(const Edge& arc, const double* s, int n, ArcNodes& out) {
  double c[31], sn[31];
  for (int i = 0; i < n; ++i) c[i] = s[i];
  cos_sin_in_place(c, sn, n);
  const Mat2& a = arc.axes;
  for (int i = 0; i < n; ++i) {
    out.x[i] = arc.centre.x() + a(0, 0) * c[i] + a(0, 1) * sn[i];
    out.y[i] = arc.centre.y() + a(1, 0) * c[i] + a(1, 1) * sn[i];
    out.tx[i] = -a(0, 0) * sn[i] + a(0, 1) * c[i];
    out.ty[i] = -a(1, 0) * sn[i] + a(1, 1) * c[i];
  }
}

// The arc's integrand exp(-r^2/2) dtheta/ds / (2 pi), dtheta/ds = (z x z') / |z|^2, for a
// batch of parameters, sines, cosines and exponentials taken at once; or, with c0 > 0,
// the pole-subtracted c0 expm1(-(r^2 - rho^2)/2) dtheta/ds / (2 pi) (near_pass_arc_tail).
auto arc_integrand_batch(const Edge& arc, double c0 = 0.0, double rho2 = 0.0) {
  return [&arc, c0, rho2](const double* s, double* v, int n) {
    ArcNodes nodes;
    arc_nodes(arc, s, n, nodes);
    double r2[31], cross[31];
    for (int i = 0; i < n; ++i) {
      const Vec2 z(nodes.x[i], nodes.y[i]);
      r2[i] = z.squaredNorm();
      cross[i] = accurate_cross(z, Vec2(nodes.tx[i], nodes.ty[i]));
      v[i] = -0.5 * (r2[i] - rho2);
    }
    if (c0 > 0.0) {
      expm1_in_place(v, n);
      for (int i = 0; i < n; ++i) v[i] = r2[i] == 0.0 ? 0.0 : kOneDivTwoPi * c0 * v[i] * cross[i] / r2[i];
    } else {
      exp_in_place(v, n);
      for (int i = 0; i < n; ++i) v[i] = r2[i] == 0.0 ? 0.0 : kOneDivTwoPi * v[i] * cross[i] / r2[i];
    }
  };
}

Contribution plain_arc_tail(const Edge& piece, double rel_tol, double r_min) {
  return batch_quadrature(arc_integrand_batch(piece), piece.s_from, piece.s_to, rel_tol, r_min * r_min);
}

// Angle swept by an arc as seen from the origin, theta(end) - theta(start): the angle of its
// chord, atan2(z_a x z_b, z_a . z_b), plus 2 pi times the winding of "arc, then chord back"
// about the origin, which is +-1 when the origin lies in the region between the arc and its
// chord. That region is decided in the unit-circle coordinates u = A^{-1} (z - c), where it is
// the unit disk on the arc's side of the chord (affine maps keep sides). NaN when the origin is
// too close to the chord's line, or to the circle, for the tests to be trusted.
double swept_angle(const Edge& arc) {
  const Vec2 za = arc.point(arc.s_from), zb = arc.point(arc.s_to);
  const double chord = std::atan2(accurate_cross(za, zb), za.dot(zb));
  const double det = arc.axes.determinant();
  const double big = std::max(arc.axes.col(0).norm(), arc.axes.col(1).norm());
  const double margin = 64 * kEps * big * big / std::fabs(det) * (1.0 + arc.centre.norm() / big);
  const Vec2 u = arc.axes.inverse() * (-arc.centre);
  const double u2 = u.squaredNorm();
  if (std::fabs(u2 - 1.0) <= margin) return std::numeric_limits<double>::quiet_NaN();
  if (u2 > 1.0) return chord;
  const double lo = std::min(arc.s_from, arc.s_to), hi = std::max(arc.s_from, arc.s_to);
  const Vec2 ea(std::cos(lo), std::sin(lo)), eb(std::cos(hi), std::sin(hi));
  const Vec2 d = eb - ea;
  // On the unit circle the arc runs counter-clockwise from lo to hi, so its region lies to the
  // right of the chord from e(lo) to e(hi); a whole turn (d = 0) encloses the whole disk.
  const double side = accurate_cross(d, u - ea);
  if (d.norm() > 0.0 && std::fabs(side) <= margin * d.norm()) return std::numeric_limits<double>::quiet_NaN();
  const bool enclosed = d.norm() == 0.0 || side < 0.0;
  const double orientation = (det > 0) == (arc.s_to > arc.s_from) ? 1.0 : -1.0;
  return chord + (enclosed ? 2 * M_PI * orientation : 0.0);
}

// An arc piece that passes within rho of the mean, rho much less than its length: dtheta/ds is
// a peak of width ~rho that adaptive quadrature can step over (a pass at 1e-9 sweeps pi within
// a few 1e-9 of arc). As for whole ellipses, the pole is subtracted:
//   I = c0 sweep / (2 pi) + 1/(2 pi) integral c0 expm1(-(r^2 - rho^2)/2) dtheta,
// c0 = exp(-rho^2/2), whose integrand stays bounded (by about c0 rho |z'| / 2) through the pass.
// A near pass sweeps about pi within a few rho of it, so I is at least about c0 / 8 and the
// two terms do not cancel badly; when they do (the piece starts at its closest point and turns
// away), or the sweep cannot be told, the plain integrand is used.
Contribution near_pass_arc_tail(const Edge& piece, double rel_tol, double rho, int depth) {
  const double sweep = swept_angle(piece);
  if (std::isnan(sweep)) {
    if (depth >= 3) return plain_arc_tail(piece, rel_tol, rho);
    // The two halves have other chords; the origin cannot be close to both lines unless it is
    // close to their common end, which lies on the arc.
    const double mid = 0.5 * (piece.s_from + piece.s_to);
    Contribution total;
    for (const Edge& half : {Edge::arc(piece.centre, piece.axes, piece.s_from, mid),
                             Edge::arc(piece.centre, piece.axes, mid, piece.s_to)})
      add(total, near_pass_arc_tail(half, rel_tol, radius_range(half, 8).closest, depth + 1), 1.0);
    return total;
  }
  const double rho2 = rho * rho, c0 = std::exp(-0.5 * rho2);
  Contribution c = batch_quadrature(arc_integrand_batch(piece, c0, rho2), piece.s_from, piece.s_to, rel_tol, rho2);
  const double pole = kOneDivTwoPi * c0 * sweep;
  c.value += pole;
  c.abs_err += 4 * kEps * std::fabs(pole);
  if (std::fabs(pole) > 1e4 * std::fabs(c.value)) return plain_arc_tail(piece, rel_tol, rho);
  return c;
}

// An arc through the mean (to rounding): its principal value, the jump of theta there being
// the caller's. With u(s) = (cos s, sin s) and s0 the parameter of the point through the mean,
// the arc moved by its residual c + A u(s0) (a few ulps, which the bound adds) is
//   z(s) = A (u(s) - u(s0)) = 2 sin((s - s0) / 2) A v(m),  v(m) = (-sin m, cos m), m = (s + s0) / 2,
// so that r^2 = 4 sin^2((s - s0) / 2) |A v(m)|^2 and dtheta/ds = z x z' / |z|^2 = det A / (2 |A v(m)|^2)
// exactly: no 0/0 at the mean (where the plain integrand loses all its digits to the rounding of
// z). Under an elongated spread the whitened arc is a long thin ellipse, and dtheta/ds has a peak
// of width ~ b / a in s (b <= a its semi-axes) where v(m) lies along the minor axis: adaptive
// quadrature started on a few wide pieces steps over it (a disk through the mean under a 1000:1
// spread came out 0.1126 +- 0.0016 for 0.0147). The arc is therefore cut at each peak and at
// geometrically spaced points around it, down to a tenth of its width.
Contribution through_origin_arc_tail(const Edge& arc, double rel_tol) {
  const Mat2& a = arc.axes;
  const double det = a.determinant();
  const Vec2 u = a.inverse() * (-arc.centre);
  const double s0 = std::atan2(u.y(), u.x());
  const Vec2 residual = arc.centre + a * Vec2(std::cos(s0), std::sin(s0));
  const auto f = [&a, det, s0](const double* s, double* v, int n) {
    for (int i = 0; i < n; ++i) {
      const double m = 0.5 * (s[i] + s0), h = 0.5 * (s[i] - s0);
      const double sh = std::sin(h);
      const double w2 = (a * Vec2(-std::sin(m), std::cos(m))).squaredNorm();
      v[i] = kOneDivTwoPi * std::exp(-2.0 * sh * sh * w2) * det / (2.0 * w2);
    }
  };
  const Eigen::JacobiSVD<Mat2> svd(a, Eigen::ComputeFullV);
  const double big = svd.singularValues()(0), small = svd.singularValues()(1);
  const Vec2 minor = svd.matrixV().col(1);  // |A v| smallest along it
  const double m_peak = std::atan2(-minor.x(), minor.y());
  const double lo = std::min(arc.s_from, arc.s_to), hi = std::max(arc.s_from, arc.s_to);
  std::vector<double> cuts{lo, hi};
  for (int k = 1; k < 4; ++k) cuts.push_back(lo + (hi - lo) * k / 4);
  const double width = small > 0.0 ? small / big : 1.0;
  double peak = 2 * m_peak - s0;
  peak -= 2 * M_PI * std::ceil((peak - lo) / (2 * M_PI));  // the last peak at or below lo
  for (; peak <= hi + 1.0; peak += 2 * M_PI) {
    if (peak > lo && peak < hi) cuts.push_back(peak);
    for (double w = 0.5; w > 0.1 * width; w *= 0.125)
      for (double c : {peak - w, peak + w})
        if (c > lo && c < hi) cuts.push_back(c);
  }
  // exp(-r^2 / 2) falls off within ~1 / |A v(m)| >= 1 / big of s0: a second narrow feature when
  // the whitened arc is long; cut around s0 likewise.
  double at = s0 - 2 * M_PI * std::ceil((s0 - lo) / (2 * M_PI));
  for (; at <= hi + 1.0; at += 2 * M_PI) {
    if (at > lo && at < hi) cuts.push_back(at);
    for (double w = 0.5; w > 0.1 / std::max(big, 1.0); w *= 0.125)
      for (double c : {at - w, at + w})
        if (c > lo && c < hi) cuts.push_back(c);
  }
  std::sort(cuts.begin(), cuts.end());
  cuts.erase(std::unique(cuts.begin(), cuts.end()), cuts.end());
  Contribution total;
  for (std::size_t i = 0; i + 1 < cuts.size(); ++i)
    add(total, batch_quadrature(f, cuts[i], cuts[i + 1], rel_tol, 0.0), 1.0);
  if (arc.s_to < arc.s_from) total.value = -total.value;
  // Moving the arc by its residual moves at most |residual| x length of area, at density <= 1 / (2 pi).
  total.abs_err += kOneDivTwoPi * residual.norm() * (hi - lo) * big;
  return total;
}

// Where an arc comes closest to the mean, with the widths of what peaks there. On the arc
// z(s) = c + A u(s), u = (cos s, sin s), the squared radius is a trigonometric polynomial of
// degree 2,
//   r^2(s) = |c|^2 + (M00 + M11) / 2 + 2 g . u(s) + (M00 - M11) / 2 cos 2s + M01 sin 2s,
// with g = A^T c and M = A^T A, so (r^2)' has at most four zeros a period: at most two local
// minima. Each is bracketed by sampling (r^2)' at 32 points a period and refined by bisection
// (a missed pair of zeros closer than the sampling is a shallow minimum and maximum with r
// nearly constant between them: no narrow feature). An end of [lo, hi] where r^2 increases
// inwards is a closest approach too. Around a closest approach s*, with v = |z'(s*)| and
// r* = r(s*), exp(-r^2/2) is a peak of width about 1/v in s and dtheta/ds one of width r*/v.
// `width` is the narrowest the quadrature must resolve: r*/v, unless r* < 0.1, where the piece
// about s* passes so close that arc_tail subtracts the pole (near_pass_arc_tail) and what is
// left has the width 1/v of the exponential.
struct Approach {
  double s = 0.0, width = 0.0;
};

std::vector<Approach> closest_approaches(const Edge& arc, double lo, double hi) {
  const Mat2& a = arc.axes;
  const Vec2 g = a.transpose() * arc.centre;
  const Mat2 m = a.transpose() * a;
  const double half_diff = 0.5 * (m(0, 0) - m(1, 1)), cross = m(0, 1);
  const auto slope = [&](double s) {  // (r^2)'(s) / 2, one sine and cosine (double angles)
    const double sn = std::sin(s), cs = std::cos(s);
    return -g.x() * sn + g.y() * cs - half_diff * (2 * sn * cs) + cross * (cs * cs - sn * sn);
  };
  const auto width_at = [&](double s) {
    const double v = arc.tangent(s).norm(), r = arc.point(s).norm();
    return v > 0.0 ? (r < 0.1 ? 1.0 : std::min(1.0, r)) / v : hi - lo;
  };
  std::vector<Approach> out;
  if (slope(lo) > 0.0) out.push_back({lo, width_at(lo)});
  if (slope(hi) < 0.0) out.push_back({hi, width_at(hi)});
  const int samples = std::max(2, static_cast<int>(std::ceil(32 * (hi - lo) / (2 * M_PI))));
  double x0 = lo, f0 = slope(lo);
  for (int k = 1; k <= samples; ++k) {
    const double x1 = k == samples ? hi : lo + (hi - lo) * k / samples, f1 = slope(x1);
    if (f0 < 0.0 && f1 >= 0.0) {  // a minimum of r^2 in [x0, x1]
      // Located to a twentieth of the peak's width (checked every 8 halvings), which is all
      // the cuts need.
      double l = x0, r = x1;
      for (int i = 0; i < 80 && r - l > 4 * kEps * std::max(std::fabs(l), 1.0); ++i) {
        if (i % 8 == 7 && r - l < 0.05 * width_at(0.5 * (l + r))) break;
        const double mid = 0.5 * (l + r);
        (slope(mid) < 0.0 ? l : r) = mid;
      }
      const double at = 0.5 * (l + r);
      if (at > lo && at < hi) out.push_back({at, width_at(at)});
    }
    x0 = x1;
    f0 = f1;
  }
  return out;
}

// The parameters at which an arc is cut before adaptive quadrature: its quarters and points
// spaced by factors of 4 on either side of each closest approach, down to 4 times its
// narrowest peak, so that the first rule on every piece sees the scale of what lies in it. The
// approach itself is not a cut: the innermost piece has it at its centre, where the odd Gauss
// rule has a node (a peak there cannot go unseen), and a piece about a near pass keeps the
// whole pass for its pole subtraction. A Gauss-Kronrod rule whose nodes all miss a narrow peak
// agrees with itself about nothing: a disk 150 sigma across under a 50:1 spread came out 6e-9
// low with a bound of 5e-12 before this.
// `r_min` (a lower bound on the arc's distance from the mean) and `big` (a bound on |z'|, the
// axes' Frobenius norm) bound every width from below, max(0.1, min(1, r_min)) / big: when even
// that is wide, no cut beyond the quarters can be needed and the search is skipped.
std::vector<double> arc_cuts(const Edge& arc, double r_min, double big) {
  const double lo = std::min(arc.s_from, arc.s_to), hi = std::max(arc.s_from, arc.s_to);
  std::vector<double> cuts{lo, hi};
  for (int k = 1; k < 4; ++k) cuts.push_back(lo + (hi - lo) * k / 4);
  const double narrowest = std::max(0.1, std::min(1.0, r_min)) / big;
  const std::vector<Approach> approaches =
      16 * narrowest >= 0.25 * (hi - lo) ? std::vector<Approach>{} : closest_approaches(arc, lo, hi);
  for (const Approach& c : approaches) {
    // A peak wider than a sixteenth of a quarter is seen by the rule on that quarter (its
    // 31 nodes are at most a tenth of the piece apart).
    if (16 * c.width >= 0.25 * (hi - lo)) continue;
    // A cut within 4 widths of a narrow peak would split it: the quarters' cuts too. (A wide
    // one keeps them: a piece must never be a whole turn, whose swept angle is ambiguous.)
    if (4 * c.width < 0.125 * (hi - lo))
      cuts.erase(std::remove_if(cuts.begin() + 2, cuts.end(),
                                [&](double x) { return std::fabs(x - c.s) < 4 * c.width; }),
                 cuts.end());
    for (double w = 0.5; w >= 4 * c.width; w *= 0.25)
      for (double x : {c.s - w, c.s + w})
        if (x > lo && x < hi) cuts.push_back(x);
  }
  std::sort(cuts.begin(), cuts.end());
  cuts.erase(std::unique(cuts.begin(), cuts.end()), cuts.end());
  if (arc.s_to < arc.s_from) std::reverse(cuts.begin(), cuts.end());
  return cuts;
}

}  // namespace

Contribution arc_tail(const Edge& arc, double rel_tol, bool through_origin) {
  const double closest = radius_range(arc, 8).closest;
  if (square(closest) > kNegligibleR2) {
    Contribution c;
    c.abs_err = kNegligible;
    return c;
  }
  if (through_origin) return through_origin_arc_tail(arc, rel_tol);
  if (is_whole_ellipse(arc)) {
    const Contribution whole = whole_ellipse_tail(arc, rel_tol);
    if (whole.converged) return whole;
  }
  // A whitened ellipse can be long and pass close to the mean, making the integrand a narrow
  // peak; the adaptive rule starts on pieces cut around each closest approach (arc_cuts), each
  // with its own noise floor, and pieces that pass closer than a hundredth of their length have
  // the pole subtracted. (An arc through the mean has its own form above.)
  const double big = std::max(arc.axes.col(0).norm(), arc.axes.col(1).norm());
  const std::vector<double> cuts = arc_cuts(arc, closest, arc.axes.norm());  // Frobenius >= |z'|
  Contribution total;
  for (std::size_t k = 0; k + 1 < cuts.size(); ++k) {
    const double a = cuts[k], b = cuts[k + 1];
    const Edge piece = Edge::arc(arc.centre, arc.axes, a, b);
    const double r_min = radius_range(piece, 8).closest;
    if (r_min * r_min > kNegligibleR2) {
      total.abs_err += kNegligible;
      continue;
    }
    const bool near_pass = r_min < 0.01 * big * std::fabs(b - a);
    add(total, near_pass ? near_pass_arc_tail(piece, rel_tol, r_min, 0) : plain_arc_tail(piece, rel_tol, r_min), 1.0);
  }
  return total;
}

Contribution edge_near(const Edge& edge, double rel_tol) {
  if (is_whole_ellipse(edge)) {
    const double sign = edge.s_to > edge.s_from ? 1.0 : -1.0;
    const Contribution whole = periodic_ellipse_near(sign, computed_nodes(edge), rel_tol);
    if (whole.converged) return whole;
  }
  return quadrature([&edge](double s) { return near_integrand(edge.point(s), edge.tangent(s)); }, edge.param_from(),
                    edge.param_to(), rel_tol, square(min_radius(edge)));
}

}  // namespace strewn::detail
