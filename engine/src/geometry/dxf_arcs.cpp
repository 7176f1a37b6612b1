// DXF group-code reading for dxf_arcs.hpp. A DXF (ASCII) is a sequence of pairs of lines: an
// integer group code, then its value (AutoCAD DXF Reference: group codes 0 entity type, 10/20
// x/y, 40 radius, 42 bulge, 50/51 start/end angle in degrees, 70 flags, 72/73/92/93 HATCH
// boundary data). Only the codes needed for arc ends and radii are interpreted.
#include "geometry/dxf_arcs.hpp"

#include <cmath>
#include <cstdlib>
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

// The sweep (radians) of the minor arc of radius r over a chord c.
double sweep_of(double chord, double radius) {
  const double s = chord / (2.0 * radius);
  return s >= 1.0 ? kPi : 2.0 * std::asin(s);
}

class Collector {
 public:
  explicit Collector(double max_sweep_deg) : most_(max_sweep_deg * kPi / 180.0) {}

  // A bulged edge from a to b (bulge = tan(sweep / 4), signed by side).
  void bulge(const Vec2& a, const Vec2& b, double bulge) {
    const double k = std::fabs(bulge);
    const double c = (b - a).norm();
    if (!(k > 0.0) || !(c > 0.0) || !std::isfinite(k)) return;
    const double sweep = 4.0 * std::atan(k);
    if (sweep >= most_) return;
    arc(a, b, c * (1.0 + k * k) / (4.0 * k));  // r = c / (2 sin(sweep / 2))
  }

  void arc(const Vec2& a, const Vec2& b, double radius) {
    const double c = (b - a).norm();
    if (!(radius > 0.0) || !(c > 0.0) || sweep_of(c, radius) >= most_) return;
    out.push_back({a, b, radius});
  }

  // An arc about `centre` from one angle (degrees) to the other; HATCH arc edges drawn clockwise
  // may state their angles mirrored, so those give both readings (a spare one matches nothing).
  void arc_by_angles(const Vec2& centre, double r, double a0, double a1, bool both_senses) {
    const auto at = [&](double deg) { return centre + r * Vec2(std::cos(deg * kPi / 180.0), std::sin(deg * kPi / 180.0)); };
    arc(at(a0), at(a1), r);
    if (both_senses) arc(at(-a0), at(-a1), r);
  }

  std::vector<DxfArcChord> out;

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

}  // namespace

std::vector<DxfArcChord> dxf_small_arcs(const std::string& dxf_text, double max_sweep_deg) {
  const std::vector<Pair> p = pairs_of(dxf_text);
  Collector c(max_sweep_deg);
  std::size_t i = 0;
  const std::size_t n = p.size();
  // The pairs of one entity: from after its (0, TYPE) pair to the next code 0.
  const auto entity_end = [&](std::size_t from) {
    while (from < n && p[from].code != 0) ++from;
    return from;
  };
  while (i < n) {
    if (p[i].code != 0) {
      ++i;
      continue;
    }
    const std::string type = p[i].value;
    const std::size_t begin = i + 1, end = entity_end(begin);
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
      while (i < n && p[i].code == 0 && p[i].value == "VERTEX") {
        const std::size_t vb = i + 1, ve = entity_end(vb);
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
  return c.out;
}

}  // namespace strewn::detail
