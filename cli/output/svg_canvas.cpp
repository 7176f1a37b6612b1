#include "output/svg_canvas.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <fmt/format.h>

#include "output/palette.hpp"
#include "output/plan_features.hpp"
#include "strewn/barrier.hpp"
#include "strewn/constants.hpp"
#include "strewn/region_builders.hpp"
#include "strewn/region_ops.hpp"

namespace strewn::cli {
namespace {

constexpr double kPanelGap = 30.0, kBottomAxis = 40.0, kNoteLine = 14.0, kNoteFont = 10.5, kLegendFont = 10.5;
constexpr double kTitleFont = 16.0, kSubtitleFont = 11.5, kTickFont = 10.0;

// Ticks at round values ({1, 2, 2.5, 5} x 10^k in the unit of `lo` and `hi`) with at least
// `min_px` between them; `px_per_unit` pixels per that unit.
struct Ticks {
  std::vector<double> at;
  int decimals = 0;
};

Ticks round_ticks(double lo, double hi, double px_per_unit, double min_px) {
  Ticks t;
  const double raw = std::max(min_px / px_per_unit, 1e-12);
  const double k = std::floor(std::log10(raw));
  double step = 0.0;
  for (double e = k; e <= k + 1 && step == 0.0; ++e)
    for (double m : {1.0, 2.0, 2.5, 5.0})
      if (step == 0.0 && m * std::pow(10.0, e) >= raw) {
        step = m * std::pow(10.0, e);
        t.decimals = std::max(0, static_cast<int>(-e) + (m == 2.5 ? 1 : 0));
      }
  for (double v = std::ceil(lo / step) * step; v <= hi + 1e-9 * step; v += step) t.at.push_back(std::fabs(v) < 1e-9 * step ? 0.0 : v);
  return t;
}

// Ticks along [lo, hi] (site metres, `px_per_m` pixels per metre), valued in `unit`.
Ticks unit_ticks(double lo, double hi, double px_per_m, LengthUnit unit, double min_px) {
  const double mpu = metres_per(unit);
  return round_ticks(lo / mpu, hi / mpu, px_per_m * mpu, min_px);
}

}  // namespace

std::string SvgCanvas::escape(const std::string& s) {
  std::string out;
  for (char c : s) {
    if (c == '&') out += "&amp;";
    else if (c == '<') out += "&lt;";
    else if (c == '>') out += "&gt;";
    else if (c == '"') out += "&quot;";
    else out += c;
  }
  return out;
}

double SvgCanvas::text_width(const std::string& text, double font_px) {
  // Advance widths of DejaVu Sans in em, rounded up by class (it is wider than Liberation Sans
  // or Arial, so the estimate also holds for those).
  double em = 0.0;
  for (unsigned char c : text) {
    if ((c & 0xC0) == 0x80) continue;  // UTF-8 continuation byte
    if (c >= 0x80) em += 0.8;
    else if (c == ' ') em += 0.33;
    else if (std::string("il.,:;'|!`").find(static_cast<char>(c)) != std::string::npos) em += 0.32;
    else if (std::string("ftrj()[]{}-/\\\"").find(static_cast<char>(c)) != std::string::npos) em += 0.45;
    else if (c == 'm' || c == 'w' || c == 'M' || c == 'W') em += 1.0;
    else if (c >= 'A' && c <= 'Z') em += 0.78;
    else if (c >= '0' && c <= '9') em += 0.65;
    else if (c >= 'a' && c <= 'z') em += 0.63;
    else em += 0.85;
  }
  return em * font_px + 1.0;
}

std::string SvgCanvas::probability(double p) {
  if (!(p > 0.0)) return "0";
  int e = static_cast<int>(std::floor(std::log10(p)));
  double m = std::round(p / std::pow(10.0, e) * 10.0) / 10.0;
  if (m >= 10.0) {
    m /= 10.0;
    ++e;
  }
  return m == 1.0 ? fmt::format("1e{}", e) : fmt::format("{:g}e{}", m, e);
}

double SvgCanvas::round_step(double span, int ticks) {
  const double raw = span / ticks;
  if (!(raw > 0.0) || !std::isfinite(raw)) return 1.0;
  const double decade = std::pow(10.0, std::floor(std::log10(raw)));
  return decade * (raw / decade <= 1.0 ? 1.0 : raw / decade <= 2.0 ? 2.0 : raw / decade <= 5.0 ? 5.0 : 10.0);
}

std::string SvgCanvas::fixed(double v, int decimals) {
  std::string s = fmt::format("{:.{}f}", v, std::max(0, decimals));
  if (s.find_first_not_of("-0.") == std::string::npos) s = fmt::format("{:.{}f}", 0.0, std::max(0, decimals));  // no "-0"
  return s;
}

SvgCanvas::SvgCanvas(const BoundingBox& world, std::string title, std::string subtitle, LengthUnit unit, double plan_px)
    : world_(world), unit_(unit), title_(std::move(title)), subtitle_(std::move(subtitle)) {
  const double w = std::max(world.max.x() - world.min.x(), 1e-9), h = std::max(world.max.y() - world.min.y(), 1e-9);
  scale_ = plan_px / std::max(w, h);
  plan_w_ = w * scale_;
  plan_h_ = h * scale_;
  // The left margin holds the widest y tick label and the rotated axis title.
  const Ticks ty = unit_ticks(world.min.y(), world.max.y(), scale_, unit_, 36.0);
  double widest = 0.0;
  for (double v : ty.at) widest = std::max(widest, text_width(fixed(v, ty.decimals), kTickFont));
  left_ = std::max(56.0, widest + 34.0);
  const double width = left_ + plan_w_ + kPanelGap + panel_w_ + 10;
  double y_text = 8.0;
  for (const std::string& line : wrap(title_, kTitleFont, width - 24)) {
    y_text += kTitleFont * 1.25;
    head_ += fmt::format("<text class=\"title\" x=\"12\" y=\"{:.1f}\" font-size=\"{}\" font-weight=\"bold\">{}</text>\n", y_text,
                         kTitleFont, escape(line));
  }
  for (const std::string& line : wrap(subtitle_, kSubtitleFont, width - 24)) {
    y_text += kSubtitleFont * 1.35;
    head_ += fmt::format("<text class=\"subtitle\" x=\"12\" y=\"{:.1f}\" font-size=\"{}\">{}</text>\n", y_text, kSubtitleFont,
                         escape(line));
  }
  top_ = y_text + 16.0;
  panel_x_ = left_ + plan_w_ + kPanelGap;
  panel_y_ = top_;
}

double SvgCanvas::x(double wx) const { return left_ + (wx - world_.min.x()) * scale_; }
double SvgCanvas::y(double wy) const { return top_ + (world_.max.y() - wy) * scale_; }

std::vector<std::string> SvgCanvas::wrap(const std::string& text, double font_px, double width) const {
  std::vector<std::string> lines;
  std::string line, word;
  const auto flush_word = [&] {
    if (word.empty()) return;
    if (!line.empty() && text_width(line + " " + word, font_px) > width) {
      lines.push_back(line);
      line.clear();
    }
    line += (line.empty() ? "" : " ") + word;
    word.clear();
  };
  for (char c : text) {
    if (c == ' ' || c == '\n') flush_word();
    else word += c;
  }
  flush_word();
  if (!line.empty()) lines.push_back(line);
  return lines;
}

bool SvgCanvas::free(const Box& b) const {
  if (b.x0 < left_ + 1 || b.x1 > left_ + plan_w_ - 1 || b.y0 < top_ + 1 || b.y1 > top_ + plan_h_ - 1) return false;
  return std::none_of(taken_.begin(), taken_.end(), [&](const Box& o) {
    return b.x0 < o.x1 && o.x0 < b.x1 && b.y0 < o.y1 && o.y0 < b.y1;
  });
}

void SvgCanvas::text_at(double px, double py, const std::string& text, double font_px, const std::string& attrs) {
  body_ += fmt::format("<text x=\"{:.2f}\" y=\"{:.2f}\" font-size=\"{}\" {}>{}</text>\n", px, py, font_px, attrs, escape(text));
}

bool SvgCanvas::plan_label(const Vec2& at, const std::string& text, double font_px, const std::string& attrs, bool centred,
                           bool may_move, const BoundingBox* home) {
  const double w = text_width(text, font_px), asc = 0.96 * font_px, desc = 0.28 * font_px, pad = 1.5;
  const double ax = x(at.x()), ay = y(at.y());
  // Candidate baselines: beside the anchor first, then rings further out in eight directions.
  std::vector<std::pair<double, double>> tries;
  if (centred) tries.push_back({ax - w / 2, ay + (asc - desc) / 2});
  else tries.push_back({ax + 5, ay - 5});
  // Past the plan's right edge (a zone at the edge of the map): slid left to end at the edge,
  // above the anchor and just below it, before the rings further out (which put a keep-out
  // zone's label 1.4 m off it, over another area's hatching).
  const double right = left_ + plan_w_ - 2 - pad;
  if (may_move && tries.front().first + w > right) {
    const double bx = std::max(right - w, left_ + 2 + pad);
    tries.push_back({bx, ay - 5});
    tries.push_back({bx, ay + asc + 5});
  }
  const std::pair<double, double> first = tries.front();
  if (may_move)
    for (int ring = 1; ring <= 12; ++ring) {
      const double step = ring * (asc + desc + 2);
      for (const auto& [dx, dy] : std::initializer_list<std::pair<double, double>>{
               {0, -1}, {0, 1}, {1, 0}, {-1, 0}, {1, -1}, {-1, -1}, {1, 1}, {-1, 1}})
        tries.push_back({first.first + dx * std::max(step, w / 2 * (ring > 3 ? 1.0 : 0.5) * std::fabs(dx)),
                         first.second + dy * step});
    }
  for (const auto& [bx, by] : tries) {
    const Box b{bx - pad, by - asc - pad, bx + w + pad, by + desc + pad};
    if (!free(b)) continue;
    taken_.push_back(b);
    const double cx = (b.x0 + b.x1) / 2, cy = (b.y0 + b.y1) / 2;
    // Moved off its anchor, for a label that names a shape (a zone's label pushed aside by the
    // plan's edge sat over another zone's hatching, its end just inside its own zone's box), or
    // moved far: a leader line to the anchor.
    const double grow = 8.0;
    const bool off_home = home && !(ax >= b.x0 - grow && ax <= b.x1 + grow && ay >= b.y0 - grow && ay <= b.y1 + grow);
    if (off_home || std::hypot(cx - ax, cy - ay) > 2.5 * (asc + desc) + w / 2) {
      const double lx = std::clamp(ax, b.x0, b.x1), ly = std::clamp(ay, b.y0, b.y1);
      body_ += fmt::format("<path d=\"M{:.2f},{:.2f} L{:.2f},{:.2f}\" stroke=\"{}\" stroke-width=\"0.7\" fill=\"none\"/>\n", ax, ay,
                           lx, ly, palette::grey());
    }
    text_at(bx, by, text, font_px, attrs + " paint-order=\"stroke\" stroke=\"white\" stroke-width=\"3\" stroke-linejoin=\"round\"");
    return true;
  }
  return false;
}

void SvgCanvas::cell(const Vec2& lo, const Vec2& hi, const std::string& fill) {
  // Half a pixel of overlap so that renderers leave no seams between neighbouring cells.
  body_ += fmt::format("<rect x=\"{:.2f}\" y=\"{:.2f}\" width=\"{:.2f}\" height=\"{:.2f}\" fill=\"{}\"/>\n", x(lo.x()),
                       y(hi.y()), (hi.x() - lo.x()) * scale_ + 0.5, (hi.y() - lo.y()) * scale_ + 0.5, fill);
}

void SvgCanvas::polyline(const std::vector<Vec2>& points, bool closed, const std::string& style) {
  std::string d;
  for (std::size_t k = 0; k < points.size(); ++k) d += fmt::format("{}{:.2f},{:.2f} ", k == 0 ? "M" : "L", x(points[k].x()), y(points[k].y()));
  if (closed) d += "Z";
  body_ += fmt::format("<path d=\"{}\" fill=\"none\" {}/>\n", d, style);
}

void SvgCanvas::area(const Region& region, const std::string& style) {
  std::string d;
  for (const Loop& loop : polygonised(region, 1e-3 * std::max(world_.max.x() - world_.min.x(), 1e-9)).loops) {
    for (std::size_t k = 0; k < loop.size(); ++k) d += fmt::format("{}{:.2f},{:.2f} ", k == 0 ? "M" : "L", x(loop[k].from.x()), y(loop[k].from.y()));
    d += "Z ";
  }
  if (!d.empty()) body_ += fmt::format("<path d=\"{}\" fill-rule=\"evenodd\" {}/>\n", d, style);
}

void SvgCanvas::zones(const Site& s, const std::vector<Verdict>& verdicts) {
  body_ += "<g id=\"zones\" fill=\"none\">\n";
  std::string labels;
  for (std::size_t k = 0; k < s.zones.size(); ++k) {
    const Zone& z = s.zones[k];
    const Verdict v = k < verdicts.size() ? verdicts[k] : Verdict::no_limit;
    const BoundingBox b = bounds(z.region);
    const Region poly = polygonised(z.region, 1e-3 * std::max((b.max - b.min).norm(), 1e-9));
    const std::string colour = v == Verdict::exceeded ? palette::alarm() : v == Verdict::not_shown ? palette::doubt()
                               : v == Verdict::holds  ? palette::safe()
                                                      : palette::ink();
    const std::string dash = z.role == Role::target ? "" : z.role == Role::keep_out ? " stroke-dasharray=\"8 4\"" : " stroke-dasharray=\"2 3\"";
    const std::string style = fmt::format("stroke=\"{}\" stroke-width=\"{}\"{} class=\"zone {}\"", colour,
                                          v == Verdict::exceeded ? 3.0 : 2.0, dash, to_string(z.role));
    for (const Loop& loop : poly.loops) {
      std::vector<Vec2> pts;
      for (const Edge& e : loop) pts.push_back(e.from);
      // A zone without a limit is drawn in ink, which the ramp's darkest cells hide (a target
      // zone about the mean was almost invisible): on a white halo.
      if (v == Verdict::no_limit) polyline(pts, true, "stroke=\"white\" stroke-width=\"4\" stroke-opacity=\"0.85\" class=\"halo\"");
      polyline(pts, true, style);
    }
  }
  body_ += "</g>\n";
}

namespace {

// Where a zone's label stands: its bounding box's top-left corner, or, for a zone of straight
// edges whose corner there is cut off (a lawn with a bevelled corner), its vertex nearest that
// corner, so that the label stays on the zone's own outline. Curved zones keep the box's corner
// (a disk's label sits just above it).
Vec2 label_anchor(const Region& r, const BoundingBox& b) {
  const Vec2 corner(b.min.x(), b.max.y());
  Vec2 best = corner;
  double nearest = std::numeric_limits<double>::infinity();
  for (const Loop& l : r.loops)
    for (const Edge& e : l) {
      if (e.kind == Edge::Kind::arc) return corner;
      if ((e.from - corner).norm() < nearest) nearest = (e.from - corner).norm(), best = e.from;
    }
  const double diagonal = (b.max - b.min).norm();
  return nearest > 0.05 * diagonal ? best : corner;
}

}  // namespace

void SvgCanvas::zone_labels(const Site& s, const std::vector<Verdict>& verdicts) {
  body_ += "<g id=\"zone-labels\">\n";
  for (std::size_t k = 0; k < s.zones.size(); ++k) {
    const Zone& z = s.zones[k];
    const Verdict v = k < verdicts.size() ? verdicts[k] : Verdict::no_limit;
    const BoundingBox b = bounds(z.region);
    const char* word = v == Verdict::exceeded ? ": limit exceeded" : v == Verdict::not_shown ? ": not shown to hold"
                       : v == Verdict::holds  ? ": limit holds"
                                              : "";
    const std::string colour = v == Verdict::exceeded ? palette::alarm() : v == Verdict::not_shown ? palette::doubt()
                               : v == Verdict::holds  ? palette::safe()
                                                      : palette::ink();
    plan_label(label_anchor(z.region, b), z.name + word, 11, fmt::format("fill=\"{}\" class=\"zone-label\"", colour), false,
               true, &b);
  }
  body_ += "</g>\n";
}

void SvgCanvas::sources(const Site& s, bool with_spread) {
  body_ += "<g id=\"sources\">\n";
  const std::string mark = palette::alarm();
  for (const Source& src : s.sources) {
    // Aim: a cross; mean impact point: a dot; the core's 1- and 2-sigma ellipses (Mahalanobis
    // radius 1 and 2) and, dashed, the circle of radius CEP about the mean.
    // The spread's rings are a shape, not a verdict: ink on a white halo (visible on the ramp's
    // dark and light ends alike), so that red stays the unsafe area's and the exceeded limits'
    // (four concentric red rings were hard to tell from the limit line).
    const Gaussian& core = src.model.components().front().gaussian;
    if (with_spread) {
      const auto ring_pair = [&](const std::vector<Vec2>& ring, const std::string& dash) {
        polyline(ring, true, "stroke=\"white\" stroke-width=\"2.6\" stroke-opacity=\"0.85\" class=\"halo\"");
        polyline(ring, true, fmt::format("stroke=\"{}\" stroke-width=\"1\"{} class=\"spread-ring\"", palette::ink(), dash));
      };
      for (double k : {1.0, 2.0}) {
        std::vector<Vec2> ring;
        for (int t = 0; t < 72; ++t)
          ring.push_back(core.mean() + k * core.cholesky() * Vec2(std::cos(t * kPi / 36), std::sin(t * kPi / 36)));
        ring_pair(ring, "");
      }
      const SpreadAxes a = core.axes();
      // The family's median radius (sqrt(2 ln 2) for the normal) on the geometric-mean sigma.
      const double cep_circular = core.family().radius_quantile(0.5) * std::sqrt(a.sigma_major * a.sigma_minor);
      std::vector<Vec2> cep;
      for (int t = 0; t < 72; ++t) cep.push_back(core.mean() + cep_circular * Vec2(std::cos(t * kPi / 36), std::sin(t * kPi / 36)));
      ring_pair(cep, " stroke-dasharray=\"3 3\"");
    }
    body_ += fmt::format("<path d=\"M{:.2f},{:.2f} l10,10 m0,-10 l-10,10\" transform=\"translate(-5,-5)\" stroke=\"{}\" stroke-width=\"1.8\"/>\n",
                         x(src.aim.x()), y(src.aim.y()), mark);
    body_ += fmt::format("<circle cx=\"{:.2f}\" cy=\"{:.2f}\" r=\"3\" fill=\"{}\"/>\n", x(core.mean().x()), y(core.mean().y()), mark);
  }
  body_ += "</g>\n";
}

void SvgCanvas::barriers(const Site& s) {
  bool any_position = false;
  for (const Source& src : s.sources) any_position = any_position || !src.positions.empty();
  if (s.barriers.empty() && !any_position) return;
  body_ += "<g id=\"barriers\">\n";
  // Lines rising to the right, across the unsafe areas' (map_output.cpp), which fall to the right:
  // where the two overlap they cross instead of running together.
  defs_ += fmt::format("<pattern id=\"shadow-hatch\" width=\"6\" height=\"6\" patternUnits=\"userSpaceOnUse\" "
                       "patternTransform=\"rotate(-45)\"><path d=\"M3,0 v6\" stroke=\"{}\" stroke-width=\"1\"/></pattern>\n",
                       palette::grey());
  for (const ShadowFeature& f : plan_shadows(s, {world_.min, world_.max})) {
    area(f.area, fmt::format("class=\"shadow\" data-barrier=\"{}\" data-source=\"{}\" fill=\"url(#shadow-hatch)\" "
                             "stroke=\"none\"", escape(f.barrier), escape(f.source)));
    area(f.area, fmt::format("fill=\"{}\" fill-opacity=\"0.10\" stroke=\"none\"", palette::grey()));
  }
  for (const Barrier& b : s.barriers)
    polyline(b.points, false, fmt::format("class=\"barrier\" data-name=\"{}\" stroke=\"{}\" stroke-width=\"4\" "
                                          "stroke-linecap=\"round\" stroke-linejoin=\"round\"",
                                          escape(b.name), palette::ink()));
  // Where each thrower stands: a triangle; a throwing line: a line between its ends.
  for (const Source& src : s.sources) {
    if (src.positions.empty()) continue;
    if (src.thrower && src.thrower->line_end)
      polyline({src.thrower->position, *src.thrower->line_end}, false,
               fmt::format("class=\"throwing-line\" stroke=\"{}\" stroke-width=\"2.5\"", palette::alarm()));
    const Vec2 p = src.thrower ? src.thrower->position : src.positions.front();
    if (!(src.thrower && src.thrower->line_end))
      body_ += fmt::format("<path class=\"standing-point\" d=\"M{:.2f},{:.2f} l6,10 h-12 z\" transform=\"translate(0,-6)\" "
                           "fill=\"none\" stroke=\"{}\" stroke-width=\"1.8\"/>\n",
                           x(p.x()), y(p.y()), palette::alarm());
  }
  body_ += "</g>\n";
  // A barrier's label at its upper end, beside the line (at its middle it crossed the line and
  // the spread's rings of a thrower behind it, in a new user's trial); a standing point's at its
  // triangle, which was unlabelled (the source's name sits at its aim).
  for (const Barrier& b : s.barriers) {
    Vec2 end = b.points.front();
    for (const Vec2& p : b.points)
      if (p.y() > end.y() || (p.y() == end.y() && p.x() > end.x())) end = p;
    plan_label(end, fmt::format("{} (catch {:g})", b.name, b.catch_share), 10, fmt::format("fill=\"{}\"", palette::ink()));
  }
  for (const Source& src : s.sources) {
    if (src.positions.empty() || !src.thrower) continue;
    plan_label(src.thrower->position, src.name + (src.thrower->line_end ? ": throwing line" : ": stands here"), 10,
               fmt::format("fill=\"{}\"", palette::alarm()));
  }
}

void SvgCanvas::drops(const Site& s) {
  const std::vector<DropFeature> drops = plan_drops(s);
  if (drops.empty()) return;
  body_ += "<g id=\"drops\">\n";
  for (const DropFeature& d : drops) {
    // The track clipped to the plan; its label halfway along the part ahead of the release.
    Vec2 a = d.track_start, b = d.track_end;
    const bool seen = clip_segment(a, b, {world_.min, world_.max});
    if (seen)
      polyline({a, b}, false,
               fmt::format("class=\"flight-track\" data-source=\"{}\" stroke=\"{}\" stroke-width=\"1.5\" stroke-dasharray=\"8 4\"",
                           escape(d.source), palette::ink()));
    Vec2 r = d.release, l = d.landing;
    if (clip_segment(r, l, {world_.min, world_.max}))
      polyline({r, l}, false,
               fmt::format("class=\"fall\" data-source=\"{}\" stroke=\"{}\" stroke-width=\"1\" stroke-dasharray=\"2 3\"",
                           escape(d.source), palette::alarm()));
    const bool on_plan = (d.release.array() >= world_.min.array()).all() && (d.release.array() <= world_.max.array()).all();
    if (on_plan) {
      body_ += fmt::format("<circle class=\"release-point\" data-source=\"{}\" cx=\"{:.2f}\" cy=\"{:.2f}\" r=\"5\" fill=\"none\" "
                           "stroke=\"{}\" stroke-width=\"2\"/>\n",
                           escape(d.source), x(d.release.x()), y(d.release.y()), palette::alarm());
      plan_label(d.release, d.release_label, 10, fmt::format("fill=\"{}\" class=\"release-label\"", palette::alarm()));
    }
    if (seen) plan_label(0.5 * (d.release + b), d.track_label, 9, fmt::format("fill=\"{}\" class=\"track-label\"", palette::ink()));
  }
  body_ += "</g>\n";
}

void SvgCanvas::legend_drops(const Site& s) {
  if (plan_drops(s).empty()) return;
  legend_line(fmt::format("stroke=\"{}\" stroke-width=\"1.5\" stroke-dasharray=\"8 4\"", palette::ink()),
              "Flight track of a drop (one fall time before and after release)");
  legend_mark(fmt::format("<circle cx=\"13\" cy=\"6\" r=\"5\" fill=\"none\" stroke=\"{}\" stroke-width=\"2\"/>", palette::alarm()),
              "Release point, dotted to the nominal landing");
}

void SvgCanvas::legend_barriers(const Site& s) {
  bool any_position = false, line = false;
  for (const Source& src : s.sources) {
    any_position = any_position || !src.positions.empty();
    line = line || (src.thrower && src.thrower->line_end);
  }
  if (!s.barriers.empty()) {
    legend_line(fmt::format("stroke=\"{}\" stroke-width=\"4\"", palette::ink()), "Barrier (net, fence, wall), with its catch");
    legend_fill("fill=\"url(#shadow-hatch)\" stroke=\"none\"",
                "Barrier's shadow: impacts whose straight ground path from the source crosses it");
  }
  if (any_position)
    legend_mark(fmt::format("<path d=\"M13,0 l6,10 h-12 z\" fill=\"none\" stroke=\"{}\" stroke-width=\"1.8\"/>", palette::alarm()),
                "Where the thrower stands");
  if (line) legend_line(fmt::format("stroke=\"{}\" stroke-width=\"2.5\"", palette::alarm()), "Throwing line (stands anywhere on it)");
}

void SvgCanvas::source_labels(const Site& s) {
  body_ += "<g id=\"source-labels\">\n";
  for (const Source& src : s.sources)
    plan_label(src.aim, src.name, 10, fmt::format("fill=\"{}\" class=\"source-label\"", palette::alarm()));
  body_ += "</g>\n";
}

void SvgCanvas::axes(bool has_origin, bool grid_of_crs) {
  const std::string ink = palette::ink(), grey = palette::grey();
  std::string a = "<g id=\"axes\">\n";
  a += fmt::format("<rect x=\"{:.2f}\" y=\"{:.2f}\" width=\"{:.2f}\" height=\"{:.2f}\" fill=\"none\" stroke=\"{}\"/>\n", left_, top_,
                   plan_w_, plan_h_, grey);
  double widest = 0.0;
  const double mpu = metres_per(unit_);
  const Ticks probe = unit_ticks(world_.min.x(), world_.max.x(), scale_, unit_, 40.0);
  for (double v : probe.at) widest = std::max(widest, text_width(fixed(v, probe.decimals), kTickFont));
  const Ticks tx = unit_ticks(world_.min.x(), world_.max.x(), scale_, unit_, std::max(40.0, widest + 12));
  for (double v : tx.at) {
    a += fmt::format("<path d=\"M{0:.2f},{1:.2f} v5\" stroke=\"{2}\"/><text class=\"tick\" x=\"{0:.2f}\" y=\"{3:.2f}\" "
                     "font-size=\"{4}\" text-anchor=\"middle\" fill=\"{5}\">{6}</text>\n",
                     x(v * mpu), top_ + plan_h_, grey, top_ + plan_h_ + 16, kTickFont, ink, fixed(v, tx.decimals));
  }
  const Ticks ty = unit_ticks(world_.min.y(), world_.max.y(), scale_, unit_, 36.0);
  for (double v : ty.at)
    a += fmt::format("<path d=\"M{0:.2f},{1:.2f} h-5\" stroke=\"{2}\"/><text class=\"tick\" x=\"{3:.2f}\" y=\"{4:.2f}\" "
                     "font-size=\"{5}\" text-anchor=\"end\" fill=\"{6}\">{7}</text>\n",
                     left_, y(v * mpu), grey, left_ - 7, y(v * mpu) + 3.5, kTickFont, ink, fixed(v, ty.decimals));
  a += fmt::format("<text class=\"axis-title\" x=\"{:.2f}\" y=\"{:.2f}\" font-size=\"11\" text-anchor=\"middle\" fill=\"{}\">"
                   "x: east ({})</text>\n",
                   left_ + plan_w_ / 2, top_ + plan_h_ + 33, ink, symbol(unit_));
  a += fmt::format("<text class=\"axis-title\" x=\"{0:.2f}\" y=\"{1:.2f}\" font-size=\"11\" text-anchor=\"middle\" fill=\"{2}\" "
                   "transform=\"rotate(-90 {0:.2f} {1:.2f})\">y: north ({3})</text>\n",
                   14.0, top_ + plan_h_ / 2, ink, symbol(unit_));
  a += "</g>\n";
  head_ += a;
  // North: the site frame's +y. With a geographic origin it is grid north of a transverse
  // Mercator about that origin, which is true north there.
  std::string n = "<g id=\"north\">\n";
  const double cx = panel_x_ + 12, y0 = panel_y_;
  n += fmt::format("<path d=\"M{0:.1f},{1:.1f} l-7,20 l7,-5 l7,5 z\" fill=\"{2}\"/>\n", cx, y0 + 4, ink);
  // A site in a projected CRS: +y is that CRS's grid north, which differs from true north by the
  // meridian convergence (up to a few degrees in a UTM zone); said, not drawn.
  const bool noted = !has_origin || grid_of_crs;
  n += fmt::format("<text x=\"{:.1f}\" y=\"{:.1f}\" font-size=\"12\" font-weight=\"bold\" fill=\"{}\">{}</text>\n", cx + 14, y0 + 18,
                   ink, has_origin ? "N" : grid_of_crs ? "N (grid)" : "y axis = grid north");
  if (noted)
    n += fmt::format("<text x=\"{:.1f}\" y=\"{:.1f}\" font-size=\"{}\" fill=\"{}\">{}</text>\n", cx + 14, y0 + 32,
                     kLegendFont - 1, ink,
                     grid_of_crs ? "(grid north of the site's CRS)" : "(the site has no geographic origin)");
  n += "</g>\n";
  panel_ += n;
  panel_y_ += noted ? 44 : 34;
}

void SvgCanvas::colour_bar(const std::vector<std::pair<double, std::string>>& ticks, const std::string& caption, int steps) {
  colour_bar(ticks, caption, steps, [](double t) { return palette::ramp(t); });
}

void SvgCanvas::colour_bar(const std::vector<std::pair<double, std::string>>& ticks, const std::string& caption, int steps,
                           const std::function<std::string(double)>& colour) {
  const double bx = panel_x_, bh = 170;
  std::string c = "<g id=\"colour-bar\">\n";
  double cy = panel_y_;
  for (const std::string& line : wrap(caption, kLegendFont, panel_w_)) {
    cy += 13;
    c += fmt::format("<text x=\"{:.1f}\" y=\"{:.1f}\" font-size=\"{}\" fill=\"{}\">{}</text>\n", bx, cy, kLegendFont, palette::ink(),
                     escape(line));
  }
  const double by = cy + 10;
  const int n = steps > 0 ? steps : 60;
  for (int k = 0; k < n; ++k)
    c += fmt::format("<rect x=\"{:.1f}\" y=\"{:.2f}\" width=\"16\" height=\"{:.2f}\" fill=\"{}\"/>\n", bx, by + bh * (1 - (k + 1.0) / n),
                     bh / n + 0.5, colour(n > 1 ? k / (n - 1.0) : 0.0));
  c += fmt::format("<rect x=\"{:.1f}\" y=\"{:.1f}\" width=\"16\" height=\"{:.1f}\" fill=\"none\" stroke=\"{}\"/>\n", bx, by, bh,
                   palette::grey());
  double last = -1e9;  // ticks at least a line apart
  for (auto it = ticks.rbegin(); it != ticks.rend(); ++it) {
    const double ty = by + bh * (1 - it->first);
    if (std::fabs(ty - last) < 13) continue;
    last = ty;
    c += fmt::format("<path d=\"M{:.1f},{:.1f} h4\" stroke=\"{}\"/><text x=\"{:.1f}\" y=\"{:.1f}\" font-size=\"{}\" fill=\"{}\">{}</text>\n",
                     bx + 16, ty, palette::ink(), bx + 24, ty + 3.5, kTickFont, palette::ink(), escape(it->second));
  }
  c += "</g>\n";
  panel_ += c;
  panel_y_ = by + bh + 18;
}

void SvgCanvas::legend_entry(const std::string& swatch, const std::string& text) {
  if (!legend_open_ && !legend_closed_) {
    panel_ += "<g id=\"legend\">\n";
    panel_y_ += 4;
    legend_open_ = true;
  }
  const std::vector<std::string> lines = wrap(text, kLegendFont, panel_w_ - 34);
  panel_ += fmt::format("<g transform=\"translate({:.1f},{:.1f})\">{}</g>\n", panel_x_, panel_y_, swatch);
  double ly = panel_y_ + 10;
  for (const std::string& line : lines) {
    panel_ += fmt::format("<text x=\"{:.1f}\" y=\"{:.1f}\" font-size=\"{}\" fill=\"{}\">{}</text>\n", panel_x_ + 32, ly, kLegendFont,
                          palette::ink(), escape(line));
    ly += 13;
  }
  panel_y_ += std::max<double>(15, 13.0 * lines.size() + 3);
}

void SvgCanvas::legend_heading(const std::string& text) {
  legend_entry("", "");
  panel_y_ -= 15;
  panel_ += fmt::format("<text x=\"{:.1f}\" y=\"{:.1f}\" font-size=\"{}\" font-weight=\"bold\" fill=\"{}\">{}</text>\n", panel_x_,
                        panel_y_ + 14, kLegendFont + 0.5, palette::ink(), escape(text));
  panel_y_ += 20;
}

void SvgCanvas::legend_line(const std::string& style, const std::string& text) {
  legend_entry(fmt::format("<path d=\"M0,6 h26\" fill=\"none\" {}/>", style), text);
}

void SvgCanvas::legend_fill(const std::string& style, const std::string& text) {
  legend_entry(fmt::format("<rect x=\"0\" y=\"0\" width=\"26\" height=\"12\" {}/>", style), text);
}

void SvgCanvas::legend_mark(const std::string& svg, const std::string& text) { legend_entry(svg, text); }

void SvgCanvas::legend_text(const std::string& text) { legend_entry("", text); }

void SvgCanvas::legend_zone_roles() {
  const std::string grey = palette::grey();
  legend_line(fmt::format("stroke=\"{}\" stroke-width=\"2\"", grey), "Solid: target zone");
  legend_line(fmt::format("stroke=\"{}\" stroke-width=\"2\" stroke-dasharray=\"8 4\"", grey), "Dashed: keep-out zone");
  legend_line(fmt::format("stroke=\"{}\" stroke-width=\"2\" stroke-dasharray=\"2 3\"", grey), "Dotted: report-only zone (reported, no verdict)");
}

void SvgCanvas::legend_source_marks(bool with_spread) {
  const std::string mark = palette::alarm();
  legend_mark(fmt::format("<path d=\"M8,1 l10,10 m0,-10 l-10,10\" stroke=\"{}\" stroke-width=\"1.8\"/>", mark), "Aim of a source");
  legend_mark(fmt::format("<circle cx=\"13\" cy=\"6\" r=\"3\" fill=\"{}\"/>", mark), "Mean impact point");
  if (!with_spread) return;
  const std::string ink = palette::ink();
  legend_mark(fmt::format("<ellipse cx=\"13\" cy=\"6\" rx=\"12\" ry=\"5\" fill=\"none\" stroke=\"{}\"/>", ink),
              "1- and 2-sigma ellipses of the main spread");
  legend_mark(fmt::format("<circle cx=\"13\" cy=\"6\" r=\"5.5\" fill=\"none\" stroke=\"{}\" stroke-dasharray=\"3 3\"/>", ink),
              "Circle of radius CEP (half the impacts inside)");
}

void SvgCanvas::scale_bar() {
  if (legend_open_) panel_ += "</g>\n";
  legend_open_ = false;
  legend_closed_ = true;
  // The largest round length (1, 2 or 5 x 10^k in the scenario's unit) within a quarter of the
  // plan's width; the plan itself is drawn in metres.
  const double mpu = metres_per(unit_);
  const double w = (world_.max.x() - world_.min.x()) / mpu;
  const double decade = std::pow(10.0, std::floor(std::log10(std::max(w / 4, 1e-9))));
  double length = decade;
  for (double m : {2.0, 5.0})
    if (m * decade <= w / 4) length = m * decade;
  while (length * mpu * scale_ > panel_w_ - 60) length /= 2;
  const double px = length * mpu * scale_;
  const double sy = panel_y_ + 14;
  panel_ += fmt::format("<g id=\"scale-bar\"><path d=\"M{:.1f},{:.1f} h{:.2f}\" stroke=\"{}\" stroke-width=\"3\"/>"
                        "<text x=\"{:.1f}\" y=\"{:.1f}\" font-size=\"{}\" fill=\"{}\">{:g} {}</text></g>\n",
                        panel_x_, sy, px, palette::ink(), panel_x_ + px + 6, sy + 4, kLegendFont, palette::ink(), length,
                        symbol(unit_));
  panel_y_ = sy + 16;
}

void SvgCanvas::note(const std::string& text) { notes_.push_back(text); }

std::string SvgCanvas::finish() const {
  const double width = left_ + plan_w_ + kPanelGap + panel_w_ + 10;
  std::string notes = "<g id=\"notes\">\n";
  double ny = std::max(top_ + plan_h_ + kBottomAxis + 12, panel_y_);  // below the plan and the panel
  for (const std::string& n : notes_)
    for (const std::string& line : wrap(n, kNoteFont, width - 24)) {
      ny += kNoteLine;
      notes += fmt::format("<text x=\"12\" y=\"{:.1f}\" font-size=\"{}\" fill=\"{}\">{}</text>\n", ny, kNoteFont, palette::ink(),
                           escape(line));
    }
  notes += "</g>\n";
  const std::string panel = panel_ + (legend_open_ ? "</g>\n" : "");
  const double height = ny + 12;
  return fmt::format(
      "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
      "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{0:.0f}\" height=\"{1:.0f}\" viewBox=\"0 0 {0:.0f} {1:.0f}\" "
      "font-family=\"'DejaVu Sans', sans-serif\" font-size=\"11\">\n<title>{2}</title>\n"
      "<rect width=\"100%\" height=\"100%\" fill=\"white\"/>\n"
      "<defs><clipPath id=\"plan-clip\"><rect x=\"{3:.2f}\" y=\"{4:.2f}\" width=\"{5:.2f}\" height=\"{6:.2f}\"/></clipPath>\n{11}</defs>\n"
      "{7}<g id=\"plan\" clip-path=\"url(#plan-clip)\">\n{8}</g>\n<g id=\"panel\">\n{9}</g>\n{10}</svg>\n",
      width, height, escape(title_ + (subtitle_.empty() ? "" : ": " + subtitle_)), left_, top_, plan_w_, plan_h_, head_, body_, panel,
      notes, defs_);
}

}  // namespace strewn::cli
