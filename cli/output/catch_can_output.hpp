#ifndef STREWN_CLI_CATCH_CAN_OUTPUT_HPP
#define STREWN_CLI_CATCH_CAN_OUTPUT_HPP

// What `strewn deposition SITE --measured cans.csv` prints: the model against a measured
// catch-can test (strewn/catch_can_test.hpp) as a table, one CSV row per measured can, or JSON;
// and the difference map (SVG) in the palette's diverging colours (output/palette.hpp).

#include <iosfwd>
#include <string>

#include "strewn/catch_can_test.hpp"

namespace strewn::cli {

void write_catch_can_table(std::ostream& out, const Site& s, const CatchCanComparison& c);
void write_catch_can_csv(std::ostream& out, const Site& s, const CatchCanComparison& c);
void write_catch_can_json(std::ostream& out, const Site& s, const CatchCanComparison& c);
std::string catch_can_difference_svg(const Site& s, const CatchCanComparison& c);

}  // namespace strewn::cli

#endif
