#include "strewn/site_map.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <cstdio>
#include <nlohmann/json.hpp>
#include <sstream>
#include <utility>

#include "geometry/nesting_scan.hpp"
#include "strewn/barrier_effect.hpp"
#include "strewn/error.hpp"
#include "strewn/input_file.hpp"
#include "strewn/region_ops.hpp"

namespace strewn {
namespace {

std::string level_text(double v) {
  char text[32];
  std::snprintf(text, sizeof text, "%.3g", v);
  return text;
}

// "a', 'b', 'c": names joined as the label quotes them.
std::string joined(const std::vector<std::string>& names) {
  std::string out;
  for (std::size_t i = 0; i < names.size(); ++i) out += (i ? "', '" : "") + names[i];
  return out;
}

// Whether the extent (x0 y0 x1 y1, m) meets a zone's bounding box or holds a source's mean
// impact point (of any component): the things a map is drawn to show.
bool extent_holds_site(const Site& site, const std::vector<double>& extent) {
  const Vec2 lo(extent[0], extent[1]);
  const Vec2 hi(extent[2], extent[3]);
  for (const Zone& z : site.zones) {
    const BoundingBox b = bounds(z.region);
    if ((b.max.array() >= lo.array()).all() && (b.min.array() <= hi.array()).all()) return true;
  }
  for (const Source& src : site.sources)
    for (const WeightedGaussian& c : src.model.components()) {
      const Vec2 p = c.gaussian.mean();
      if ((p.array() >= lo.array()).all() && (p.array() <= hi.array()).all()) return true;
    }
  return false;
}

}  // namespace

GridSpec site_map_grid(const Site& site, const std::vector<double>& extent, int cells) {
  BoundingBox box;
  if (extent.size() == 4) {
    for (double v : extent)
      if (!(std::fabs(v) <= 1e12)) throw request_error("extent", "the map extent's coordinates must be finite numbers within +-1e12 m");
    box = {Vec2(extent[0], extent[1]), Vec2(extent[2], extent[3])};
    if (!(box.max.x() > box.min.x() && box.max.y() > box.min.y())) throw request_error("extent", "the map extent must be X0 Y0 X1 Y1 with X1 > X0 and Y1 > Y0");
  } else {
    // The zones and three standard deviations around every component's mean, plus 5%.
    box = site_extent(site);
    for (const Source& src : site.sources)
      for (const WeightedGaussian& c : src.model.components()) {
        const double reach = 3.0 * c.gaussian.axes().sigma_major;
        box.min = box.min.cwiseMin(c.gaussian.mean() - Vec2(reach, reach));
        box.max = box.max.cwiseMax(c.gaussian.mean() + Vec2(reach, reach));
      }
    const Vec2 pad = 0.05 * (box.max - box.min);
    box = {box.min - pad, box.max + pad};
  }
  const Vec2 size = box.max - box.min;
  GridSpec g;
  g.spacing = std::max(size.x(), size.y()) / cells;
  g.columns = std::max(2, static_cast<int>(std::ceil(size.x() / g.spacing)));
  g.rows = std::max(2, static_cast<int>(std::ceil(size.y() / g.spacing)));
  g.origin = box.min + Vec2(g.spacing / 2, g.spacing / 2);
  return g;
}

SiteMap make_site_map(const Site& site, const ShapeRegistry& shapes, const SiteMapRequest& r,
                      const ProgressFn& progress) {
  try {
    check_json_nesting(r.footprint_params, "the footprint's parameters");
  } catch (const input_error& e) {
    throw request_error("footprint_params", e.what());
  }
  std::string twice;
  nlohmann::json params;
  try {
    params = detail::parse_json_once(r.footprint_params, twice);
  } catch (const std::exception&) {
    params = nlohmann::json(nlohmann::json::value_t::discarded);
  }
  if (!twice.empty())
    throw request_error("footprint_params", "the footprint's parameter '" + quoted_excerpt(twice) + "' is given twice");
  if (params.is_discarded() || !params.is_object())
    throw request_error("footprint_params", "the footprint's parameters must be a JSON object");
  // The footprint is built once and translated to every cell (compute_risk_map). A kind with a
  // `centre` parameter stands on that centre ([0, 0] unless given: a given centre offsets the
  // footprint from the cell); any other kind (polygon, doorway, composite) stands on the centre of
  // its bounding box, whatever coordinates it was drawn in.
  const ShapeKindInfo* kind = shapes.find(r.footprint_kind);
  bool has_centre = false;
  if (kind != nullptr) {
    const nlohmann::json d = nlohmann::json::parse(kind->params_json, nullptr, false);
    if (!d.is_discarded() && d.contains("params") && d["params"].is_array())
      for (const auto& p : d["params"]) has_centre = has_centre || (p.is_object() && p.value("name", "") == "centre");
  }
  if (has_centre && !params.contains("centre")) params["centre"] = {0.0, 0.0};
  if (!(r.footprint_metres_per_unit > 0.0 && std::isfinite(r.footprint_metres_per_unit)))
    throw request_error("footprint_metres_per_unit", "the footprint's unit must be a positive number of metres");
  Region built;
  std::vector<Warning> footprint_warnings;  // former parameter names, as the scenario reader reports them
  try {
    BuildOptions build_options;
    build_options.warnings = &footprint_warnings;
    built = shapes.build(r.footprint_kind, shapes.params_in_metres(r.footprint_kind, params.dump(), r.footprint_metres_per_unit),
                         build_options);
  } catch (const input_error& e) {
    // A known kind refused its parameters (unknown, missing, both a former and a new name, a bad
    // value): the parameters are at fault; an unknown kind is the kind's.
    throw request_error(kind != nullptr ? "footprint_params" : "footprint_kind", "the footprint " + r.footprint_kind + ": " + e.what());
  }
  const Region footprint = has_centre ? built : footprint_about(built, footprint_reference(built));
  std::vector<MapSource> sources;
  // Barriers and throwing lines: each cell through integrate_source (strewn/barrier_effect.hpp).
  std::vector<std::function<Estimate(const Region&)>> past_barriers;
  double barriered_components = 0.0;
  for (const Source& src : site.sources) {
    sources.push_back({src.model, src.events_per_session, src.sessions_per_year});
    past_barriers.emplace_back();
    if (needs_barrier_integration(src)) {
      IntegrateOptions cell_options = site.options;
      cell_options.progress = nullptr;
      // A throwing line stays at its line_components pieces per cell (no refinement: a map has
      // many cells); the proven bound still goes into each cell's.
      past_barriers.back() = [src, cell_options](const Region& placed) { return integrate_source(src, placed, cell_options, 0); };
      barriered_components += static_cast<double>(src.model.components().size());
    }
  }
  const GridSpec grid = site_map_grid(site, r.extent, r.cells);
  WorkEstimate work = risk_map_work(sources, footprint, grid);
  // A cell past barriers costs the footprint's intersections with every barrier's shadow: about
  // 0.2 + 3 barriers units per component and footprint edge, an arc counting as the 64 chords it
  // is cut into there. Measured (1 core, CPU per cell and component, 2026-12-05; a 16-piece
  // throwing line): a 0.3 m disk 14 us with no barrier (a line goes this way too), 230 us past
  // one net, the person 200 us (250 us past two), an octagon 22 us past one; the estimate's 13,
  // 205, 205 (397), 26. The flat 40 units per component before left the curved footprints' maps
  // 5-6 times longer than estimated.
  double effective_edges = 0.0;
  for (const Loop& l : footprint.loops)
    for (const Edge& e : l) effective_edges += e.kind == Edge::Kind::arc ? 64.0 : 1.0;
  work.units += (0.2 + 3.0 * static_cast<double>(site.barriers.size())) * std::max(effective_edges, 1.0) *
                barriered_components * static_cast<double>(grid.columns) * static_cast<double>(grid.rows);
  if (barriered_components > 0.0) {
    std::ostringstream past;
    past << ", " << barriered_components << " of them through barriers (" << site.barriers.size()
         << ") or a throwing line, each costing " << (0.2 + 3.0 * static_cast<double>(site.barriers.size())) *
                                                          std::max(effective_edges, 1.0)
         << " units a cell";
    work.what += past.str();
  }
  check_work(work, kMapWorkCeiling, r.force,
             "ask for fewer cells (or a smaller extent), or force the request to run it anyway");
  SiteMap m;
  m.warnings = std::move(footprint_warnings);
  if (r.extent.size() == 4) m.extent_holds_nothing = !extent_holds_site(site, r.extent);
  {
    double narrowest = std::numeric_limits<double>::infinity();
    for (const Source& src : site.sources)
      for (const WeightedGaussian& c : src.model.components()) narrowest = std::min(narrowest, c.gaussian.axes().sigma_minor);
    const BoundingBox b = bounds(footprint);
    const double side = footprint.empty() ? 0.0 : std::min(b.max.x() - b.min.x(), b.max.y() - b.min.y());
    m.resolvable_width = 2.0 * narrowest + side;
  }
  m.per = r.per;
  m.footprint = r.footprint_kind + " " + params.dump();
  m.footprint_kind = r.footprint_kind;
  m.footprint_params = params.dump();
  RiskMapOptions o;
  o.integrate = site.options;
  o.threads = r.threads;
  o.progress = progress;
  o.past_barriers = past_barriers;
  o.distributor = r.distributor;
  try {
    m.map = compute_risk_map(sources, footprint, grid, r.per, o);
  } catch (const input_error& e) {
    throw input_error(site.file + ": map with footprint " + m.footprint + ": " + e.what());
  }
  if (!m.map.converged) m.status = Status::tolerance_not_met;
  if (m.map.value.empty()) return m;  // a computing process of a distributed map: rank 0 has it
  const double top = *std::max_element(m.map.value.begin(), m.map.value.end());
  // Contours: every keep-out limit stated per the map's period, and the decades 1e-2 .. 1e-8.
  std::vector<std::pair<double, std::vector<std::string>>> limits;  // zones sharing a limit share a line
  for (const Zone& z : site.zones) {
    if (!z.limit || z.limit_per != r.per) continue;
    auto same = std::find_if(limits.begin(), limits.end(), [&](const auto& l) { return l.first == *z.limit; });
    if (same == limits.end()) limits.push_back({*z.limit, {z.name}});
    else same->second.push_back(z.name);
  }
  for (const auto& [level, names] : limits) {
    UnsafeArea u{level, names, area_at_or_above(m.map, level), 0.0};
    u.square_metres = u.area.empty() ? 0.0 : area(u.area);
    m.unsafe_areas.push_back(std::move(u));
    if (level < top) m.contours.push_back({contour(m.map, level), "limit of '" + joined(names) + "' (" + level_text(level) + ")"});
  }
  const double bottom = *std::min_element(m.map.value.begin(), m.map.value.end());
  for (int d = -2; d >= -8; --d) {
    const double level = std::pow(10.0, d);
    const bool is_limit = std::any_of(m.contours.begin(), m.contours.end(), [&](const LabelledContours& c) { return std::fabs(c.set.level - level) <= 1e-12 * level; });
    if (level < top && level > bottom && !is_limit) m.contours.push_back({contour(m.map, level), level_text(level)});
  }
  return m;
}

std::string coarse_cells_warning(const SiteMap& m) {
  std::ostringstream w;
  w.precision(3);
  w << "the cells (" << m.map.grid.spacing << " m) are wider than the narrowest peak of the risk (about "
    << m.resolvable_width << " m: twice the smallest spread's sigma plus the footprint): the risk between cell centres "
    << "is not seen, so the largest risk and the unsafe areas may be understated; map a smaller extent or more cells";
  return w.str();
}

}  // namespace strewn
