#ifndef STREWN_CLI_DESIGN_REPORT_HPP
#define STREWN_CLI_DESIGN_REPORT_HPP

// Writing the answers of `strewn solve` for people (text) or scripts (JSON).
#include <iosfwd>

#include "strewn/design.hpp"
#include "strewn/spacing.hpp"

namespace strewn::cli {

void write_clearance(std::ostream& out, const Site& s, const ClearanceQuery& q, const ClearanceAnswer& a, bool json);
void write_spread(std::ostream& out, const Site& s, const SpreadQuery& q, const SpreadAnswer& a, bool json);
void write_aim(std::ostream& out, const Site& s, const AimQuery& q, const AimAnswer& a, bool json);
void write_spacing(std::ostream& out, const Site& s, const SpacingQuery& q, const SpacingAnswer& a, bool json);

}  // namespace strewn::cli

#endif
