#ifndef STREWN_CLI_SVG_CANVAS_HPP
#define STREWN_CLI_SVG_CANVAS_HPP

// Drawing a site plan in SVG: the frame from site metres to pixels (y up on the site, down on
// the page), zones by role (target solid, keep-out dashed, watch dotted; so that roles read
// without colour), sources, a colour ramp whose lightness falls steadily (pale sand to deep
// blue: readable in greyscale and for the common colour-vision deficiencies; our own choice),
// colour bars and a scale bar. The deposition plan and the risk map are built from these.
#include <string>

#include "strewn/units.hpp"
#include "strewn/site_io.hpp"

namespace strewn::cli {

class SvgCanvas {
 public:
  // The plan shows `world` in a square of about `plan_px` pixels, with room on the right for a
  // colour bar and below for notes.
  SvgCanvas(const BoundingBox& world, const std::string& title, double plan_px = 640.0);

  double x(double wx) const;
  double y(double wy) const;
  double scale() const { return scale_; }

  void cell(const Vec2& lo, const Vec2& hi, const std::string& fill);
  void zones(const Site& s);
  void sources(const Site& s, bool with_spread);
  void polyline(const std::vector<Vec2>& points, bool closed, const std::string& style);
  void label(const Vec2& at, const std::string& text, const std::string& style = "");
  // A vertical bar from `low_text` (bottom) to `high_text` (top) with tick labels in between.
  void colour_bar(const std::vector<std::pair<double, std::string>>& ticks, const std::string& caption);
  void scale_bar(LengthUnit unit = LengthUnit::metre);  // labelled in the scenario's unit
  void note(const std::string& text);
  void raw(const std::string& svg) { body_ += svg; }
  std::string finish() const;

  static std::string ramp(double t);  // t in [0, 1], light to dark
  static std::string escape(const std::string& s);

 private:
  BoundingBox world_;
  double scale_, margin_ = 40.0, width_, height_;
  std::string title_, body_;
  int notes_ = 0;
};

}  // namespace strewn::cli

#endif
