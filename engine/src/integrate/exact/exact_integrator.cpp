// The exact method: Green's theorem on the whitened region (DESIGN.md, "Integration methods").
//
// With w = (1 - exp(-r^2/2)) / (2 pi) dtheta, dw is the standard normal density, so
// P(D) = closed integral of w over the boundary of D. Two ways of summing it:
//  - far form, P = W - sum I_e and Q = (1 - W) + sum I_e, W the winding number of the boundary
//    around the mean. W is an integer found by a crossing test, so no arctangent terms enter the
//    sum and tails keep their relative accuracy (a square 8 sigma away would otherwise be 1% off).
//  - near form, P = sum J_e, used when the whole region lies within one sigma of the mean (tiny
//    regions next to it), where "W minus almost W" would cancel.
// When the mean lies on the boundary, W is the interior angle there (after whitening) / 2 pi.
#include <Eigen/LU>
#include <algorithm>
#include <cmath>
#include <limits>
#include <vector>

#include "strewn/constants.hpp"

#include "integrate/exact/edge_tail.hpp"
#include "special/fma_clones.hpp"
#include "integrate/integrators.hpp"
#include "geometry/region_internal.hpp"
#include "special/vector_math.hpp"

namespace strewn::detail {
namespace {

// Scratch storage: on the stack for up to N elements, else on the heap.
template <class T, std::size_t N>
class ScratchBuffer {
 public:
  explicit ScratchBuffer(std::size_t n) : data_(n <= N ? local_ : (heap_.resize(n), heap_.data())) {}
  T* data() { return data_; }
  T& operator[](std::size_t i) { return data_[i]; }

 private:
  T local_[N];
  std::vector<T> heap_;
  T* data_;
};

double max_radius(const BoundingBox& b) {
  const double x = std::max(std::fabs(b.min.x()), std::fabs(b.max.x()));
  const double y = std::max(std::fabs(b.min.y()), std::fabs(b.max.y()));
  return std::hypot(x, y);
}

// The origin lies outside the box by more than the rounding allowance of find_boundary_hit()
// (64 eps times the size of the coordinates): no loop winds around it and no edge touches it.
bool clearly_outside(const BoundingBox& b, double extra = 0.0) {
  const double allowance = 128 * kEps * max_radius(b) + 2 * extra;
  return b.min.x() > allowance || b.min.y() > allowance || b.max.x() < -allowance || b.max.y() < -allowance;
}

Vec2 travel_direction(const Edge& e, bool at_end) {
  if (e.kind == Edge::Kind::segment) return e.to - e.from;
  const double dir = e.s_to >= e.s_from ? 1.0 : -1.0;
  return dir * e.tangent(at_end ? e.s_to : e.s_from);
}

// Counter-clockwise angle from the outgoing direction to the reversed incoming one: the
// interior angle at a vertex of a loop that keeps its region on the left.
double interior_angle(const Vec2& incoming, const Vec2& outgoing) {
  const Vec2 back = -incoming;
  double a = std::atan2(accurate_cross(outgoing, back), outgoing.dot(back));
  if (a <= 0) a += 2 * kPi;
  return a;
}

struct BoundaryHit {
  bool on_boundary = false;
  // Per loop: whether the mean lies on it, and then its fractional winding. Two loops may meet
  // at the mean (the union of two squares touching at a corner, the mean on that corner: one
  // loop's fraction alone gave p 0.25 for 0.5), and one loop may pass through it twice.
  std::vector<bool> on_loop;
  std::vector<double> winding;
  bool on(std::size_t li) const { return on_boundary && on_loop[li]; }
  double abs_err = 0.0;   // effect of treating a near-zero distance as zero
  // The mean lies next to a vertex, nearer than the principal value can tell (see
  // sweep_deficit): the caller takes the near form, which needs no winding number.
  bool ambiguous = false;
};

// What treating an edge that passes at distance h from the mean as passing through it misses:
// its sweep of theta is pi less atan(h / d1) + atan(h / d2), d1 and d2 the distances from the
// foot of the perpendicular to its ends (the principal value takes a whole jump of pi), and
// nearly nothing when the foot lies beyond an end. An end within `at_vertex` of the mean is the
// vertex the interior angle takes (no deficit there). A mean 1e-13 m from a corner under an
// elongated spread had both edges within the rounding allowance of it, the corner just outside:
// each edge's jump of pi was taken, p 0.345 for 0.429 under a bound of 7e-13.
double sweep_deficit(double h, double t1, double t2, double end1, double end2, double at_vertex) {
  if (!(t1 < 0.0 && t2 > 0.0)) {
    // The foot at or beyond an end: only a vertex at the mean makes the jump right.
    const bool at_end = (t1 >= 0.0 ? end1 : end2) <= at_vertex;
    return at_end ? 0.0 : kPi;
  }
  return (end1 <= at_vertex ? 0.0 : std::atan(h / -t1)) + (end2 <= at_vertex ? 0.0 : std::atan(h / t2));
}
// Above this share of the turn, the sweep's deficit is not taken as an error bound: the near form
// is computed instead (a deficit this small is what rounding leaves on an edge passing within
// the allowance of the mean, far from its ends: h ~ 1e-13 against ends ~ 1 away).
constexpr double kLargestDeficit = 1e-12;
// An arc's end this near the mean (whitened, times the region's scale when above 1) is not left
// to the tail form's quadrature (find_boundary_hit).
constexpr double kArcEndSpike = 1e-8;

// Distance from the origin to an arc when the origin lies on it to within `tol`, else a
// negative number. The closest point is found where the origin's preimage under the arc's
// affine map, u = A^{-1} (-c), points (on the unit circle at s0 = atan2(u)), or at an end.
double arc_distance_if_on(const Edge& e, double tol) {
  const double det = e.axes.determinant();
  if (det == 0.0) return -1.0;
  const Vec2 u = e.axes.inverse() * (-e.centre);
  const double smallest_axis = std::fabs(det) / std::max(e.axes.col(0).norm(), e.axes.col(1).norm());
  // |u| - 1 changes by at most 1 / (smallest semi-axis) per unit of distance.
  if (std::fabs(u.norm() - 1.0) * smallest_axis > 4 * tol) return -1.0;
  const double lo = std::min(e.s_from, e.s_to), hi = std::max(e.s_from, e.s_to);
  double s0 = std::atan2(u.y(), u.x());
  // That point is the nearest only on a circle: on a thin ellipse it can lie far beyond the
  // allowance while the curve passes within a few ulps (a 60:1 ellipse whose arc passed 1e-15
  // from the mean, found 4e-14 away: not on it, and the tail form's near pass took the wrong
  // side, p 0.5054 for 0.0054). Newton's method on z . z' = 0 (the derivative of |z|^2 / 2),
  // z' = A (-sin s, cos s), z'' = -(z - centre), from there.
  for (int it = 0; it < 6; ++it) {
    const Vec2 z = e.point(s0), d = e.tangent(s0);
    const double g = z.dot(d), dg = d.squaredNorm() - z.dot(z - e.centre);
    if (!(dg > 0.0)) break;
    const double step = g / dg;
    s0 -= step;
    if (!(std::fabs(step) > 1e-15 * (1.0 + std::fabs(s0)))) break;
  }
  s0 += 2 * kPi * std::ceil((lo - s0) / (2 * kPi));
  double h = std::min(e.from.norm(), e.to.norm());
  if (s0 <= hi) h = std::min(h, e.point(s0).norm());
  return h <= tol ? h : -1.0;
}

// Is the origin on the boundary (to rounding)? A segment through it adds nothing to the tail
// integral (dtheta = 0 along its line) and is skipped; an arc through it keeps its smooth part
// (z x z' / |z|^2 stays bounded where a smooth curve passes through the origin: it tends to
// the curvature term (z' x z'') / (2 |z'|^2)), while the jump of pi in theta there goes into
// the fractional winding number.
// skip[j] for the j-th edge of the region (loops in order) is set to 0, 1 (skipped) or 2.
// Rounding is judged on the scale of the whole region, not of each edge: whitened under an
// elongated spread, an arc 2000 sigma across ends 1.2e-13 from where it should (2000 cos(pi / 2))
// and the short edge that meets it there, 1 sigma long, must still count the mean at that corner
// as on it (judged on its own ends, it swept a quarter turn at full density: 0.4207 for 0.1707).
double boundary_scale(const Region& z) {
  double scale = 0.0;
  for (const Loop& loop : z.loops)
    for (const Edge& e : loop) {
      scale = std::max({scale, e.from.norm(), e.to.norm()});
      if (e.kind == Edge::Kind::arc) scale = std::max(scale, e.centre.norm() + e.axes.norm());
    }
  return scale;
}

// The allowance within which the mean counts as on the boundary: 64 eps of the region's scale
// (the whitening's arithmetic) plus four times the input's own rounding in whitened units
// (noise.absolute). At national-grid coordinates the second rules: a ring sector's corner typed
// as the mean is 6e-11 sigma from its arc's computed end (the arc is evaluated from its rounded
// centre), and judged on the first alone the arc's end swept a turn at full density beside the
// corner's interior angle (p 0.058 for 0.224, "not met" with a bound of 2e-9).
double boundary_tolerance(double scale, const WhiteningNoise& noise) { return 64 * kEps * scale + 4 * noise.absolute; }

BoundaryHit find_boundary_hit(const Region& z, char* skip, const WhiteningNoise& noise, const ScatterFamily* family) {
  BoundaryHit hit;
  // Treating an edge that passes at distance h from the mean as passing through it moves the
  // region by a strip of width h along the edge: its probability is at most h times the
  // density's integral along the edge, itself at most the largest density times the length and,
  // for a straight edge, at most the integral along a whole line through the mean (the marginal
  // density at 0, line_density(0)). The second matters where the edge is long: a mean 1 ulp from
  // the corner of a wedge 2e7 sigma long at (2.6e8, 2.6e8) m was given a bound of 0.669 (the
  // whole q) for a shift of 5e-8, by the first alone. A profile's density may peak away from the
  // mean (a sprinkler's ring), so its largest density is taken, not the density at 0.
  const double peak = family ? family->density_bound(0.0) : kOneDivTwoPi;
  const double line = family ? family->line_density(0.0) : kOneDivRootTwoPi;
  hit.on_loop.assign(z.loops.size(), false);
  hit.winding.assign(z.loops.size(), 0.0);
  const double scale = boundary_scale(z);
  const double tol = boundary_tolerance(scale, noise);
  // The turn the loops make at the mean: pi for each edge or arc through it (its ends away from
  // it), the interior angle at each vertex on it.
  std::vector<double> turn(z.loops.size(), 0.0);
  for (std::size_t li = 0; li < z.loops.size(); ++li) {
    const Loop& loop = z.loops[li];
    for (std::size_t k = 0; k < loop.size(); ++k, ++skip) {
      *skip = 0;
      const Edge& e = loop[k];
      if (e.kind == Edge::Kind::arc) {
        const double big = std::max(e.axes.col(0).norm(), e.axes.col(1).norm());
        const double h = arc_distance_if_on(e, tol);
        // An arc that ends next to the mean, not on it: the tail form's dtheta there is a spike
        // as narrow as that distance, at the arc's end, where adaptive Gauss-Kronrod has no
        // node (an inner corner 5e-13 sigma from the mean: p 0.26107 for 0.26100, with a
        // bound of 2.6e-7 that did not hold). Nearer than kArcEndSpike, the near form.
        if (h < 0.0) {
          const double end = std::min(e.from.norm(), e.to.norm());
          if (end > tol && end <= kArcEndSpike * std::max(1.0, scale)) hit.ambiguous = true;
          continue;
        }
        *skip = 2;  // kept, as a principal value
        hit.on_boundary = true;
        hit.on_loop[li] = true;
        if (std::min(e.from.norm(), e.to.norm()) > tol) turn[li] += kPi;
        hit.abs_err += peak * h * std::fabs(e.s_to - e.s_from) * big;  // density bound x area moved
        // An end near the mean but not at it: the principal value's jump may be wrong (the
        // segments' sweep_deficit, with the ends' distances for the foot's).
        {
          const double d1 = e.from.norm(), d2 = e.to.norm();
          const double deficit = (d1 <= tol ? 0.0 : std::atan(h / d1)) + (d2 <= tol ? 0.0 : std::atan(h / d2));
          if (h > 0.0 && kOneDivTwoPi * deficit > kLargestDeficit) hit.ambiguous = true;
          hit.abs_err += kOneDivTwoPi * deficit;
          if (h == 0.0 && std::min(d1, d2) > tol && std::min(d1, d2) < 1e6 * tol) hit.ambiguous = true;
        }
        continue;
      }
      const Vec2 d = e.to - e.from;
      // Most edges pass far from the origin: |cross| = h * length against tol * length, in
      // squares (no roots) and with a margin of 2 for their rounding.
      const double cross = accurate_cross(e.from, e.to);
      if (cross * cross > 2 * tol * tol * d.squaredNorm()) continue;
      const double length = d.norm();
      if (length == 0.0) continue;
      const double h = std::fabs(cross) / length;
      const double t1 = e.from.dot(d) / length, t2 = e.to.dot(d) / length;
      if (h > tol || t1 > tol || t2 < -tol) continue;
      *skip = 1;
      hit.on_boundary = true;
      hit.on_loop[li] = true;
      if (std::min(e.from.norm(), e.to.norm()) > tol) turn[li] += kPi;
      hit.abs_err += h * std::min(peak * length, line);  // the strip's probability (above)
      const double deficit = sweep_deficit(h, t1, t2, e.from.norm(), e.to.norm(), tol);
      if (kOneDivTwoPi * deficit > kLargestDeficit) hit.ambiguous = true;
      hit.abs_err += kOneDivTwoPi * deficit;
    }
  }
  if (!hit.on_boundary) return hit;
  for (std::size_t li = 0; li < z.loops.size(); ++li) {
    if (!hit.on_loop[li]) continue;
    const Loop& loop = z.loops[li];
    // At each vertex that is (to rounding) at the origin, its interior angle. Two vertices of a
    // loop within the allowance of the mean, not both at it, are two corners taken as one
    // point: their angles add to the turn of neither (a sliver's acute corner and the obtuse one
    // 5e-4 sigma from it, at a national-grid site where the allowance held the crossing's
    // vertex_move: p 0.49999836 for 8.4e-5): the near form, which needs no turn.
    int at_mean = 0;
    bool apart = false;
    const Vec2* first_at_mean = nullptr;
    for (std::size_t k = 0; k < loop.size(); ++k) {
      const Edge& e = loop[k];
      const Edge& next = loop[(k + 1) % loop.size()];
      if (e.to.norm() <= tol) {
        turn[li] += interior_angle(travel_direction(e, true), travel_direction(next, false));
        if (first_at_mean && *first_at_mean != e.to) apart = true;
        if (!first_at_mean) first_at_mean = &e.to;
        ++at_mean;
      }
    }
    if (at_mean >= 2 && apart) hit.ambiguous = true;
    if (turn[li] == 0.0) turn[li] = kPi;  // (hits only next to ends: the near form is taken, hit.ambiguous)
    // The loop keeps its region on the left: a counter-clockwise loop winds once around the
    // points on its left, a clockwise one (a hole) minus once around those on its right. On the
    // boundary the winding is the left fraction turn / (2 pi), less one for a hole (a mean on a
    // hole's edge is half inside: -1/2, where +1/2 gave p = 1.5 - tail).
    hit.winding[li] = turn[li] / (2 * kPi) - (signed_area(loop) < 0.0 ? 1.0 : 0.0);
  }
  return hit;
}

Estimate near_form(const Region& z, const IntegrateOptions& options, const ScatterFamily* family) {
  Estimate est;
  double sum = 0.0, mag = 0.0;
  for (const Loop& loop : z.loops)
    for (const Edge& e : loop) {
      const double tol = options.rel_tolerance * 0.01;
      const Contribution c = !family                          ? edge_near(e, tol)
                             : e.kind == Edge::Kind::segment ? family_segment(e.from, e.to, *family, true, tol)
                                                             : family_arc(e, *family, true, tol, false);
      sum += c.value;
      mag += std::fabs(c.value);
      est.abs_err += c.abs_err;
      est.evaluations += c.evaluations;
      est.converged = est.converged && c.converged;
    }
  est.p = std::clamp(sum, 0.0, 1.0);
  est.q = 1.0 - est.p;
  est.abs_err += 4 * kEps * mag;
  return est;
}

// An arc's stored ends were rounded in site coordinates and then whitened, while the arc itself
// is integrated along centre + axes (cos s, sin s) from s_from to s_to: the two differ by a few
// ulps of the site's coordinates (about 1e-13 sigma at national-grid coordinates), and the loop
// is open there. In the boundary form the missing piece is I of the tiny segment across the gap,
// (1/2 pi) * integral of S(r) dtheta, worth about |gap| S(d) / (2 pi d) at distance d from the
// mean: near the mean far more than the density times the area the move sweeps, which
// whitening_error counts (measured: a constant profile's ring sector at (5e5, 5e6) m, scale
// 1e3, came out 5.5e-14 off with a bound of 4.3e-14). Each gap is closed: away from the mean
// (d above 8 gaps) by the midpoint rule S(r_mid) dtheta / (2 pi), whose error is at most
// |dtheta| / (2 pi) times the spread of S over the segment, S(r_lo) - S(r_hi) (S falls
// outwards; r_lo = d - gap, r_hi the farther end), second order in the gap; nearer, by the
// edge rule `segment`; within `at_vertex` of a mean on the boundary, as for the loop's other
// gaps, by the density bound times the area moved. `survival` is S; `add` takes each piece.
template <class Survival, class Segment, class Add>
void close_arc_ends(const Edge& e, bool near_hit, double at_vertex, const Survival& survival, const Segment& segment,
                    const Add& add, double& abs_err) {
  const Vec2 ends[2][2] = {{e.from, e.point(e.s_from)}, {e.point(e.s_to), e.to}};
  for (const auto& ab : ends) {
    const Vec2 &a = ab[0], &b = ab[1];
    if (a == b) continue;
    const double ra = a.norm(), rb = b.norm(), gap = (b - a).norm(), d = std::min(ra, rb) - gap;
    if (near_hit && std::max(ra, rb) <= at_vertex) {
      abs_err += kOneDivTwoPi * gap * at_vertex;
    } else if (d > 8.0 * gap) {
      // (below 1e-8, atan x = x (1 - x^2/3 + ...) is x to within 4e-17 relative: no atan2 call)
      const double cross = accurate_cross(a, b), dot = a.dot(b);
      const double angle = dot > 0.0 && std::fabs(cross) < 1e-8 * dot ? cross / dot : std::atan2(cross, dot);
      Contribution c;
      c.value = kOneDivTwoPi * angle * survival(0.5 * (ra + rb));
      c.abs_err = kOneDivTwoPi * std::fabs(angle) * (survival(d) - survival(std::max(ra, rb))) + 8 * kEps * std::fabs(c.value);
      add(c);
    } else {
      add(segment(a, b));
    }
  }
}

// One pass over the boundary: the tail sum of every edge not skipped (`skip`, region order: 1
// skip, 2 an arc through the mean), the straight edges of each loop in one batch, and the tiny
// segment across each gap of a loop closed only to rounding. `hit` and `at_vertex` are the
// mean's place on the boundary (find_boundary_hit); quad_tol the quadrature tolerance.
struct BoundarySum {
  double tail = 0.0;            // sum of I_e
  double magnitude = 0.0;       // sum of |I_e|
  double abs_err = 0.0;
  std::uint64_t evaluations = 0;
  bool converged = true;
  bool has_quadrature = false;  // some edge needed adaptive quadrature
  double moved_straight = 0.0;  // whitening_error's share of the batched segments
};

BoundarySum boundary_sum(const Region& z, const char* skip, const BoundaryHit& hit, double at_vertex,
                         double quad_tol, const WhiteningNoise& noise) {
  BoundarySum sum;
  for (std::size_t li = 0; li < z.loops.size(); skip += z.loops[li].size(), ++li) {
    const Loop& loop = z.loops[li];
    // The loop's straight edges first, in one batch (their Owen's T values together).
    ScratchBuffer<Vec2, 64> from(loop.size()), to(loop.size());
    int n_straight = 0;
    for (std::size_t k = 0; k < loop.size(); ++k)
      if (loop[k].kind == Edge::Kind::segment && skip[k] == 0) {
        from[n_straight] = loop[k].from;
        to[n_straight++] = loop[k].to;
      }
    const ContributionSum straight =
        segment_tails(from.data(), to.data(), n_straight, quad_tol, noise.absolute, noise.relative);
    sum.moved_straight += straight.moved;
    sum.tail += straight.value;
    sum.magnitude += straight.magnitude;
    sum.abs_err += straight.abs_err;
    sum.evaluations += straight.evaluations;
    sum.converged = sum.converged && straight.converged;
    sum.has_quadrature = sum.has_quadrature || straight.quadrature;
    for (std::size_t k = 0; k < loop.size(); ++k) {
      const Edge& e = loop[k];
      // A loop closed only to rounding is closed by the tiny segment across each gap (as
      // loop_winding does): seen from a mean a few ulps away, a gap can subtend an angle.
      const Edge& previous = loop[(k + loop.size() - 1) % loop.size()];
      const Vec2& start = previous.to;
      // A gap at the vertex where the mean lies (a corner where an arc's computed end meets a
      // typed-in point) has its line through the mean: dtheta = 0 along it, and the jump is
      // in the fractional winding. Its closed form would add atan(t / 0) / (2 pi): a quarter
      // of a turn (a ring sector's corner under a 1000:1 spread came out 0.4207 for 0.1707).
      if (e.from != start && hit.on(li) &&
          std::max(start.norm(), e.from.norm()) <= at_vertex) {
        sum.abs_err += kOneDivTwoPi * (e.from - start).norm() * at_vertex;  // density bound x area moved
      } else if (e.from != start) {
        const Contribution gap = segment_tail(start, e.from, quad_tol);
        sum.tail += gap.value;
        sum.magnitude += std::fabs(gap.value);
        sum.abs_err += gap.abs_err;
      }
      if (skip[k] == 1 || e.kind == Edge::Kind::segment) continue;
      const Contribution c = arc_tail(e, quad_tol, skip[k] == 2);
      sum.has_quadrature = true;
      sum.tail += c.value;
      sum.magnitude += std::fabs(c.value);
      sum.abs_err += c.abs_err;
      sum.evaluations += c.evaluations;
      sum.converged = sum.converged && c.converged;
      const auto survival = [](double r) { return std::exp(-0.5 * r * r); };
      close_arc_ends(
          e, hit.on(li), at_vertex, survival,
          [&](const Vec2& a, const Vec2& b) { return segment_tail(a, b, quad_tol); },
          [&](const Contribution& g) {
            sum.tail += g.value;
            sum.magnitude += std::fabs(g.value);
            sum.abs_err += g.abs_err;
          },
          sum.abs_err);
    }
  }
  return sum;
}

// boundary_sum() under another family: every edge by adaptive quadrature of S(r) dtheta (the
// segments' closed forms and batches are the normal's), the same skips and gaps.
// `ranges`: radius_range(e, 8) of every edge, region order.
BoundarySum family_boundary_sum(const Region& z, const char* skip, const BoundaryHit& hit, double at_vertex,
                                double quad_tol, const ScatterFamily& family, const RadiusRange* ranges) {
  BoundarySum sum;
  sum.has_quadrature = true;
  const auto take = [&sum](const Contribution& c) {
    sum.tail += c.value;
    sum.magnitude += std::fabs(c.value);
    sum.abs_err += c.abs_err;
    sum.evaluations += c.evaluations;
    sum.converged = sum.converged && c.converged;
  };
  for (std::size_t li = 0; li < z.loops.size(); skip += z.loops[li].size(), ranges += z.loops[li].size(), ++li) {
    const Loop& loop = z.loops[li];
    for (std::size_t k = 0; k < loop.size(); ++k) {
      const Edge& e = loop[k];
      const Vec2& start = loop[(k + loop.size() - 1) % loop.size()].to;
      if (e.from != start && hit.on(li) && std::max(start.norm(), e.from.norm()) <= at_vertex) {
        sum.abs_err += kOneDivTwoPi * (e.from - start).norm() * at_vertex;  // density bound x area moved
      } else if (e.from != start) {
        take(family_segment(start, e.from, family, false, quad_tol));
      }
      if (skip[k] == 1) continue;
      if (e.kind == Edge::Kind::segment) {
        take(family_segment(e.from, e.to, family, false, quad_tol));
        continue;
      }
      take(family_arc(e, family, false, quad_tol, skip[k] == 2, &ranges[k]));
      const auto survival = [&family](double r) { return family.survival(r); };
      close_arc_ends(
          e, hit.on(li), at_vertex, survival,
          [&](const Vec2& a, const Vec2& b) { return family_segment(a, b, family, false, quad_tol); }, take,
          sum.abs_err);
    }
  }
  return sum;
}

}  // namespace

// Bound on |P(moved region) - P(region)| when rounding may have moved each vertex z_i by
// noise.absolute + noise.relative * |z_i|: per edge, the larger move of its two ends times the
// integral of the density along the edge, itself at most
// min(length / (2 pi), 1 / sqrt(2 pi)) * exp(-d^2 / 2), d the least distance from the mean the
// moved edge can reach (its own less the move).
// The exponentials are taken in batches.
// `done`, when given, marks the edges (region order) whose share segment_tails() has added.
namespace {

// whitening_error's share of one edge under another family, whose radius_range(e, 8) is `range`:
// the integral of the density along an edge at distance d is at most min(length f(d), the
// whole line's integral at d).
double family_whitening_error(const Edge& e, const RadiusRange& range, const WhiteningNoise& noise,
                              const ScatterFamily& family) {
  const double length =
      e.kind == Edge::Kind::segment ? (e.to - e.from).norm() : std::fabs(e.s_to - e.s_from) * e.axes.norm();
  const double moved = noise.absolute + noise.relative * range.farthest;
  const double nearest = std::max(range.closest - moved, 0.0);  // the band the edge may sweep (whitening_error)
  return moved * std::min(length * family.density_bound(nearest),
                          e.kind == Edge::Kind::segment ? family.line_density(nearest)
                                                        : std::numeric_limits<double>::infinity());
}

}  // namespace

double whitening_error(const Region& z, const WhiteningNoise& noise, const char* done, const ScatterFamily* family) {
  if (family) {
    // The same bound with the family's densities (family_whitening_error).
    double bound = 0.0;
    for (const Loop& loop : z.loops)
      for (const Edge& e : loop) {
        if (done && *done++) continue;
        bound += family_whitening_error(e, radius_range(e, 8), noise, *family);
      }
    return bound;
  }
  constexpr int kBatch = 32;
  double density[kBatch], factor[kBatch];
  int n = 0;
  double bound = 0.0;
  const auto flush = [&] {
    exp_in_place(density, n);
    for (int i = 0; i < n; ++i) bound += factor[i] * density[i];
    n = 0;
  };
  for (const Loop& loop : z.loops)
    for (const Edge& e : loop) {
      if (done && *done++) continue;
      const RadiusRange range = radius_range(e, 8);
      const double length =
          e.kind == Edge::Kind::segment
              ? (e.to - e.from).norm()
              : std::fabs(e.s_to - e.s_from) * e.axes.norm();  // Frobenius >= largest singular value
      const double moved = noise.absolute + noise.relative * range.farthest;
      factor[n] = moved * std::min(length * kOneDivTwoPi, kOneDivRootTwoPi);
      // The density over the band the edge may sweep, whose near side is `moved` closer: at the
      // edge's own distance it claimed nothing for a spread below the coordinates' rounding (sigma
      // 1e-11 m at x = 5e5 m, the rounding 37 sigma: cubature 6e-15 +- 1e-12 for 0.0018).
      const double nearest = std::max(range.closest - moved, 0.0);
      density[n] = -0.5 * nearest * nearest;  // exponentiated in flush()
      if (++n == kBatch) flush();
    }
  flush();
  return bound;
}

STREWN_FMA_CLONES Estimate integrate_exact(const Region& z, const IntegrateOptions& options,
                         const WhiteningNoise& noise, const ScatterFamily* family) {
  Estimate est;
  const BoundingBox box = bounds(z);
  std::size_t edges = 0;
  for (const Loop& loop : z.loops) edges += loop.size();
  ScratchBuffer<char, 256> skip_all(edges);
  BoundaryHit hit;
  if (max_radius(box) > kNearRadius && !clearly_outside(box, noise.absolute))
    hit = find_boundary_hit(z, skip_all.data(), noise, family);
  // Within kNearRadius of the mean, or next to a vertex nearer than the principal value can
  // tell (hit.ambiguous), the near form, whose integrand (1 - S(r)) dtheta is bounded at the
  // mean: it needs no winding number.
  if (max_radius(box) <= kNearRadius || hit.ambiguous) {
    est = near_form(z, options, family);
    est.abs_err += whitening_error(z, noise, nullptr, family);
  } else {
    double winding = 0.0;
    if (clearly_outside(box, noise.absolute)) {
      std::fill(skip_all.data(), skip_all.data() + edges, 0);
    } else {
      for (std::size_t li = 0; li < z.loops.size(); ++li) {
        if (hit.on(li)) {
          winding += hit.winding[li];
        } else {
          winding += loop_winding(z.loops[li], Vec2::Zero());
        }
      }
    }
    // Quadrature tolerances are relative to each integrand's L1 norm; when the edges cancel
    // (an arc seen from outside), the answer is much smaller than that, so the sum is redone
    // with a tolerance scaled by the cancellation until the request is met or the quadrature
    // reaches its rounding floor.
    // Within this of the mean, a gap's ends are at the vertex find_boundary_hit() found there.
    const double at_vertex = hit.on_boundary ? boundary_tolerance(boundary_scale(z), noise) : 0.0;
    double quad_tol = options.rel_tolerance * 0.01;
    double moved_straight = 0.0;  // whitening_error's share of the batched segments
    // Under another family every edge's radius range, once: the arcs' panels and the
    // whitening bound both need it.
    ScratchBuffer<RadiusRange, 64> ranges(family ? edges : 0);
    if (family) {
      std::size_t j = 0;
      for (const Loop& loop : z.loops)
        for (const Edge& e : loop) ranges[j++] = radius_range(e, 8);
    }
    for (int pass = 0; pass < 3; ++pass) {
      const BoundarySum sum = family ? family_boundary_sum(z, skip_all.data(), hit, at_vertex, quad_tol, *family, ranges.data())
                                     : boundary_sum(z, skip_all.data(), hit, at_vertex, quad_tol, noise);
      Estimate trial;
      trial.abs_err = sum.abs_err;
      trial.evaluations = sum.evaluations;
      trial.converged = sum.converged;
      moved_straight = sum.moved_straight;
      const double tail = sum.tail, mag = sum.magnitude;
      const bool has_quadrature = sum.has_quadrature;
      trial.p = std::max(winding - tail, 0.0);
      trial.q = std::max((1.0 - winding) + tail, 0.0);
      trial.abs_err += 4 * kEps * mag + hit.abs_err;
      if (winding != std::round(winding)) trial.abs_err += 4 * kEps;  // fractional winding
      trial.evaluations += est.evaluations;
      est = trial;
      const double wanted = 0.5 * options.rel_tolerance * std::min(est.p, est.q);
      if (!has_quadrature || est.abs_err <= std::max(wanted, options.abs_tolerance) ||
          quad_tol <= 1e-16)
        break;
      quad_tol = std::max(quad_tol * std::max(wanted, options.abs_tolerance) / est.abs_err, 1e-16);
    }
    // The segments given to segment_tails() carried their share of whitening_error().
    ScratchBuffer<char, 256> batched(edges);
    std::size_t j = 0;
    for (std::size_t li = 0; li < z.loops.size(); ++li)
      for (const Edge& e : z.loops[li]) {
        batched[j] = !family && e.kind == Edge::Kind::segment && skip_all[j] == 0;
        ++j;
      }
    if (family) {
      std::size_t k = 0;
      for (const Loop& loop : z.loops)
        for (const Edge& e : loop) {
          est.abs_err += family_whitening_error(e, ranges[k], noise, *family);
          ++k;
        }
    } else {
      est.abs_err += moved_straight + whitening_error(z, noise, batched.data(), family);
    }
  }
  est.method = Method::exact;
  // Polygonisation in boolean operations may have moved some area near the boundary.
  est.abs_err += approximation_error(z, family);
  if (!est.converged) est.message = "adaptive quadrature on an arc or edge did not reach its tolerance";
  return est;
}

STREWN_FMA_CLONES std::optional<Estimate> integrate_exact_polygon(const Region& region, const Mat2& M,
                                                                  const Vec2& origin, const IntegrateOptions& options,
                                                                  const WhiteningNoise& noise) {
  if (!(M.determinant() > 0.0) || region.approximation_area > 0.0) return std::nullopt;
  std::size_t edges = 0;
  for (const Loop& loop : region.loops) edges += loop.size();
  // Whitened as transformed_about() does it, to the same bits, in one pass that also checks
  // the edges' kinds and the loops' closure. On the stack up to 256 edges (8 KB; a 200-gon
  // on the heap cost two allocations a call).
  ScratchBuffer<Vec2, 256> from(edges), to(edges);
  const double inf = std::numeric_limits<double>::infinity();
  BoundingBox box{Vec2(inf, inf), Vec2(-inf, -inf)};
  // Without gaps, each edge's end is the next edge's start: one product per vertex.
  std::size_t j = 0;
  for (std::size_t li = 0; li < region.loops.size(); ++li) {
    const Loop& loop = region.loops[li];
    if (loop.empty()) continue;
    const std::size_t first = j;
    const Vec2* previous_end = &loop.back().to;
    for (const Edge& e : loop) {
      if (e.kind != Edge::Kind::segment || e.from != *previous_end) return std::nullopt;  // an arc, a gap
      previous_end = &e.to;
      from[j] = M * (e.from - origin);
      if (j > first) to[j - 1] = from[j];
      ++j;
    }
    to[j - 1] = from[first];
  }
  // The box by four running minima and maxima (one made each vertex wait on the one before).
  if (edges > 0) {
    Vec2 lo[4] = {from[0], from[0], from[0], from[0]}, hi[4] = {from[0], from[0], from[0], from[0]};
    std::size_t k = 0;
    for (; k + 4 <= edges; k += 4)
      for (int i = 0; i < 4; ++i) {
        lo[i] = lo[i].cwiseMin(from[k + i]);
        hi[i] = hi[i].cwiseMax(from[k + i]);
      }
    for (; k < edges; ++k) {
      lo[0] = lo[0].cwiseMin(from[k]);
      hi[0] = hi[0].cwiseMax(from[k]);
    }
    box.min = lo[0].cwiseMin(lo[1]).cwiseMin(lo[2].cwiseMin(lo[3]));
    box.max = hi[0].cwiseMax(hi[1]).cwiseMax(hi[2].cwiseMax(hi[3]));
  }
  if (max_radius(box) <= kNearRadius) return std::nullopt;
  // As integrate_exact's first pass. With the mean clearly outside the box the winding number is
  // 0; otherwise it is counted in segment_tails()' pass over the edges (PolygonChecks), unless
  // an edge passes within find_boundary_hit()'s rounding allowance of the mean (the same test,
  // with its margin of 2), which integrate_exact handles. The winding number by loop_winding()'s
  // half-open crossing rule, the side of the mean taken from the same accurate cross product: an
  // edge that passes this test is more than 64 eps |z| |d| from the mean in cross product, far
  // beyond the product's rounding.
  PolygonChecks checks;
  if (!clearly_outside(box)) checks.near_tolerance = 64 * kEps * max_radius(box);
  const ContributionSum s = segment_tails(from.data(), to.data(), static_cast<int>(edges),
                                          options.rel_tolerance * 0.01, noise.absolute, noise.relative, &checks);
  if (checks.near || !s.converged) return std::nullopt;
  // The region must be normalised (integrate()'s check, which this path takes over): twice the
  // whitened area, det(M) times the input's, clear of its error bound. The bound holds 4 eps
  // |cross| an edge (2^-51 |cross|), so the sum's rounding, at most 2 n eps of the terms'
  // magnitudes (n edges, about 1.25 n additions), is within n / 2 times it. A region this
  // cannot prove positive goes to the general path, which checks the input itself.
  if (!(checks.twice_area > checks.twice_area_error * (1.0 + 0.5 * static_cast<double>(edges))))
    return std::nullopt;
  const int winding = checks.winding;
  Estimate est;
  est.method = Method::exact;
  est.p = std::max(winding - s.value, 0.0);
  est.q = std::max((1.0 - winding) + s.value, 0.0);
  est.abs_err = s.abs_err + 4 * kEps * s.magnitude;
  est.evaluations = s.evaluations;
  // Where an edge needed quadrature, integrate_exact would stop after this first pass only if
  // the bound already meets the request; otherwise it tightens the quadrature and redoes it.
  const double wanted = 0.5 * options.rel_tolerance * std::min(est.p, est.q);
  if (s.quadrature && est.abs_err > std::max(wanted, options.abs_tolerance)) return std::nullopt;
  est.abs_err += s.moved;
  return est;
}

}  // namespace strewn::detail
