#include "output/svg_plan.hpp"

#include <algorithm>
#include <fmt/format.h>

#include "output/svg_canvas.hpp"

namespace strewn::cli {

std::string deposition_svg(const Site& s, const Deposition& d) {
  BoundingBox box = site_extent(s);
  const double half = s.deposition && s.deposition->grid ? s.deposition->grid->spacing / 2 : 0.0;
  for (const Can& c : d.cans) {
    box.min = box.min.cwiseMin(c.centre - Vec2(half, half));
    box.max = box.max.cwiseMax(c.centre + Vec2(half, half));
  }
  SvgCanvas canvas(box, s.site_name + " - expected deposition");
  double top = 0.0;
  for (const Can& c : d.cans) top = std::max(top, c.cell_depth);
  canvas.raw("<g id=\"field\">\n");
  for (const Can& c : d.cans)
    canvas.cell(c.centre - Vec2(half, half), c.centre + Vec2(half, half), SvgCanvas::ramp(top > 0 ? c.cell_depth / top : 0.0));
  canvas.raw("</g>\n<g id=\"cans\" fill=\"none\" stroke=\"#222\" stroke-width=\"0.8\">\n");
  for (const Can& c : d.cans)
    canvas.raw(fmt::format("<circle cx=\"{:.2f}\" cy=\"{:.2f}\" r=\"2\"/>\n", canvas.x(c.centre.x()), canvas.y(c.centre.y())));
  canvas.raw("</g>\n");
  canvas.zones(s);
  canvas.sources(s, false);
  canvas.colour_bar({{0.0, "0"}, {0.5, fmt::format("{:.3g}", top / 2)}, {1.0, fmt::format("{:.3g} {}", top, d.depth_unit)}},
                    "cell mean depth");
  canvas.scale_bar(s.units);
  canvas.note("Expected depth per cell (linear scale); circles: catch cans. Model estimate; see the cautions.");
  return canvas.finish();
}

}  // namespace strewn::cli
