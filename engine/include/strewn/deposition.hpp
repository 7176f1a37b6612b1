#ifndef STREWN_DEPOSITION_HPP
#define STREWN_DEPOSITION_HPP

/// \file
/// Deposition: where the emitted material lands (what `strewn deposition` prints).
/// Each source emits amount_per_event * events_per_hour * hours; the expected amount in a region
/// is that times the probability of the region. A can catches what falls on its opening (a disk);
/// a cell is the spacing x spacing square around a can, so the cells tile the grid rectangle and
/// their amounts add up to what lands on the grid (additivity of the integral). Barriers count as
/// in assess (strewn/barrier_effect.hpp): what a barrier stops lands in no can, cell or zone, and
/// the amounts outside the grid and off the site include it.

#include <optional>
#include <string>
#include <vector>

#include "strewn/export.hpp"
#include "strewn/site.hpp"
#include "strewn/uniformity.hpp"

namespace strewn {

/// The share of the area whose driest window the scheduling coefficient looks at: 5%, a common
/// choice in irrigation practice (from memory).
constexpr double kSchedulingShare = 0.05;

struct Can {
  Vec2 centre;
  double depth = 0.0;       // amount per m^2 over the opening (litre/m^2 = mm)
  double depth_err = 0.0;
  double cell_depth = 0.0;  // mean over the can's cell
  double cell_amount = 0.0, cell_amount_err = 0.0;
};

struct ZoneShare {
  std::string zone;
  std::string role;
  double amount = 0.0, amount_err = 0.0;
  double fraction = 0.0;
};

struct Deposition {
  std::string unit;          // of amounts
  std::string depth_unit;    // of depths
  double emitted = 0.0;
  std::vector<Can> cans;     // row by row from the grid origin
  double on_grid = 0.0, on_grid_err = 0.0;       // sum of the cells
  double off_grid = 0.0, off_grid_err = 0.0;     // emitted * P(outside the grid rectangle, or stopped by a barrier)
  double cu = 0.0, du = 0.0;                     // percent, over the cans
  /// The scheduling coefficient over the can grid (strewn/uniformity.hpp) at the share asked
  /// for (kSchedulingShare unless said); none when there is no grid or its driest window
  /// catches nothing.
  std::optional<SchedulingCoefficient> sc;
  double sc_share = 0.0;                         // the share asked for (the window's own is in sc)
  double mean_depth = 0.0, min_depth = 0.0, max_depth = 0.0;
  std::vector<ZoneShare> zones;
  bool has_site = false;
  double off_site = 0.0, off_site_err = 0.0;     // amount outside the site zone
};

/// Throws input_error when the site has no deposition settings, a source lacks its amounts or
/// nothing is emitted.
STREWN_API Deposition compute_deposition(const Site& s);
/// The same with the scheduling coefficient over the driest window of `sc_share` of the area,
/// in (0, 1] (throws strewn::input_error outside it).
STREWN_API Deposition compute_deposition(const Site& s, double sc_share);

/// Expected depth at points (amount per m^2 over the run: litre/m^2 = mm): the sum over sources
/// of amount_per_event * events_per_hour * hours times the source's density there, each
/// component's weight * exp(-|W (x - m)|^2 / 2) / (2 pi det L) with L the Cholesky factor and
/// W = L^-1. A closed form with rounding error only (a few ulps); for pictures of the whole
/// field, where the cans' values are integrals over their openings. Throws input_error like
/// compute_deposition.
STREWN_API std::vector<double> depth_at(const Site& s, const std::vector<Vec2>& points);

}  // namespace strewn

#endif
