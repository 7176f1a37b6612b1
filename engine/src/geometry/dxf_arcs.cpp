// DXF group-code reading for dxf_arcs.hpp. A DXF (ASCII) is a sequence of pairs of lines: an
// integer group code, then its value (AutoCAD DXF Reference: group codes 0 entity type, 5
// handle, 10/20/30 x/y/z, 38 LWPOLYLINE elevation, 40 radius, 42 bulge, 50/51 start/end angle
// in degrees, 70 flags, 72/73/92/93 HATCH boundary data, 210/220/230 extrusion direction; BLOCK
// 2 name, 10/20/30 base point; INSERT 2 block, 10/20/30 point, 41/42/43 scales, 50 rotation in
// degrees, 70/71 column and row counts, 44/45 their spacing). Only the codes needed for arc ends
// and radii, for object frames and for placing blocks are interpreted.
#include "geometry/dxf_arcs.hpp"

#include <Eigen/Geometry>
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <map>
#include <optional>
#include <sstream>

#include "strewn/constants.hpp"

namespace strewn::detail {
namespace {

using Vec3 = Eigen::Vector3d;
using Mat3 = Eigen::Matrix3d;

struct Pair {
  int code = -1;
  std::string value;
};

std::string trimmed(const std::string& s) {
  const std::size_t a = s.find_first_not_of(" \t\r\n");
  if (a == std::string::npos) return {};
  const std::size_t b = s.find_last_not_of(" \t\r\n");
  return s.substr(a, b - a + 1);
}

std::vector<Pair> pairs_of(const std::string& text) {
  std::vector<Pair> out;
  std::istringstream in(text);
  std::string code, value;
  while (std::getline(in, code) && std::getline(in, value)) {
    const std::string c = trimmed(code);
    char* end = nullptr;
    const long n = std::strtol(c.c_str(), &end, 10);
    if (c.empty() || *end != '\0') break;  // not an ASCII DXF from here on
    out.push_back({static_cast<int>(n), trimmed(value)});
  }
  return out;
}

double number(const std::string& s) {
  char* end = nullptr;
  const double v = std::strtod(s.c_str(), &end);
  return end != s.c_str() && std::isfinite(v) ? v : 0.0;
}

// A MINSERT count, clamped before the cast (a huge value would overflow a long).
long count_of(const std::string& s) { return static_cast<long>(std::clamp(number(s), 1.0, 1e9)); }

// An affine map into the file's world frame (WCS), in three dimensions: an entity's object frame
// (OCS, its extrusion direction 210/220/230 and elevation) and the INSERTs that place its block
// turn and tilt planes, and only the composition's plan (x, y) is what GDAL draws. A point of an
// entity's own plane is (x, y, 0) in the frame of `linear` (its elevation is in `shift`), so the
// plan of that plane is the 2 x 2 top-left block of `linear` plus the shift's x and y.
struct Placement {
  Mat3 linear = Mat3::Identity();
  Vec3 shift = Vec3::Zero();
  Vec2 apply(const Vec2& p) const { return (linear * Vec3(p.x(), p.y(), 0.0) + shift).head<2>(); }
  Mat2 plan() const { return linear.topLeftCorner<2, 2>(); }
  double area_scale() const {
    const Mat2 a = plan();
    return std::fabs(a(0, 0) * a(1, 1) - a(0, 1) * a(1, 0));
  }
  double stretch() const { return largest_stretch(plan()); }
  // Whether circles stay circles in the plan (equal scales, any rotation or mirroring, no tilt).
  bool conformal() const {
    const double most = stretch();
    return most > 0.0 && area_scale() / most >= most * (1.0 - 1e-9);
  }
  // Whether the entity's plane stands upright in the world, so that its plan is a line: the
  // plane's normal, the cross product of its placed axes, has no z (to 1e-9 of its length). A
  // zero scale, which flattens the plane itself, is not counted here (it draws no sliver).
  bool upright() const {
    const Vec3 normal = linear.col(0).cross(linear.col(1));
    const double length = normal.norm();
    return length > 0.0 && std::isfinite(length) && std::fabs(normal.z()) <= 1e-9 * length;
  }
  Placement then(const Placement& outer) const { return {outer.linear * linear, outer.linear * shift + outer.shift}; }
};

// An object frame (OCS) by the arbitrary axis algorithm (AutoCAD DXF Reference, "Object
// Coordinate Systems (OCS)", "Arbitrary Axis Algorithm"): with N the unit extrusion, the OCS x
// axis is Ax = Wy x N when |Nx| < 1/64 and |Ny| < 1/64 (N near the world z), else Wz x N,
// normalised; Ay = N x Ax. A point (x, y, z) of the OCS is x Ax + y Ay + z N in the world, z the
// entity's elevation. N = (0, 0, 1) is the identity; N = (0, 0, -1) gives Ax = (-1, 0, 0),
// Ay = (0, 1, 0): the entity mirrored in x (measured with GDAL 3.6's ogrinfo, which applies the
// same algorithm to LWPOLYLINE, POLYLINE, ARC, CIRCLE, HATCH and INSERT). A zero or non-finite
// extrusion is read as the default (0, 0, 1), which is what the reference's default is.
Placement object_frame(const Vec3& extrusion, double elevation) {
  const double length = extrusion.norm();
  if (!(length > 0.0) || !std::isfinite(length)) return Placement{};
  const Vec3 n = extrusion / length;
  const Vec3 ax = (std::fabs(n.x()) < 1.0 / 64.0 && std::fabs(n.y()) < 1.0 / 64.0 ? Vec3::UnitY().cross(n) : Vec3::UnitZ().cross(n)).normalized();
  const Vec3 ay = n.cross(ax).normalized();
  Placement p;
  p.linear.col(0) = ax;
  p.linear.col(1) = ay;
  p.linear.col(2) = n;
  p.shift = elevation * n;
  return p;
}

class Collector {
 public:
  explicit Collector(double max_sweep_deg) : most_(max_sweep_deg * kPi / 180.0) {}

  // A bulged edge from a to b (bulge = tan(sweep / 4), signed by side).
  void bulge(const Vec2& a, const Vec2& b, double bulge) {
    const double k = std::fabs(bulge);
    const double c = (b - a).norm();
    if (!(k > 0.0) || !(c > 0.0) || !std::isfinite(k)) return;
    arc(a, b, c * (1.0 + k * k) / (4.0 * k), 4.0 * std::atan(k));  // r = c / (2 sin(sweep / 2))
  }

  // An arc from a to b of the given radius and sweep (radians), in the frame of the entity being
  // read; kept placed by `place` (the INSERTs around it) in file coordinates. Under a conformal
  // placement, only the arcs under the largest sweep (GDAL's single chords); under any other,
  // every arc, whose chords GDAL strokes in the block's frame and then stretches unequally.
  void arc(const Vec2& a, const Vec2& b, double radius, double sweep) {
    if (!(radius > 0.0) || !std::isfinite(radius) || !(sweep > 0.0)) return;
    const bool chain = !place.conformal();
    if (!chain && sweep >= most_) return;
    const double c = (b - a).norm();
    if (!(c > 0.0) && !chain) return;
    Vec2 far = a;
    if (c > 0.0) {
      const Vec2 along = (b - a) / c;
      const double h = 2.0 * radius * std::pow(std::sin(0.25 * std::min(sweep, kPi)), 2);  // the sagitta r (1 - cos(sweep / 2))
      far = 0.5 * (a + b) + h * Vec2(-along.y(), along.x());
    }
    out.push_back({place.apply(a), place.apply(b), place.apply(far), radius, sweep, place.area_scale(), place.stretch(), chain});
  }

  // An arc about `centre` counter-clockwise from one angle (degrees) to the other; HATCH arc
  // edges drawn clockwise may state their angles mirrored, so those give both readings (a spare
  // one matches nothing).
  void arc_by_angles(const Vec2& centre, double r, double a0, double a1, bool both_senses) {
    const auto at = [&](double deg) -> Vec2 { return centre + r * Vec2(std::cos(deg * kPi / 180.0), std::sin(deg * kPi / 180.0)); };
    double degrees = std::fmod(a1 - a0, 360.0);
    if (degrees <= 0.0) degrees += 360.0;
    if (!std::isfinite(degrees)) return;
    arc(at(a0), at(a1), r, degrees * kPi / 180.0);
    if (both_senses) arc(at(-a0), at(-a1), r, degrees * kPi / 180.0);
  }

  // A circle: GDAL strokes it from angle 0, so under an unequal placement its chain of chords
  // starts and ends at the placed point (r, 0) from the centre. Under a conformal one its chords
  // are equal, and stroked_arc_slivers finds them.
  void circle(const Vec2& centre, double r) {
    if (place.conformal()) return;
    const Vec2 start = centre + Vec2(r, 0.0);
    arc(start, start, r, 2.0 * kPi);
  }

  std::vector<DxfArcChord> out;
  Placement place;

 private:
  double most_;
};

// A polyline's vertices with the bulge of the edge leaving each.
struct Vertex {
  Vec2 p = Vec2::Zero();
  double bulge = 0.0;
};

void polyline_arcs(const std::vector<Vertex>& v, bool closed, Collector& c) {
  if (v.size() < 2) return;
  const std::size_t edges = closed ? v.size() : v.size() - 1;  // a closed one's last edge returns to the first
  for (std::size_t i = 0; i < edges; ++i)
    if (v[i].bulge != 0.0) c.bulge(v[i].p, v[(i + 1) % v.size()].p, v[i].bulge);
}

// The pairs' entities, read into a Collector, blocks placed through their INSERTs.
class Reader {
 public:
  Reader(std::vector<Pair> pairs, double max_sweep_deg) : p(std::move(pairs)), n(p.size()), c(max_sweep_deg) { find_blocks(); }

  DxfArcs arcs() {
    std::vector<std::string> open;
    read(0, n, Placement{}, open, true);
    return {std::move(c.out), std::move(upright), std::move(curved_edges)};
  }

 private:
  // A block's entities lie between its BLOCK entity and ENDBLK; its base point is the point of
  // the block's frame that an INSERT puts at its insertion point.
  struct Block {
    Vec3 base = Vec3::Zero();
    std::size_t begin = 0, end = 0;
  };

  // The pairs of one entity: from after its (0, TYPE) pair to the next code 0.
  std::size_t entity_end(std::size_t from) const {
    while (from < n && p[from].code != 0) ++from;
    return from;
  }

  void find_blocks() {
    for (std::size_t i = 0; i < n; ++i) {
      if (p[i].code != 0 || p[i].value != "BLOCK") continue;
      const std::size_t begin = i + 1, end = entity_end(begin);
      std::string name;
      Block b;
      for (std::size_t k = begin; k < end; ++k) {
        if (p[k].code == 2) name = p[k].value;
        else if (p[k].code == 10) b.base.x() = number(p[k].value);
        else if (p[k].code == 20) b.base.y() = number(p[k].value);
        else if (p[k].code == 30) b.base.z() = number(p[k].value);
      }
      std::size_t k = end;
      while (k < n && !(p[k].code == 0 && (p[k].value == "ENDBLK" || p[k].value == "ENDSEC"))) ++k;
      b.begin = end;
      b.end = k;
      if (!name.empty()) blocks.emplace(name, b);
      i = k;
    }
  }

  // An INSERT (or MINSERT) of a block: each copy's placement composed with the outer one. A
  // block already being placed (one that inserts itself) is not followed again.
  void insert(std::size_t begin, std::size_t end, const Placement& outer, std::vector<std::string>& open) {
    std::string name;
    Vec3 at = Vec3::Zero(), extrusion = Vec3::UnitZ();
    Vec2 spacing = Vec2::Zero();
    double sx = 1.0, sy = 1.0, sz = 1.0, degrees = 0.0;
    long columns = 1, rows = 1;
    for (std::size_t k = begin; k < end; ++k) {
      if (p[k].code == 2) name = p[k].value;
      else if (p[k].code == 10) at.x() = number(p[k].value);
      else if (p[k].code == 20) at.y() = number(p[k].value);
      else if (p[k].code == 30) at.z() = number(p[k].value);
      else if (p[k].code == 41) sx = number(p[k].value);
      else if (p[k].code == 42) sy = number(p[k].value);
      else if (p[k].code == 43) sz = number(p[k].value);
      else if (p[k].code == 210) extrusion.x() = number(p[k].value);
      else if (p[k].code == 220) extrusion.y() = number(p[k].value);
      else if (p[k].code == 230) extrusion.z() = number(p[k].value);
      else if (p[k].code == 50) degrees = number(p[k].value);
      else if (p[k].code == 70) columns = count_of(p[k].value);
      else if (p[k].code == 71) rows = count_of(p[k].value);
      else if (p[k].code == 44) spacing.x() = number(p[k].value);
      else if (p[k].code == 45) spacing.y() = number(p[k].value);
    }
    const auto b = blocks.find(name);
    if (b == blocks.end() || open.size() >= kMostNesting || std::find(open.begin(), open.end(), name) != open.end()) return;
    const double a = degrees * kPi / 180.0;
    Mat3 turn = Mat3::Identity();
    turn.topLeftCorner<2, 2>() << std::cos(a), -std::sin(a), std::sin(a), std::cos(a);
    // p -> OCS(at + R (S (p - base) + (column dx, row dy, 0))): MINSERT copies are spaced along
    // the rotated block axes, unscaled; the insertion point and the rotation are in the INSERT's
    // own object frame (measured with GDAL 3.6: an INSERT with extrusion (0, 0, -1) places the
    // block mirrored in x, and a tilted one tilts it).
    const Mat3 linear = turn * Vec3(sx, sy, sz).asDiagonal();
    const Placement frame = object_frame(extrusion, 0.0).then(outer);
    open.push_back(name);
    for (long row = 0; row < std::max(1L, rows) && copies_ < kMostCopies; ++row)
      for (long column = 0; column < std::max(1L, columns) && ++copies_ <= kMostCopies; ++column) {
        const Vec3 offset(static_cast<double>(column) * spacing.x(), static_cast<double>(row) * spacing.y(), 0.0);
        const Placement here{linear, at - linear * b->second.base + turn * offset};
        read(b->second.begin, b->second.end, here.then(frame), open, false);
      }
    open.pop_back();
  }

  // The entity's object frame (extrusion 210/220/230, elevation from `elevation_code`, codes read
  // up to `header_end`) placed by `place`, set as the collector's; false (and the entity noted as
  // upright) when its plane stands upright in the world, where it has no area in the plan.
  bool enter(const std::string& type, std::size_t at, std::size_t header_end, int elevation_code, const Placement& place) {
    Vec3 extrusion = Vec3::UnitZ();
    double elevation = 0.0;
    for (std::size_t k = at + 1; k < header_end; ++k) {
      if (p[k].code == 210) extrusion.x() = number(p[k].value);
      else if (p[k].code == 220) extrusion.y() = number(p[k].value);
      else if (p[k].code == 230) extrusion.z() = number(p[k].value);
      else if (p[k].code == elevation_code) elevation = number(p[k].value);
    }
    c.place = object_frame(extrusion, elevation).then(place);
    if (!c.place.upright()) return true;
    const std::size_t line = 2 * at + 1;  // each pair is two lines, the code first
    if (upright.empty() || upright.back().line != line) {  // MINSERT copies: once
      char text[96];
      std::snprintf(text, sizeof text, "%.6g, %.6g, %.6g", extrusion.x(), extrusion.y(), extrusion.z());
      upright.push_back({line, type, handle_, text});
    }
    return false;
  }

  void read(std::size_t from, std::size_t to, const Placement& place, std::vector<std::string>& open, bool top) {
    std::size_t i = from;
    while (i < to) {
      if (p[i].code != 0) {
        ++i;
        continue;
      }
      const std::string type = p[i].value;
      const std::size_t at = i, begin = i + 1, end = std::min(to, entity_end(begin));
      c.place = place;
      if (type == "BLOCK") {  // read only where an INSERT places it
        while (i < to && !(p[i].code == 0 && (p[i].value == "ENDBLK" || p[i].value == "ENDSEC"))) ++i;
        continue;
      }
      if (top) {  // the handle (code 5) GDAL gives the feature, for a block's entities the INSERT's
        handle_.clear();
        for (std::size_t k = begin; k < end; ++k)
          if (p[k].code == 5) handle_ = p[k].value;
      }
      if (type == "INSERT") {
        insert(begin, end, place, open);
        i = end;
        continue;
      }
      if (type == "LWPOLYLINE") {
        if (!enter(type, at, end, 38, place)) {
          i = end;
          continue;
        }
        std::vector<Vertex> v;
        int flags = 0;
        for (std::size_t k = begin; k < end; ++k) {
          if (p[k].code == 70) flags = static_cast<int>(number(p[k].value));
          else if (p[k].code == 10) v.push_back({Vec2(number(p[k].value), 0.0), 0.0});
          else if (p[k].code == 20 && !v.empty()) v.back().p.y() = number(p[k].value);
          else if (p[k].code == 42 && !v.empty()) v.back().bulge = number(p[k].value);
        }
        polyline_arcs(v, (flags & 1) != 0, c);
        i = end;
      } else if (type == "POLYLINE") {
        int flags = 0;
        for (std::size_t k = begin; k < end; ++k)
          if (p[k].code == 70) flags = static_cast<int>(number(p[k].value));
        // A 2D polyline is drawn in its object frame (elevation: its own point's z); 3D
        // polylines and meshes (flags 8, 16, 64) are in world coordinates and have no bulges.
        const bool flat = (flags & (8 | 16 | 64)) == 0;
        const bool drawn = !flat || enter(type, at, end, 30, place);
        std::vector<Vertex> v;
        i = end;
        while (i < to && p[i].code == 0 && p[i].value == "VERTEX") {
          const std::size_t vb = i + 1, ve = std::min(to, entity_end(vb));
          Vertex x;
          for (std::size_t k = vb; k < ve; ++k) {
            if (p[k].code == 10) x.p.x() = number(p[k].value);
            else if (p[k].code == 20) x.p.y() = number(p[k].value);
            else if (p[k].code == 42) x.bulge = number(p[k].value);
          }
          v.push_back(x);
          i = ve;
        }
        if (drawn && flat) polyline_arcs(v, (flags & 1) != 0, c);
      } else if (type == "CIRCLE") {
        if (!enter(type, at, end, 30, place)) {
          i = end;
          continue;
        }
        Vec2 centre = Vec2::Zero();
        double r = 0.0;
        for (std::size_t k = begin; k < end; ++k) {
          if (p[k].code == 10) centre.x() = number(p[k].value);
          else if (p[k].code == 20) centre.y() = number(p[k].value);
          else if (p[k].code == 40) r = number(p[k].value);
        }
        c.circle(centre, r);
        i = end;
      } else if (type == "ARC") {
        if (!enter(type, at, end, 30, place)) {
          i = end;
          continue;
        }
        Vec2 centre = Vec2::Zero();
        double r = 0.0, a0 = 0.0, a1 = 0.0;
        for (std::size_t k = begin; k < end; ++k) {
          if (p[k].code == 10) centre.x() = number(p[k].value);
          else if (p[k].code == 20) centre.y() = number(p[k].value);
          else if (p[k].code == 40) r = number(p[k].value);
          else if (p[k].code == 50) a0 = number(p[k].value);
          else if (p[k].code == 51) a1 = number(p[k].value);
        }
        c.arc_by_angles(centre, r, a0, a1, false);
        i = end;
      } else if (type == "HATCH") {
        // Boundary paths follow code 91; each starts with 92 (flags, bit 2: a polyline path).
        std::size_t k = begin;
        while (k < end && p[k].code != 91) ++k;
        // Its object frame: extrusion and the elevation point's z (30) come before the paths.
        if (!enter(type, at, k, 30, place)) {
          i = end;
          continue;
        }
        while (k < end) {
          if (p[k].code != 92) {
            ++k;
            continue;
          }
          const int path_flags = static_cast<int>(number(p[k].value));
          ++k;
          if ((path_flags & 2) != 0) {  // 72 has-bulge, 73 closed, 93 count, then 10, 20 [, 42]
            bool closed = true;
            std::vector<Vertex> v;
            while (k < end && p[k].code != 92 && p[k].code != 97 && p[k].code != 75) {
              if (p[k].code == 73) closed = number(p[k].value) != 0.0;
              else if (p[k].code == 10) v.push_back({Vec2(number(p[k].value), 0.0), 0.0});
              else if (p[k].code == 20 && !v.empty()) v.back().p.y() = number(p[k].value);
              else if (p[k].code == 42 && !v.empty()) v.back().bulge = number(p[k].value);
              ++k;
            }
            polyline_arcs(v, closed, c);
          } else {  // edges: 72 type (2: circular arc with 10, 20 centre, 40 radius, 50, 51, 73 ccw)
            while (k < end && p[k].code != 92 && p[k].code != 97 && p[k].code != 75) {
              if (p[k].code == 72 && number(p[k].value) == 2.0) {
                Vec2 centre = Vec2::Zero();
                double r = 0.0, a0 = 0.0, a1 = 0.0;
                bool ccw = true;
                ++k;
                while (k < end && p[k].code != 72 && p[k].code != 92 && p[k].code != 97 && p[k].code != 75) {
                  if (p[k].code == 10) centre.x() = number(p[k].value);
                  else if (p[k].code == 20) centre.y() = number(p[k].value);
                  else if (p[k].code == 40) r = number(p[k].value);
                  else if (p[k].code == 50) a0 = number(p[k].value);
                  else if (p[k].code == 51) a1 = number(p[k].value);
                  else if (p[k].code == 73) ccw = number(p[k].value) != 0.0;
                  ++k;
                }
                c.arc_by_angles(centre, r, a0, a1, !ccw);
              } else if (p[k].code == 72 && (number(p[k].value) == 3.0 || number(p[k].value) == 4.0)) {
                const std::size_t line = 2 * k + 1;
                if (curved_edges.empty() || curved_edges.back().line != line)  // MINSERT copies: once
                  curved_edges.push_back({line, number(p[k].value) == 3.0 ? "elliptical arc" : "spline", handle_});
                ++k;
              } else {
                ++k;
              }
            }
          }
          // 97: source boundary objects (330 handles) close the path.
          while (k < end && p[k].code != 92 && p[k].code != 75) ++k;
          if (k < end && p[k].code == 75) break;  // hatch style: the paths are done
        }
        i = end;
      } else {
        i = end;
      }
    }
  }

  // Guards, so that a file cannot stall the scan: blocks nested deeper than this, and block copies
  // beyond this many in all (nested MINSERT arrays multiply), are not read (DEVELOPERS.md).
  static constexpr std::size_t kMostNesting = 30;
  static constexpr long kMostCopies = 100000;
  long copies_ = 0;

  std::vector<Pair> p;
  std::size_t n;
  Collector c;
  std::map<std::string, Block> blocks;
  std::string handle_;                 // of the file's entity being read (ENTITIES level)
  std::vector<DxfUpright> upright;
  std::vector<DxfCurvedEdge> curved_edges;
};

}  // namespace

DxfArcs dxf_small_arcs(const std::string& dxf_text, double max_sweep_deg) {
  return Reader(pairs_of(dxf_text), max_sweep_deg).arcs();
}

double largest_stretch(const Mat2& a) {
  const double f2 = a.squaredNorm(), d = std::fabs(a(0, 0) * a(1, 1) - a(0, 1) * a(1, 0));
  return std::sqrt(0.5 * (f2 + std::sqrt(std::max(0.0, f2 * f2 - 4.0 * d * d))));
}

bool is_binary_dxf(const std::string& head) { return head.rfind("AutoCAD Binary DXF", 0) == 0; }

}  // namespace strewn::detail
