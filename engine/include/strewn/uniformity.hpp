#ifndef STREWN_UNIFORMITY_HPP
#define STREWN_UNIFORMITY_HPP

/// \file
/// How evenly material lands: the two measures irrigation practice uses on catch-can data.
///
/// Christiansen's coefficient of uniformity (Christiansen 1942, "Irrigation by sprinkling",
/// University of California Agricultural Experiment Station Bulletin 670):
///     CU = 100 (1 - sum |x_i - mean| / sum x_i)   [%]
/// Low-quarter distribution uniformity (as used by the USDA NRCS and the Irrigation Association):
///     DU_lq = 100 * (mean of the lowest quarter of the cans) / (mean of all cans)   [%]
/// The lowest quarter of n cans is ambiguous when n is not a multiple of 4; strewn takes exactly
/// n/4 cans, the lowest first, with the boundary can weighted by the fractional part
/// (n = 6: the lowest can and half of the second lowest, divided by 1.5).
/// (The bibliographic details above are from memory; the formulas are the standard ones.)
///
/// Scheduling coefficient (from memory: landscape irrigation practice; no published text was at
/// hand, so the window rule below is strewn's own):
///     SC = (mean of all cans) / (mean of the driest contiguous window holding `share` of the area)
/// SC >= 1; it says how much longer than the mean needs to run so that the driest patch of that
/// size still gets the mean depth. On a regular can grid every can stands for the same area (its
/// cell), so a share of the area is a share of the cans. The window is a block of h x w adjacent
/// cans (h rows, w columns), chosen once for the grid, then slid over every position, in both
/// orientations (h x w and w x h) where they fit:
///   - it must hold at least k = ceil(share * n) cans (n cans on the grid), so a grid whose count
///     does not give the share exactly gets the next block up, never a smaller one;
///   - among blocks that fit the grid, the smallest h * w >= k whose longer side is at most twice
///     the shorter (square-ish); only when none fits (a grid one can wide) a longer strip;
///     ties go to the squarer block.
///   48 cans at 5%: k = 3, and 1 x 3 is too long, so 2 x 2 (8.3% of the cans). 100 cans at 5%:
///   k = 5, 2 x 3 (6%). 400 cans at 5%: k = 20, 4 x 5 (5%).
/// A can with no value (NaN: a measured test that lost it) is no part of any window, and windows
/// that hold one are skipped; the mean is over the cans that have values.

#include <optional>

#include <vector>

#include "strewn/export.hpp"

namespace strewn {

/// CU in percent; 100 for a uniform field. Throws strewn::input_error for no cans, a negative or
/// non-finite catch, or a zero total.
STREWN_API double christiansen_cu(const std::vector<double>& catches);
/// DU (low quarter) in percent, with the fractional convention above; same errors.
STREWN_API double low_quarter_du(const std::vector<double>& catches);

/// The block the scheduling coefficient slides over the grid (see above).
struct SchedulingWindow {
  int rows = 0, columns = 0;   ///< one orientation; its transpose is tried too
  double share = 0.0;          ///< rows * columns / n: the share of the area it actually holds
};

/// The scheduling coefficient and the driest window found.
struct SchedulingCoefficient {
  double sc = 0.0;                 ///< mean / driest window's mean (>= 1)
  double window_mean = 0.0;        ///< mean of the driest window
  SchedulingWindow window;         ///< its shape as chosen (before orientation)
  int first_row = 0, first_column = 0, window_rows = 0, window_columns = 0;  ///< where it lies
};

/// The block for a grid of rows x columns cans and a share in (0, 1]. Throws strewn::input_error
/// for an empty grid or a share outside (0, 1].
STREWN_API SchedulingWindow scheduling_window(int rows, int columns, double share);

/// SC over `depths` given row by row (rows * columns values; NaN marks a missing can). Returns
/// nothing when no window is free of missing cans or the driest window caught nothing (SC is then
/// unbounded). Throws strewn::input_error for a size mismatch, a negative or infinite depth, no
/// can with a value, or a zero total.
STREWN_API std::optional<SchedulingCoefficient> scheduling_coefficient(const std::vector<double>& depths, int rows,
                                                                       int columns, double share = 0.05);

}  // namespace strewn

#endif
