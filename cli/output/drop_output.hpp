#ifndef STREWN_CLI_DROP_OUTPUT_HPP
#define STREWN_CLI_DROP_OUTPUT_HPP
// Drops from flight as printed: the spread a drop source became (assess table, CSV, JSON and the
// report) and the answer of `solve release` (table and JSON). Lengths in the scenario's unit.
#include <iosfwd>
#include <nlohmann/json.hpp>
#include <string>

#include "output/lengths.hpp"
#include "strewn/release.hpp"
#include "strewn/site.hpp"

namespace strewn::cli {

// One paragraph: the drop, the mean landing, the spread it became and how it was checked
// ("normal (unscented transform) ..." or "mixture of 2 fitted to N falls ...").
std::string drop_summary(const Source& src, const Lengths& L);
// The same as JSON: the flight, the unscented and Monte Carlo moments, the check, the components.
nlohmann::json drop_json(const Source& src, const Lengths& L);

void write_release(std::ostream& out, const Site& s, const ReleaseQuery& q, const ReleaseAnswer& a, bool json);

}  // namespace strewn::cli

#endif
