#include "line_bound.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

namespace strewn::detail {
namespace {

double cross(const Vec2& a, const Vec2& b) { return a.x() * b.y() - a.y() * b.x(); }

// Distance from p to the segment [a, b].
double distance_to_segment(const Vec2& p, const Vec2& a, const Vec2& b) {
  const Vec2 ab = b - a;
  const double len2 = ab.squaredNorm();
  const double t = len2 > 0.0 ? std::clamp((p - a).dot(ab) / len2, 0.0, 1.0) : 0.0;
  return (a + t * ab - p).norm();
}

bool segments_meet(const Vec2& a, const Vec2& b, const Vec2& c, const Vec2& d) {
  const double d1 = cross(b - a, c - a), d2 = cross(b - a, d - a);
  const double d3 = cross(d - c, a - c), d4 = cross(d - c, b - c);
  if (((d1 > 0 && d2 < 0) || (d1 < 0 && d2 > 0)) && ((d3 > 0 && d4 < 0) || (d3 < 0 && d4 > 0))) return true;
  // Touching or collinear: an end on the other segment.
  const auto on = [](const Vec2& p, const Vec2& q, const Vec2& r) {  // r on [p, q]
    return cross(q - p, r - p) == 0.0 && (r - p).dot(r - q) <= 0.0;
  };
  return on(a, b, c) || on(a, b, d) || on(c, d, a) || on(c, d, b);
}

// A, B (variances along and across) and the quantities the bounds need on [ua, ub].
struct PieceShape {
  double q_min, q_max, dq_max, ddq;  // D^2, |(D^2)'|, (D^2)''
  double cross_rate;                 // |d0 x L|: theta' = +-cross_rate / D^2
};

PieceShape piece_shape(const Thrower& t, double ua, double ub) {
  const Vec2 line = *t.line_end - t.position;
  const Vec2 sa = t.position + ua * line, sb = t.position + ub * line;
  PieceShape s;
  const double d_min = distance_to_segment(t.toward, sa, sb);
  const double d_max = std::max((t.toward - sa).norm(), (t.toward - sb).norm());
  s.q_min = d_min * d_min;
  s.q_max = d_max * d_max;
  s.dq_max = 2.0 * d_max * line.norm();  // (D^2)' = -2 d . L
  s.ddq = 2.0 * line.squaredNorm();
  s.cross_rate = std::fabs(cross(t.toward - t.position, line));
  return s;
}

// The variances' ranges and derivative bounds on the piece.
struct Variances {
  double a_min, a_max, b_min, b_max;  // A along, B across
  double da, db, dda, ddb;            // |A'|, |B'|, |A''|, |B''|
  double diff_max, ddiff_max;         // |A - B|, |A' - B'|
};

Variances variances(const Thrower& t, const PieceShape& s) {
  const double tn = std::tan(t.spread_angle_deg * 3.14159265358979323846 / 180.0), t2 = tn * tn;
  Variances v;
  v.b_min = t2 * s.q_min;
  v.b_max = t2 * s.q_max;
  v.db = t2 * s.dq_max;
  v.ddb = t2 * s.ddq;
  if (t.range_fraction) {
    const double f2 = *t.range_fraction * *t.range_fraction;
    v.a_min = f2 * s.q_min;
    v.a_max = f2 * s.q_max;
    v.da = f2 * s.dq_max;
    v.dda = f2 * s.ddq;
    v.diff_max = std::fabs(f2 - t2) * s.q_max;
    v.ddiff_max = std::fabs(f2 - t2) * s.dq_max;
  } else {
    const double r2 = *t.range_sigma * *t.range_sigma;
    v.a_min = v.a_max = r2;
    v.da = v.dda = 0.0;
    v.diff_max = std::max(std::fabs(r2 - v.b_min), std::fabs(r2 - v.b_max));
    v.ddiff_max = v.db;
  }
  return v;
}

// max over x >= 0 of (c0 + c1 x + c2 x^2) exp(-e x / 2), e > 0: at 0 or where the derivative
// vanishes, (e/2) c2 x^2 + ((e/2) c1 - 2 c2) x + ((e/2) c0 - c1) = 0.
double polynomial_times_exp_max(double c0, double c1, double c2, double e) {
  const auto g = [&](double x) { return (c0 + c1 * x + c2 * x * x) * std::exp(-0.5 * e * x); };
  double best = g(0.0);
  const double qa = 0.5 * e * c2, qb = 0.5 * e * c1 - 2.0 * c2, qc = 0.5 * e * c0 - c1;
  if (qa > 0.0) {
    const double disc = qb * qb - 4.0 * qa * qc;
    if (disc >= 0.0)
      for (double x : {(-qb - std::sqrt(disc)) / (2.0 * qa), (-qb + std::sqrt(disc)) / (2.0 * qa)})
        if (x > 0.0) best = std::max(best, g(x));
  } else if (qb != 0.0) {
    const double x = -qc / qb;
    if (x > 0.0) best = std::max(best, g(x));
  }
  return best;
}

}  // namespace

double line_max_variance(const Thrower& t) {
  const Variances v = variances(t, piece_shape(t, 0.0, 1.0));
  return std::max(v.a_max, v.b_max);
}

LinePieceBound line_piece_bound(const Thrower& t, double ua, double ub, double envelope_variance) {
  const PieceShape s = piece_shape(t, ua, ub);
  LinePieceBound out;
  if (!(s.q_min > 0.0)) {  // the aim on the piece: the spread shrinks to nothing there
    out.second_derivative = out.density = std::numeric_limits<double>::infinity();
    return out;
  }
  const Variances v = variances(t, s);
  const double theta1 = s.cross_rate / s.q_min;
  const double theta2 = s.cross_rate * s.dq_max / (s.q_min * s.q_min);
  const double g1 = std::max(v.da, v.db) + v.diff_max * theta1;
  const double g2 = std::max(v.dda, v.ddb) + 2.0 * v.ddiff_max * theta1 + v.diff_max * (theta2 + 2.0 * theta1 * theta1);
  const double m = std::min(v.a_min, v.b_min), big = std::max(v.a_max, v.b_max);
  const double delta = v.a_min * v.b_min;
  const double c0 = g2 / m + 2.0 * g1 * g1 / (m * m);
  const double c1 = 2.0 * g1 * g1 / (m * m * m) + g2 / (2.0 * m * m);
  const double c2 = g1 * g1 / (4.0 * m * m * m * m);
  const double e = 1.0 / big - 1.0 / envelope_variance;
  out.density = envelope_variance / std::sqrt(delta);
  out.second_derivative = e > 0.0 ? out.density * polynomial_times_exp_max(c0, c1, c2, e)
                                  : std::numeric_limits<double>::infinity();
  return out;
}

ShadowChanges shadow_changes(const Barrier& b, const Vec2& sa, const Vec2& sb, const BoundingBox& zone,
                             std::optional<double> release_height) {
  ShadowChanges out;
  for (std::size_t k = 0; k + 1 < b.points.size(); ++k)
    if (segments_meet(b.points[k], b.points[k + 1], sa, sb)) out.touches = true;
  if (out.touches) return out;
  const Vec2 corners[4] = {zone.min, zone.max, Vec2(zone.min.x(), zone.max.y()), Vec2(zone.max.x(), zone.min.y())};
  // A path from s crosses a segment that a path from s' misses only when an end of the segment
  // lies in the triangle (s, s', x) (the segment does not meet [s, s']), which puts x in the
  // wedge behind that end seen from the piece.
  for (const Vec2& v : b.points) {
    const Vec2 ea = v - sa, eb = v - sb;
    if (std::fabs(cross(ea, eb)) <= 1e-12 * ea.norm() * eb.norm()) continue;  // a ray: no area
    const Vec2 ua = ea.normalized(), ub = eb.normalized();
    const double cos_half = std::sqrt(std::max(0.0, 0.5 * (1.0 + ua.dot(ub))));
    if (cos_half < 0.05) {  // nearly flat: take everything
      out.touches = true;
      return out;
    }
    double reach = 0.0;
    for (const Vec2& c : corners) reach = std::max(reach, (c - v).norm());
    // The triangle v, v + R ua, v + R ub holds every point of the wedge within R cos_half of v.
    const double r = (reach * 1.01 + 1.0) / cos_half;
    out.polygons.push_back({v, v + r * ua, v + r * ub});
  }
  // The height rule ends a segment's shadow at the segment scaled by f about s: the far edge
  // f P + (1 - f) s sweeps the parallelogram f [p, p'] + (1 - f) [sa, sb].
  if (b.height && release_height && *b.height < *release_height) {
    const double f = *release_height / (*release_height - *b.height);
    for (std::size_t k = 0; k + 1 < b.points.size(); ++k) {
      const Vec2 p = f * b.points[k], q = f * b.points[k + 1], a = (1.0 - f) * sa, c = (1.0 - f) * sb;
      if (std::fabs(cross(q - p, c - a)) == 0.0) continue;  // parallel: no area
      out.polygons.push_back({p + a, q + a, q + c, p + c});
    }
  }
  return out;
}

}  // namespace strewn::detail
