#ifndef STREWN_CLI_OUTPUT_SWEEP_OUTPUT_HPP
#define STREWN_CLI_OUTPUT_SWEEP_OUTPUT_HPP

// Renderers of a design sweep (strewn/sweep.hpp): the rows (CSV, one per combination and zone)
// and the summary for people (which combinations meet every limit).
#include <iosfwd>

#include "strewn/sweep.hpp"

namespace strewn::cli {

// Columns: combination, one per axis (its label, with the unit of a length), zone, role, then
// p and its bound per event, per session and per year, limit, limit_per, verdict, accuracy and
// whether the combination meets every limit. Lengths in the scenario's unit.
void write_sweep_csv(std::ostream& out, const Study& study, const SweepResult& result);

// The study, its design, how many combinations meet every limit and which (the first 20).
void write_sweep_summary(std::ostream& out, const Study& study, const SweepResult& result, double seconds);

}  // namespace strewn::cli

#endif
