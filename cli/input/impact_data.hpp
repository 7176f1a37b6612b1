#ifndef STREWN_CLI_IMPACT_DATA_HPP
#define STREWN_CLI_IMPACT_DATA_HPP

// Field data for `strewn fit`: a CSV of impacts. The header names the columns: x and y (site
// frame) or distance and bearing_deg (from the aim; degrees clockwise from north), lengths in
// the data's unit as written (fit --units converts them to metres after reading),
// and optionally group, in any case (X,Y too). Cells are separated by commas, or by semicolons
// when the header has a semicolon and no comma (then a comma in a number is its decimal mark).
// A first row of numbers is refused as a missing header (the columns are not guessed).
// Lines starting with # are comments; "# aim = X, Y" gives the aim.
// Errors name the file and row: "marks.csv:14: column 'y': 'abc' is not a number".
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "strewn/scatter_model.hpp"

namespace strewn::cli {

struct ImpactGroup {
  std::string name;            // empty when the file has no group column
  std::vector<Vec2> points;
  std::vector<std::size_t> rows;  // file row of each point, for naming outliers
};

struct ImpactData {
  std::string file;
  std::optional<Vec2> aim;     // from the file's "# aim" comment
  std::vector<ImpactGroup> groups;  // in order of first appearance
};

// `aim` (from the command line) overrides the file's; distance/bearing data need one of them.
ImpactData read_impacts(const std::string& path, const std::optional<Vec2>& aim);

}  // namespace strewn::cli

#endif
