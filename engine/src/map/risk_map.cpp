#include "strewn/risk_map.hpp"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <cstring>
#include <stdexcept>
#include <string>
#include <sstream>

#include "integrate/integrators.hpp"
#include "strewn/error.hpp"
#include "strewn/position_text.hpp"
#include "strewn/work.hpp"
#include "map/translated_footprint.hpp"

namespace strewn {

namespace {

// Measured on the throwing lane (4 components, Release build, one thread): the person footprint
// (one arc) about 1.7 us a cell-component, a 4-edge polygon about 0.8 us a cell-component-edge.
constexpr double kMapSecondsPerUnit = 1e-6;

// Every source's components over the footprint, set up once and evaluated at many points.
class CellIntegrator {
 public:
  CellIntegrator(const std::vector<MapSource>& sources, const Region& footprint, Period per,
                 const IntegrateOptions& options,
                 std::vector<std::function<Estimate(const Region&)>> past_barriers = {})
      : sources_(sources), footprint_(footprint), box_(bounds(footprint)), per_(per), options_(options),
        past_barriers_(std::move(past_barriers)) {
    for (const MapSource& s : sources) {
      std::vector<detail::TranslatedFootprint> components;
      for (const WeightedGaussian& c : s.model.components()) components.emplace_back(c.gaussian, footprint, options);
      components_.push_back(std::move(components));
    }
  }

  Estimate source_at(std::size_t s, const Vec2& where) const {
    if (s < past_barriers_.size() && past_barriers_[s]) return past_barriers_[s](transformed(footprint_, Mat2::Identity(), where));
    const auto& components = components_[s];
    const ScatterModel& model = sources_[s].model;
    // A lone component needs neither the bounds nor the ordering (as integrate() does).
    if (components.size() == 1 && model.components().front().weight == 1.0) return components.front().at(where);
    const BoundingBox placed{box_.min + where, box_.max + where};
    return detail::integrate_components(model, placed, options_,
                                        [&](std::size_t k) { return components[k].at(where); });
  }

  Estimate at(const Vec2& where) const {
    ExposureSum sum;
    Estimate out;
    out.converged = true;
    for (std::size_t s = 0; s < sources_.size(); ++s) {
      const Estimate e = source_at(s, where);
      out.converged = out.converged && e.converged;
      out.evaluations += e.evaluations;
      const MapSource& source = sources_[s];
      sum.add(e.p, e.abs_err, Exposure{source.events_per_session, source.sessions_per_year}.events(per_));
    }
    out.method = options_.method;
    if (per_ == Period::event) {
      out.p = sum.largest();  // the largest single source, as limits are judged
      out.abs_err = sum.largest_abs_err();
    } else {
      out.p = sum.any();
      out.abs_err = sum.any_abs_err();
    }
    out.q = 1.0 - out.p;
    return out;
  }

 private:
  const std::vector<MapSource>& sources_;
  Region footprint_;
  BoundingBox box_;
  Period per_;
  IntegrateOptions options_;
  std::vector<std::function<Estimate(const Region&)>> past_barriers_;
  std::vector<std::vector<detail::TranslatedFootprint>> components_;
};

}  // namespace

Estimate risk_at(const std::vector<MapSource>& sources, const Region& footprint, const Vec2& where, Period per,
                 const IntegrateOptions& options) {
  return CellIntegrator(sources, footprint, per, options).at(where);
}

Vec2 footprint_reference(const Region& footprint) {
  const BoundingBox box = bounds(footprint);
  return 0.5 * (box.min + box.max);
}

Region footprint_about(const Region& footprint, const Vec2& reference) {
  if (!reference.allFinite()) throw input_error("the footprint's reference point must be finite");
  return transformed(footprint, Mat2::Identity(), -reference);
}

WorkEstimate risk_map_work(const std::vector<MapSource>& sources, const Region& footprint, const GridSpec& grid) {
  double edges = 0.0;
  for (const Loop& l : footprint.loops) edges += static_cast<double>(l.size());
  double components = 0.0;
  for (const MapSource& s : sources) components += static_cast<double>(s.model.components().size());
  const double cells = static_cast<double>(grid.columns) * static_cast<double>(grid.rows);
  WorkEstimate w;
  std::ostringstream what;
  what << "map of " << grid.columns << " x " << grid.rows << " cells x " << components << " component(s) x "
       << edges << " footprint edge(s)";
  w.what = what.str();
  w.units = cells * components * std::max(edges, 1.0);
  w.seconds_per_unit = kMapSecondsPerUnit;
  return w;
}

RiskMap compute_risk_map(const std::vector<MapSource>& sources, const Region& footprint, const GridSpec& grid,
                         Period per, const RiskMapOptions& options) {
  if (sources.empty()) throw input_error("a risk map needs at least one source");
  if (!(grid.columns >= 1 && grid.rows >= 1 && grid.spacing > 0.0 && std::isfinite(grid.spacing)))
    throw input_error("a risk map needs at least one cell and a positive spacing");
  RiskMap map;
  map.grid = grid;
  map.per = per;
  const std::size_t rows = static_cast<std::size_t>(grid.rows), columns = static_cast<std::size_t>(grid.columns);
  const CellIntegrator cell(sources, footprint, per, options.integrate, options.past_barriers);
  std::atomic<bool> all_converged{true};
  // Row j into value[0 .. columns) and abs_err[0 .. columns). The first cell that throws stops
  // the others and its error, naming the cell, reaches the caller (parallel_for).
  const auto fill_row = [&](std::size_t j, double* value, double* abs_err) {
    for (int i = 0; i < grid.columns; ++i) {
      const Vec2 where = grid.centre(i, static_cast<int>(j));
      Estimate e;
      try {
        e = cell.at(where);
      } catch (const input_error& fault) {
        std::ostringstream m;
        m.precision(10);
        m << "map cell (" << i << ", " << j << ") at " << position_text(where) << " m: " << fault.what();
        throw input_error(m.str());
      }
      value[i] = e.p;
      abs_err[i] = e.abs_err;
      if (!e.converged) all_converged = false;
    }
  };
  const Distributor* d = options.distributor;
  if (d == nullptr || d->processes() <= 1) {
    map.value.assign(rows * columns, 0.0);
    map.abs_err.assign(rows * columns, 0.0);
    // Rows are handed out one at a time so that threads finish together.
    parallel_for(rows, options.threads,
                 [&](std::size_t j) { fill_row(j, &map.value[j * columns], &map.abs_err[j * columns]); },
                 options.progress);
    map.converged = all_converged;
    return map;
  }
  // Tiles of whole rows, about eight per process so that a slow tile does not hold the others
  // up (a process that finishes early takes the next tile). A tile travels as one byte of
  // convergence, then its values and its bounds, row by row, as raw doubles: the gathering
  // process copies them back bit for bit. Only the gathering process holds the whole map; a
  // computing process holds one tile at a time.
  const bool gathers = d->gathers();
  if (gathers) {
    map.value.assign(rows * columns, 0.0);
    map.abs_err.assign(rows * columns, 0.0);
  }
  const std::size_t tile_rows = std::max<std::size_t>(1, rows / (8 * static_cast<std::size_t>(d->processes())));
  const std::size_t tiles = (rows + tile_rows - 1) / tile_rows;
  const auto compute_tile = [&](std::size_t t) {
    const std::size_t j0 = t * tile_rows, j1 = std::min(rows, j0 + tile_rows);
    const std::size_t n = (j1 - j0) * columns;
    std::vector<double> value(n), abs_err(n);
    all_converged = true;
    parallel_for(j1 - j0, options.threads,
                 [&](std::size_t r) { fill_row(j0 + r, &value[r * columns], &abs_err[r * columns]); });
    std::string bytes(1 + 2 * n * sizeof(double), '\0');
    bytes[0] = all_converged ? 1 : 0;
    std::memcpy(&bytes[1], value.data(), n * sizeof(double));
    std::memcpy(&bytes[1 + n * sizeof(double)], abs_err.data(), n * sizeof(double));
    return bytes;
  };
  bool gathered_converged = true;
  const auto store_tile = [&](std::size_t t, const std::string& bytes) {
    const std::size_t j0 = t * tile_rows, j1 = std::min(rows, j0 + tile_rows);
    const std::size_t n = (j1 - j0) * columns;
    if (bytes.size() != 1 + 2 * n * sizeof(double)) throw std::runtime_error("a map tile arrived with the wrong size");
    gathered_converged = gathered_converged && bytes[0] != 0;
    std::memcpy(&map.value[j0 * columns], &bytes[1], n * sizeof(double));
    std::memcpy(&map.abs_err[j0 * columns], &bytes[1 + n * sizeof(double)], n * sizeof(double));
  };
  d->run(tiles, compute_tile, store_tile, options.progress);
  map.converged = gathered_converged;
  return map;
}

}  // namespace strewn
