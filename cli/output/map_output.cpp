#include "output/lengths.hpp"
#include "output/map_output.hpp"

#include <algorithm>
#include <cmath>
#include <fmt/format.h>
#include <fmt/ostream.h>
#include <nlohmann/json.hpp>
#include <optional>
#include <ostream>

#include "output/assess_output.hpp"
#include "output/palette.hpp"
#include "output/plan_features.hpp"
#include "output/svg_canvas.hpp"
#include "output/svg_plan.hpp"
#include "strewn/crs.hpp"
#include "strewn/region_io.hpp"
#include "strewn/version.hpp"

namespace strewn::cli {
namespace {

// How the sources combine in a cell: the same definitions as the limits of an assessment.
std::string combined_text(Period per) {
  return per == Period::event ? "largest single source (as per-event limits are judged)" : "at least one impact from any source";
}

// The cell of the largest risk and the worst bound relative to its cell's value, over the cells
// whose bound is above the absolute floor: the request's abs_tolerance per event times the
// events of every source in the map's period (a cell of risk 1e-300 with a bound of 1e-44 met
// the request absolutely; its 8e256 "relative" said nothing).
struct MapPeak {
  std::size_t best = 0;
  double worst_rel = 0.0;
  double floor = 0.0;
  Vec2 at;
};

MapPeak peak_of(const Site& s, const SiteMap& m) {
  MapPeak p;
  for (const Source& src : s.sources)
    p.floor += s.options.abs_tolerance * (m.per == Period::event     ? 1.0
                                          : m.per == Period::session ? src.events_per_session
                                                                     : src.events_per_session * src.sessions_per_year);
  for (std::size_t k = 0; k < m.map.value.size(); ++k) {
    if (m.map.value[k] > m.map.value[p.best]) p.best = k;
    if (m.map.value[k] > 0 && m.map.abs_err[k] > p.floor)
      p.worst_rel = std::max(p.worst_rel, m.map.abs_err[k] / m.map.value[k]);
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
  const MapPeak p = peak_of(s, m);
  const Lengths L(s);
  nlohmann::json j = {{"strewn_version", STREWN_VERSION_STRING}, {"site", s.site_name}, {"file", s.file},
                      {"units", {{"length", L.symbol()}}},
                      {"footprint", m.footprint}, {"per", to_string(m.per)}, {"sources_combined", combined_text(m.per)},
                      {"grid", {{"origin", {L(g.origin.x()), L(g.origin.y())}}, {L.key("spacing"), L(g.spacing)}, {"columns", g.columns}, {"rows", g.rows}}},
                      {"max_risk", m.map.value[p.best]}, {"max_at", {L(p.at.x()), L(p.at.y())}},
                      {"worst_relative_bound", p.worst_rel}, {"absolute_floor", p.floor}, {"converged", m.map.converged},
                      {L.key("resolvable_width"), L(m.resolvable_width)}, {"cells_too_coarse", m.cells_too_coarse()}, {"seconds", seconds},
                      {"caution", kCaution}};
  for (const LabelledContours& c : m.contours)
    j["contours"].push_back({{"level", c.set.level}, {"label", c.label}, {"lines", c.set.lines.size()},
                             {"log10_accuracy", c.set.log10_error}});
  for (const UnsafeArea& u : m.unsafe_areas)
    j["unsafe_areas"].push_back({{"level", u.level}, {"zones", u.zones}, {L.area_key("area"), L(L(u.square_metres))}, {"loops", u.area.loops.size()}});
  out << j.dump(2) << "\n";
}

void write_map_summary_table(std::ostream& out, const Site& s, const SiteMap& m, double seconds) {
  const GridSpec& g = m.map.grid;
  const MapPeak p = peak_of(s, m);
  const Lengths L(s);
  const char* u = L.symbol();
  fmt::print(out, "strewn {} map: {}\nscenario: {}\n", STREWN_VERSION_STRING, s.site_name, s.file);
  fmt::print(out, "footprint: {}; risk per {}, {}\n", m.footprint, to_string(m.per), combined_text(m.per));
  fmt::print(out, "grid: {} x {} cells of {:.3g} {} from {} {}; {:.2g} s\n", g.columns, g.rows, L(g.spacing), u,
             L.point(g.origin), u, seconds);
  // Whether the request was met, as the picture's note says it (a new-user trial: the summary
  // read "within its bound" where the SVG said some cells missed the tolerance).
  if (m.status != Status::converged)
    fmt::print(out, "largest risk {:.3g} at {} {}; the requested tolerance was NOT met in some cells: worst bound {:.1g} "
                    "relative (bounds under {:.1g} not counted; each cell's bound is the CSV's abs_err)\n",
               m.map.value[p.best], L.point(p.at), u, p.worst_rel, p.floor);
  else if (p.worst_rel > 0.0)
    fmt::print(out, "largest risk {:.3g} at {} {}; every cell within its bound, worst {:.1g} relative (bounds under {:.1g} not counted)\n",
               m.map.value[p.best], L.point(p.at), u, p.worst_rel, p.floor);
  else
    fmt::print(out, "largest risk {:.3g} at {} {}; every cell within its bound, every bound under {:.1g}\n",
               m.map.value[p.best], L.point(p.at), u, p.floor);
  fmt::print(out, "\ncontours (marching squares; the field on a line is within the factor shown):\n");
  for (const LabelledContours& c : m.contours)
    fmt::print(out, "  {:<40.40} {:>3} line(s), within x{:.4f}\n", c.label, c.set.lines.size(), std::pow(10.0, c.set.log10_error));
  if (!m.unsafe_areas.empty()) fmt::print(out, "\nunsafe to stand (risk at or above a keep-out limit, within the map):\n");
  for (const UnsafeArea& u : m.unsafe_areas) {
    std::string names;
    for (const std::string& n : u.zones) names += (names.empty() ? "'" : ", '") + n + "'";
    fmt::print(out, "  limit {:.3g} per {} of {}: {:.3g} {}^2\n", u.level, to_string(m.per), names, L(L(u.square_metres)), L.symbol());
  }
  fmt::print(out, "\n{}\n", kCaution);
}

std::vector<Verdict> zone_verdicts(const Site& s, const Assessment* a) {
  std::vector<Verdict> v(s.zones.size(), Verdict::no_limit);
  if (a == nullptr) return v;
  for (const ZoneResult& z : a->zones) {
    const auto at = static_cast<std::size_t>(z.zone - s.zones.data());
    if (at >= v.size() || !z.limit_holds) continue;
    v[at] = z.limit_undecided ? Verdict::not_shown : *z.limit_holds ? Verdict::holds : Verdict::exceeded;
  }
  return v;
}

std::string footprint_words(const SiteMap& m) {
  // "a person (shape 'person', default size)" rather than the raw JSON of the parameters.
  const nlohmann::json p = nlohmann::json::parse(m.footprint_params.empty() ? "{}" : m.footprint_params, nullptr, false);
  std::string given;
  if (p.is_object())
    for (const auto& [key, value] : p.items()) {
      if (key == "centre" && value == nlohmann::json::array({0.0, 0.0})) continue;
      given += (given.empty() ? "" : ", ") + key + " " + (value.is_number() ? fmt::format("{:g}", value.get<double>()) : value.dump());
    }
  const std::string kind = m.footprint_kind.empty() ? m.footprint : m.footprint_kind;
  const std::string what = kind == "person" ? "a person" : "a footprint";
  return what + " (shape '" + kind + "', " + (given.empty() ? std::string("default size") : given) + ")";
}

namespace {

// Limit lines: the alarm colour, one dash pattern per limit so that two limits read apart
// without colour; decade lines thin and grey.
const char* const kLimitDashes[] = {"", "9 4", "3 3", "12 4 3 4"};

std::string limit_style(std::size_t k) {
  const char* dash = kLimitDashes[k % 4];
  return fmt::format("stroke=\"{}\" stroke-width=\"2.4\"{}", palette::alarm(),
                     *dash ? fmt::format(" stroke-dasharray=\"{}\"", dash) : std::string());
}

// The unsafe area at limit k: hatched in the alarm colour, every other limit at the other
// slant, so that nested areas cross-hatch and the field's colour still shows through.
std::string hatch(std::size_t k) {
  return fmt::format("<pattern id=\"unsafe-{}\" width=\"7\" height=\"7\" patternUnits=\"userSpaceOnUse\" "
                     "patternTransform=\"rotate({})\"><path d=\"M0,0 v7\" stroke=\"{}\" stroke-width=\"1.6\"/></pattern>\n",
                     k, k % 2 == 0 ? 45 : -45, palette::alarm());
}

std::string names_text(const std::vector<std::string>& names) {
  std::string out;
  for (std::size_t i = 0; i < names.size(); ++i) out += (i ? ", '" : "'") + names[i] + "'";
  return out;
}

// Labels along a contour: candidate anchors spread over every line, starting at an offset
// that differs per level; the first place free of other text wins.
void label_contour(SvgCanvas& canvas, const ContourSet& set, const std::string& text, std::size_t k, const std::string& attrs) {
  std::vector<Vec2> anchors;
  for (const ContourLine& line : set.lines) {
    const std::size_t n = line.points.size();
    if (n == 0) continue;
    for (std::size_t step = 0; step < 16; ++step) anchors.push_back(line.points[(n - 1) * ((step * 7 + k * 3 + 2) % 16) / 16]);
  }
  for (const Vec2& at : anchors)
    if (canvas.plan_label(at, text, 10, attrs, true, false)) return;
}

}  // namespace

std::string risk_map_svg(const Site& s, const SiteMap& m, const Assessment* assessment) {
  const GridSpec& g = m.map.grid;
  const double h = g.spacing / 2;
  BoundingBox box{g.origin - Vec2(h, h), g.centre(g.columns - 1, g.rows - 1) + Vec2(h, h)};
  const std::string per = per_text(m);
  const Lengths L(s);
  SvgCanvas canvas(box, s.site_name + ": where it is unsafe to stand",
                   "Risk per " + per + " that an impact lands on " + footprint_words(m) + " standing at each point, " +
                       (m.per == Period::event ? "largest single source" : "all sources"),
                   s.units);
  // The colour scale fitted to the field: from the decade above its largest value down to the
  // decade below its smallest positive one, at most ten decades and at least one.
  double top = 0.0, bottom = 0.0;
  for (double v : m.map.value) {
    top = std::max(top, v);
    if (v > 0 && (bottom == 0.0 || v < bottom)) bottom = v;
  }
  const double high = (top > 0 ? std::ceil(std::log10(top) - 1e-12) : 0.0) + 0.0;  // + 0.0: never -0
  const double low = top > 0 ? std::min(high - 1.0, std::max(std::floor(std::log10(bottom)), high - 10.0)) : -1.0;
  const LogScale scale{low, high};
  const int bands = static_cast<int>(std::lround((high - low) * kBandsPerDecade));
  canvas.raw(fmt::format("<g id=\"field\" shape-rendering=\"crispEdges\" data-log10-range=\"{:g} {:g}\">\n", low, high));
  for (int j = 0; j < g.rows; ++j)
    for (int i = 0; i < g.columns;) {  // runs of equal band become one rectangle
      const int b = scale.band(m.map.at(i, j));
      int end = i + 1;
      while (end < g.columns && scale.band(m.map.at(end, j)) == b) ++end;
      if (b >= 0)
        canvas.cell(g.centre(i, j) - Vec2(h, h), g.centre(end - 1, j) + Vec2(h, h),
                    palette::ramp(bands > 1 ? std::min(b, bands - 1) / (bands - 1.0) : 0.0));
      i = end;
    }
  canvas.raw("</g>\n<g id=\"unsafe-areas\">\n");
  for (std::size_t k = 0; k < m.unsafe_areas.size(); ++k) {
    const UnsafeArea& u = m.unsafe_areas[k];
    canvas.define(hatch(k));
    if (u.area.empty()) continue;
    canvas.area(u.area, fmt::format("class=\"unsafe-area\" data-level=\"{:g}\" fill=\"{}\" fill-opacity=\"0.12\" stroke=\"none\"",
                                    u.level, palette::alarm()));
    canvas.area(u.area, fmt::format("fill=\"url(#unsafe-{})\" stroke=\"none\"", k));
  }
  canvas.raw("</g>\n<g id=\"contours\">\n");
  std::vector<std::size_t> limit_index(m.contours.size(), 0);
  for (std::size_t k = 0; k < m.contours.size(); ++k) {
    const LabelledContours& c = m.contours[k];
    const auto u = std::find_if(m.unsafe_areas.begin(), m.unsafe_areas.end(), [&](const UnsafeArea& a) { return a.level == c.set.level; });
    const bool is_limit = u != m.unsafe_areas.end();
    limit_index[k] = is_limit ? static_cast<std::size_t>(u - m.unsafe_areas.begin()) : 0;
    const std::string style = is_limit ? limit_style(limit_index[k]) + " class=\"limit-contour\""
                                       : fmt::format("stroke=\"{}\" stroke-width=\"0.9\" class=\"decade-contour\"", palette::grey());
    for (const ContourLine& line : c.set.lines) canvas.polyline(line.points, line.closed, style);
  }
  canvas.raw("</g>\n");
  canvas.zones(s, zone_verdicts(s, assessment));
  canvas.barriers(s);
  canvas.drops(s);
  canvas.sources(s, true);
  canvas.zone_labels(s, zone_verdicts(s, assessment));
  canvas.source_labels(s);
  canvas.raw("<g id=\"contour-labels\">\n");
  for (int pass = 0; pass < 2; ++pass)  // limits first: they matter most
    for (std::size_t k = 0; k < m.contours.size(); ++k) {
      const LabelledContours& c = m.contours[k];
      const bool is_limit = std::any_of(m.unsafe_areas.begin(), m.unsafe_areas.end(), [&](const UnsafeArea& a) { return a.level == c.set.level; });
      if (is_limit != (pass == 0)) continue;
      label_contour(canvas, c.set, (is_limit ? "limit " : "") + SvgCanvas::probability(c.set.level), k,
                    fmt::format("fill=\"{}\" class=\"contour-label\"", is_limit ? palette::alarm() : palette::ink()));
    }
  canvas.raw("</g>\n");

  canvas.axes(s.origin.has_value(), !s.crs.empty());
  std::vector<std::pair<double, std::string>> ticks;
  const int every = high - low > 6 ? 2 : 1;
  for (double d = high; d >= low - 1e-9; d -= every) ticks.push_back({(d - low) / (high - low), SvgCanvas::probability(std::pow(10.0, d))});
  canvas.colour_bar(ticks, "Risk per " + per + " (log scale; white: below " + SvgCanvas::probability(std::pow(10.0, low)) + ")", bands);
  canvas.legend_heading("Key");
  for (std::size_t k = 0; k < m.unsafe_areas.size(); ++k) {
    const UnsafeArea& u = m.unsafe_areas[k];
    const std::string swatch = fmt::format("<rect width=\"26\" height=\"12\" fill=\"{0}\" fill-opacity=\"0.12\"/>"
                                           "<rect width=\"26\" height=\"12\" fill=\"url(#unsafe-{2})\"/><path d=\"M0,6 h26\" {1}/>",
                                           palette::alarm(), limit_style(k), k);
    // A limit reached nowhere gets its line sample only: no hatch that would look like an area.
    canvas.legend_mark(u.area.empty() ? fmt::format("<path d=\"M0,6 h26\" {}/>", limit_style(k)) : swatch, u.area.empty()
                                   ? fmt::format("Limit {} per {} of {}: not reached anywhere on this map", SvgCanvas::probability(u.level), per,
                                                 names_text(u.zones))
                                   : fmt::format("Unsafe to stand: risk at or above {} per {}, the limit of {} ({} {}\u00b2 here)",
                                                 SvgCanvas::probability(u.level), per, names_text(u.zones),
                                                 SvgCanvas::fixed(L(L(u.square_metres)), L(L(u.square_metres)) < 10 ? 1 : 0), L.symbol()));
  }
  if (std::any_of(m.contours.begin(), m.contours.end(), [&](const LabelledContours& c) {
        return std::none_of(m.unsafe_areas.begin(), m.unsafe_areas.end(), [&](const UnsafeArea& a) { return a.level == c.set.level; });
      }))
    canvas.legend_line(fmt::format("stroke=\"{}\" stroke-width=\"0.9\"", palette::grey()), "Risk at a whole decade (1e-2, 1e-3, ...), labelled on the line");
  const std::vector<Verdict> verdicts = zone_verdicts(s, assessment);
  const auto has = [&](Verdict v) { return std::find(verdicts.begin(), verdicts.end(), v) != verdicts.end(); };
  if (has(Verdict::exceeded)) canvas.legend_line(fmt::format("stroke=\"{}\" stroke-width=\"3\"", palette::alarm()), "Zone whose limit is exceeded");
  if (has(Verdict::not_shown))
    canvas.legend_line(fmt::format("stroke=\"{}\" stroke-width=\"2\"", palette::doubt()), "Zone whose limit is not shown to hold (its error bound reaches past it)");
  if (has(Verdict::holds)) canvas.legend_line(fmt::format("stroke=\"{}\" stroke-width=\"2\"", palette::safe()), "Zone whose limit holds");
  if (has(Verdict::no_limit)) canvas.legend_line(fmt::format("stroke=\"{}\" stroke-width=\"2\"", palette::ink()), "Zone without a limit");
  canvas.legend_zone_roles();
  canvas.legend_source_marks(true);
  canvas.legend_barriers(s);
  canvas.legend_drops(s);
  canvas.scale_bar();
  double accuracy = 0.0;
  for (const LabelledContours& c : m.contours) accuracy = std::max(accuracy, c.set.log10_error);
  canvas.note("Each cell shows the probability per " + per + " that " +
              (m.per == Period::event ? "an impact from the riskiest single source" : "at least one impact from any source") + " lands on " +
              footprint_words(m) + " standing there; every cell is an exact integration with its own error bound. Lines and unsafe "
              "areas follow the grid (marching squares); " +
              // A field that jumps (at a barrier's shadow edge) has no useful factor: say so.
              (accuracy <= 2.0 ? "along a line the risk is within a factor " + SvgCanvas::fixed(std::pow(10.0, accuracy), 3) + " of its level"
                               : std::string("the risk jumps between cells (e.g. at a barrier's shadow edge), so a line may be far from its level there")) +
              ". Coordinates in " +
              (s.units == LengthUnit::foot ? "feet" : "metres") + " in the site frame.");
  bool other_periods = false;
  for (const Zone& z : s.zones) other_periods = other_periods || (z.limit && z.limit_per != m.per);
  if (other_periods) canvas.note("Limits stated per another period than " + per + " are not drawn here; run strewn map with --per for them.");
  if (m.status != Status::converged)
    canvas.note(fmt::format("Some cells did not meet the requested tolerance: the worst error bound is {:.1g} of its "
                            "cell's risk; every cell's bound is in the map's CSV (strewn map --csv, column abs_err).",
                            peak_of(s, m).worst_rel));
  canvas.note("Model estimate: it does not replace physical barriers, the venue's rules, local codes or a competent person's assessment.");
  return canvas.finish();
}

std::string risk_map_csv(const Site& s, const SiteMap& m) {
  const Lengths L(s);
  std::string out = fmt::format("{},{},risk_per_{},abs_err\n", L.key("x"), L.key("y"), per_text(m));
  const GridSpec& g = m.map.grid;
  for (int j = 0; j < g.rows; ++j)
    for (int i = 0; i < g.columns; ++i) {
      const Vec2 c = L(g.centre(i, j));
      // 15 digits: at a northing of 5.7e6 m, 9 rounded cell centres to the centimetre (a 5 mm map had
      // 840 distinct points in 1600 cells).
      out += fmt::format("{:.15g},{:.15g},{:.17g},{:.3g}\n", c.x(), c.y(), m.map.at(i, j),
                         m.map.abs_err[static_cast<std::size_t>(j) * g.columns + i]);
    }
  return out;
}

std::string contours_geojson(const Site& s, const SiteMap& m) {
  const Lengths L(s);
  nlohmann::json fc = {{"type", "FeatureCollection"}};
  // A foreign member (RFC 7946, 6.1): positions in the site's frame and unit, when it is tied to no
  // place (neither a CRS nor an origin); longitude/latitude otherwise.
  const bool tied = s.origin || !s.crs.empty();
  if (!tied) fc["strewn_coordinates"] = s.units == LengthUnit::foot ? "site_feet" : "site_metres";
  std::optional<CrsTransform> to_site;
  if (tied) to_site = lon_lat_to_site(s);
  fc["features"] = nlohmann::json::array();
  for (const LabelledContours& c : m.contours) {
    nlohmann::json lines = nlohmann::json::array();
    for (const ContourLine& line : c.set.lines) {
      nlohmann::json coords = nlohmann::json::array();
      for (const Vec2& p : line.points) {
        const Vec2 q = to_site ? to_site->inverse(p) : L(p);
        coords.push_back({q.x(), q.y()});
      }
      if (line.closed && !line.points.empty()) coords.push_back(coords.front());
      lines.push_back(coords);
    }
    fc["features"].push_back({{"type", "Feature"},
                              {"properties",
                               {{"kind", "contour"}, {"level", c.set.level}, {"per", per_text(m)}, {"label", c.label},
                                {"log10_accuracy", c.set.log10_error}, {"footprint", m.footprint}}},
                              {"geometry", {{"type", "MultiLineString"}, {"coordinates", lines}}}});
  }
  const auto point_of = [&](const Vec2& p) {
    const Vec2 q = to_site ? to_site->inverse(p) : L(p);
    return nlohmann::json::array({q.x(), q.y()});
  };
  // RFC 7946 polygons: each outer loop (counter-clockwise) with the holes (clockwise) that lie
  // in it, every ring closed by repeating its first position.
  const auto polygons_of = [&](const Region& region) {
    const auto ring_of = [&](const Loop& loop) {
      nlohmann::json ring = nlohmann::json::array();
      for (const Edge& e : loop) ring.push_back(point_of(e.from));
      ring.push_back(ring.front());
      return ring;
    };
    std::vector<const Loop*> outers, holes;
    for (const Loop& l : region.loops) (signed_area(l) > 0 ? outers : holes).push_back(&l);
    nlohmann::json polygons = nlohmann::json::array();
    for (const Loop* o : outers) {
      nlohmann::json poly = nlohmann::json::array({ring_of(*o)});
      Region just_outer;
      just_outer.loops.push_back(*o);
      for (const Loop* hole : holes)
        if (winding_number(just_outer, hole->front().from) != 0) poly.push_back(ring_of(*hole));
      polygons.push_back(poly);
    }
    return polygons;
  };
  for (const UnsafeArea& u : m.unsafe_areas) {
    if (u.area.empty()) continue;
    fc["features"].push_back({{"type", "Feature"},
                              {"properties",
                               {{"kind", "unsafe_area"}, {"level", u.level}, {"per", per_text(m)}, {"zones", u.zones},
                                {L.area_key("area"), L(L(u.square_metres))}, {"footprint", m.footprint}}},
                              {"geometry", {{"type", "MultiPolygon"}, {"coordinates", polygons_of(u.area)}}}});
  }
  // Barriers, their shadows over the map's extent and the drops' flights
  // (output/plan_features.hpp: the same ones the SVG draws).
  for (const Barrier& b : s.barriers) {
    nlohmann::json line = nlohmann::json::array();
    for (const Vec2& p : b.points) line.push_back(point_of(p));
    nlohmann::json props = {{"kind", "barrier"}, {"name", b.name}, {"catch", b.catch_share}};
    props[L.key("height")] = b.height ? nlohmann::json(L(*b.height)) : nlohmann::json();
    fc["features"].push_back({{"type", "Feature"}, {"properties", props}, {"geometry", {{"type", "LineString"}, {"coordinates", line}}}});
  }
  const GridSpec& g = m.map.grid;
  const Vec2 half(g.spacing / 2, g.spacing / 2);
  const BoundingBox extent{g.origin - half, g.centre(g.columns - 1, g.rows - 1) + half};
  for (const ShadowFeature& f : plan_shadows(s, extent))
    fc["features"].push_back({{"type", "Feature"},
                              {"properties", {{"kind", "barrier_shadow"}, {"barrier", f.barrier}, {"source", f.source},
                                              {"seen_from", point_of(f.from)}}},
                              {"geometry", {{"type", "MultiPolygon"}, {"coordinates", polygons_of(f.area)}}}});
  for (const DropFeature& d : plan_drops(s)) {
    fc["features"].push_back({{"type", "Feature"},
                              {"properties", {{"kind", "flight_track"}, {"source", d.source}, {"label", d.track_label}}},
                              {"geometry", {{"type", "LineString"}, {"coordinates", {point_of(d.track_start), point_of(d.track_end)}}}}});
    fc["features"].push_back({{"type", "Feature"},
                              {"properties", {{"kind", "release_point"}, {"source", d.source}, {"label", d.release_label}}},
                              {"geometry", {{"type", "Point"}, {"coordinates", point_of(d.release)}}}});
    fc["features"].push_back({{"type", "Feature"},
                              {"properties", {{"kind", "nominal_landing"}, {"source", d.source}, {"label", d.landing_label}}},
                              {"geometry", {{"type", "Point"}, {"coordinates", point_of(d.landing)}}}});
  }
  return fc.dump(1) + "\n";
}

}  // namespace strewn::cli
