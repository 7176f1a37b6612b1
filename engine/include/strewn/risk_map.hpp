#ifndef STREWN_RISK_MAP_HPP
#define STREWN_RISK_MAP_HPP

/// \file
/// Risk on a grid: for every cell centre x, the probability that an impact lands within a body
/// footprint standing at x, from every source, combined per event, per session or per year.
///
/// Each cell is an exact integration (integrate() with the requested options) of every source's
/// model over the footprint translated to x, so every value carries its own error bound; cells
/// are shared among threads. What does not depend on x is done once per component: a footprint
/// that is one whole ellipse (person, disk) has its whitened trapezoid nodes tabled, one of
/// straight edges (rectangle, doorway, polygon, a composite of those) its whitened vertices; a
/// cell then agrees with integrate() within the two bounds, and the cells the tables cannot
/// settle (the mean on the footprint's boundary, a footprint within one sigma of the mean, a bound
/// above the request) are integrate()'s. Combination over sources (strewn/exposure.hpp, the same combiner
/// as an assessment's):
///   per event:   max_s p_s           (the worst single event: what a per-event limit is compared
///                                     with in an assessment, so maps and limits agree; the bound
///                                     max_s abs_err_s covers |max_s p_s - max_s exact_s|)
///   per session: 1 - prod_s (1 - p_s)^N_s, computed as -expm1(sum N_s log1p(-p_s))
///   per year:    the same with N_s = events per session * sessions per year.
///
/// The footprint is one Region built once, around the origin: its reference point (where the
/// person stands) at (0, 0). compute_risk_map translates it to every cell centre, so a cell's
/// value is the risk of the footprint with its reference point on that centre. footprint_about()
/// moves any region into that frame: for a kind with a `centre` parameter the reference point is
/// that centre; for the others (polygon, doorway, composite, files) it is the centre of the
/// region's bounding box (footprint_reference()).
///
/// Cells are shared among threads (parallel_for in strewn/work.hpp): the first cell that fails
/// stops the map and its error, naming the cell, is thrown on the calling thread.
///
/// Across processes (RiskMapOptions::distributor, strewn/distribute.hpp): the rows are cut into
/// tiles of whole rows, handed out one at a time (a process that finishes early takes the next);
/// each tile's values, bounds and convergence travel as bytes to the gathering process, whose map
/// is then the same, bit for bit, as one process's. On the other processes the map's `value` and
/// `abs_err` are empty (they hold one tile at a time, and write nothing).

#include <functional>
#include <vector>

#include "strewn/distribute.hpp"
#include "strewn/export.hpp"
#include "strewn/exposure.hpp"
#include "strewn/integrate.hpp"
#include "strewn/work.hpp"

namespace strewn {

/// Cell centres at origin + spacing * (i, j), i < columns, j < rows.
struct GridSpec {
  Vec2 origin = Vec2::Zero();
  double spacing = 1.0;
  int columns = 0;
  int rows = 0;
  Vec2 centre(int i, int j) const { return origin + spacing * Vec2(i, j); }
};

struct MapSource {
  ScatterModel model;
  double events_per_session = 1.0;
  double sessions_per_year = 1.0;
};

struct RiskMapOptions {
  IntegrateOptions integrate;
  int threads = 0;  ///< 0: as many as the machine has
  /// Called now and then with the share of cells done (from the calling thread only).
  ProgressFn progress;
  /// Empty, or one per source: when set, a cell's probability for that source is
  /// past_barriers[s](the footprint placed at the cell) instead of the model's integral over it,
  /// for a source behind barriers or on a throwing line (strewn/barrier_effect.hpp,
  /// integrate_source). Called from several threads at once.
  std::vector<std::function<Estimate(const Region&)>> past_barriers;
  /// Shares row tiles among processes (strewn/distribute.hpp); nullptr: this process alone.
  /// Within a process, a tile's rows use `threads`.
  const Distributor* distributor = nullptr;
};

struct RiskMap {
  GridSpec grid;
  Period per = Period::event;
  std::vector<double> value;    ///< row by row: value[j * columns + i]
  std::vector<double> abs_err;  ///< bound on |value - exact|
  bool converged = true;        ///< every cell met the requested tolerance
  double at(int i, int j) const { return value[static_cast<std::size_t>(j) * grid.columns + i]; }
};

/// `footprint` is given around the origin (its reference point at (0, 0)).
STREWN_API RiskMap compute_risk_map(const std::vector<MapSource>& sources, const Region& footprint,
                                    const GridSpec& grid, Period per, const RiskMapOptions& options = {});

/// The centre of the footprint's bounding box: the reference point of a footprint whose kind
/// has no `centre` parameter.
STREWN_API Vec2 footprint_reference(const Region& footprint);

/// The footprint translated so that `reference` lies at the origin (the frame compute_risk_map
/// expects).
STREWN_API Region footprint_about(const Region& footprint, const Vec2& reference);

/// The work a map will take: cells x components of every source x edges of the footprint (see
/// strewn/work.hpp), to check against kMapWorkCeiling before compute_risk_map.
STREWN_API WorkEstimate risk_map_work(const std::vector<MapSource>& sources, const Region& footprint,
                                      const GridSpec& grid);

/// The same combination for one point (what a map cell holds), with its bound.
STREWN_API Estimate risk_at(const std::vector<MapSource>& sources, const Region& footprint, const Vec2& where,
                            Period per, const IntegrateOptions& options = {});

}  // namespace strewn

#endif
