#ifndef STREWN_SPACING_HPP
#define STREWN_SPACING_HPP

/// \file
/// The largest spacing of a layout (strewn/layout.hpp) that still waters well enough: Christiansen's
/// CU and the low-quarter DU at least their targets and no more than a stated amount of water on
/// each keep-out zone per run (what `strewn solve spacing` prints; docs/irrigation.md).
///
/// The layout keeps its pattern: square and triangular layouts take the new spacing; a
/// rectangular one keeps its row spacing's ratio to the spacing. Heads are placed again
/// (strewn::layout_heads) at each spacing tried and the whole deposition is computed again
/// (strewn::compute_deposition).
///
/// How the limits are judged:
///  - the litres on a keep-out zone per run by their upper bound, amount + its error bound. A run
///    is the one that applies the scenario's target_depth when it has one (its run time from the
///    cans, or from flow over area without a grid: fewer heads run longer), else the scenario's
///    hours; the amounts scale with the run's length (its upper bound);
///  - CU and DU from the cans' central depths (as compute_deposition gives them): the cans' error
///    bounds are about 1e-10 of their depths (the profile family's closed form), far below the
///    0.01 percentage point the answer prints.
///
/// The search: head placement is a step function of the spacing (the zone's box is cut into the
/// fewest equal steps no longer than it), and the limits pull both ways (a keep-out zone gets
/// more water from many close heads, CU and DU fall as heads move apart), so a scan of `steps` +
/// 1 equally spaced spacings from `least` to `most` finds the largest spacing that passes and
/// the next one, which fails; bisection then narrows that bracket to `tolerance`. The answer is
/// the end of the bracket where every limit holds (checked there), `beyond` the end where one
/// fails. When no spacing of the scan passes, `why` names the limit that fails at the smallest.
/// A passing stretch narrower than the scan's step can be missed.
///
/// Example (the demo pitch, shapes/sports_pitch_rotors.toml):
/// \code
///   strewn::SpacingQuery q;
///   q.min_cu = 80.0;
///   q.max_litres_per_zone = 50.0;
///   const strewn::SpacingAnswer a = strewn::solve_spacing(site, q);
///   if (a.found) use(a.at.spacing_m, a.at.cu);
/// \endcode

#include <optional>
#include <string>
#include <vector>

#include "strewn/export.hpp"
#include "strewn/site.hpp"
#include "strewn/work.hpp"

namespace strewn {

struct SpacingQuery {
  std::string layout;                         ///< the layout to space; empty: the site's only layout
  std::optional<double> min_cu, min_du;       ///< percent; need a catch grid
  std::optional<double> max_litres_per_zone;  ///< per run, on each keep-out zone
  double least_of_radius = 0.3, most_of_radius = 1.3;  ///< the window, as shares of the head's radius
  int steps = 20;                             ///< scan steps over the window
  double tolerance_m = 0.01;                  ///< width of the final bracket
};

/// One limit at one spacing: its value there and the margin (positive: it holds by that much).
struct SpacingLimit {
  std::string name;   ///< "CU", "DU" or "litres on zone 'footpath'"
  double value = 0.0;  ///< CU/DU in percent; litres: the upper bound, amount + error bound
  double target = 0.0;
  double margin = 0.0;  ///< CU/DU: value - target; litres: target - value
  std::string zone;     ///< a water limit's keep-out zone (value, target and margin in litres); empty for CU and DU
  bool holds() const { return margin >= 0.0; }
};

/// The layout at one spacing and every limit there.
struct SpacingCheck {
  double spacing_m = 0.0, row_spacing_m = 0.0;  ///< row spacing: rectangular only (else 0)
  std::size_t heads = 0;
  double run_hours = 0.0;  ///< the run the litres are for (see above)
  double cu = 0.0, du = 0.0;
  std::vector<SpacingLimit> limits;  ///< CU, DU, then each keep-out zone, those asked for
  bool holds() const;
  /// The first limit that fails, or nullptr.
  const SpacingLimit* failing() const;
};

struct SpacingAnswer {
  bool found = false;
  std::string layout;
  SpacingCheck at;                     ///< at the answer
  std::optional<SpacingCheck> beyond;  ///< the nearest spacing tried above it, where a limit fails
  bool holds_to_end = false;           ///< every limit holds up to the window's largest spacing
  double least_m = 0.0, most_m = 0.0;  ///< the window searched
  int evaluations = 0;
  std::string why;  ///< when not found: the limit that fails at the smallest spacing tried (`at` is there)
};

/// The site with the named layout's heads placed again at `spacing_m` (its row spacing scaled
/// alike for a rectangular layout), each head again a source past the site's barriers. Throws
/// request_error("layout") for an unknown layout (naming the site's), input_error for a spacing
/// the layout rejects (strewn::layout_heads).
STREWN_API Site with_layout_spacing(const Site& s, const std::string& layout, double spacing_m);

/// The figures and limits of `q` at one spacing.
STREWN_API SpacingCheck check_spacing(const Site& s, const SpacingQuery& q, double spacing_m);

/// The largest spacing meeting every limit of q. Throws request_error naming the query's field:
/// "layout" (unknown, or none given when the site has several), "limits" (none asked), "grid"
/// (CU or DU asked without a catch grid), "range" (a bad window, steps or tolerance).
STREWN_API SpacingAnswer solve_spacing(const Site& s, const SpacingQuery& q, const ProgressFn& progress = {});

}  // namespace strewn

#endif
