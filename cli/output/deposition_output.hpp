#ifndef STREWN_CLI_DEPOSITION_OUTPUT_HPP
#define STREWN_CLI_DEPOSITION_OUTPUT_HPP

// What `strewn deposition` prints: a table, one CSV row per can, or JSON.

#include <iosfwd>

#include "strewn/deposition.hpp"

namespace strewn::cli {

void write_deposition_table(std::ostream& out, const Site& s, const Deposition& d);
void write_deposition_csv(std::ostream& out, const Site& s, const Deposition& d);
void write_deposition_json(std::ostream& out, const Site& s, const Deposition& d);

}  // namespace strewn::cli

#endif
