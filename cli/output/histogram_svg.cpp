#include "output/histogram_svg.hpp"

#include <algorithm>
#include <cmath>
#include <fmt/format.h>
#include <tuple>
#include <vector>

#include "output/deposition_units.hpp"
#include "output/palette.hpp"
#include "output/svg_canvas.hpp"
#include "strewn/units.hpp"

namespace strewn::cli {
namespace {

const auto escaped = SvgCanvas::escape;

}  // namespace

std::string can_histogram_svg(const Site& s, const Deposition& d) {
  const DepositionUnits shown(s, d);
  const std::string unit = shown.depth_unit;
  std::vector<double> depth;
  for (const Can& c : d.cans) depth.push_back(shown.depth(c.depth));
  const double w = 640, h = 420, left = 64, right = 24, top = 84, bottom = 64;
  std::string svg = fmt::format("<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{0}\" height=\"{1}\" viewBox=\"0 0 {0} {1}\" "
                                "font-family=\"sans-serif\">\n<rect width=\"{0}\" height=\"{1}\" fill=\"white\"/>\n",
                                w, h);
  svg += fmt::format("<text x=\"{}\" y=\"24\" font-size=\"15\" font-weight=\"bold\" fill=\"{}\">Catch-can depths</text>\n"
                     "<text x=\"{}\" y=\"42\" font-size=\"12\" fill=\"{}\">{}</text>\n",
                     left, palette::ink(), left, palette::ink(), escaped(s.site_name));
  if (depth.empty()) {
    svg += fmt::format("<text x=\"{}\" y=\"60\" font-size=\"12\">No catch grid: give [deposition] catch_grid for cans.</text>\n</svg>\n", left);
    return svg;
  }
  std::sort(depth.begin(), depth.end());
  const double lo = depth.front(), hi = depth.back();
  double mean = 0.0;
  for (double v : depth) mean += v / static_cast<double>(depth.size());
  // About sqrt(n) classes, 5 to 20, of equal width from the least to the most.
  const int classes = std::clamp(static_cast<int>(std::lround(std::sqrt(static_cast<double>(depth.size())))), 5, 20);
  const double span = hi > lo ? hi - lo : std::max(std::fabs(hi), 1e-12);
  const double x0 = hi > lo ? lo : lo - span / 2, width = span / classes;
  std::vector<int> count(static_cast<std::size_t>(classes), 0);
  for (double v : depth) ++count[static_cast<std::size_t>(std::clamp(static_cast<int>((v - x0) / width), 0, classes - 1))];
  const int most = *std::max_element(count.begin(), count.end());
  const double pw = w - left - right, ph = h - top - bottom;
  // The count axis runs to a round value at least a quarter above the tallest bar: the band
  // above the bars holds the lines' labels (they were drawn over the tallest bar, which ran to
  // the frame's top).
  const double count_step = std::max(1.0, SvgCanvas::round_step(1.25 * most, 5));
  const double count_top = count_step * std::ceil(1.25 * most / count_step);
  const auto px = [&](double v) { return left + (v - x0) / (width * classes) * pw; };
  const auto py = [&](double n) { return top + ph - n / count_top * ph; };
  svg += fmt::format("<text x=\"{}\" y=\"60\" font-size=\"12\" fill=\"{}\">{} cans; CU {:.1f} %, DU (low quarter) {:.1f} %; "
                     "depth mean {:.3g}, least {:.3g}, most {:.3g} {}</text>\n",
                     left, palette::ink(), depth.size(), d.cu, d.du, mean, lo, hi, escaped(unit));
  svg += "<g id=\"bars\">\n";
  for (int k = 0; k < classes; ++k)
    if (count[static_cast<std::size_t>(k)] > 0)
      svg += fmt::format("<rect x=\"{:.2f}\" y=\"{:.2f}\" width=\"{:.2f}\" height=\"{:.2f}\" fill=\"{}\" stroke=\"white\"/>\n",
                         px(x0 + k * width), py(count[static_cast<std::size_t>(k)]), pw / classes,
                         ph * count[static_cast<std::size_t>(k)] / count_top, palette::ramp(0.35));
  svg += "</g>\n";
  // The low quarter's mean (DU x mean) and the mean, as vertical lines.
  const double low_mean = d.du / 100.0 * mean;
  for (const auto& [v, label, dash] : {std::tuple<double, const char*, const char*>{mean, "mean", ""},
                                       std::tuple<double, const char*, const char*>{low_mean, "low-quarter mean", "5 3"}})
  {
    // In the band above the bars, each on its own row; beside its line, on the left of it past
    // the plot's middle (so that it stays inside the frame).
    const bool left_of = px(v) > left + 0.6 * pw;
    svg += fmt::format("<line x1=\"{0:.2f}\" x2=\"{0:.2f}\" y1=\"{1}\" y2=\"{2}\" stroke=\"{3}\" stroke-width=\"1.5\" "
                       "stroke-dasharray=\"{4}\"/>\n<text x=\"{5:.2f}\" y=\"{6}\" font-size=\"11\" fill=\"{3}\" "
                       "text-anchor=\"{9}\">{7} {8:.3g}</text>\n",
                       px(v), top - 6, top + ph, palette::alarm(), dash, left_of ? px(v) - 3 : px(v) + 3,
                       label == std::string("mean") ? top + 6 : top + 20, label, v, left_of ? "end" : "start");
  }
  // Axes with five ticks each.
  svg += fmt::format("<g stroke=\"{0}\" fill=\"none\"><line x1=\"{1}\" x2=\"{2}\" y1=\"{3}\" y2=\"{3}\"/>"
                     "<line x1=\"{1}\" x2=\"{1}\" y1=\"{4}\" y2=\"{3}\"/></g>\n",
                     palette::ink(), left, left + pw, top + ph, top);
  // Ticks at round values (SvgCanvas::round_step), not at fifths of the range.
  const double step = SvgCanvas::round_step(span, 5);
  for (double v = std::ceil(x0 / step - 1e-9) * step; v <= x0 + span * (1 + 1e-12); v += step)
    svg += fmt::format("<text x=\"{:.2f}\" y=\"{}\" font-size=\"11\" text-anchor=\"middle\">{:g}</text>\n", px(v), top + ph + 16,
                       std::abs(v) < step * 1e-9 ? 0.0 : v);
  for (double n = 0; n <= count_top * (1 + 1e-12); n += count_step)
    svg += fmt::format("<text x=\"{}\" y=\"{:.2f}\" font-size=\"11\" text-anchor=\"end\">{:g}</text>\n", left - 6, py(n) + 4, n);
  svg += fmt::format("<text x=\"{:.2f}\" y=\"{}\" font-size=\"12\" text-anchor=\"middle\">Depth a can catches over the run ({})</text>\n",
                     left + pw / 2, h - 18, escaped(unit));
  svg += fmt::format("<text transform=\"translate(18 {:.2f}) rotate(-90)\" font-size=\"12\" text-anchor=\"middle\">Cans</text>\n",
                     top + ph / 2);
  svg += "</svg>\n";
  return svg;
}

}  // namespace strewn::cli
