// I_e of elliptic arcs: adaptive Gauss-Kronrod on pieces cut around each closest approach to the
// mean, with the pole subtracted on near passes and a principal value through the mean.
#include "integrate/exact/edge_tail.hpp"

#include <Eigen/LU>
#include <Eigen/SVD>
#include <algorithm>
#include <cmath>
#include <vector>

#include "core/profile_table.hpp"
#include "core/t_power.hpp"
#include "integrate/exact/bounded_gauss.hpp"
#include "integrate/exact/gauss_kronrod.hpp"
#include "integrate/exact/periodic_ellipse_tail.hpp"
#include "special/fma_clones.hpp"
#include "special/vector_math.hpp"
#include "strewn/constants.hpp"

namespace strewn::detail {
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
  return chord + (enclosed ? 2 * kPi * orientation : 0.0);
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
// `radial(sh, w2)` is the survival at r^2 = 4 sh^2 w2: exp(-2 sh^2 w2) for the normal.
// `kinks`: the radii where another family's survival has a kink (the uniform's edge at r = 2),
// cut where the arc crosses them (with_kink_crossings, below): a rule straddling the kink keeps
// no meaningful estimate (a uniform's disk with the mean on its arc: 1.58e-9 off under a bound
// of 2.9e-14).
std::vector<double> with_kink_crossings(const Edge& arc, std::vector<double> cuts, const std::vector<double>& all_kinks,
                                        const RadiusRange* range);
template <class Radial>
Contribution through_origin_arc_tail(const Edge& arc, double rel_tol, Radial radial,
                                     const std::vector<double>& kinks = {}) {
  const Mat2& a = arc.axes;
  const double det = a.determinant();
  const Vec2 u = a.inverse() * (-arc.centre);
  const double s0 = std::atan2(u.y(), u.x());
  const Vec2 residual = arc.centre + a * Vec2(std::cos(s0), std::sin(s0));
  const auto f = [&a, det, s0, &radial](const double* s, double* v, int n) {
    for (int i = 0; i < n; ++i) {
      const double m = 0.5 * (s[i] + s0), h = 0.5 * (s[i] - s0);
      const double sh = std::sin(h);
      const double w2 = (a * Vec2(-std::sin(m), std::cos(m))).squaredNorm();
      v[i] = kOneDivTwoPi * radial(sh, w2) * det / (2.0 * w2);
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
  peak -= 2 * kPi * std::ceil((peak - lo) / (2 * kPi));  // the last peak at or below lo
  for (; peak <= hi + 1.0; peak += 2 * kPi) {
    if (peak > lo && peak < hi) cuts.push_back(peak);
    for (double w = 0.5; w > 0.1 * width; w *= 0.125)
      for (double c : {peak - w, peak + w})
        if (c > lo && c < hi) cuts.push_back(c);
  }
  // exp(-r^2 / 2) falls off within ~1 / |A v(m)| >= 1 / big of s0: a second narrow feature when
  // the whitened arc is long; cut around s0 likewise.
  double at = s0 - 2 * kPi * std::ceil((s0 - lo) / (2 * kPi));
  for (; at <= hi + 1.0; at += 2 * kPi) {
    if (at > lo && at < hi) cuts.push_back(at);
    for (double w = 0.5; w > 0.1 / std::max(big, 1.0); w *= 0.125)
      for (double c : {at - w, at + w})
        if (c > lo && c < hi) cuts.push_back(c);
  }
  std::sort(cuts.begin(), cuts.end());
  cuts.erase(std::unique(cuts.begin(), cuts.end()), cuts.end());
  if (!kinks.empty()) {
    cuts = with_kink_crossings(arc, std::move(cuts), kinks, nullptr);
    std::sort(cuts.begin(), cuts.end());
    cuts.erase(std::unique(cuts.begin(), cuts.end()), cuts.end());
  }
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
  const int samples = std::max(2, static_cast<int>(std::ceil(32 * (hi - lo) / (2 * kPi))));
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

Contribution arc_near(const Edge& arc, double rel_tol) {
  const double closest = radius_range(arc, 8).closest;
  const std::vector<double> cuts = arc_cuts(arc, closest, arc.axes.norm());
  Contribution total;
  for (std::size_t k = 0; k + 1 < cuts.size(); ++k) {
    const Edge piece = Edge::arc(arc.centre, arc.axes, cuts[k], cuts[k + 1]);
    add(total,
        quadrature([&piece](double s) { return near_integrand(piece.point(s), piece.tangent(s)); }, piece.param_from(),
                   piece.param_to(), rel_tol, square(radius_range(piece, 8).closest)),
        1.0);
  }
  return total;
}

Contribution arc_tail(const Edge& arc, double rel_tol, bool through_origin) {
  const double closest = radius_range(arc, 8).closest;
  if (square(closest) > kNegligibleR2) {
    Contribution c;
    c.abs_err = kNegligible;
    return c;
  }
  if (through_origin)
    return through_origin_arc_tail(arc, rel_tol, [](double sh, double w2) { return std::exp(-2.0 * sh * sh * w2); });
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

// Arcs under another family (DESIGN.md, "Scatter families"): the normal's cuts, principal
// value through the mean and pole subtraction on near passes, with the family's S(r) (tail) or
// G(r) (near form) in place of exp(-r^2/2) and its complement, all by adaptive Gauss-Kronrod
// (no periodic rule: the uniform's edge is a kink that would slow it to algebraic convergence).
namespace {

// K(r) (z x z') / |z|^2 / (2 pi) with K = S or G, less `minus` (the pole subtraction's S(rho)).
auto family_arc_integrand(const Edge& arc, const ScatterFamily& family, bool near, double minus = 0.0) {
  return [&arc, &family, near, minus](const double* s, double* v, int n) {
    ArcNodes nodes;
    arc_nodes(arc, s, n, nodes);
    if (family.kind() == FamilyKind::student_t) {
      // The t's K at all nodes at once (t_kernel_in_place).
      double r2[31], k[31];
      for (int i = 0; i < n; ++i) k[i] = r2[i] = nodes.x[i] * nodes.x[i] + nodes.y[i] * nodes.y[i];
      t_kernel_in_place(k, n, family.nu(), near);
      for (int i = 0; i < n; ++i)
        v[i] = r2[i] == 0.0 ? 0.0
                            : kOneDivTwoPi * (k[i] - minus) *
                                  accurate_cross(Vec2(nodes.x[i], nodes.y[i]), Vec2(nodes.tx[i], nodes.ty[i])) / r2[i];
      return;
    }
    for (int i = 0; i < n; ++i) {
      const Vec2 z(nodes.x[i], nodes.y[i]);
      const double r2 = z.squaredNorm();
      if (r2 == 0.0) {
        v[i] = 0.0;
        continue;
      }
      const double r = std::sqrt(r2);
      const double k = (near ? family.cdf(r) : family.survival(r)) - minus;
      v[i] = kOneDivTwoPi * k * accurate_cross(z, Vec2(nodes.tx[i], nodes.ty[i])) / r2;
    }
  };
}

// The parameters where the arc's radius crosses one of the family's kinks (the uniform's edge,
// a profile's rows), added to `cuts`, so that Gauss-Kronrod sees a smooth integrand on every
// piece and its error estimate keeps its meaning. Crossings are bracketed on 64 samples per
// piece (batched sines and cosines) and refined by safeguarded Newton steps on r^2 to a few
// ulps (bisection before it: about 50 sines and cosines a crossing); two crossings closer than a sample's spacing
// (an arc grazing a kink's circle) can go unseen, where the kink's effect on the piece is
// a grazing one that the adaptive rule's bisection resolves.
std::vector<double> with_kink_crossings(const Edge& arc, std::vector<double> cuts, const std::vector<double>& all_kinks,
                                        const RadiusRange* range = nullptr) {
  if (all_kinks.empty()) return cuts;
  // Only the kinks within the arc's bounds on its radius can be crossed (most arcs cross none
  // or few of a profile's rows).
  const RadiusRange span = range ? *range : radius_range(arc, 8);
  std::vector<double> kinks;
  for (double k : all_kinks)
    if (k >= span.closest && k <= span.farthest) kinks.push_back(k);
  if (kinks.empty()) return cuts;
  const bool reversed = arc.s_to < arc.s_from;
  const Vec2 c = arc.centre;
  const Mat2& ax = arc.axes;
  // r^2 and its slope at s from one sine and cosine: z = c + A u, (r^2)' = 2 z . A u'.
  const auto r2_slope = [&c, &ax](double s, double* slope) {
    const double cs = std::cos(s), sn = std::sin(s);
    const Vec2 z = c + ax * Vec2(cs, sn);
    *slope = 2.0 * z.dot(ax * Vec2(-sn, cs));
    return z.squaredNorm();
  };
  std::vector<double> found;
  constexpr int kSamples = 64;
  double cs[kSamples + 1], sn[kSamples + 1], r[kSamples + 1];
  for (std::size_t k = 0; k + 1 < cuts.size(); ++k) {
    const double lo = std::min(cuts[k], cuts[k + 1]), hi = std::max(cuts[k], cuts[k + 1]);
    for (int j = 0; j <= kSamples; ++j) cs[j] = j == kSamples ? hi : lo + (hi - lo) * j / kSamples;
    const double last = cs[kSamples];
    cos_sin_in_place(cs, sn, kSamples + 1);
    for (int j = 0; j <= kSamples; ++j) r[j] = (c + ax * Vec2(cs[j], sn[j])).norm();
    // An arc grazing a kink's circle crosses it twice between two samples, both on one side: the
    // sliver between went unseen, and under the uniform (a jump, not a kink) it is mass (a disk
    // poking 1e-5 sigma out of the support: 0.25 +- 2.8e-15 for 0.2499999933; an adversarial
    // trial). Where r^2 turns between two samples (its slope changes sign) and a kink lies within
    // the chord's margin |(r^2)''| w^2 / 8 of the samples' radii, the turning point is found by
    // bisection on the slope and splits the step, so that each crossing has its own bracket.
    // |(r^2)''| = 2 |z'|^2 + 2 z . z'' <= 2 (big^2 + (|c| + big) big), big the Frobenius norm.
    struct Step {
      double a, b, ra, rb;  // a bracket and the radii at its ends
    };
    Step steps[2 * kSamples];  // on the stack: this runs for every family arc near a kink
    int n_steps = 0;
    {
      const double big = ax.norm(), w = (hi - lo) / kSamples;
      const double margin = 0.125 * 2.0 * (big * big + (c.norm() + big) * big) * w * w;
      // (r^2)' at the samples from their sines and cosines: 2 z . A u'.
      const auto slope_at = [&](int j) { return 2.0 * (c + ax * Vec2(cs[j], sn[j])).dot(ax * Vec2(-sn[j], cs[j])); };
      double slope_prev = slope_at(0);
      for (int j = 1; j <= kSamples; ++j) {
        const double a = lo + (hi - lo) * (j - 1) / kSamples, b = j == kSamples ? last : lo + (hi - lo) * j / kSamples;
        const double slope_b = slope_at(j);
        bool near = false;
        const double r2lo = std::min(r[j - 1], r[j]) * std::min(r[j - 1], r[j]), r2hi = std::max(r[j - 1], r[j]) * std::max(r[j - 1], r[j]);
        for (double rk : kinks) near = near || (rk * rk >= r2lo - margin && rk * rk <= r2hi + margin);
        if (near && (slope_prev < 0.0) != (slope_b < 0.0)) {
          double l = a, h = b;
          const bool falling = slope_prev < 0.0;
          for (int it = 0; it < 200 && h - l > 4 * kEps * std::max(std::fabs(l), std::fabs(h)); ++it) {
            const double mid = 0.5 * (l + h);
            double sm = 0.0;
            r2_slope(mid, &sm);
            ((sm < 0.0) == falling ? l : h) = mid;
          }
          const double t = 0.5 * (l + h);
          double unused = 0.0;
          const double rt = std::sqrt(r2_slope(t, &unused));
          steps[n_steps++] = {a, t, r[j - 1], rt};
          steps[n_steps++] = {t, b, rt, r[j]};
        } else {
          steps[n_steps++] = {a, b, r[j - 1], r[j]};
        }
        slope_prev = slope_b;
      }
    }
    for (int q = 0; q < n_steps; ++q) {
      const Step& step = steps[q];
      const double r0 = step.ra, r1 = step.rb;
      for (double rk : kinks) {
        if ((r0 - rk) * (r1 - rk) >= 0.0) continue;
        // The crossing of r^2 = rk^2 in [s0, s1]: Newton's method kept inside a bracket that
        // shrinks at every step (a step that would leave it is a bisection), until its step is
        // a few ulps or the bracket that wide. (How near the crossing the cut falls changes no
        // bound: FamilyArcBound measures its pieces' radii.)
        double a = step.a, b = step.b;
        const bool rising = r0 < rk;
        const double target = rk * rk;
        double x = 0.5 * (a + b);
        for (int it = 0; it < 100; ++it) {
          double slope = 0.0;
          const double g = r2_slope(x, &slope) - target;
          if (g == 0.0) break;
          ((g < 0.0) == rising ? a : b) = x;
          const double next = x - g / slope;
          const double tiny = 4 * kEps * std::max(std::fabs(a), std::fabs(b));
          if (b - a <= tiny) break;
          if (next > a && next < b) {
            const bool done = std::fabs(next - x) <= tiny;
            x = next;
            if (done) break;
          } else {
            x = 0.5 * (a + b);
          }
        }
        found.push_back(x);
      }
    }
  }
  cuts.insert(cuts.end(), found.begin(), found.end());
  std::sort(cuts.begin(), cuts.end());
  cuts.erase(std::unique(cuts.begin(), cuts.end()), cuts.end());
  if (reversed) std::reverse(cuts.begin(), cuts.end());
  return cuts;
}

// Whether the radii [closest, farthest] reach across one of the rows (kinks).
bool straddles_kink(const RadiusRange& range, const std::vector<double>& rows) {
  for (double k : rows)
    if (range.closest < k && k < range.farthest) return true;
  return false;
}

// Tightens `range` to the radii of the arc's ends (widened by their rounding) where r is
// certified monotone on the arc; leaves it as it is otherwise. On z(s) = c + A u(s),
// p(s) = z . z' = (r^2)'(s) / 2 and p'' = 3 z' . z'' + z . z''' with z'' = -A u, z''' = -A u',
// so |p''| <= 4 big^2 + |c| big, big >= |A| (the Frobenius norm). Between samples w apart, p
// lies above its chord less |p''| w^2 / 8 (linear interpolation's error), so p keeps the sign
// of two samples of one sign whose smaller magnitude exceeds that margin (plus the samples'
// rounding); r^2 is then monotone and its extremes are at the arc's ends.
void monotone_radius_range(const Edge& arc, RadiusRange& range) {
  constexpr int kSamples = 8;
  const double big = arc.axes.norm(), c = arc.centre.norm();
  const double w = (arc.s_to - arc.s_from) / kSamples;
  double s[kSamples + 1];
  for (int k = 0; k <= kSamples; ++k) s[k] = arc.s_from + k * w;
  ArcNodes nodes;
  arc_nodes(arc, s, kSamples + 1, nodes);
  const double margin = (4.0 * big * big + c * big) * 0.125 * w * w + 16 * kEps * (c + big) * big;
  double sign = 0.0;
  for (int k = 0; k <= kSamples; ++k) {
    const double p = nodes.x[k] * nodes.tx[k] + nodes.y[k] * nodes.ty[k];
    if (!(std::fabs(p) > margin)) return;
    if (sign != 0.0 && (p > 0.0) != (sign > 0.0)) return;
    sign = p;
  }
  const double ra = std::hypot(nodes.x[0], nodes.y[0]), rb = std::hypot(nodes.x[kSamples], nodes.y[kSamples]);
  // (the last sample is s_from + 8 w, within a few ulps of s_to)
  const double rounding = 8 * kEps * (c + big) + 4 * kEps * big * (std::fabs(arc.s_from) + std::fabs(arc.s_to));
  range.closest = std::max(range.closest, std::min(ra, rb) - rounding);
  range.farthest = std::min(range.farthest, std::max(ra, rb) + rounding);
}

// One-panel Gauss-Legendre rules with a proven bound on a piece of a family arc
// (bounded_gauss.hpp). On the arc z(s) = c + A u(s), u = (cos s, sin s), with g = A^T c and
// M = A^T A (as in closest_approaches),
//     r^2(s) = C0 + 2 g . u(s) + D cos 2s + E sin 2s,   C0 = |c|^2 + (M00 + M11) / 2,
//     D = (M00 - M11) / 2, E = M01,   z x z' = det A + (A^T J c) . u'(s),  J c = (-c_y, c_x),
// entire functions of s. For s = x + i y, Re cos(x + i y) = cos x cosh y and likewise for sin,
// so Re r^2(x + i y) = r^2(x) + (cosh y - 1) 2 g . u(x) + (cosh 2y - 1) (D cos 2x + E sin 2x),
// and |cos s|^2 + |sin s|^2 = cosh 2y. On the rectangle |Re s - m| <= h A_rho, |Im s| <= h B_rho
// that holds the scaled Bernstein ellipse of the piece [m - h, m + h] (bounded_gauss.hpp):
//     Re r^2 >= r_min^2 - L e - (cosh Y - 1) 2 |g| - (cosh 2Y - 1) R,
//     |r^2| <= C0 + 2 |g| sqrt(cosh 2Y) + R sqrt(cosh 4Y),  |z x z'| <= |det A| + |A^T J c| sqrt(cosh 2Y),
// with R = sqrt(D^2 + E^2), Y = h B_rho, e = h (A_rho - 1) the reach beyond the piece's ends,
// L = 2 |g| + 2 R >= |(r^2)'| on the real line and r_min a lower bound of |z| on the piece.
// Where Re r^2 > 0 the integrand K(r^2) (z x z') / r^2 / (2 pi) is analytic (K continued as a
// function of r^2: exp(-r^2/2); (1 + r^2/nu)^(-nu/2) on the principal branch, analytic while
// Re(1 + r^2/nu) > 0; a profile's cubic S(r_i) - c2 (r^2 - r_i^2) - c3 ((r^2)^(3/2) - r_i^3);
// the uniform's 1 - r^2/4) and bounded by:
//     normal |K| <= exp(-Re r^2 / 2);  t |K| = |1 + r^2/nu|^(-nu/2) <= (1 + Re r^2 / nu)^(-nu/2);
//     profile |K| <= S(r_i) + |c2| (|r^2| + r_i^2) + |c3| (|r^2|^(3/2) + r_i^3);  uniform 1 + |r^2| / 4;
// the near form's G = 1 - S by 1 + |S| (a profile's by G(r_i) + the same terms).
struct ArcAnalytic {
  double c0 = 0.0, g = 0.0, harmonic2 = 0.0, det = 0.0, jc = 0.0;
  explicit ArcAnalytic(const Edge& arc) {
    const Mat2& a = arc.axes;
    const Mat2 m = a.transpose() * a;
    c0 = arc.centre.squaredNorm() + 0.5 * (m(0, 0) + m(1, 1));
    g = (a.transpose() * arc.centre).norm();
    harmonic2 = std::hypot(0.5 * (m(0, 0) - m(1, 1)), m(0, 1));
    det = std::fabs(a.determinant());
    jc = (a.transpose() * Vec2(-arc.centre.y(), arc.centre.x())).norm();
  }
};

// The bound M on a piece's Bernstein ellipse, infinite where it cannot be given.
class FamilyArcBound {
 public:
  FamilyArcBound(const ArcAnalytic& q, const ScatterFamily& family, bool near, double r_min, double r_max,
                 double half)
      : q_(q), family_(family), near_(near), r_min_(r_min), half_(half) {
    if (const ProfileTable* t = family.profile_table()) {
      // The piece's cubic is that of the row interval [lo, hi] holding the middle of its radii
      // (beyond the wetted radius, S = 0 and G = 1). Its ends lie on rows when the arc was cut
      // where it crosses one (with_kink_crossings), and their radii then straddle the row by
      // rounding: by up to d below lo (or above hi) the true K is the neighbouring interval's
      // cubic, which agrees with this one at the row (G is continuous) and differs from it by
      //     |dc2 (r^2 - lo^2) + dc3 (r^3 - lo^3)| <= (|dc2| (2 lo + d) + 3 |dc3| (lo + d)^2) d
      // (dc the difference of the two cubics' coefficients; a step at the wetted edge, where
      // the last rate is above 0, is covered too). The panel is then the rule of the piece's
      // own cubic plus that difference on the overshoot, whose integral and rule are each at
      // most the piece's length times its largest value (positive weights that sum to the
      // length): overshoot_error(). Overshoots beyond 1e-9 (1 + lo) are not rounding: no bound.
      const std::size_t last = t->r.size() - 1;  // t->r[last] = 2, the wetted radius
      const double mid = 0.5 * (r_min + r_max);
      beyond_ = mid >= t->r[last];
      const std::size_t i = beyond_ ? last : t->index(mid);
      const double lo = t->r[i], hi = beyond_ ? std::numeric_limits<double>::infinity() : t->r[i + 1];
      const auto coefficients = [t, last](std::size_t row) {  // the cubic of [r_row, r_row+1]; 0 beyond
        return row < last ? t->cubic(row) : ProfileTable::Cubic{};
      };
      const ProfileTable::Cubic own = coefficients(i);
      const double d_lo = std::max(0.0, lo - r_min), d_hi = std::max(0.0, r_max - hi);
      // (and no further than the neighbouring interval: rows closer than the overshoot are refused)
      valid_ = d_lo <= 1e-9 * (1.0 + lo) && d_hi <= 1e-9 * (1.0 + lo) && (d_lo == 0.0 || (i > 0 && r_min >= t->r[i - 1])) &&
               (d_hi == 0.0 || i + 2 > last || r_max <= t->r[i + 2]);
      if (valid_ && d_lo > 0.0) {
        const ProfileTable::Cubic below = coefficients(i - 1);
        overshoot_k_ += (std::fabs(own.c2 - below.c2) * (2.0 * lo + d_lo) +
                         3.0 * std::fabs(own.c3 - below.c3) * square(lo + d_lo)) * d_lo;
      }
      if (valid_ && d_hi > 0.0) {
        const ProfileTable::Cubic above = coefficients(i + 1);
        overshoot_k_ += (std::fabs(own.c2 - above.c2) * (2.0 * hi + d_hi) +
                         3.0 * std::fabs(own.c3 - above.c3) * square(hi + d_hi)) * d_hi;
      }
      if (!beyond_) {
        c2_ = std::fabs(own.c2);
        c3_ = std::fabs(own.c3);
        ri_ = lo;
        k_i_ = near ? t->below[i] : t->above[i];
      }
    } else if (family.kind() == FamilyKind::uniform) {
      beyond_ = r_min >= 2.0;
      valid_ = beyond_ || r_max <= 2.0;
    } else if (family.kind() == FamilyKind::student_t) {
      t_whole_ = t_whole_nu(family.nu(), &t_twice_k_);
    }
  }
  // An upper bound of log M on E_rho, rho = kGaussLadder[rung] (choose_gauss_rule_log), by the
  // bounds above with cosh, log and the t's power taken from rigorous series bounds
  // (bounded_gauss.hpp): cosh Y <= cosh_upper(Y) and, cosh being increasing, the double angles
  // from it; log M <= log_upper(M) (or -nu/2 log_lower(1 + lo/nu) for the t's power). The near
  // form's 1 + K is at most 2 for the t (K <= 1 where Re r^2 > 0).
  double log_bound(int rung) const {
    constexpr double kInf = std::numeric_limits<double>::infinity();
    if (!valid_) return kInf;
    const BernsteinAxes& e = kGaussLadderAxes[rung];
    const double y = half_ * e.across, reach = half_ * (e.along - 1.0);
    const double ch = cosh_upper(y), ch2 = 2.0 * ch * ch - 1.0, ch4 = 2.0 * ch2 * ch2 - 1.0;
    // (a relative margin of 1e-12 for the rounding of the bounds themselves)
    const double lo = (r_min_ * r_min_ - 2.0 * (q_.g + q_.harmonic2) * reach - 2.0 * (ch - 1.0) * q_.g -
                       (ch2 - 1.0) * q_.harmonic2) *
                          (1.0 - 1e-12) -
                      1e-300;
    if (!(lo > 0.0)) return kInf;
    const double hi = (q_.c0 + 2.0 * q_.g * std::sqrt(ch2) + q_.harmonic2 * std::sqrt(ch4)) * (1.0 + 1e-12);
    const double cross = (q_.det + q_.jc * std::sqrt(ch2)) * (1.0 + 1e-12);
    const double angle = kOneDivTwoPi * cross / lo;  // |dtheta/ds| / (2 pi)
    switch (family_.kind()) {
      case FamilyKind::normal: return log_upper(angle * (near_ ? 2.0 : std::exp(-0.5 * lo))) + 1e-12;
      case FamilyKind::student_t: {
        if (near_) return log_upper(2.0 * angle) + 1e-12;
        // A whole nu's power by products (core/t_power.hpp, within 6 eps; raised by 1e-12), one
        // logarithm in all; else (1 + lo/nu lowered by its rounding, which the power's exponent
        // nu/2 magnifies) through log_lower.
        if (t_whole_) return log_upper(angle * t_half_power(family_.nu() / (family_.nu() + lo), t_twice_k_) * (1.0 + 1e-12)) + 1e-12;
        return log_upper(angle) - 0.5 * family_.nu() * log_lower((1.0 + lo / family_.nu()) * (1.0 - 4 * kEps)) + 1e-12;
      }
      case FamilyKind::uniform:
        if (beyond_) return near_ ? log_upper(angle) + 1e-12 : -kInf;  // G = 1, S = 0
        return log_upper(angle * ((near_ ? 2.0 : 1.0) + 0.25 * hi)) + 1e-12;
      case FamilyKind::profile:
        if (beyond_) return near_ ? log_upper(angle) + 1e-12 : -kInf;
        return log_upper(angle * (k_i_ + c2_ * (hi + ri_ * ri_) + c3_ * (hi * std::sqrt(hi) + ri_ * ri_ * ri_))) + 1e-12;
    }
    return kInf;
  }
  // The error added by a profile piece's ends straddling a row (above), for a piece of the given
  // length in s: twice the length times the overshoot's largest K difference times
  // |dtheta/ds| / (2 pi) <= (|det A| + |A^T J c|) / r_min^2 / (2 pi) on the real line.
  double overshoot_error(double length) const {
    if (overshoot_k_ == 0.0) return 0.0;
    return 2.0 * length * overshoot_k_ * kOneDivTwoPi * (q_.det + q_.jc) / square(r_min_) * (1.0 + 1e-12);
  }

 private:
  const ArcAnalytic& q_;
  const ScatterFamily& family_;
  bool near_;
  double r_min_, half_;
  bool valid_ = true, beyond_ = false;
  bool t_whole_ = false;  // a t with a whole nu up to 8 (core/t_power.hpp), nu = t_twice_k_
  int t_twice_k_ = 0;
  double c2_ = 0.0, c3_ = 0.0, ri_ = 0.0, k_i_ = 0.0;
  double overshoot_k_ = 0.0;
};

// A piece [a, b] of a family arc by one Gauss-Legendre panel whose proven bound meets the
// tolerance (relative to the panel's L1 norm, as batch_quadrature judges it), plus the same
// rounding allowance batch_quadrature adds; false where no panel up to kMaxBoundedNodes does.
template <class Batch>
bool bounded_family_piece(Batch& f, const FamilyArcBound& bound, double a, double b, double tol, double noise,
                          double guess_l1, Contribution& out) {
  const double half = 0.5 * std::fabs(b - a);
  const double overshoot = bound.overshoot_error(2.0 * half);
  const auto log_m = [&bound](int rung) { return bound.log_bound(rung); };
  GaussChoice choice = choose_gauss_rule_log(half, tol * guess_l1, log_m);
  for (int attempt = 0; attempt < 2 && choice.n > 0; ++attempt) {
    const GaussPanel p = gauss_panel(f, a, b, choice.n);
    out.evaluations += static_cast<std::uint64_t>(choice.n);
    if (!std::isfinite(p.value) || !std::isfinite(p.l1)) return false;
    if (choice.bound + overshoot <= tol * p.l1) {
      out.value = p.value;
      out.abs_err = choice.bound + overshoot + noise * p.l1;
      out.converged = true;
      return true;
    }
    // The guess was too large: choose again from the panel's own L1 norm.
    const GaussChoice again = choose_gauss_rule_log(half, tol * p.l1, log_m);
    if (again.n <= choice.n) break;
    choice = again;
  }
  return false;
}

// |atan2(y, x)| to within about 1.5% below it, for a guess that only sizes a rule: by octants,
// atan a ~ a / (1 + 0.28 a^2) on [0, 1] (within 0.5%), lowered by 1%.
double guess_angle(double y, double x) {
  y = std::fabs(y);
  const auto atan01 = [](double a) { return a / (1.0 + 0.28 * a * a); };
  double angle = 0.0;
  if (!(y > 0.0 || x < 0.0)) return 0.0;
  if (x >= y) {
    angle = atan01(y / x);
  } else if (-x >= y) {
    angle = kPi - atan01(y / -x);
  } else {
    angle = 0.5 * kPi - atan01(x / y);  // |x| < y
  }
  return 0.99 * angle;
}

// A piece [a, b] by a bounded panel, halved (to depth 3) where no panel's bound meets the
// tolerance; false where even the halves fail or a piece passes near the mean (whose pole the
// adaptive path subtracts).
bool bounded_family_pieces(const Edge& arc, const ArcAnalytic& q, const ScatterFamily& family, bool near,
                           double rel_tol, double a, double b, int depth, Contribution& total,
                           const RadiusRange* arc_range) {
  // The whole arc (uncut) is its own piece, with the range its caller has.
  const bool whole = a == arc.s_from && b == arc.s_to;
  const Edge piece = whole ? arc : Edge::arc(arc.centre, arc.axes, a, b);
  RadiusRange range = whole && arc_range ? *arc_range : radius_range(piece, 8);
  // The chords' slack (about big (ds/16)^2 / 2) carries a piece cut at a profile's row across
  // that row, where its bound is refused: its radii are those of its ends when r is monotone.
  if (family.profile_table() && straddles_kink(range, family.profile_table()->r)) monotone_radius_range(piece, range);
  const double r_min = range.closest;
  // S at most kNegligible on the piece (the t's tail decays slowly: no radius alone will do).
  if (!near && family.survival(r_min) < kNegligible) {
    total.abs_err += kNegligible;
    return true;
  }
  const double big = std::max(arc.axes.col(0).norm(), arc.axes.col(1).norm());
  if (r_min < 0.01 * big * std::fabs(b - a)) return false;
  const double noise_r2 = near ? 0.0 : family_noise_r2(family, r_min);
  const double noise = 8 * kEps * (1.0 + std::max(0.5 * noise_r2, 1.0));
  const double tol = std::max({rel_tol, kMinQuadTolerance, noise});
  // A first guess of the panel's L1 norm, to pick its size: the smallest K on the piece times
  // the angle its chord subtends (checked against the panel's own L1 norm after).
  const double k_low = near ? family.cdf(r_min) : family.survival(range.farthest);
  const Vec2 &za = piece.from, &zb = piece.to;  // (a whole arc's stored ends: a guess needs no more)
  const double guess = kOneDivTwoPi * k_low * guess_angle(accurate_cross(za, zb), za.dot(zb));
  auto f = family_arc_integrand(piece, family, near);
  Contribution c;
  if (bounded_family_piece(f, FamilyArcBound(q, family, near, r_min, range.farthest, 0.5 * std::fabs(b - a)), a, b,
                           tol, noise, guess, c)) {
    add(total, c, 1.0);
    return true;
  }
  total.evaluations += c.evaluations;
  if (depth >= 3) return false;
  const double mid = 0.5 * (a + b);
  return bounded_family_pieces(arc, q, family, near, rel_tol, a, mid, depth + 1, total, nullptr) &&
         bounded_family_pieces(arc, q, family, near, rel_tol, mid, b, depth + 1, total, nullptr);
}

// A family arc by bounded panels on the pieces between its ends and the points where its
// radius crosses a kink of the family; false (with nothing to keep) where some piece fails.
bool bounded_family_arc(const Edge& arc, const ScatterFamily& family, bool near, double rel_tol, Contribution& out,
                        const RadiusRange* range) {
  // (a t has no kinks: its arc is one piece, with no vector to allocate)
  const double ends[2] = {arc.s_from, arc.s_to};
  std::vector<double> crossings;
  const double* cuts = ends;
  std::size_t n_cuts = 2;
  if (family.kind() == FamilyKind::uniform || family.kind() == FamilyKind::profile) {
    crossings = with_kink_crossings(arc, {arc.s_from, arc.s_to}, family.kinks(), range);
    cuts = crossings.data();
    n_cuts = crossings.size();
  }
  const ArcAnalytic q(arc);
  Contribution total;
  for (std::size_t k = 0; k + 1 < n_cuts; ++k)
    if (!bounded_family_pieces(arc, q, family, near, rel_tol, cuts[k], cuts[k + 1], 0, total, range)) {
      out.evaluations += total.evaluations;
      return false;
    }
  out = total;
  return true;
}

}  // namespace

namespace {

// t_kernel_in_place for nu = M, a whole number up to 8 (core/t_power.hpp), by a loop whose
// power is fixed, so that it runs in vector lanes.
template <int M>
void t_whole_kernel(double* r2, int n, double nu, bool near) {
  constexpr double kInf = std::numeric_limits<double>::infinity();
  if (near) {
    for (int i = 0; i < n; ++i) {
      const double q = nu + r2[i];
      r2[i] = q < kInf ? t_half_power_complement(nu / q, r2[i] / q, M) : 1.0;
    }
  } else {
    for (int i = 0; i < n; ++i) r2[i] = t_half_power(nu / (nu + r2[i]), M);
  }
}

}  // namespace

void t_kernel_in_place(double* r2, int n, double nu, bool near) {
  int m = 0;
  if (t_whole_nu(nu, &m)) {
    switch (m) {
      case 1: return t_whole_kernel<1>(r2, n, nu, near);
      case 2: return t_whole_kernel<2>(r2, n, nu, near);
      case 3: return t_whole_kernel<3>(r2, n, nu, near);
      case 4: return t_whole_kernel<4>(r2, n, nu, near);
      case 5: return t_whole_kernel<5>(r2, n, nu, near);
      case 6: return t_whole_kernel<6>(r2, n, nu, near);
      case 7: return t_whole_kernel<7>(r2, n, nu, near);
      case 8: return t_whole_kernel<8>(r2, n, nu, near);
    }
  }
  const double minus_half_nu = -0.5 * nu;
  for (int i = 0; i < n; ++i) r2[i] /= nu;
  log1p_in_place(r2, n);
  for (int i = 0; i < n; ++i) r2[i] *= minus_half_nu;
  if (near) {
    expm1_in_place(r2, n);
    for (int i = 0; i < n; ++i) r2[i] = -r2[i];
  } else {
    exp_in_place(r2, n);
  }
}

double family_noise_r2(const ScatterFamily& family, double r_min) {
  // The rounding of S(r) grows with its exponent: r^2/2 for the normal, E = nu/2 log1p(r^2/nu)
  // for the t (batch_quadrature takes it as a squared radius); the uniform's is a few ulps.
  // The t's S is taken through libmvec (t_kernel_in_place), whose log and exp, and the nodes'
  // sines and cosines in r^2, each err by a few ulps: its allowance is doubled, returning
  // 4 E + 2 so that the noise floor 8 eps (1 + max(r2 / 2, 1)) is 16 eps (1 + E).
  switch (family.kind()) {
    case FamilyKind::normal: return r_min * r_min;
    // (log1p(x) <= log(fl(1 + x)) + eps <= log_upper(1 + x) + eps: an allowance needs no more)
    case FamilyKind::student_t: return 2.0 * family.nu() * (log_upper(1.0 + r_min * r_min / family.nu()) + kEps) + 2.0;
    case FamilyKind::uniform:
    case FamilyKind::profile: return 0.0;
  }
  return 0.0;
}

STREWN_FMA_CLONES Contribution family_arc(const Edge& arc, const ScatterFamily& family, bool near, double rel_tol,
                        bool through_origin, const RadiusRange* range) {
  if (through_origin && !near)
    return through_origin_arc_tail(
        arc, rel_tol, [&family](double sh, double w2) { return family.survival(2.0 * std::fabs(sh) * std::sqrt(w2)); },
        family.kinks());
  std::uint64_t spent = 0;  // evaluations of a bounded attempt that failed
  // One bounded panel per piece first (the normal keeps its adaptive rule: its arcs come here
  // only from wedges); the adaptive rule on the fine cuts below where that fails.
  if (family.kind() != FamilyKind::normal) {
    Contribution c;
    if (bounded_family_arc(arc, family, near, rel_tol, c, range)) return c;
    spent = c.evaluations;
  }
  const double closest = (range ? *range : radius_range(arc, 8)).closest;
  const double big = std::max(arc.axes.col(0).norm(), arc.axes.col(1).norm());
  const std::vector<double> cuts = with_kink_crossings(arc, arc_cuts(arc, closest, arc.axes.norm()), family.kinks());
  Contribution total;
  total.evaluations = spent;
  for (std::size_t k = 0; k + 1 < cuts.size(); ++k) {
    const double a = cuts[k], b = cuts[k + 1];
    const Edge piece = Edge::arc(arc.centre, arc.axes, a, b);
    const double r_min = radius_range(piece, 8).closest;
    const double noise_r2 = near ? 0.0 : family_noise_r2(family, r_min);
    // A near pass in the tail form: I = S(rho) sweep / (2 pi) + 1/(2 pi) integral (S(r) - S(rho))
    // dtheta, whose integrand stays bounded through the pass (as near_pass_arc_tail does).
    if (!near && r_min < 0.01 * big * std::fabs(b - a)) {
      const double sweep = swept_angle(piece);
      if (!std::isnan(sweep)) {
        const double s_rho = family.survival(r_min);
        Contribution c = batch_quadrature(family_arc_integrand(piece, family, false, s_rho), a, b, rel_tol, noise_r2);
        const double pole = kOneDivTwoPi * s_rho * sweep;
        c.value += pole;
        c.abs_err += 4 * kEps * std::fabs(pole);
        if (std::fabs(pole) <= 1e4 * std::fabs(c.value)) {
          add(total, c, 1.0);
          continue;
        }
      }
    }
    auto f = family_arc_integrand(piece, family, near);
    add(total, batch_quadrature(f, a, b, rel_tol, noise_r2), 1.0);
  }
  return total;
}

}  // namespace strewn::detail
