#include "svg_plan.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <array>
#include <cmath>

#include "report.hpp"

namespace strewn::cli {
namespace {

// Ramp stops (sRGB), lightness decreasing monotonically: our own choice.
constexpr std::array<std::array<int, 3>, 5> kRamp = {{{246, 241, 222}, {205, 225, 180}, {120, 190, 170}, {50, 130, 160}, {25, 60, 110}}};

std::string ramp(double t) {
  t = std::clamp(t, 0.0, 1.0) * (kRamp.size() - 1);
  const std::size_t i = std::min<std::size_t>(static_cast<std::size_t>(t), kRamp.size() - 2);
  const double f = t - static_cast<double>(i);
  int c[3];
  for (int k = 0; k < 3; ++k) c[k] = static_cast<int>(std::lround(kRamp[i][k] * (1 - f) + kRamp[i + 1][k] * f));
  return fmt::format("#{:02x}{:02x}{:02x}", c[0], c[1], c[2]);
}

std::string escape(const std::string& s) {
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

struct Frame {
  BoundingBox world;
  double scale;  // px per m
  double margin = 40.0;
  double x(double wx) const { return margin + (wx - world.min.x()) * scale; }
  double y(double wy) const { return margin + (world.max.y() - wy) * scale; }
};

}  // namespace

std::string deposition_svg(const Scenario& s, const Deposition& d) {
  BoundingBox box{Vec2(1e300, 1e300), Vec2(-1e300, -1e300)};
  const auto grow = [&](const Vec2& p) {
    box.min = box.min.cwiseMin(p);
    box.max = box.max.cwiseMax(p);
  };
  const double half = s.deposition && s.deposition->grid ? s.deposition->grid->spacing / 2 : 0.0;
  for (const Can& c : d.cans) {
    grow(c.centre - Vec2(half, half));
    grow(c.centre + Vec2(half, half));
  }
  for (const Zone& z : s.zones) {
    const BoundingBox b = bounds(z.region);
    grow(b.min);
    grow(b.max);
  }
  for (const Source& src : s.sources) grow(src.aim);
  const double width_m = std::max(box.max.x() - box.min.x(), 1e-9), height_m = std::max(box.max.y() - box.min.y(), 1e-9);
  Frame f{box, 640.0 / std::max(width_m, height_m)};
  const double w = 2 * f.margin + width_m * f.scale + 120, h = 2 * f.margin + height_m * f.scale + 60;
  std::string out = fmt::format(
      "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
      "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{:.0f}\" height=\"{:.0f}\" viewBox=\"0 0 {:.0f} {:.0f}\" "
      "font-family=\"sans-serif\" font-size=\"11\">\n<title>{} - expected deposition</title>\n"
      "<rect width=\"100%\" height=\"100%\" fill=\"white\"/>\n",
      w, h, w, h, escape(s.site_name));
  double top = 0.0;
  for (const Can& c : d.cans) top = std::max(top, c.cell_depth);
  out += "<g id=\"field\">\n";
  for (const Can& c : d.cans)
    out += fmt::format("<rect x=\"{:.2f}\" y=\"{:.2f}\" width=\"{:.2f}\" height=\"{:.2f}\" fill=\"{}\"/>\n",
                       f.x(c.centre.x() - half), f.y(c.centre.y() + half), 2 * half * f.scale, 2 * half * f.scale,
                       ramp(top > 0 ? c.cell_depth / top : 0.0));
  out += "</g>\n<g id=\"cans\" fill=\"none\" stroke=\"#222\" stroke-width=\"0.8\">\n";
  for (const Can& c : d.cans) out += fmt::format("<circle cx=\"{:.2f}\" cy=\"{:.2f}\" r=\"2\"/>\n", f.x(c.centre.x()), f.y(c.centre.y()));
  out += "</g>\n<g id=\"zones\" fill=\"none\" stroke=\"#000\">\n";
  for (const Zone& z : s.zones) {
    const BoundingBox b = bounds(z.region);
    const Region poly = polygonised(z.region, 1e-3 * std::max((b.max - b.min).norm(), 1e-9));
    std::string path;
    for (const Loop& loop : poly.loops) {
      for (std::size_t k = 0; k < loop.size(); ++k)
        path += fmt::format("{}{:.2f},{:.2f} ", k == 0 ? "M" : "L", f.x(loop[k].from.x()), f.y(loop[k].from.y()));
      path += "Z ";
    }
    const char* style = z.role == Role::target ? "stroke-width=\"2\""
                        : z.role == Role::keep_out ? "stroke-width=\"2.5\" stroke-dasharray=\"8 4\""
                                                   : "stroke-width=\"1.2\" stroke-dasharray=\"2 3\"";
    out += fmt::format("<path d=\"{}\" {}/>\n<text x=\"{:.2f}\" y=\"{:.2f}\" fill=\"#000\" stroke=\"none\">{} ({})</text>\n",
                       path, style, f.x(b.min.x()), f.y(b.max.y()) - 3, escape(z.name), to_string(z.role));
  }
  out += "</g>\n<g id=\"sources\" stroke=\"#b00\" stroke-width=\"1.5\">\n";
  for (const Source& src : s.sources) {
    const double x = f.x(src.aim.x()), y = f.y(src.aim.y());
    out += fmt::format("<path d=\"M{:.2f},{:.2f} l8,8 m0,-8 l-8,8\" transform=\"translate(-4,-4)\"/>\n", x, y);
  }
  out += "</g>\n";
  // Colour bar with its unit, and a scale bar.
  const double bx = 2 * f.margin + width_m * f.scale + 20, by = f.margin, bh = 200;
  out += "<g id=\"colour-bar\">\n";
  for (int k = 0; k < 50; ++k)
    out += fmt::format("<rect x=\"{:.1f}\" y=\"{:.2f}\" width=\"16\" height=\"{:.2f}\" fill=\"{}\"/>\n", bx,
                       by + bh * (1 - (k + 1) / 50.0), bh / 50.0 + 0.5, ramp((k + 0.5) / 50.0));
  out += fmt::format("<text x=\"{:.1f}\" y=\"{:.1f}\">{:.3g} {}</text>\n<text x=\"{:.1f}\" y=\"{:.1f}\">0</text>\n"
                     "<text x=\"{:.1f}\" y=\"{:.1f}\">cell mean</text>\n</g>\n",
                     bx + 20, by + 8, top, escape(d.depth_unit), bx + 20, by + bh, bx, by + bh + 16);
  const double metres = std::pow(10.0, std::floor(std::log10(std::max(width_m / 4, 1e-9))));
  const double sy = h - 24;
  out += fmt::format("<g id=\"scale-bar\"><path d=\"M{:.1f},{:.1f} h{:.2f}\" stroke=\"#000\" stroke-width=\"3\"/>"
                     "<text x=\"{:.1f}\" y=\"{:.1f}\">{:g} m</text></g>\n",
                     f.margin, sy, metres * f.scale, f.margin + metres * f.scale + 6, sy + 4, metres);
  out += fmt::format("<text x=\"{:.1f}\" y=\"{:.1f}\" font-size=\"9\">Model estimate; see the cautions in the text output.</text>\n",
                     f.margin, h - 8);
  out += "</svg>\n";
  return out;
}

}  // namespace strewn::cli
