// Zones from vector sources through GDAL/OGR's C++ API (GDAL 3.6), each read inside a GdalScope
// (strewn/gdal_scope.hpp): GDAL's last message becomes the reason in our one-line error.
#include "strewn/vector_source.hpp"

#include <cpl_conv.h>
#include <cpl_error.h>
#include <gdal_priv.h>
#include <ogr_spatialref.h>
#include <ogrsf_frmts.h>

#include <algorithm>
#include <cctype>
#include <cstdio>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <memory>
#include <optional>

#include "geometry/dxf_arcs.hpp"
#include "geometry/polygon_rings.hpp"
#include "strewn/closest_names.hpp"
#include "strewn/constants.hpp"
#include "strewn/error.hpp"
#include "strewn/gdal_scope.hpp"
#include "strewn/input_file.hpp"
#include "strewn/region_ops.hpp"

namespace strewn {

const std::string* VectorFeature::attribute(const std::string& field) const {
  for (const auto& [k, v] : attributes)
    if (k == field) return &v;
  return nullptr;
}

namespace {

struct DatasetCloser {
  void operator()(GDALDataset* d) const { GDALClose(d); }
};
using Dataset = std::unique_ptr<GDALDataset, DatasetCloser>;

struct TransformDeleter {
  void operator()(OGRCoordinateTransformation* t) const { OGRCoordinateTransformation::DestroyCT(t); }
};

// A binary DXF: GDAL may read it, but dxf_arcs.hpp reads only the text form, so the arcs GDAL
// turns into single chords could not be bounded.
void refuse_binary_dxf(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  char head[32] = {};
  in.read(head, sizeof head);
  if (detail::is_binary_dxf(std::string(head, static_cast<std::size_t>(in.gcount()))))
    throw input_error(path + ": a binary DXF, whose arcs strewn cannot read to bound the chords GDAL draws for them; "
                             "save it as an ASCII DXF");
}

Dataset open_vector(const std::string& path) {
  // Regular files and folders (a Shapefile folder) only: a FIFO or a device could block GDAL's
  // probe of the file's header, and /dev/zero would feed it without end.
  std::error_code ec;
  const auto status = std::filesystem::status(path, ec);
  if (ec || !std::filesystem::exists(status)) throw input_error(path + ": no such file");
  if (!std::filesystem::is_regular_file(status) && !std::filesystem::is_directory(status))
    throw input_error(path + ": not a regular file or folder");
  if (std::filesystem::is_regular_file(status) && std::filesystem::file_size(path, ec) > max_input_bytes())
    throw input_error(path + ": larger than the input cap of " + std::to_string(max_input_bytes()) +
                      " bytes (STREWN_MAX_INPUT_BYTES)");
  if (std::filesystem::is_regular_file(status)) refuse_binary_dxf(path);
  Dataset d(static_cast<GDALDataset*>(
      GDALOpenEx(path.c_str(), GDAL_OF_VECTOR | GDAL_OF_READONLY, nullptr, nullptr, nullptr)));
  if (!d) throw input_error(path + ": GDAL cannot open it as a vector source (" + GdalScope::reason("format not recognised") + ")");
  return d;
}

OGRLayer* choose_layer(GDALDataset& d, const std::string& path, const std::string& wanted) {
  std::vector<std::string> names;
  for (int i = 0; i < d.GetLayerCount(); ++i) names.push_back(d.GetLayer(i)->GetName());
  if (names.empty()) throw input_error(path + ": no layers");
  if (wanted.empty()) {
    if (names.size() == 1) return d.GetLayer(0);
    std::string list;
    for (const auto& n : names) list += (list.empty() ? "" : ", ") + n;
    throw input_error(path + ": " + std::to_string(names.size()) + " layers; name one with 'layer' (" + list + ")");
  }
  for (int i = 0; i < d.GetLayerCount(); ++i)
    if (names[static_cast<std::size_t>(i)] == wanted) return d.GetLayer(i);
  throw input_error(path + ": no layer named '" + wanted + "'" + did_you_mean(wanted, names));
}

// ---- geometry: OGR curves to loops of segments and exact circular arcs ----

using Points = std::vector<Vec2>;

Vec2 xy(const OGRSimpleCurve& c, int i) { return Vec2(c.getX(i), c.getY(i)); }

void add_segment(Loop& loop, const Vec2& a, const Vec2& b) {
  if (a != b) loop.push_back(Edge::segment(a, b));
}

// The circular arc from a through m to b (ISO 19107 / OGC CircularString: three points per arc).
// The centre is computed relative to a, so that coordinates of a national grid lose nothing.
// Collinear points make a segment; a == b is a whole circle with m diametrically opposite.
void add_arc(Loop& loop, const Vec2& a, const Vec2& m, const Vec2& b) {
  const Vec2 u = m - a, v = b - a;
  if (a == b) {
    const Vec2 c = a + 0.5 * u;
    const double r = 0.5 * u.norm();
    if (r == 0.0) return;
    const double s0 = std::atan2(a.y() - c.y(), a.x() - c.x());
    loop.push_back(Edge::arc(c, r * Mat2::Identity(), s0, s0 + 2 * kPi));
    return;
  }
  const double d = 2.0 * (u.x() * v.y() - u.y() * v.x());
  const double scale = u.norm() * v.norm();
  if (std::abs(d) <= 1e-12 * scale) {  // collinear to rounding
    add_segment(loop, a, b);
    return;
  }
  const Vec2 c0((v.y() * u.squaredNorm() - u.y() * v.squaredNorm()) / d,
                (u.x() * v.squaredNorm() - v.x() * u.squaredNorm()) / d);
  const Vec2 c = a + c0;
  const double r = c0.norm();
  const double s0 = std::atan2(-c0.y(), -c0.x());
  const double s2 = std::atan2((v - c0).y(), (v - c0).x());
  const bool ccw = d > 0;  // m left of the chord a -> b... as seen going a, m, b
  double sweep = ccw ? s2 - s0 : s0 - s2;
  while (sweep <= 0) sweep += 2 * kPi;
  while (sweep > 2 * kPi) sweep -= 2 * kPi;
  loop.push_back(Edge::arc(c, r * Mat2::Identity(), s0, ccw ? s0 + sweep : s0 - sweep));
}

void add_curve(Loop& loop, const OGRCurve& curve, const std::string& what) {
  const auto type = wkbFlatten(curve.getGeometryType());
  if (type == wkbLineString || type == wkbLinearRing) {
    const auto& line = static_cast<const OGRSimpleCurve&>(curve);
    for (int i = 0; i + 1 < line.getNumPoints(); ++i) add_segment(loop, xy(line, i), xy(line, i + 1));
  } else if (type == wkbCircularString) {
    const auto& arcs = static_cast<const OGRSimpleCurve&>(curve);
    const int n = arcs.getNumPoints();
    if (n < 3 || n % 2 == 0) throw input_error(what + ": a circular string needs 2k + 1 points");
    for (int i = 0; i + 2 < n; i += 2) add_arc(loop, xy(arcs, i), xy(arcs, i + 1), xy(arcs, i + 2));
  } else if (type == wkbCompoundCurve) {
    const auto& compound = static_cast<const OGRCompoundCurve&>(curve);
    for (int i = 0; i < compound.getNumCurves(); ++i) add_curve(loop, *compound.getCurve(i), what);
  } else {
    throw input_error(what + ": unsupported ring type " + OGRGeometryTypeToName(curve.getGeometryType()));
  }
}

std::string distance_text(double d) {
  char b[64];
  std::snprintf(b, sizeof b, "%.3g m", d);
  return b;
}

// A ring's loop. Its ends must meet; GDAL 3.6 itself leaves a DXF polyline that starts with a
// bulged edge open by rounding (measured: 6.6e-13 m on a 10 m square, the stroked arc's first
// point computed by trigonometry), so ends within 1e-9 of the ring's size (plus 1e-9 m) are
// joined: the last segment's end moves onto the start, sweeping a triangle of at most half the
// gap times that segment's length, which `snapped_area` collects for the error bound.
Loop ring_loop(const OGRCurve& curve, const std::string& what, double& snapped_area) {
  OGRPoint start, end;
  curve.StartPoint(&start);
  curve.EndPoint(&end);
  const Vec2 a(start.getX(), start.getY()), b(end.getX(), end.getY());
  OGREnvelope box;
  curve.getEnvelope(&box);
  const double size = std::hypot(box.MaxX - box.MinX, box.MaxY - box.MinY);
  const double gap = (b - a).norm();
  const bool joined = a != b && gap <= 1e-9 * (size + 1.0);
  if (a != b && !joined)
    throw input_error(what + " is a line that does not close (its ends are " + distance_text(gap) +
                      " apart); a zone needs a closed ring or a polygon");
  Loop loop;
  add_curve(loop, curve, what);
  if (loop.empty()) throw input_error(what + ": an empty ring");
  if (joined) {
    if (loop.back().kind != Edge::Kind::segment)
      throw input_error(what + " is a line that does not close (its ends are " + distance_text(gap) +
                        " apart); a zone needs a closed ring or a polygon");
    snapped_area += 0.5 * gap * (loop.back().to - loop.back().from).norm();
    loop.back().to = a;
  }
  // GDAL also repeats a stroked arc's end beside the vertex it was computed for (measured: an
  // edge of 1.3e-12 m from 10.0000000000013 back to 10, a spike the validity check refuses).
  // An edge within the same 1e-9 of the ring's size is dropped and the segment before it made to
  // end where it ended, sweeping a triangle of at most half its length times that segment's.
  const double tiny = 1e-9 * (size + 1.0);
  Loop kept;
  for (const Edge& e : loop) {
    const double length = (e.to - e.from).norm();
    if (e.kind == Edge::Kind::segment && length <= tiny && !kept.empty() && kept.back().kind == Edge::Kind::segment &&
        loop.size() > 3) {
      snapped_area += 0.5 * length * (kept.back().to - kept.back().from).norm();
      kept.back().to = e.to;
      continue;
    }
    kept.push_back(e);
  }
  return kept;
}

void collect(const OGRGeometry& g, const std::string& what, std::vector<PolygonLoops>& out, double& snapped_area) {
  const auto type = wkbFlatten(g.getGeometryType());
  if (g.IsEmpty()) throw input_error(what + " has an empty geometry");
  switch (type) {
    case wkbPolygon:
    case wkbCurvePolygon:
    case wkbTriangle: {
      const auto& p = static_cast<const OGRCurvePolygon&>(g);
      PolygonLoops& loops = out.emplace_back();
      loops.push_back(ring_loop(*p.getExteriorRingCurve(), what, snapped_area));
      for (int i = 0; i < p.getNumInteriorRings(); ++i)
        loops.push_back(ring_loop(*p.getInteriorRingCurve(i), what, snapped_area));
      return;
    }
    case wkbLineString:
    case wkbCircularString:
    case wkbCompoundCurve:
      out.emplace_back().push_back(ring_loop(static_cast<const OGRCurve&>(g), what, snapped_area));
      return;
    case wkbMultiPolygon:
    case wkbMultiSurface:
    case wkbMultiLineString:
    case wkbMultiCurve:
    case wkbGeometryCollection: {
      const auto& c = static_cast<const OGRGeometryCollection&>(g);
      for (int i = 0; i < c.getNumGeometries(); ++i) collect(*c.getGeometryRef(i), what, out, snapped_area);
      return;
    }
    case wkbPoint:
    case wkbMultiPoint:
      throw input_error(what + " is a point; a zone needs an area (a polygon or a closed ring)");
    default:
      throw input_error(what + " is a " + OGRGeometryTypeToName(g.getGeometryType()) +
                        "; a zone needs an area (a polygon or a closed ring)");
  }
}

// The sliver between the circular arcs GDAL strokes (DXF arcs and circles) and their chords, so
// that it enters the error bound (Region::approximation_area, approximation_width). GDAL 3.6
// strokes an arc into equal chords, each turning by the same angle, at most OGR_ARC_STEPSIZE:
// a vertex whose turn is that small and whose two edges are equal (to 1e-6) is taken as inside
// a stroked arc, and both its edges as chords of a circle of radius r = c / (2 sin(theta/2)).
// The area between a chord turning theta and its arc is r^2 (theta - sin theta) / 2 (a circular
// segment), the arc at most r (1 - cos(theta/2)) from it; the bound covers the region drawn as
// chords and the circle alike (the difference is the same sliver). An arc stroked into a single
// chord (a sweep below one step) has no turning vertex: single_chord_slivers finds it from the
// arcs of the DXF text instead.
struct Slivers {
  double area = 0.0, width = 0.0;
};

// r^2 (theta - sin theta) / 2, with theta - sin theta by its series for a small theta (digits).
double segment_area(double r, double theta) {
  const double t2 = theta * theta;
  const double theta_minus_sin = theta < 0.1 ? theta * t2 / 6.0 * (1.0 - t2 / 20.0 * (1.0 - t2 / 42.0 * (1.0 - t2 / 72.0)))
                                             : theta - std::sin(theta);
  return 0.5 * r * r * theta_minus_sin;
}

Slivers stroked_arc_slivers(const Loop& loop, double step_deg) {
  Slivers out;
  const std::size_t n = loop.size();
  if (n < 3 || !(step_deg > 0.0)) return out;
  const double most = step_deg * kPi / 180.0 * (1.0 + 1e-6);
  std::vector<double> chord_turn(n, 0.0);  // the turn of a regular vertex at either end of edge i
  for (std::size_t i = 0; i < n; ++i) {
    const Edge& a = loop[(i + n - 1) % n];
    const Edge& b = loop[i];
    if (a.kind != Edge::Kind::segment || b.kind != Edge::Kind::segment) continue;
    const Vec2 da = a.to - a.from, db = b.to - b.from;
    const double ca = da.norm(), cb = db.norm();
    if (!(ca > 0.0 && cb > 0.0) || std::fabs(ca - cb) > 1e-6 * std::max(ca, cb)) continue;
    const double turn = std::fabs(std::atan2(da.x() * db.y() - da.y() * db.x(), da.dot(db)));
    if (!(turn > 0.0 && turn <= most)) continue;
    chord_turn[(i + n - 1) % n] = std::max(chord_turn[(i + n - 1) % n], turn);
    chord_turn[i] = std::max(chord_turn[i], turn);
  }
  for (std::size_t i = 0; i < n; ++i) {
    const double theta = chord_turn[i];
    if (theta <= 0.0) continue;
    const double c = (loop[i].to - loop[i].from).norm();
    const double r = c / (2.0 * std::sin(0.5 * theta));
    out.area += segment_area(r, theta);
    out.width = std::max(out.width, 2.0 * r * std::pow(std::sin(0.25 * theta), 2));  // r (1 - cos(theta/2))
  }
  return out;
}

// A DXF arc that GDAL emits as one chord (sweep under one step), or as a chain of chords it
// stretched unequally (dxf_arcs.hpp), in site coordinates: its ends, and the sliver between it
// and its chords (area, and its depth as the width).
struct SingleChordArc {
  Vec2 from = Vec2::Zero(), to = Vec2::Zero();
  double area = 0.0, width = 0.0;
  bool chain = false;
};

// The distance of `p` from the line through a and b.
double off_line(const Vec2& a, const Vec2& b, const Vec2& p) {
  const Vec2 d = b - a, m = p - a;
  return std::fabs(d.x() * m.y() - d.y() * m.x()) / d.norm();
}

// The file's arcs (dxf_arcs.hpp) brought into the site frame. Without a transformation a single
// chord's sliver is exact: the drawn circular segment times |det| of the block placement (affine
// maps scale areas by it), as deep as the placed arc's farthest point. A chain's is bounded: GDAL
// cuts a sweep theta into pieces of at most one step s, and as a segment's area over its sweep
// grows with the sweep, the pieces' segments add up to at most theta / s segments of sweep s;
// each as deep as the placement's largest stretch times the sagitta of s. With a transformation
// the areas scale further by its local Jacobian's |det| and the depths by its largest stretch,
// measured by finite differences over the arc's size, widened by 1% for the curvature a
// projection adds over a few metres (far less than that).
struct FileArcs {
  std::vector<SingleChordArc> arcs;
  std::vector<detail::DxfUpright> upright;  // entities with no area in the plan
  std::vector<detail::DxfCurvedEdge> curved_edges;  // HATCH edges whose chords cannot be bounded
};

FileArcs single_chord_arcs(const std::string& path, double step_deg, OGRCoordinateTransformation* transform) {
  std::ifstream in(path, std::ios::binary);
  const std::string text((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  const double step = step_deg * kPi / 180.0;
  detail::DxfArcs found = detail::dxf_small_arcs(text, 2.0 * step_deg);
  FileArcs result{{}, std::move(found.upright), std::move(found.curved_edges)};
  std::vector<SingleChordArc>& out = result.arcs;
  // Twice the step: an arc of one to two steps is stroked into two chords, which
  // stroked_arc_slivers recognises; reading those too costs nothing (a spare one is never matched
  // twice, and a match only ever adds to the bound).
  for (const detail::DxfArcChord& a : found.arcs) {
    SingleChordArc s{a.from, a.to, 0.0, 0.0, a.chain};
    if (a.chain) {
      const double piece = std::min(a.sweep, step);
      // A whole number of steps (a circle: 1440 chords at 0.25 degrees) makes the bound the
      // sliver itself; 1e-9 more keeps rounding from leaving the true sliver a few ulps above it
      // (measured: 1.5e-14 m^2 over 7.4e-5 m^2, vector_source_test [ocs]).
      s.area = (1.0 + 1e-9) * a.area_scale * (a.sweep / piece) * segment_area(a.radius, piece);
      s.width = a.stretch * 2.0 * a.radius * std::pow(std::sin(0.25 * piece), 2);  // r (1 - cos(piece / 2))
    } else {
      s.width = off_line(a.from, a.to, a.far);
      s.area = a.area_scale * segment_area(a.radius, a.sweep);
    }
    if (!(s.width > 0.0)) continue;  // a degenerate placement (a zero scale) draws no sliver
    if (transform != nullptr) {
      const double size = a.chain ? a.stretch * a.radius : (a.to - a.from).norm();
      double x[4] = {a.from.x(), a.to.x(), a.from.x() + size, a.from.x()};
      double y[4] = {a.from.y(), a.to.y(), a.from.y(), a.from.y() + size};
      if (!transform->Transform(4, x, y)) continue;  // outside the transformation: the feature fails too
      s.from = Vec2(x[0], y[0]);
      s.to = Vec2(x[1], y[1]);
      Mat2 jacobian;
      jacobian << x[2] - x[0], x[3] - x[0], y[2] - y[0], y[3] - y[0];
      jacobian /= size;
      s.area *= 1.01 * std::fabs(jacobian(0, 0) * jacobian(1, 1) - jacobian(0, 1) * jacobian(1, 0));
      s.width *= 1.01 * detail::largest_stretch(jacobian);
    }
    out.push_back(s);
  }
  return result;
}

// A feature drawn by an upright DXF entity (dxf_arcs.hpp) is refused: seen from above it is a
// line, and GDAL's projection of it is no zone. Matched by GDAL's EntityHandle field (for a
// block's entities, the INSERT's handle); a file without handles cannot say which feature
// holds the entity, so any feature read from it is refused, naming the entity's line.
void refuse_upright(const std::string& path, const std::vector<detail::DxfUpright>& upright, const std::string& handle) {
  for (const detail::DxfUpright& u : upright)
    if (u.handle.empty() || u.handle == handle)
      throw input_error(path + ":" + std::to_string(u.line) + ": " + u.type +
                        (u.handle.empty() ? std::string() : " (handle " + u.handle + ")") +
                        " is drawn in an upright plane (extrusion " + u.extrusion +
                        ", or an INSERT placing it so): seen from above it is a line, not an area; "
                        "draw the zone in the plan (extrusion 0, 0, 1 or 0, 0, -1)");
}

// A feature holding a HATCH whose boundary has an elliptical-arc or spline edge is refused like
// the ELLIPSE and SPLINE entities (read_features): GDAL strokes the edge into chords whose
// distance from the curve strewn does not know, so the error bound could not cover it (measured
// in the trial of issue 16: an elliptical edge accepted with a bound below the difference to the
// exact ellipse). Matched by handle as refuse_upright is.
void refuse_curved_edges(const std::string& path, const std::vector<detail::DxfCurvedEdge>& edges, const std::string& handle) {
  for (const detail::DxfCurvedEdge& e : edges)
    if (e.handle.empty() || e.handle == handle)
      throw input_error(path + ":" + std::to_string(e.line) + ": HATCH" +
                        (e.handle.empty() ? std::string() : " (handle " + e.handle + ")") + " has " +
                        (e.kind == "spline" ? "a spline" : "an elliptical-arc") + " boundary edge, which GDAL reads as a polyline whose distance from the curve strewn cannot "
                        "bound; draw the boundary with lines and circular arcs, or give the zone as a shape");
}

// The slivers of the loop's DXF arcs: an edge whose two ends are a single-chord arc's two ends
// (either way round, to rounding) adds that arc's segment; a loop with a chain's two ends among
// its vertices adds that chain's bound.
Slivers single_chord_slivers(const Loop& loop, const std::vector<SingleChordArc>& arcs) {
  Slivers out;
  if (arcs.empty()) return out;
  const auto tolerance = [](const Vec2& a, const Vec2& b) {
    return 1e-11 * (1.0 + std::max(a.cwiseAbs().maxCoeff(), b.cwiseAbs().maxCoeff())) + 1e-7 * (b - a).norm();
  };
  for (const Edge& e : loop) {
    if (e.kind != Edge::Kind::segment) continue;
    const double tol = tolerance(e.from, e.to);
    for (const SingleChordArc& a : arcs) {
      if (a.chain) continue;
      const bool same = (e.from - a.from).norm() <= tol && (e.to - a.to).norm() <= tol;
      const bool reversed = (e.from - a.to).norm() <= tol && (e.to - a.from).norm() <= tol;
      if (!same && !reversed) continue;
      out.area += a.area;
      out.width = std::max(out.width, a.width);
      break;
    }
  }
  for (const SingleChordArc& a : arcs) {
    if (!a.chain) continue;
    const auto has_vertex = [&](const Vec2& p) {
      const double tol = tolerance(p, p);
      return std::any_of(loop.begin(), loop.end(), [&](const Edge& e) { return (e.from - p).norm() <= tol; });
    };
    if (!has_vertex(a.from) || !has_vertex(a.to)) continue;
    out.area += a.area;
    out.width = std::max(out.width, a.width);
  }
  return out;
}

// The arc step GDAL strokes with while reading (degrees): the user's OGR_ARC_STEPSIZE, else 4.
double arc_step_degrees() {
  const char* v = CPLGetConfigOption("OGR_ARC_STEPSIZE", nullptr);
  const double step = v != nullptr ? std::atof(v) : 4.0;
  return step > 0.0 ? step : 4.0;
}

// The transformation from the layer's CRS into the site frame, or none (site metres).
std::unique_ptr<OGRCoordinateTransformation, TransformDeleter> site_transform(OGRLayer& layer, const std::string& path,
                                                                               const std::string& site_crs) {
  const OGRSpatialReference* layer_srs = layer.GetSpatialRef();
  // No CRS, or one of the GeoPackage's two "undefined" systems (srs_id -1 and 0, GeoPackage 1.3
  // section 1.1.2.1.2), which GDAL reports by name for layers written without a CRS.
  if (layer_srs == nullptr || layer_srs->IsEmpty()) return nullptr;
  if (const char* name = layer_srs->GetName();
      name != nullptr && layer_srs->GetAuthorityName(nullptr) == nullptr &&
      (std::string(name) == "Undefined geographic SRS" || std::string(name) == "Undefined Cartesian SRS"))
    return nullptr;
  const std::string layer_name = layer.GetName();
  if (site_crs.empty()) {
    const char* name = layer_srs->GetName();
    throw input_error(path + ": layer '" + layer_name + "' is in " + (name ? name : "a CRS") +
                      "; set site.crs (or site.origin) so that it can be transformed into the site frame");
  }
  OGRSpatialReference target;
  if (target.SetFromUserInput(site_crs.c_str()) != OGRERR_NONE)
    throw input_error("unknown CRS '" + site_crs + "' (GDAL: " + GdalScope::reason("not recognised") + ")");
  target.SetAxisMappingStrategy(OAMS_TRADITIONAL_GIS_ORDER);
  std::unique_ptr<OGRCoordinateTransformation, TransformDeleter> t(OGRCreateCoordinateTransformation(layer_srs, &target));
  if (!t)
    throw input_error(path + ": layer '" + layer_name + "': no transformation into the site CRS (" +
                      GdalScope::reason("PROJ found none") + ")");
  return t;
}

// A vertex farther than `most` metres from the site origin, in a local frame about site.origin:
// most likely an origin or a file with longitude and latitude swapped (the same refusal as the
// GeoJSON reader's, geojson_reader.cpp), which would otherwise put every zone thousands of
// kilometres away and report p = 0.
void refuse_far(const std::vector<PolygonLoops>& polygons, double most, const std::string& what) {
  for (const PolygonLoops& loops : polygons)
    for (const Loop& loop : loops)
      for (const Edge& e : loop)
        if (!(e.from.norm() <= most)) {
          char at[96];
          std::snprintf(at, sizeof at, "(%.0f, %.0f)", e.from.x(), e.from.y());
          throw input_error(what + ": position " + at + " m lies " + std::to_string(static_cast<long>(e.from.norm() / 1000)) +
                            " km from the site origin; check the origin and the axis order (longitude first)");
        }
}

// The reason a where filter fails: an attribute the layer lacks (with the nearest field names),
// found by reading the filter's identifiers outside quotes, else GDAL's own message. OGR SQL
// (GDAL's "OGR SQL dialect" page): 'text' literals, "quoted" identifiers, keywords and functions.
std::string filter_fault(const std::string& where, OGRFeatureDefn& defn) {
  const std::string gdal = GdalScope::reason("GDAL refuses the filter");
  std::vector<std::string> fields;
  for (int i = 0; i < defn.GetFieldCount(); ++i) fields.push_back(defn.GetFieldDefn(i)->GetNameRef());
  const auto upper = [](std::string t) {
    for (char& ch : t) ch = static_cast<char>(std::toupper(static_cast<unsigned char>(ch)));
    return t;
  };
  static const std::vector<std::string> kWords = {"AND", "OR", "NOT", "IN", "LIKE", "ILIKE", "IS", "NULL", "BETWEEN",
                                                  "ESCAPE", "TRUE", "FALSE", "CAST", "AS", "FID", "OGR_GEOMETRY",
                                                  "OGR_STYLE", "OGR_GEOM_WKT", "OGR_GEOM_AREA", "OGR_FID"};
  const auto known = [&](const std::string& id) {
    const std::string u = upper(id);
    if (std::find(kWords.begin(), kWords.end(), u) != kWords.end()) return true;
    return std::any_of(fields.begin(), fields.end(), [&](const std::string& f) { return upper(f) == u; });
  };
  const auto missing = [&](const std::string& id) {
    return "the layer has no attribute '" + id + "'" + did_you_mean(id, fields);
  };
  const auto is_word = [](char ch) { return std::isalnum(static_cast<unsigned char>(ch)) || ch == '_'; };
  std::size_t i = 0;
  while (i < where.size()) {
    const char ch = where[i];
    if (ch == '\'') {  // a text literal; '' inside is a quote
      for (++i; i < where.size(); ++i)
        if (where[i] == '\'' && !(i + 1 < where.size() && where[i + 1] == '\'' && (++i, true))) break;
      ++i;
    } else if (ch == '"') {
      const std::size_t end = where.find('"', i + 1);
      if (end == std::string::npos) break;
      const std::string id = where.substr(i + 1, end - i - 1);
      if (!known(id)) return missing(id);
      i = end + 1;
    } else if (std::isdigit(static_cast<unsigned char>(ch)) || ch == '.') {
      while (i < where.size() && (is_word(where[i]) || where[i] == '.')) ++i;
    } else if (is_word(ch)) {
      const std::size_t start = i;
      while (i < where.size() && is_word(where[i])) ++i;
      const std::string id = where.substr(start, i - start);
      std::size_t next = i;
      while (next < where.size() && std::isspace(static_cast<unsigned char>(where[next]))) ++next;
      const bool function = next < where.size() && where[next] == '(';
      if (!function && !known(id)) return missing(id);
    } else {
      ++i;
    }
  }
  return gdal;
}

// GDAL 3.6 reads DXF arcs, circles and ellipses as line strings, one vertex every
// OGR_ARC_STEPSIZE degrees (default 4: a chord error of r (1 - cos 2 deg) = 6.1e-4 r). Unless the
// user set it, strewn asks for 0.25 degrees while it reads (r (1 - cos 0.125 deg) = 2.4e-6 r,
// 0.024 mm on a 10 m circle); the slivers between arcs and chords enter the error bound
// (stroked_arc_slivers).
class FineArcSteps {
 public:
  FineArcSteps() : set_(CPLGetConfigOption("OGR_ARC_STEPSIZE", nullptr) == nullptr) {
    if (set_) CPLSetThreadLocalConfigOption("OGR_ARC_STEPSIZE", "0.25");
  }
  ~FineArcSteps() {
    if (set_) CPLSetThreadLocalConfigOption("OGR_ARC_STEPSIZE", nullptr);
  }
  FineArcSteps(const FineArcSteps&) = delete;
  FineArcSteps& operator=(const FineArcSteps&) = delete;

 private:
  bool set_;
};

std::vector<VectorFeature> read_features(const std::string& path, const VectorQuery& query) {
  GdalScope gdal;
  FineArcSteps steps;
  Dataset d = open_vector(path);
  OGRLayer* layer = choose_layer(*d, path, query.layer);
  const std::string layer_name = layer->GetName();
  const std::string where_it_is = path + ": layer '" + layer_name + "'";
  if (!query.where.empty() && layer->SetAttributeFilter(query.where.c_str()) != OGRERR_NONE)
    throw input_error(where_it_is + ": where \"" + quoted_excerpt(query.where) + "\": " +
                      filter_fault(query.where, *layer->GetLayerDefn()));
  const auto transform = site_transform(*layer, path, query.site_crs);
  OGRFeatureDefn* defn = layer->GetLayerDefn();
  const int name_index = defn->GetFieldIndex(query.name_field.c_str());
  // DXF: GDAL strokes curved entities into line strings. Circles and circular arcs are recognised
  // and their chords' slivers bounded (stroked_arc_slivers; an arc under one step, a single
  // chord, from the file's own arcs: single_chord_slivers); ellipses and splines are refused.
  const bool dxf = d->GetDriver() != nullptr && std::string(d->GetDriver()->GetDescription()) == "DXF";
  const int subclasses_index = dxf ? defn->GetFieldIndex("SubClasses") : -1;
  const int handle_index = dxf ? defn->GetFieldIndex("EntityHandle") : -1;
  const double step_deg = arc_step_degrees();
  const FileArcs file_arcs = dxf ? single_chord_arcs(path, step_deg, transform.get()) : FileArcs{};
  const std::vector<SingleChordArc>& small_arcs = file_arcs.arcs;

  std::vector<VectorFeature> out;
  std::vector<std::string> names;  // of the features passing `where`, for did-you-mean
  layer->ResetReading();
  for (OGRFeatureUniquePtr f(layer->GetNextFeature()); f; f.reset(layer->GetNextFeature())) {
    VectorFeature v;
    v.fid = f->GetFID();
    const std::string fid_text = std::to_string(v.fid);
    v.name = name_index >= 0 && f->IsFieldSetAndNotNull(name_index) ? f->GetFieldAsString(name_index)
                                                                    : layer_name + " fid " + fid_text;
    names.push_back(v.name);
    if (!query.feature.empty() && v.name != query.feature && fid_text != query.feature) continue;
    if (query.fid && v.fid != *query.fid) continue;
    for (int i = 0; i < defn->GetFieldCount(); ++i)
      v.attributes.emplace_back(defn->GetFieldDefn(i)->GetNameRef(),
                                f->IsFieldSetAndNotNull(i) ? f->GetFieldAsString(i) : std::string());
    const std::string what = where_it_is + ": feature '" + v.name + "' (fid " + fid_text + ")";
    const std::string handle =
        handle_index >= 0 && f->IsFieldSetAndNotNull(handle_index) ? f->GetFieldAsString(handle_index) : "";
    if (dxf && !file_arcs.upright.empty()) refuse_upright(path, file_arcs.upright, handle);
    if (dxf && !file_arcs.curved_edges.empty()) refuse_curved_edges(path, file_arcs.curved_edges, handle);
    OGRGeometry* g = f->GetGeometryRef();
    if (g == nullptr) throw input_error(what + " has no geometry");
    if (transform && g->transform(transform.get()) != OGRERR_NONE)
      throw input_error(what + ": cannot be transformed into the site CRS (" +
                        GdalScope::reason("outside the transformation's domain") + ")");
    if (subclasses_index >= 0 && f->IsFieldSetAndNotNull(subclasses_index)) {
      const std::string sub = f->GetFieldAsString(subclasses_index);
      for (const char* curve : {"AcDbEllipse", "AcDbSpline"})
        if (sub.find(curve) != std::string::npos)
          throw input_error(what + " is a DXF " + (std::string(curve) == "AcDbEllipse" ? "ellipse" : "spline") +
                            ", which GDAL reads as a polyline whose distance from the curve strewn cannot bound; "
                            "draw it as a closed polyline, or give the zone as a shape (shape = \"ellipse\")");
    }
    std::vector<PolygonLoops> polygons;
    Slivers slivers;
    collect(*g, what, polygons, slivers.area);
    if (transform && query.max_distance_from_origin) refuse_far(polygons, *query.max_distance_from_origin, what);
    if (dxf)
      for (const PolygonLoops& loops : polygons)
        for (const Loop& loop : loops) {
          for (const Slivers& s : {stroked_arc_slivers(loop, step_deg), single_chord_slivers(loop, small_arcs)}) {
            slivers.area += s.area;
            slivers.width = std::max(slivers.width, s.width);
          }
        }
    v.region = region_from_polygon_loops(std::move(polygons), what);
    v.region.approximation_area += slivers.area;
    v.region.approximation_width = std::max(v.region.approximation_width, slivers.width);
    if (!transform && query.unframed_metres_per_unit != 1.0)
      v.region = transformed(v.region, query.unframed_metres_per_unit * Mat2::Identity(), Vec2::Zero());
    out.push_back(std::move(v));
  }
  // Some drivers (GeoPackage) check a filter only when reading: the read then stops with an error.
  if (!query.where.empty() && GdalScope::failed())
    throw input_error(where_it_is + ": where \"" + quoted_excerpt(query.where) + "\": " +
                      filter_fault(query.where, *defn));
  // A name shared by several features would merge them into one zone unasked (issue 16); a
  // where filter says the user wants what it selects.
  if (!query.feature.empty() && !query.fid && query.where.empty() && out.size() > 1) {
    std::string fids;
    for (const VectorFeature& v : out) fids += (fids.empty() ? "" : ", ") + std::to_string(v.fid);
    throw input_error(where_it_is + ": " + std::to_string(out.size()) + " features are named '" + query.feature +
                      "' (fids " + fids + "): give feature = FID or a where filter");
  }
  if (query.fid && out.empty())
    throw input_error(where_it_is + ": no feature with id " + std::to_string(*query.fid) +
                      (query.where.empty() ? "" : " passing the where filter"));
  if (!query.feature.empty() && out.empty())
    throw input_error(where_it_is + ": no feature named '" + query.feature + "'" +
                      (query.where.empty() ? "" : " passing the where filter") + did_you_mean(query.feature, names));
  if (out.empty())
    throw input_error(where_it_is + (query.where.empty() ? ": no features" : ": no feature passes where \"" +
                                                                                 quoted_excerpt(query.where) + "\""));
  return out;
}

}  // namespace

std::vector<VectorFeature> read_vector_features(const std::string& path, const VectorQuery& query) {
  return read_features(path, query);
}

std::vector<std::string> vector_source_files(const std::string& path) {
  GdalScope gdal;
  Dataset d = open_vector(path);
  std::vector<std::string> files;
  char** list = d->GetFileList();
  for (char** f = list; f != nullptr && *f != nullptr; ++f) files.emplace_back(*f);
  CSLDestroy(list);
  return files;
}

Region region_from_vector_source(const std::string& path, const VectorQuery& query) {
  std::vector<VectorFeature> features = read_features(path, query);
  if (features.size() == 1) return std::move(features.front().region);
  // Several features make one zone: their loops together, each feature's outer loops
  // counter-clockwise and holes clockwise already. Checked as one region: crossing features are
  // invalid, and a feature inside another (or in its hole) would change the nesting, which
  // normalisation then shows as a loop whose orientation flips.
  Region together;
  std::string names;
  for (VectorFeature& f : features) {
    names += (names.empty() ? "" : ", ") + f.name;
    for (Loop& loop : f.region.loops) together.loops.push_back(std::move(loop));
    together.approximation_area += f.region.approximation_area;  // stroked DXF arcs
    together.approximation_width = std::max(together.approximation_width, f.region.approximation_width);
    together.vertex_move = std::max(together.vertex_move, f.region.vertex_move);
  }
  const std::string what = path + ": features " + quoted_excerpt(names);
  const Validity v = check_validity(together);
  if (!v.valid) throw input_error(what + ": " + v.fault + " (features that overlap cannot make one zone)");
  Region n = normalised(together);
  for (std::size_t i = 0; i < n.loops.size(); ++i)
    if ((signed_area(n.loops[i]) > 0) != (signed_area(together.loops[i]) > 0))
      throw input_error(what + ": one feature lies inside another; features that overlap cannot make one zone");
  return n;
}

}  // namespace strewn
