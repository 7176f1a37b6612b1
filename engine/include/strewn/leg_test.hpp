#ifndef STREWN_LEG_TEST_HPP
#define STREWN_LEG_TEST_HPP

/// \file
/// A single head's leg test: a line of catch cans running out from one head that ran alone for a
/// stated time; what each can caught, by its distance from the head, gives the head's radial
/// profile (strewn/radial_profile.hpp), the table the `profile` scatter family reads. What
/// `strewn fit --profile LEG.csv` does.
///
/// The file (CSV) states its settings first, as `# key = value` lines:
///   duration_min or duration_h                       how long the head ran (required)
///   opening_diameter_mm, opening_area_cm2,
///   opening_diameter_in or opening_area_in2          the cans' opening (required for volume_ml)
///   flow_l_per_min, flow_m3_per_h or flow_gpm        the head's flow (optional; for the balance)
/// then a header row: `distance_m` (or `distance_ft`) and `depth_mm` (or `depth_in`, or
/// `volume_ml`), then one row per can, distances increasing. 1 mL in an opening of A cm^2 is
/// 10 / A mm; the inch is 25.4 mm, the foot 0.3048 m and the US gallon 3.785411784 L, all exact
/// (NIST SP 811, 2008, appendix B.8). Everything is converted to metres, mm and litres as read.
///
/// The profile's rate at each distance is the caught depth over the duration (mm/h), linear
/// between cans, the first can's rate kept in to the head and 0 beyond the last can (the
/// profile's own conventions). The volume balance compares what the profile accounts for,
///     caught = integral from 0 to R of depth(r) 2 pi r dr   (mm x m^2 = L),
/// with what the head delivered, flow x duration. It assumes a full-circle head and no wind:
/// the leg stands for every direction. For a part-circle head of arc a degrees the caught
/// volume is a/360 of the figure, so the balance reads low by that factor. A balance well below
/// 100% means water the cans missed (drift, evaporation, a leg shorter than the throw); above
/// 100% a leg through the wetter side of an uneven pattern or a wrong flow.
///
/// Example:
/// \code
///   const strewn::LegTest leg = strewn::read_leg_test_csv("shapes/field_data/rotor_leg_test.csv");
///   const strewn::LegTestProfile p = strewn::profile_from_leg_test(leg);
///   // p.profile.rate_at(4.0) in mm/h; p.caught_l, p.delivered_l, p.balance
/// \endcode

#include <optional>
#include <string>
#include <vector>

#include "strewn/export.hpp"
#include "strewn/radial_profile.hpp"
#include "strewn/units.hpp"

namespace strewn {

struct LegTest {
  std::string file;
  double duration_h = 0.0;
  std::optional<double> opening_diameter_m;
  std::optional<double> flow_l_per_h;        ///< the head's flow, when given
  std::vector<double> distance_m, depth_mm;  ///< one per can, distances increasing
  /// The unit system the file is written in: feet (and inches, gpm) when its distances are in
  /// feet, else metres; a tool prints in it unless told otherwise.
  LengthUnit units = LengthUnit::metre;
};

/// Reads a leg test (see above). Throws strewn::input_error "FILE:LINE:COLUMN: why" for the
/// first bad line: an unknown setting or column (with "did you mean"), a missing duration, a
/// volume without an opening, distances not increasing, fewer than two cans, a negative catch.
STREWN_API LegTest parse_leg_test_csv(const std::string& text, const std::string& name);
/// The same from a file (read through strewn/input_file.hpp's size cap).
STREWN_API LegTest read_leg_test_csv(const std::string& path);

struct LegTestProfile {
  RadialProfile profile;              ///< rates in mm/h, distances in metres
  double caught_l = 0.0;              ///< what the profile accounts for over the test, litres
  std::optional<double> delivered_l;  ///< flow x duration, when the flow is given
  std::optional<double> balance;      ///< caught / delivered
};

/// The profile and the volume balance of a leg test (see above). Throws strewn::input_error
/// when no can caught anything.
STREWN_API LegTestProfile profile_from_leg_test(const LegTest& leg);

}  // namespace strewn

#endif
