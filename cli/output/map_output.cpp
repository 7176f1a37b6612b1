#include "output/lengths.hpp"
#include "output/map_output.hpp"

#include <algorithm>
#include <cmath>
#include <fmt/format.h>
#include <fmt/ostream.h>
#include <nlohmann/json.hpp>
#include <ostream>

#include "output/assess_output.hpp"
#include "output/svg_canvas.hpp"
#include "output/svg_plan.hpp"
#include "strewn/region_io.hpp"
#include "strewn/version.hpp"

namespace strewn::cli {
namespace {

// How the sources combine in a cell: the same definitions as the limits of an assessment.
std::string combined_text(Period per) {
  return per == Period::event ? "largest single source (as per-event limits are judged)" : "at least one impact from any source";
}

// The cell of the largest risk and the worst bound relative to its cell's value.
struct MapPeak {
  std::size_t best = 0;
  double worst_rel = 0.0;
  Vec2 at;
};

MapPeak peak_of(const SiteMap& m) {
  MapPeak p;
  for (std::size_t k = 0; k < m.map.value.size(); ++k) {
    if (m.map.value[k] > m.map.value[p.best]) p.best = k;
    if (m.map.value[k] > 0) p.worst_rel = std::max(p.worst_rel, m.map.abs_err[k] / m.map.value[k]);
  }
  const GridSpec& g = m.map.grid;
  p.at = g.centre(static_cast<int>(p.best % g.columns), static_cast<int>(p.best / g.columns));
  return p;
}

std::string per_text(const SiteMap& m) { return to_string(m.per); }

constexpr int kBandsPerDecade = 3;

// The colour scale: log10 of the risk from `low` (lightest) to `high` (darkest), in bands of a
// third of a decade so that the plan reads like a contour map even in greyscale.
struct LogScale {
  double low, high;
  int band(double v) const {
    if (!(v > 0.0) || std::log10(v) < low) return -1;
    return static_cast<int>(std::floor((std::min(std::log10(v), high) - low) * kBandsPerDecade));
  }
  double t(int band) const { return std::min(1.0, (band + 0.5) / (kBandsPerDecade * (high - low))); }
};

}  // namespace

void write_map_summary_json(std::ostream& out, const Site& s, const SiteMap& m, double seconds) {
  const GridSpec& g = m.map.grid;
  const MapPeak p = peak_of(m);
  const Lengths L(s);
  nlohmann::json j = {{"strewn_version", STREWN_VERSION_STRING}, {"site", s.site_name}, {"file", s.file},
                      {"units", {{"length", L.symbol()}}},
                      {"footprint", m.footprint}, {"per", to_string(m.per)}, {"sources_combined", combined_text(m.per)},
                      {"grid", {{"origin", {L(g.origin.x()), L(g.origin.y())}}, {L.key("spacing"), L(g.spacing)}, {"columns", g.columns}, {"rows", g.rows}}},
                      {"max_risk", m.map.value[p.best]}, {"max_at", {L(p.at.x()), L(p.at.y())}},
                      {"worst_relative_bound", p.worst_rel}, {"converged", m.map.converged}, {"seconds", seconds},
                      {"caution", kCaution}};
  for (const LabelledContours& c : m.contours)
    j["contours"].push_back({{"level", c.set.level}, {"label", c.label}, {"lines", c.set.lines.size()},
                             {"log10_accuracy", c.set.log10_error}});
  out << j.dump(2) << "\n";
}

void write_map_summary_table(std::ostream& out, const Site& s, const SiteMap& m, double seconds) {
  const GridSpec& g = m.map.grid;
  const MapPeak p = peak_of(m);
  const Lengths L(s);
  const char* u = L.symbol();
  fmt::print(out, "strewn {} map: {}\nscenario: {}\n", STREWN_VERSION_STRING, s.site_name, s.file);
  fmt::print(out, "footprint: {}; risk per {}, {}\n", m.footprint, to_string(m.per), combined_text(m.per));
  fmt::print(out, "grid: {} x {} cells of {:.3g} {} from ({:.3g}, {:.3g}) {}; {:.1f} s\n", g.columns, g.rows, L(g.spacing), u,
             L(g.origin.x()), L(g.origin.y()), u, seconds);
  fmt::print(out, "largest risk {:.3g} at ({:.3g}, {:.3g}) {}; every cell within its bound, worst {:.1g} relative\n",
             m.map.value[p.best], L(p.at.x()), L(p.at.y()), u, p.worst_rel);
  fmt::print(out, "\ncontours (marching squares; the field on a line is within the factor shown):\n");
  for (const LabelledContours& c : m.contours)
    fmt::print(out, "  {:<40.40} {:>3} line(s), within x{:.4f}\n", c.label, c.set.lines.size(), std::pow(10.0, c.set.log10_error));
  fmt::print(out, "\n{}\n", kCaution);
}

std::string risk_map_svg(const Site& s, const SiteMap& m) {
  const GridSpec& g = m.map.grid;
  const double h = g.spacing / 2;
  BoundingBox box{g.origin - Vec2(h, h), g.centre(g.columns - 1, g.rows - 1) + Vec2(h, h)};
  SvgCanvas canvas(box, s.site_name + " - risk map (" + per_text(m) + ")");
  const double top = *std::max_element(m.map.value.begin(), m.map.value.end());
  const double high = top > 0 ? std::ceil(std::log10(top)) : 0.0;
  const LogScale scale{std::max(high - 10.0, -300.0), high};
  canvas.raw("<g id=\"field\" shape-rendering=\"crispEdges\">\n");
  for (int j = 0; j < g.rows; ++j)
    for (int i = 0; i < g.columns;) {  // runs of equal band become one rectangle
      const int b = scale.band(m.map.at(i, j));
      int end = i + 1;
      while (end < g.columns && scale.band(m.map.at(end, j)) == b) ++end;
      if (b >= 0) canvas.cell(g.centre(i, j) - Vec2(h, h), g.centre(end - 1, j) + Vec2(h, h), SvgCanvas::ramp(scale.t(b)));
      i = end;
    }
  canvas.raw("</g>\n<g id=\"contours\">\n");
  for (std::size_t k = 0; k < m.contours.size(); ++k) {
    const LabelledContours& c = m.contours[k];
    for (const ContourLine& line : c.set.lines) canvas.polyline(line.points, line.closed, "stroke=\"#111\" stroke-width=\"1.3\"");
    // Labels spread along their lines so that neighbouring levels do not print on one spot.
    if (!c.set.lines.empty() && !c.set.lines.front().points.empty()) {
      const auto& pts = c.set.lines.front().points;
      const std::size_t at = (pts.size() - 1) * ((k * 5 + 2) % 11) / 11;
      canvas.label(pts[at], c.label, "font-size=\"10\" fill=\"#111\" paint-order=\"stroke\" stroke=\"white\" stroke-width=\"3\"");
    }
  }
  canvas.raw("</g>\n");
  canvas.zones(s);
  canvas.sources(s, true);
  std::vector<std::pair<double, std::string>> ticks;
  for (int d = 0; d <= 10; d += 2) ticks.push_back({d / 10.0, fmt::format("1e{:g}", scale.low + d)});
  canvas.colour_bar(ticks, "risk per " + per_text(m));
  canvas.scale_bar(s.units);
  canvas.note("Probability that an impact lands on a " + m.footprint + " standing at each point, per " + per_text(m) +
              (m.per == Period::event ? ", largest single source." : ", all sources.") + " Lengths in " + symbol(s.units) + ".");
  canvas.note("Source marks: aim (x), mean impact point (dot), 1- and 2-sigma ellipses, CEP circle (dashed).");
  canvas.note("Model estimate: not a substitute for barriers, venue rules, local codes or a competent person's assessment.");
  return canvas.finish();
}

std::string risk_map_csv(const Site& s, const SiteMap& m) {
  const Lengths L(s);
  std::string out = fmt::format("{},{},risk_per_{},abs_err\n", L.key("x"), L.key("y"), per_text(m));
  const GridSpec& g = m.map.grid;
  for (int j = 0; j < g.rows; ++j)
    for (int i = 0; i < g.columns; ++i) {
      const Vec2 c = L(g.centre(i, j));
      out += fmt::format("{:.9g},{:.9g},{:.17g},{:.3g}\n", c.x(), c.y(), m.map.at(i, j),
                         m.map.abs_err[static_cast<std::size_t>(j) * g.columns + i]);
    }
  return out;
}

std::string contours_geojson(const Site& s, const SiteMap& m) {
  nlohmann::json fc = {{"type", "FeatureCollection"}};
  // A foreign member (RFC 7946, 6.1): positions in the site's frame and unit, when it has no origin.
  if (!s.origin) fc["strewn_coordinates"] = s.units == LengthUnit::foot ? "site_feet" : "site_metres";
  fc["features"] = nlohmann::json::array();
  for (const LabelledContours& c : m.contours) {
    nlohmann::json lines = nlohmann::json::array();
    for (const ContourLine& line : c.set.lines) {
      nlohmann::json coords = nlohmann::json::array();
      for (const Vec2& p : line.points) {
        const Vec2 q = s.origin ? site_to_lon_lat(*s.origin, p) : Lengths(s)(p);
        coords.push_back({q.x(), q.y()});
      }
      if (line.closed && !line.points.empty()) coords.push_back(coords.front());
      lines.push_back(coords);
    }
    fc["features"].push_back({{"type", "Feature"},
                              {"properties",
                               {{"level", c.set.level}, {"per", per_text(m)}, {"label", c.label},
                                {"log10_accuracy", c.set.log10_error}, {"footprint", m.footprint}}},
                              {"geometry", {{"type", "MultiLineString"}, {"coordinates", lines}}}});
  }
  return fc.dump(1) + "\n";
}

}  // namespace strewn::cli
