// DXF group-code reading for dxf_arcs.hpp. A DXF (ASCII) is a sequence of pairs of lines: an
// integer group code, then its value (AutoCAD DXF Reference: group codes 0 entity type, 10/20
// x/y, 40 radius, 42 bulge, 50/51 start/end angle in degrees, 70 flags, 72/73/92/93 HATCH
// boundary data; BLOCK 2 name, 10/20 base point; INSERT 2 block, 10/20 point, 41/42 scales, 50
// rotation in degrees, 70/71 column and row counts, 44/45 their spacing). Only the codes needed
// for arc ends and radii, and for placing blocks, are interpreted.
#include "geometry/dxf_arcs.hpp"

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <map>
#include <optional>
#include <sstream>

#include "strewn/constants.hpp"

namespace strewn::detail {
namespace {

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

// An affine map from a block's frame into the file's: p -> linear p + shift.
struct Placement {
  Mat2 linear = Mat2::Identity();
  Vec2 shift = Vec2::Zero();
  Vec2 apply(const Vec2& p) const { return linear * p + shift; }
  double area_scale() const { return std::fabs(linear(0, 0) * linear(1, 1) - linear(0, 1) * linear(1, 0)); }
  double stretch() const { return largest_stretch(linear); }
  // Whether circles stay circles (equal scales, any rotation or mirroring).
  bool conformal() const {
    const double most = stretch();
    return most > 0.0 && area_scale() / most >= most * (1.0 - 1e-9);
  }
  Placement then(const Placement& outer) const { return {outer.linear * linear, outer.linear * shift + outer.shift}; }
};

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

  std::vector<DxfArcChord> arcs() {
    std::vector<std::string> open;
    read(0, n, Placement{}, open);
    return std::move(c.out);
  }

 private:
  // A block's entities lie between its BLOCK entity and ENDBLK; its base point is the point of
  // the block's frame that an INSERT puts at its insertion point.
  struct Block {
    Vec2 base = Vec2::Zero();
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
    Vec2 at = Vec2::Zero(), spacing = Vec2::Zero();
    double sx = 1.0, sy = 1.0, degrees = 0.0;
    long columns = 1, rows = 1;
    for (std::size_t k = begin; k < end; ++k) {
      if (p[k].code == 2) name = p[k].value;
      else if (p[k].code == 10) at.x() = number(p[k].value);
      else if (p[k].code == 20) at.y() = number(p[k].value);
      else if (p[k].code == 41) sx = number(p[k].value);
      else if (p[k].code == 42) sy = number(p[k].value);
      else if (p[k].code == 50) degrees = number(p[k].value);
      else if (p[k].code == 70) columns = count_of(p[k].value);
      else if (p[k].code == 71) rows = count_of(p[k].value);
      else if (p[k].code == 44) spacing.x() = number(p[k].value);
      else if (p[k].code == 45) spacing.y() = number(p[k].value);
    }
    const auto b = blocks.find(name);
    if (b == blocks.end() || open.size() >= kMostNesting || std::find(open.begin(), open.end(), name) != open.end()) return;
    const double a = degrees * kPi / 180.0;
    Mat2 turn;
    turn << std::cos(a), -std::sin(a), std::sin(a), std::cos(a);
    // p -> at + R (S (p - base) + (column dx, row dy)): MINSERT copies are spaced along the
    // rotated block axes, unscaled.
    const Mat2 linear = turn * Vec2(sx, sy).asDiagonal();
    open.push_back(name);
    for (long row = 0; row < std::max(1L, rows) && copies_ < kMostCopies; ++row)
      for (long column = 0; column < std::max(1L, columns) && ++copies_ <= kMostCopies; ++column) {
        const Vec2 offset(static_cast<double>(column) * spacing.x(), static_cast<double>(row) * spacing.y());
        const Placement here{linear, at - linear * b->second.base + turn * offset};
        read(b->second.begin, b->second.end, here.then(outer), open);
      }
    open.pop_back();
  }

  void read(std::size_t from, std::size_t to, const Placement& place, std::vector<std::string>& open) {
    std::size_t i = from;
    while (i < to) {
      if (p[i].code != 0) {
        ++i;
        continue;
      }
      const std::string type = p[i].value;
      const std::size_t begin = i + 1, end = std::min(to, entity_end(begin));
      c.place = place;
      if (type == "BLOCK") {  // read only where an INSERT places it
        while (i < to && !(p[i].code == 0 && (p[i].value == "ENDBLK" || p[i].value == "ENDSEC"))) ++i;
        continue;
      }
      if (type == "INSERT") {
        insert(begin, end, place, open);
        i = end;
        continue;
      }
      if (type == "LWPOLYLINE") {
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
        polyline_arcs(v, (flags & 1) != 0, c);
      } else if (type == "CIRCLE") {
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
};

}  // namespace

std::vector<DxfArcChord> dxf_small_arcs(const std::string& dxf_text, double max_sweep_deg) {
  return Reader(pairs_of(dxf_text), max_sweep_deg).arcs();
}

double largest_stretch(const Mat2& a) {
  const double f2 = a.squaredNorm(), d = std::fabs(a(0, 0) * a(1, 1) - a(0, 1) * a(1, 0));
  return std::sqrt(0.5 * (f2 + std::sqrt(std::max(0.0, f2 * f2 - 4.0 * d * d))));
}

bool is_binary_dxf(const std::string& head) { return head.rfind("AutoCAD Binary DXF", 0) == 0; }

}  // namespace strewn::detail
