#include "output/svg_plan.hpp"

#include <algorithm>
#include <cmath>
#include <fmt/format.h>

#include "output/deposition_units.hpp"
#include "output/palette.hpp"
#include "output/svg_canvas.hpp"
#include "strewn/constants.hpp"
#include "strewn/contours.hpp"
#include "strewn/head.hpp"
#include "strewn/units.hpp"

namespace strewn::cli {
namespace {

// Each head: a dot and its calm wetted outline, a circle or a sector (a wind moves and stretches
// the pattern, which the field shows; the outline is the head's setting).
void draw_heads(SvgCanvas& canvas, const Site& s) {
  if (s.heads.empty()) return;
  canvas.raw(fmt::format("<g id=\"heads\" fill=\"none\" stroke=\"{}\" stroke-width=\"0.8\" stroke-dasharray=\"4 3\">\n", palette::ink()));
  for (const Head& h : s.heads) {
    const double cx = canvas.x(h.position.x()), cy = canvas.y(h.position.y()), r = h.radius_m * canvas.scale();
    if (!h.arc) {
      canvas.raw(fmt::format("<circle cx=\"{:.2f}\" cy=\"{:.2f}\" r=\"{:.2f}\"/>\n", cx, cy, r));
    } else {
      const double sweep = head_sweep_deg(h), a0 = h.arc->from_deg * kPi / 180.0, a1 = a0 + sweep * kPi / 180.0;
      // The plan's y runs down: a counter-clockwise arc on the site is clockwise on the page (sweep flag 0).
      canvas.raw(fmt::format("<path d=\"M{:.2f},{:.2f} L{:.2f},{:.2f} A{:.2f},{:.2f} 0 {} 0 {:.2f},{:.2f} Z\"/>\n", cx, cy,
                             cx + r * std::cos(a0), cy - r * std::sin(a0), r, r, sweep > 180.0 ? 1 : 0, cx + r * std::cos(a1),
                             cy - r * std::sin(a1)));
    }
  }
  canvas.raw("</g>\n<g id=\"head-marks\">\n");
  for (const Head& h : s.heads)
    canvas.raw(fmt::format("<circle cx=\"{:.2f}\" cy=\"{:.2f}\" r=\"3\" fill=\"{}\" stroke=\"white\" stroke-width=\"0.8\"/>\n",
                           canvas.x(h.position.x()), canvas.y(h.position.y()), palette::ink()));
  canvas.raw("</g>\n");
}

}  // namespace

std::string deposition_svg(const Site& s, const Deposition& d) {
  BoundingBox box = site_extent(s);
  const bool has_grid = s.deposition && s.deposition->grid;
  const double half = has_grid ? s.deposition->grid->spacing / 2 : 0.0;
  for (const Can& c : d.cans) {
    box.min = box.min.cwiseMin(c.centre - Vec2(half, half));
    box.max = box.max.cwiseMax(c.centre + Vec2(half, half));
  }
  for (const Source& src : s.sources) {
    box.min = box.min.cwiseMin(src.aim);
    box.max = box.max.cwiseMax(src.aim);
  }
  const Vec2 pad = 0.04 * (box.max - box.min);
  box = {box.min - pad, box.max + pad};
  // Depths as the tables print them: mm, or inches in a US site (strewn/units.hpp).
  const DepositionUnits printed(s, d);
  const std::string unit = printed.depth_unit;
  const auto shown_depth = [&](double per_m2) { return printed.depth(per_m2); };
  SvgCanvas canvas(box, s.site_name + ": expected deposition",
                   fmt::format("Expected depth over a run of {:g} h from all sources, in {}; numbers: what each catch can collects{}",
                               s.deposition ? s.deposition->hours : 0.0, unit,
                               d.cans.empty() ? std::string() : fmt::format(". CU {:.1f} %, DU (low quarter) {:.1f} %", d.cu, d.du)),
                   s.units);

  // The whole field, not only the cans' cells: the depth at the centre of each of about 150
  // cells along the longer side (closed form, strewn::depth_at).
  const Vec2 size = box.max - box.min;
  const double step = std::max(size.x(), size.y()) / 150.0;
  const int nx = std::max(1, static_cast<int>(std::ceil(size.x() / step))), ny = std::max(1, static_cast<int>(std::ceil(size.y() / step)));
  std::vector<Vec2> centres;
  for (int j = 0; j < ny; ++j)
    for (int i = 0; i < nx; ++i) centres.push_back(box.min + step * Vec2(i + 0.5, j + 0.5));
  std::vector<double> depth = depth_at(s, centres);
  for (double& v : depth) v = shown_depth(v);
  double top = shown_depth(d.max_depth);
  for (double v : depth) top = std::max(top, v);
  // A linear scale in ten bands from 0 to a round value at or above the largest depth.
  const double unit_step = std::pow(10.0, std::floor(std::log10(std::max(top, 1e-300))));
  double scale_top = unit_step;
  for (double m : {1.0, 2.0, 2.5, 5.0, 10.0})
    if (m * unit_step >= top) {
      scale_top = m * unit_step;
      break;
    }
  const int bands = 10;
  const auto band = [&](double v) { return std::clamp(static_cast<int>(v / scale_top * bands), 0, bands - 1); };
  canvas.raw("<g id=\"field\" shape-rendering=\"crispEdges\">\n");
  for (int j = 0; j < ny; ++j)
    for (int i = 0; i < nx;) {
      const int b = band(depth[static_cast<std::size_t>(j) * nx + i]);
      int end = i + 1;
      while (end < nx && band(depth[static_cast<std::size_t>(j) * nx + end]) == b) ++end;
      canvas.cell(box.min + step * Vec2(i, j), box.min + step * Vec2(end, j + 1), palette::ramp(b / (bands - 1.0)));
      i = end;
    }
  canvas.raw("</g>\n");
  // Depth contours at the colour bar's labelled steps (marching squares, strewn/contours.hpp).
  RiskMap field;
  field.grid = GridSpec{box.min + step * Vec2(0.5, 0.5), step, nx, ny};
  field.value = depth;
  field.abs_err.assign(depth.size(), 0.0);
  canvas.raw(fmt::format("<g id=\"depth-contours\" fill=\"none\" stroke=\"{}\" stroke-width=\"0.7\" stroke-opacity=\"0.8\">\n", palette::ink()));
  for (int k = 1; k < 5; ++k)
    for (const ContourLine& line : contour(field, scale_top * k / 5.0, scale_top * 1e-6).lines)
      canvas.polyline(line.points, line.closed, "");
  canvas.raw("</g>\n");
  canvas.zones(s, {});
  // Heads are drawn as heads (their sources are the last ones): aims and labels only for the others.
  Site others = s;
  others.sources.resize(s.sources.size() - std::min(s.sources.size(), s.heads.size()));
  canvas.sources(others, false);
  draw_heads(canvas, s);
  // The cans: a ring each, and its expected depth beside it, every value with the same decimals.
  const int decimals = std::max(0, 2 - static_cast<int>(std::floor(std::log10(std::max(shown_depth(d.max_depth), 1e-300)))));
  canvas.raw(fmt::format("<g id=\"cans\" fill=\"none\" stroke=\"{}\" stroke-width=\"0.9\">\n", palette::ink()));
  for (const Can& c : d.cans)
    canvas.raw(fmt::format("<circle cx=\"{:.2f}\" cy=\"{:.2f}\" r=\"2.5\"/>\n", canvas.x(c.centre.x()), canvas.y(c.centre.y())));
  canvas.raw("</g>\n<g id=\"can-values\">\n");
  int shown = 0;
  for (const Can& c : d.cans)
    shown += canvas.plan_label(c.centre - Vec2(0, 9.0 / canvas.scale()), SvgCanvas::fixed(shown_depth(c.depth), decimals), 9,
                               fmt::format("fill=\"{}\" class=\"can-value\"", palette::ink()), true, false)
                 ? 1
                 : 0;
  canvas.raw("</g>\n");
  canvas.zone_labels(s, {});
  canvas.source_labels(others);

  canvas.axes(s.origin.has_value(), !s.crs.empty());
  std::vector<std::pair<double, std::string>> ticks;
  const int tick_decimals = std::max(0, -static_cast<int>(std::floor(std::log10(scale_top / 5))));
  for (int k = 0; k <= 5; ++k) ticks.push_back({k / 5.0, SvgCanvas::fixed(scale_top * k / 5, tick_decimals)});
  canvas.colour_bar(ticks, "Expected depth (" + unit + ", linear scale)", bands);
  canvas.legend_heading("Key");
  if (!d.cans.empty()) {
    canvas.legend_text(fmt::format("Over the {} cans: CU {} %, DU (low quarter) {} %; depth mean {}, least {}, most {} {}", d.cans.size(),
                                   SvgCanvas::fixed(d.cu, 1), SvgCanvas::fixed(d.du, 1), SvgCanvas::fixed(shown_depth(d.mean_depth), decimals),
                                   SvgCanvas::fixed(shown_depth(d.min_depth), decimals), SvgCanvas::fixed(shown_depth(d.max_depth), decimals), unit));
    canvas.legend_mark(fmt::format("<circle cx=\"13\" cy=\"6\" r=\"2.5\" fill=\"none\" stroke=\"{}\"/>", palette::ink()),
                       fmt::format("Catch can, with its expected depth in {}{}", unit,
                                   shown < static_cast<int>(d.cans.size()) ? " (where there is room; all in the CSV)" : ""));
  }
  canvas.legend_line(fmt::format("stroke=\"{}\" stroke-width=\"0.7\"", palette::ink()),
                     fmt::format("Depth contours at {}, {}, {} and {} {}", SvgCanvas::fixed(scale_top / 5, tick_decimals),
                                 SvgCanvas::fixed(2 * scale_top / 5, tick_decimals), SvgCanvas::fixed(3 * scale_top / 5, tick_decimals),
                                 SvgCanvas::fixed(4 * scale_top / 5, tick_decimals), unit));
  if (!s.heads.empty()) {
    canvas.legend_mark(fmt::format("<circle cx=\"13\" cy=\"6\" r=\"3\" fill=\"{}\"/>", palette::ink()),
                       fmt::format("Sprinkler head ({} in all)", s.heads.size()));
    canvas.legend_line(fmt::format("stroke=\"{}\" stroke-dasharray=\"4 3\"", palette::ink()),
                       "Head's wetted radius over its arc (calm)");
    if (d.run_time)
      canvas.legend_text(fmt::format("Run time for {:g} {}: {:.0f} min; with the DU allowance {}", shown_depth(*s.deposition->target_depth_mm),
                                     unit, 60 * d.run_time->hours,
                                     d.run_time->with_allowance_hours ? fmt::format("{:.0f} min", 60 * *d.run_time->with_allowance_hours)
                                                                      : std::string("(needs catch cans)")));
  }
  canvas.legend_zone_roles();
  if (!others.sources.empty()) canvas.legend_source_marks(false);
  canvas.scale_bar();
  canvas.note("Colours: the expected depth at each point, the sources' scatter densities times what they emit (a closed form). "
              "Numbers: what each can collects, integrated over its opening (error bounds in the CSV). CU is Christiansen's "
              "coefficient; DU the mean of the lowest quarter of the cans over the mean of all, the lowest quarter being exactly "
              "n/4 cans with the boundary can weighted by its fraction.");
  canvas.note("Model estimate: it does not replace measured catch-can tests, local codes or a competent person's assessment.");
  return canvas.finish();
}

}  // namespace strewn::cli
