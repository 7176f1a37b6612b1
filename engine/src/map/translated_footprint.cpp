#include "map/translated_footprint.hpp"

#include <Eigen/LU>
#include <Eigen/SVD>
#include <algorithm>
#include <cmath>
#include <limits>

#include "integrate/exact/edge_tail.hpp"
#include "integrate/exact/periodic_ellipse_tail.hpp"
#include "special/fma_clones.hpp"
#include "strewn/constants.hpp"

namespace strewn::detail {
namespace {


bool is_one_whole_ellipse(const Region& r) {
  return r.loops.size() == 1 && r.loops.front().size() == 1 && r.approximation_area == 0.0 &&
         detail::is_whole_ellipse(r.loops.front().front());
}

}  // namespace

TranslatedFootprint::TranslatedFootprint(const Gaussian& g, const Region& footprint, const IntegrateOptions& options)
    : g_(g), footprint_(footprint), options_(options), noise_(whitening_noise(g, footprint.vertex_move)) {
  check_region(footprint, options);
  // The tabled trapezoid is the normal's; other families go through the full integrator.
  const bool normal_exact = options.method == Method::exact && g.family().is_normal() && !g.family().has_arc();
  whole_ellipse_ = normal_exact && is_one_whole_ellipse(footprint);
  if (normal_exact && !whole_ellipse_) polygon_ = table_polygon(footprint);
  if (!whole_ellipse_) return;
  const Edge& e = footprint.loops.front().front();
  const Mat2 a = g.whitening() * e.axes;
  centre_offset_ = e.centre;
  axes_inverse_ = a.inverse();
  half_extent_ = Vec2(a.row(0).norm(), a.row(1).norm());
  a_max_ = Eigen::JacobiSVD<Mat2>(a).singularValues()(0);
  const double big = a.norm();  // Frobenius >= largest singular value (chord sagitta, length)
  chord_slack_ = big * (1.0 - std::cos(0.5 * kTwoPi / kChords));
  length_ = kTwoPi * big;
  orientation_ = (a.determinant() > 0) == (e.s_to > e.s_from) ? 1.0 : -1.0;
  sign_ = e.s_to > e.s_from ? 1.0 : -1.0;
  // What the a-priori bound needs of A besides the cell's centre (periodic_ellipse_tail.hpp).
  axes_transpose_ = a.transpose();
  const Eigen::Vector2d l = Eigen::JacobiSVD<Mat2>(a).singularValues().array().square();
  strip_.half_trace = 0.5 * (l(0) + l(1));
  strip_.gamma = 0.5 * (l(0) - l(1));
  strip_.det = std::fabs(a.determinant());
  for (int k = 0; k < kTableNodes; ++k) {
    const double s = e.s_from + sign_ * kTwoPi * k / kTableNodes;
    const double cs = std::cos(s), sn = std::sin(s);
    node_[k] = a * Vec2(cs, sn);
    tangent_[k] = a * Vec2(-sn, cs);
  }
  // The same nodes in the bounded rule's nesting order, tangents along the travel: the 8 of
  // the first level, then the odd nodes of each doubling.
  int at = 0;
  for (int n = kFirstLevel; n <= kTableNodes; n *= 2)
    for (int k = n == kFirstLevel ? 0 : 1; k < n; k += n == kFirstLevel ? 1 : 2, ++at) {
      const int i = k * (kTableNodes / n);
      nested_x_[at] = node_[i].x();
      nested_y_[at] = node_[i].y();
      nested_tx_[at] = sign_ * tangent_[i].x();
      nested_ty_[at] = sign_ * tangent_[i].y();
    }
}

Estimate TranslatedFootprint::general(const Vec2& where) const {
  return integrate(g_, transformed(footprint_, Mat2::Identity(), where), options_);
}

Estimate TranslatedFootprint::at(const Vec2& where) const {
  Estimate e;
  if (whole_ellipse_ && whole_ellipse_at(where, e)) return e;
  if (polygon_ && polygon_at(where, e)) return e;
  return general(where);
}

// integrate_exact's near or far form for one whole arc, with the periodic trapezoid on tabled
// nodes. Returns false (and the caller integrates in full) wherever that form would not settle
// the cell in one pass. Built for x86-64-v3 too (fma_clones.hpp): its node loop, inlined here,
// takes a cross product with std::fma per node, a library call in the plain build.
// The far form first tries the rule whose error is bounded a priori (periodic_ellipse_tail.hpp:
// most cells of a map are well away from the mean, where a few dozen nodes settle it), then
// the doubling rule with its distance bounds from chords.
STREWN_FMA_CLONES bool TranslatedFootprint::whole_ellipse_at(const Vec2& where, Estimate& out) const {
  // z = W (x - mean): the difference first, as whitening_noise assumes.
  const Vec2 c = g_.whitening() * ((where - g_.mean()) + centre_offset_);
  const auto node_at = [&](int k, int n) {
    const int i = k * (kTableNodes / n);
    return std::pair<Vec2, Vec2>(c + node_[i], sign_ * tangent_[i]);
  };
  // The nodes new at level n of the bounded rule, from the nested table: contiguous, so that
  // the loop runs in vector lanes.
  const auto add_level = [&](int n, double shift, double& sum, double& l1) {
    const int first = n == kFirstLevel ? 0 : n / 2, count = n == kFirstLevel ? n : n / 2;
    const double* x = nested_x_.data() + first;
    const double* y = nested_y_.data() + first;
    const double* tx = nested_tx_.data() + first;
    const double* ty = nested_ty_.data() + first;
    double e[kTableNodes / 2], r2[kTableNodes / 2], cross[kTableNodes / 2];
    for (int i = 0; i < count; ++i) {
      const double zx = c.x() + x[i], zy = c.y() + y[i];
      r2[i] = zx * zx + zy * zy;
      // accurate_cross(z, t) (edge_tail.hpp), one rounding.
      const double w = tx[i] * zy;
      cross[i] = std::fma(zx, ty[i], -w) + std::fma(-tx[i], zy, w);
      e[i] = shift - 0.5 * r2[i];
    }
    exp_in_place(e, count);
    for (int i = 0; i < count; ++i) e[i] = kOneDivTwoPi * e[i] * cross[i] / r2[i];
    for (int i = 0; i < count; ++i) {
      sum += e[i];
      l1 += std::fabs(e[i]);
    }
  };
  Estimate e;
  e.method = Method::exact;
  // Bounds on the distance from the mean to the curve, for the rounding of the whitening.
  double closest2 = 0.0, farthest = 0.0;
  const auto chords = [&] {
    constexpr int kStride = kTableNodes / kChords;
    return chord_range([&](int j) { return Vec2(c + node_[(j * kStride) % kTableNodes]); }, kChords, chord_slack_);
  };
  const double near_x = std::fabs(c.x()) + half_extent_.x(), near_y = std::fabs(c.y()) + half_extent_.y();
  if (near_x * near_x + near_y * near_y <= kNearRadius * kNearRadius) {
    const double quad_tol = options_.rel_tolerance * 0.01;
    // The table runs in the direction of travel, so s increases along it.
    const Contribution near = periodic_ellipse_near(1.0, node_at, quad_tol);
    if (!near.converged) return false;
    e.p = std::clamp(near.value, 0.0, 1.0);
    e.q = 1.0 - e.p;
    e.abs_err = near.abs_err + 4 * kEps * std::fabs(near.value);
    e.evaluations = near.evaluations;
    const RadiusRange range = chords();
    closest2 = range.closest * range.closest;
    farthest = range.farthest;
  } else {
    const double inside = (axes_inverse_ * (-c)).squaredNorm();
    if (!(std::fabs(inside - 1.0) > 1e-12)) return false;
    const double winding = inside < 1.0 ? orientation_ : 0.0;
    EllipseStrip strip = strip_;
    strip.centre2 = c.squaredNorm();
    strip.beta = (axes_transpose_ * c).norm();
    strip.delta = (axes_transpose_ * Vec2(-c.y(), c.x())).norm();
    const double floor0 = strip.floor_at(1.0);
    Contribution tail;
    if (floor0 > kNegligibleR2) {
      tail.abs_err = kNegligible;
      closest2 = floor0;
      farthest = std::sqrt(strip.ceiling());
    } else {
      // A tenth of the request: the rest is left to rounding and the whitening's bound.
      tail = periodic_ellipse_tail_bounded(strip, add_level, 0.1 * options_.rel_tolerance);
      if (tail.converged) {
        closest2 = std::max(floor0, 0.0);
        farthest = std::sqrt(strip.ceiling());
      } else {
        const RadiusRange range = chords();
        closest2 = range.closest * range.closest;
        farthest = range.farthest;
        if (closest2 > kNegligibleR2) {
          tail = Contribution{};
          tail.abs_err = kNegligible;
        } else {
          EllipseView view;
          view.range = range;
          view.a_max = a_max_;
          view.inside = inside;
          view.orientation = orientation_;
          view.sign = 1.0;
          tail = periodic_ellipse_tail(view, node_at, options_.rel_tolerance * 0.01);
          if (!tail.converged) return false;
        }
      }
    }
    e.p = std::max(winding - tail.value, 0.0);
    e.q = std::max((1.0 - winding) + tail.value, 0.0);
    e.abs_err = tail.abs_err + 4 * kEps * std::fabs(tail.value);
    e.evaluations = tail.evaluations;
    if (e.abs_err > std::max(0.5 * options_.rel_tolerance * std::min(e.p, e.q), options_.abs_tolerance))
      return false;
  }
  // whitening_error() for this one edge (exact_integrator.cpp).
  const double moved = noise_.absolute + noise_.relative * farthest;
  e.abs_err += moved * std::min(length_ * kOneDivTwoPi, kOneDivRootTwoPi) * std::exp(-0.5 * closest2);
  if (!meets(e, options_)) return false;
  out = e;
  return true;
}

}  // namespace strewn::detail
