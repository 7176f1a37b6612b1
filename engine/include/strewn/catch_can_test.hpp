#ifndef STREWN_CATCH_CAN_TEST_HPP
#define STREWN_CATCH_CAN_TEST_HPP

/// \file
/// A measured catch-can test and its comparison with the modelled deposition (what
/// `strewn deposition SITE --measured cans.csv` prints).
///
/// The cans stand on the scenario's catch grid ([deposition.grid]); the file gives each can by
/// its grid indices (`row`, `col`, from 1: rows count from the grid origin along y, columns
/// along x) or by its position (`x`, `y` in the scenario's length unit, or `x_m`/`y_m`,
/// `x_ft`/`y_ft`), which must lie within a quarter of the spacing of a grid node. What a can
/// caught is its depth (`depth_mm`, `depth_in`, or `depth` in the site's depth unit: mm, or
/// inches in a US site) or its volume (`volume_ml`, needing the opening). Settings come first,
/// as `# key = value` lines:
///   duration_min or duration_h                       how long the test ran (required)
///   opening_diameter_mm, opening_area_cm2, opening_diameter_in, opening_area_in2, or
///   opening_diameter, opening_area (the site's unit: mm and cm^2, or in and in^2)
///                                                    the cans' opening (required for volume_ml)
/// Depth from volume: 1 mL over A cm^2 is 10 / A mm; an inch is 25.4 mm exactly (NIST SP 811,
/// 2008, appendix B.8). Everything is converted to mm as read; a tool prints in the site's unit.
///
/// The model is scaled to the test: the scenario's run length is replaced by the test's duration,
/// and the cans' opening by the test's when it is given, so each model can is the expected depth
/// in a can like the test's over the test's time. The comparison is can by can: difference =
/// model - measured (mm), with its bias (mean difference) and RMS; CU, DU and the scheduling
/// coefficient of the measured cans beside those of the model over the same cans (a grid can
/// without a measurement is left out of both; SC windows that hold one are skipped).
///
/// Example:
/// \code
///   const strewn::Site s = strewn::load_site("shapes/small_lawn_heads.toml");
///   const auto test = strewn::read_catch_can_csv("shapes/field_data/lawn_cans.csv", s);
///   const strewn::CatchCanComparison c = strewn::compare_catch_cans(s, test);
///   // c.rms_mm, c.bias_mm, c.measured_cu, c.model_cu, ...
/// \endcode

#include <optional>
#include <string>
#include <vector>

#include "strewn/deposition.hpp"
#include "strewn/export.hpp"
#include "strewn/site.hpp"
#include "strewn/uniformity.hpp"

namespace strewn {

struct MeasuredCan {
  int row = 0, column = 0;    ///< on the catch grid, from 0 (the file's indices less 1)
  double depth_mm = 0.0;      ///< caught depth
  std::size_t line = 0;       ///< the file's line, for messages
};

struct CatchCanTest {
  std::string file;
  double duration_h = 0.0;
  std::optional<double> opening_diameter_m;  ///< when the file states the opening
  std::vector<MeasuredCan> cans;             ///< in the file's order
};

/// Reads a catch-can test for the site's catch grid (see above). Throws strewn::input_error
/// "FILE:LINE:COLUMN: why" for the first bad line: an unknown setting or column (with "did you
/// mean"), a missing duration, a volume without an opening, a can off the grid or given twice, a
/// negative or non-finite value. Also throws when the site has no [deposition.grid] or counts
/// items rather than litres.
STREWN_API CatchCanTest parse_catch_can_csv(const std::string& text, const std::string& name, const Site& site);
/// The same from a file (read through strewn/input_file.hpp's size cap).
STREWN_API CatchCanTest read_catch_can_csv(const std::string& path, const Site& site);

struct CanDifference {
  int row = 0, column = 0;           ///< from 0
  Vec2 centre;                       ///< site metres
  double model_mm = 0.0, model_err_mm = 0.0;
  double measured_mm = 0.0;
  double difference_mm = 0.0;        ///< model - measured
};

struct CatchCanComparison {
  CatchCanTest test;
  Deposition model;                  ///< the scenario's deposition scaled to the test
  std::vector<CanDifference> cans;   ///< row by row from the grid origin
  double opening_diameter_m = 0.0;   ///< the cans' opening the model used (the test's, else the grid's)
  int missing = 0;                   ///< grid cans the test has no value for
  double bias_mm = 0.0;              ///< mean of model - measured
  double rms_mm = 0.0;               ///< root mean square of model - measured
  double largest_mm = 0.0;           ///< largest |model - measured|
  double model_mean_mm = 0.0, measured_mean_mm = 0.0;
  double model_cu = 0.0, model_du = 0.0, measured_cu = 0.0, measured_du = 0.0;  ///< percent
  double sc_share = kSchedulingShare;
  std::optional<SchedulingCoefficient> model_sc, measured_sc;
};

/// Compares the model with the test (see above), the scheduling coefficients over the driest
/// window of `sc_share` of the area. Throws strewn::input_error like compute_deposition, and
/// when the measured cans caught nothing.
STREWN_API CatchCanComparison compare_catch_cans(const Site& site, const CatchCanTest& test,
                                                 double sc_share = kSchedulingShare);

}  // namespace strewn

#endif
