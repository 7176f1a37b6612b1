#ifndef STREWN_CLI_OUTPUT_SWEEP_OUTPUT_HPP
#define STREWN_CLI_OUTPUT_SWEEP_OUTPUT_HPP

// Renderers of a design sweep (strewn/sweep.hpp): the rows (CSV, one per combination and zone)
// and the summary for people (which combinations meet every limit).
#include <iosfwd>
#include <string>
#include <utility>
#include <vector>

#include "strewn/sweep.hpp"

namespace strewn::cli {

// The rows of a sweep as the CSV and the GeoPackage both write them: one per combination and
// zone. Columns: combination, one per axis (its label, with the unit of a length or a speed),
// zone, role, then p and its bound per event, per session and per year, limit, limit_per,
// verdict, accuracy and whether the combination meets every limit; then, for a base scenario with
// sprinkler heads and a catch grid, cu_percent and du_percent (the combination's, on each of its
// rows). Lengths in the scenario's unit.
struct SweepCell {
  std::string text;     // as the CSV prints it (unquoted)
  bool number = false;  // a number column's cell (empty text: no value, e.g. no limit)
};
struct SweepTable {
  std::vector<std::string> header;
  std::vector<bool> numeric;  // per column
  std::vector<std::vector<SweepCell>> rows;
};
SweepTable sweep_table(const Study& study, const SweepResult& result);

// The table as CSV (RFC 4180; text cells quoted).
void write_sweep_csv(std::ostream& out, const Study& study, const SweepResult& result);

// The summary as lines of (item, value) for a GeoPackage's `study` table: the study, its base
// scenario, design, axes, and how many combinations meet every limit.
std::vector<std::pair<std::string, std::string>> sweep_facts(const Study& study, const SweepResult& result);

// The study, its design, how many combinations meet every limit and which (the first 20).
void write_sweep_summary(std::ostream& out, const Study& study, const SweepResult& result, double seconds);

}  // namespace strewn::cli

#endif
