#ifndef STREWN_CLI_DEPOSITION_OUTPUT_HPP
#define STREWN_CLI_DEPOSITION_OUTPUT_HPP

// What `strewn deposition` prints: a table, one CSV row per can, or JSON.

#include <iosfwd>
#include <nlohmann/json.hpp>
#include <optional>
#include <string>

#include "strewn/deposition.hpp"

namespace strewn::cli {

void write_deposition_table(std::ostream& out, const Site& s, const Deposition& d);
void write_deposition_csv(std::ostream& out, const Site& s, const Deposition& d);
void write_deposition_json(std::ostream& out, const Site& s, const Deposition& d);

// The scheduling coefficient as one line of text ("SC (5%) 1.42: driest 2 x 2 cans ...", or why
// there is none) and as a JSON object, for every output that shows one.
std::string scheduling_text(const std::optional<SchedulingCoefficient>& sc, double share);
nlohmann::json scheduling_json(const std::optional<SchedulingCoefficient>& sc, double share);

}  // namespace strewn::cli

#endif
