#include "strewn/layout.hpp"

#include <algorithm>
#include <cmath>

#include "strewn/constants.hpp"
#include "strewn/error.hpp"

namespace strewn {
namespace {

double degrees(const Vec2& v) { return std::atan2(v.y(), v.x()) * 180.0 / kPi; }

// The fewest equal steps no longer than `most` across `length` (at least one), as a double so
// that a count too large for an int is caught before it is cast.
double steps(double length, double most) { return std::max(1.0, std::ceil(length / most * (1.0 - 1e-12))); }

class Placer {
 public:
  Placer(const Layout& l, std::vector<Vec2> polygon) : layout_(l), poly_(std::move(polygon)) {
    BoundingBox b{poly_.front(), poly_.front()};
    for (const Vec2& p : poly_) {
      b.min = b.min.cwiseMin(p);
      b.max = b.max.cwiseMax(p);
    }
    box_ = b;
    tol_ = 1e-9 * std::max(1.0, (b.max - b.min).norm());
  }

  // A head at p when p is inside or on the boundary, throwing inward on the boundary.
  void place(const Vec2& p) {
    const std::size_t n = poly_.size();
    for (std::size_t i = 0; i < n; ++i)
      if ((p - poly_[i]).norm() <= tol_) return corner(i);
    for (std::size_t i = 0; i < n; ++i) {
      const Vec2 a = poly_[i], d = poly_[(i + 1) % n] - a;
      const double t = (p - a).dot(d) / d.squaredNorm();
      if (t > 0.0 && t < 1.0 && std::fabs(d.x() * (p - a).y() - d.y() * (p - a).x()) / d.norm() <= tol_)
        return add(p, degrees(d), degrees(d) + 180.0);
    }
    if (inside(p)) add(p, 0.0, 360.0);
  }

  void corner(std::size_t i) {
    const std::size_t n = poly_.size();
    const Vec2 in = poly_[i] - poly_[(i + n - 1) % n], out = poly_[(i + 1) % n] - poly_[i];
    // Counter-clockwise outline: the inside is on the left, from the outgoing side round to the
    // incoming side reversed.
    double from = degrees(out), to = degrees(-in);
    if (std::fmod(std::fmod(to - from, 360.0) + 360.0, 360.0) <= 0.0) to = from + 360.0;
    add(poly_[i], from, to);
  }

  void grid() {
    const Vec2 size = box_.max - box_.min;
    const bool tri = layout_.pattern == LayoutPattern::triangular;
    const double sx = layout_.spacing_m;
    const double sy = layout_.pattern == LayoutPattern::rectangular ? layout_.row_spacing_m
                      : tri                                           ? layout_.spacing_m * std::sqrt(3.0) / 2.0
                                                                      : layout_.spacing_m;
    const double fx = steps(size.x(), sx), fy = steps(size.y(), sy);
    if ((fx + 1) * (fy + 1) > 4.0 * kMaxLayoutHeads) too_many();
    const int nx = static_cast<int>(fx), ny = static_cast<int>(fy);
    const double dx = size.x() / nx, dy = size.y() / ny;
    for (int j = 0; j <= ny; ++j) {
      const bool shifted = tri && j % 2 == 1;
      for (int i = 0; i <= (shifted ? nx - 1 : nx); ++i)
        place(box_.min + Vec2((i + (shifted ? 0.5 : 0.0)) * dx, j * dy));
    }
  }

  void perimeter() {
    const std::size_t n = poly_.size();
    double total = 0.0;
    for (std::size_t i = 0; i < n; ++i) total += (poly_[(i + 1) % n] - poly_[i]).norm();
    if (total / layout_.spacing_m > 4.0 * kMaxLayoutHeads) too_many();
    for (std::size_t i = 0; i < n; ++i) {
      corner(i);
      const Vec2 a = poly_[i], d = poly_[(i + 1) % n] - a;
      const int k = static_cast<int>(steps(d.norm(), layout_.spacing_m));
      for (int j = 1; j < k; ++j) add(a + d * (static_cast<double>(j) / k), degrees(d), degrees(d) + 180.0);
    }
  }

  std::vector<Head> heads;

 private:
  [[noreturn]] void too_many() const {
    throw input_error("layout '" + layout_.name + "' would place more than " + std::to_string(kMaxLayoutHeads) +
                      " heads: check the spacing and its unit");
  }

  bool inside(const Vec2& p) const {  // even-odd crossing test; the boundary was handled before
    bool in = false;
    for (std::size_t i = 0, j = poly_.size() - 1; i < poly_.size(); j = i++) {
      const Vec2 &a = poly_[i], &b = poly_[j];
      if ((a.y() > p.y()) != (b.y() > p.y()) && p.x() < (b.x() - a.x()) * (p.y() - a.y()) / (b.y() - a.y()) + a.x()) in = !in;
    }
    return in;
  }

  void add(const Vec2& p, double from, double to) {
    if (heads.size() >= kMaxLayoutHeads) too_many();
    Head h = layout_.head;
    h.layout = layout_.name;
    h.name = layout_.name + " head " + std::to_string(heads.size() + 1);
    h.position = p;
    h.arc.reset();
    const double sweep = std::fmod(std::fmod(to - from, 360.0) + 360.0, 360.0);
    if (layout_.boundary_arcs && sweep > 0.0 && sweep < 360.0 - 1e-9) {
      h.arc = ProfileArc{from, to};
      h.flow_l_per_min *= sweep / 360.0;  // matched precipitation
    }
    heads.push_back(h);
  }

  const Layout& layout_;
  std::vector<Vec2> poly_;
  BoundingBox box_;
  double tol_ = 0.0;
};

}  // namespace

const std::vector<std::string>& layout_pattern_names() {
  static const std::vector<std::string> names = {"square", "triangular", "rectangular", "perimeter"};
  return names;
}

std::vector<Head> layout_heads(const Layout& layout, const Region& zone) {
  const auto positive = [](double v) { return v > 0.0 && std::isfinite(v); };
  if (!positive(layout.spacing_m) || (layout.pattern == LayoutPattern::rectangular && !positive(layout.row_spacing_m)))
    throw input_error("layout '" + layout.name + "': the spacing must be a positive length");
  if (zone.loops.size() != 1)
    throw input_error("layout '" + layout.name + "': its zone must be one polygon without holes (it has " +
                      std::to_string(zone.loops.size()) + " loops)");
  std::vector<Vec2> poly;
  for (const Edge& e : zone.loops.front()) {
    if (e.kind != Edge::Kind::segment)
      throw input_error("layout '" + layout.name + "': its zone must be a polygon (straight sides), not a shape with arcs");
    if (poly.empty() || (e.from - poly.back()).norm() > 0.0) poly.push_back(e.from);
  }
  if (poly.size() > 1 && (poly.front() - poly.back()).norm() == 0.0) poly.pop_back();
  if (poly.size() < 3) throw input_error("layout '" + layout.name + "': its zone must be a polygon of three or more corners");
  if (signed_area(zone.loops.front()) < 0.0) std::reverse(poly.begin(), poly.end());
  Placer placer(layout, poly);
  if (layout.pattern == LayoutPattern::perimeter) placer.perimeter();
  else placer.grid();
  if (placer.heads.empty()) throw input_error("layout '" + layout.name + "' places no head in its zone");
  return placer.heads;
}

}  // namespace strewn
