#ifndef STREWN_CLI_SVG_CANVAS_HPP
#define STREWN_CLI_SVG_CANVAS_HPP

// Drawing a site plan in SVG, laid out so that it answers "where is it unsafe to stand" on its
// own: a title; the plan (drawn from site metres, y up on the site, down on the page) framed
// by axes with coordinates in the scenario's unit (m or ft, strewn/units.hpp); on the right a
// north arrow (or "y axis = grid north" for a site without an origin), the colour bar, a
// legend and a scale bar in that unit; plain-word notes below. Zones by role
// (target solid, keep-out dashed, report-only dotted) and by verdict (colour and label), sources.
// Colours come from output/palette.hpp (docs/pictures.md).
//
// Text never overlaps other text: every label inside the plan is placed through one register
// of occupied boxes (estimated from the glyph widths of DejaVu Sans, the usual sans-serif on
// Debian, rounded up); a label without a free place near its anchor is left out (the legend or
// the command's table carries it). Around the plan the layout is fixed and sized from the same
// estimates. tests/report/check_pictures.sh checks the result in a browser.
#include <functional>
#include <string>
#include <vector>

#include "strewn/site_io.hpp"
#include "strewn/units.hpp"

namespace strewn::cli {

enum class Verdict { no_limit, holds, exceeded, not_shown };

class SvgCanvas {
 public:
  // The plan shows `world` (site metres) in about `plan_px` pixels along its longer side; axes,
  // scale bar and tick values are labelled in `unit`, the unit the scenario was written in.
  SvgCanvas(const BoundingBox& world, std::string title, std::string subtitle, LengthUnit unit = LengthUnit::metre,
            double plan_px = 600.0);

  double x(double wx) const;
  double y(double wy) const;
  double scale() const { return scale_; }

  // The plan, bottom layer first.
  void cell(const Vec2& lo, const Vec2& hi, const std::string& fill);
  void polyline(const std::vector<Vec2>& points, bool closed, const std::string& style);
  // A filled region (even-odd: holes stay open), e.g. an unsafe area.
  void area(const Region& region, const std::string& style);
  // Zones by role (dash pattern) and verdict (colour, and in the label); `verdicts` in the order
  // of s.zones, or empty for none.
  void zones(const Site& s, const std::vector<Verdict>& verdicts);
  void sources(const Site& s, bool with_spread);
  // Barriers (thick lines) and their shadows from each source's position (hatched grey, cut to
  // the plan; a throwing line's shadows from both of its ends), and where throwers stand.
  void barriers(const Site& s);
  /// Each drop's flight track, release point and fall to the nominal landing, labelled
  /// (output/plan_features.hpp).
  void drops(const Site& s);
  // Their labels, placed after whatever must not move (can values) and before what may be
  // left out (contour labels).
  void zone_labels(const Site& s, const std::vector<Verdict>& verdicts);
  void source_labels(const Site& s);
  // Something for <defs> (patterns).
  void define(const std::string& svg) { defs_ += svg; }
  // A label near `at` (site metres) where it overlaps no other text and stays on the plan;
  // `centred` puts the anchor at the text's centre. Returns false when no place was free.
  // `home` (site metres, optional): the box of the shape the label names; such a label moved
  // off its anchor gets a leader line to `at` however short the move.
  bool plan_label(const Vec2& at, const std::string& text, double font_px, const std::string& attrs, bool centred = false,
                  bool may_move = true, const BoundingBox* home = nullptr);
  void raw(const std::string& svg) { body_ += svg; }

  // Around the plan: axes (coordinates and titles in the canvas's unit) and north.
  /// Axes in the canvas unit and a north arrow: true north about a geographic origin, the grid
  /// north of a projected CRS (`grid_of_crs`), else the y axis called grid north.
  void axes(bool has_origin, bool grid_of_crs = false);
  // A vertical bar from the ramp's light end (bottom) to its dark end (top); ticks at t in
  // [0, 1]; `steps` bands (0: continuous).
  void colour_bar(const std::vector<std::pair<double, std::string>>& ticks, const std::string& caption, int steps);
  // The same with another scale's colours at t in [0, 1] (bottom to top), e.g. a diverging one.
  void colour_bar(const std::vector<std::pair<double, std::string>>& ticks, const std::string& caption, int steps,
                  const std::function<std::string(double)>& colour);
  // Legend entries: a line sample, a filled swatch, or any SVG mark drawn in a 24 x 12 box at
  // (0, 0); the text wraps within the panel.
  void legend_heading(const std::string& text);
  void legend_line(const std::string& style, const std::string& text);
  void legend_fill(const std::string& style, const std::string& text);
  void legend_mark(const std::string& svg, const std::string& text);
  void legend_text(const std::string& text);
  // The entries every plan shares: zone roles by dash pattern; source marks (aim, mean impact
  // point and, with the spread drawn, its ellipses and CEP circle).
  void legend_zone_roles();
  void legend_source_marks(bool with_spread);
  void legend_drops(const Site& s);    // nothing when the site has no drop
  void legend_barriers(const Site& s);  // nothing when the site has neither barriers nor throwers
  void scale_bar();  // a round length in the canvas's unit
  void note(const std::string& text);
  std::string finish() const;

  static std::string escape(const std::string& s);
  // Estimated advance width of `text` in pixels at `font_px` (DejaVu Sans, rounded up).
  static double text_width(const std::string& text, double font_px);
  // Probabilities in one format everywhere in a picture: "1e-4", "2.5e-4", "1e0".
  static std::string probability(double p);
  // The same fixed number of decimals for every value of one kind in a picture.
  static std::string fixed(double v, int decimals);
  // A round tick step for an axis spanning `span` with about `ticks` intervals: 1, 2 or 5 times a
  // power of ten, at least span / ticks (so 3.5, 7.1, 11 become 2, 4, 6, 8, 10).
  static double round_step(double span, int ticks);

 private:
  struct Box {
    double x0, y0, x1, y1;
  };
  bool free(const Box& b) const;
  void text_at(double px, double py, const std::string& text, double font_px, const std::string& attrs);
  std::vector<std::string> wrap(const std::string& text, double font_px, double width) const;
  void legend_entry(const std::string& swatch, const std::string& text);

  BoundingBox world_;
  LengthUnit unit_ = LengthUnit::metre;
  double scale_ = 1.0, plan_w_ = 0.0, plan_h_ = 0.0;
  double left_ = 72.0, top_ = 0.0, panel_x_ = 0.0, panel_y_ = 0.0, panel_w_ = 250.0;
  std::string title_, subtitle_, head_, body_, panel_, defs_;
  std::vector<std::string> notes_;
  std::vector<Box> taken_;  // text boxes placed in the plan
  bool legend_open_ = false, legend_closed_ = false;
};

}  // namespace strewn::cli

#endif
