#ifndef STREWN_CLI_REPORT_HPP
#define STREWN_CLI_REPORT_HPP

// Writing an assessment for people (an 80-column table) or for scripts (CSV, JSON).
#include <iosfwd>
#include <string>

#include "strewn/assess.hpp"
#include "strewn/uncertainty.hpp"

namespace strewn::cli {

extern const char* const kCaution;

void write_table(std::ostream& out, const Site& s, const Assessment& a, const Uncertainty* u = nullptr);
void write_csv(std::ostream& out, const Site& s, const Assessment& a, const Uncertainty* u = nullptr);
void write_json(std::ostream& out, const Site& s, const Assessment& a, const Uncertainty* u = nullptr);

}  // namespace strewn::cli

#endif
