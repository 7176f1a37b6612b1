#include "output/svg_canvas.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <fmt/format.h>

#include "strewn/constants.hpp"

namespace strewn::cli {
namespace {

constexpr std::array<std::array<int, 3>, 5> kRamp = {
    {{246, 241, 222}, {205, 225, 180}, {120, 190, 170}, {50, 130, 160}, {25, 60, 110}}};

}  // namespace

std::string SvgCanvas::ramp(double t) {
  t = std::clamp(t, 0.0, 1.0) * (kRamp.size() - 1);
  const std::size_t i = std::min<std::size_t>(static_cast<std::size_t>(t), kRamp.size() - 2);
  const double f = t - static_cast<double>(i);
  int c[3];
  for (int k = 0; k < 3; ++k) c[k] = static_cast<int>(std::lround(kRamp[i][k] * (1 - f) + kRamp[i + 1][k] * f));
  return fmt::format("#{:02x}{:02x}{:02x}", c[0], c[1], c[2]);
}

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

SvgCanvas::SvgCanvas(const BoundingBox& world, const std::string& title, double plan_px) : world_(world), title_(title) {
  const double w = std::max(world.max.x() - world.min.x(), 1e-9), h = std::max(world.max.y() - world.min.y(), 1e-9);
  scale_ = plan_px / std::max(w, h);
  width_ = 2 * margin_ + w * scale_ + 140;
  height_ = 2 * margin_ + h * scale_ + 70;
}

double SvgCanvas::x(double wx) const { return margin_ + (wx - world_.min.x()) * scale_; }
double SvgCanvas::y(double wy) const { return margin_ + (world_.max.y() - wy) * scale_; }

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

void SvgCanvas::label(const Vec2& at, const std::string& text, const std::string& style) {
  body_ += fmt::format("<text x=\"{:.2f}\" y=\"{:.2f}\" {}>{}</text>\n", x(at.x()), y(at.y()), style, escape(text));
}

void SvgCanvas::zones(const Site& s) {
  body_ += "<g id=\"zones\" stroke=\"#000\">\n";
  for (const Zone& z : s.zones) {
    const BoundingBox b = bounds(z.region);
    const Region poly = polygonised(z.region, 1e-3 * std::max((b.max - b.min).norm(), 1e-9));
    const char* style = z.role == Role::target ? "stroke-width=\"2\""
                        : z.role == Role::keep_out ? "stroke-width=\"2.5\" stroke-dasharray=\"8 4\""
                                                   : "stroke-width=\"1.2\" stroke-dasharray=\"2 3\"";
    for (const Loop& loop : poly.loops) {
      std::vector<Vec2> pts;
      for (const Edge& e : loop) pts.push_back(e.from);
      polyline(pts, true, style);
    }
    body_ += fmt::format("<text x=\"{:.2f}\" y=\"{:.2f}\" stroke=\"none\" fill=\"#000\">{} ({})</text>\n", x(b.min.x()),
                         y(b.max.y()) - 3, escape(z.name), to_string(z.role));
  }
  body_ += "</g>\n";
}

void SvgCanvas::sources(const Site& s, bool with_spread) {
  body_ += "<g id=\"sources\">\n";
  for (const Source& src : s.sources) {
    // Aim: a cross; mean impact point: a dot; the core's 1- and 2-sigma ellipses (Mahalanobis
    // radius 1 and 2) and, dashed, the circle of radius CEP about the mean.
    body_ += fmt::format("<path d=\"M{:.2f},{:.2f} l10,10 m0,-10 l-10,10\" transform=\"translate(-5,-5)\" stroke=\"#b00\" stroke-width=\"1.8\"/>\n",
                         x(src.aim.x()), y(src.aim.y()));
    const Gaussian& core = src.model.components().front().gaussian;
    body_ += fmt::format("<circle cx=\"{:.2f}\" cy=\"{:.2f}\" r=\"3\" fill=\"#b00\"/>\n", x(core.mean().x()), y(core.mean().y()));
    // Sources sharing an aim get their labels one under the other.
    const auto row = std::count_if(s.sources.data(), &src, [&](const Source& o) { return (o.aim - src.aim).norm() < 1e-9; });
    body_ += fmt::format("<text x=\"{:.2f}\" y=\"{:.2f}\" font-size=\"10\" fill=\"#b00\" paint-order=\"stroke\" stroke=\"white\" "
                         "stroke-width=\"3\">{}</text>\n", x(src.aim.x()) + 10, y(src.aim.y()) - 8 - 12 * row, escape(src.name));
    if (!with_spread) continue;
    for (double k : {1.0, 2.0}) {
      std::vector<Vec2> ring;
      for (int t = 0; t < 72; ++t)
        ring.push_back(core.mean() + k * core.cholesky() * Vec2(std::cos(t * kPi / 36), std::sin(t * kPi / 36)));
      polyline(ring, true, "stroke=\"#b00\" stroke-width=\"1\"");
    }
    const SpreadAxes a = core.axes();
    const double cep_circular = std::sqrt(2 * std::log(2.0)) * std::sqrt(a.sigma_major * a.sigma_minor);
    std::vector<Vec2> cep;
    for (int t = 0; t < 72; ++t) cep.push_back(core.mean() + cep_circular * Vec2(std::cos(t * kPi / 36), std::sin(t * kPi / 36)));
    polyline(cep, true, "stroke=\"#b00\" stroke-width=\"1\" stroke-dasharray=\"3 3\"");
  }
  body_ += "</g>\n";
}

void SvgCanvas::colour_bar(const std::vector<std::pair<double, std::string>>& ticks, const std::string& caption) {
  const double bx = width_ - 130, by = margin_, bh = 240;
  body_ += "<g id=\"colour-bar\">\n";
  for (int k = 0; k < 60; ++k)
    body_ += fmt::format("<rect x=\"{:.1f}\" y=\"{:.2f}\" width=\"16\" height=\"{:.2f}\" fill=\"{}\"/>\n", bx,
                         by + bh * (1 - (k + 1) / 60.0), bh / 60.0 + 0.5, ramp((k + 0.5) / 60.0));
  for (const auto& [t, text] : ticks)
    body_ += fmt::format("<text x=\"{:.1f}\" y=\"{:.1f}\" font-size=\"10\">{}</text>\n", bx + 20, by + bh * (1 - t) + 4, escape(text));
  body_ += fmt::format("<text x=\"{:.1f}\" y=\"{:.1f}\">{}</text>\n</g>\n", bx, by + bh + 18, escape(caption));
}

void SvgCanvas::scale_bar(LengthUnit unit) {
  // A round length in the scenario's unit (the plan itself is drawn in metres).
  const double w = from_metres(world_.max.x() - world_.min.x(), unit);
  const double length = std::pow(10.0, std::floor(std::log10(std::max(w / 4, 1e-9))));
  const double px = to_metres(length, unit) * scale_;
  const double sy = height_ - 50;
  body_ += fmt::format("<g id=\"scale-bar\"><path d=\"M{:.1f},{:.1f} h{:.2f}\" stroke=\"#000\" stroke-width=\"3\"/>"
                       "<text x=\"{:.1f}\" y=\"{:.1f}\">{:g} {}</text></g>\n",
                       margin_, sy, px, margin_ + px + 6, sy + 4, length, symbol(unit));
}

void SvgCanvas::note(const std::string& text) {
  body_ += fmt::format("<text x=\"{:.1f}\" y=\"{:.1f}\" font-size=\"9\">{}</text>\n", margin_, height_ - 30 + 12 * notes_++, escape(text));
}

std::string SvgCanvas::finish() const {
  return fmt::format(
      "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
      "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{0:.0f}\" height=\"{1:.0f}\" viewBox=\"0 0 {0:.0f} {1:.0f}\" "
      "font-family=\"sans-serif\" font-size=\"11\">\n<title>{2}</title>\n<rect width=\"100%\" height=\"100%\" fill=\"white\"/>\n"
      "{3}</svg>\n",
      width_, height_, escape(title_), body_);
}

}  // namespace strewn::cli
