#ifndef STREWN_CLI_LEG_TEST_OUTPUT_HPP
#define STREWN_CLI_LEG_TEST_OUTPUT_HPP

// What `strewn fit --profile LEG.csv` prints (a table or JSON) and writes with --out: the radial
// profile CSV that a scenario's `profile = "..."` reads (strewn/radial_profile.hpp).

#include <iosfwd>
#include <string>

#include "strewn/leg_test.hpp"
#include "strewn/units.hpp"

namespace strewn::cli {

// In a unit system: metres, mm, mm/h and litres, or (LengthUnit::foot) feet, inches, in/h and
// US gallons, converted from the engine's metric values by the exact factors of strewn/units.hpp.
void write_leg_test_table(std::ostream& out, const LegTest& leg, const LegTestProfile& p, LengthUnit u);
void write_leg_test_json(std::ostream& out, const LegTest& leg, const LegTestProfile& p, LengthUnit u);
// "distance_m,rate_mm_per_h" (or "distance_ft,rate_in_per_h") and one row per can, after '#'
// lines saying where it came from.
std::string radial_profile_csv(const LegTest& leg, const LegTestProfile& p, LengthUnit u);

}  // namespace strewn::cli

#endif
