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

#include <vector>

#include "strewn/export.hpp"

namespace strewn {

/// CU in percent; 100 for a uniform field. Throws strewn::input_error for no cans, a negative or
/// non-finite catch, or a zero total.
STREWN_API double christiansen_cu(const std::vector<double>& catches);
/// DU (low quarter) in percent, with the fractional convention above; same errors.
STREWN_API double low_quarter_du(const std::vector<double>& catches);

}  // namespace strewn

#endif
