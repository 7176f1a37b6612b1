#ifndef STREWN_CLI_HTML_REPORT_HPP
#define STREWN_CLI_HTML_REPORT_HPP

// The page of `strewn report FILE --out report.html`: one self-contained HTML page (no network, no external
// files) that a colleague can read or print on A4/Letter: the job, the scenario, the assessment
// with error bounds and verdicts, the risk map, the fit summary and uncertainty where a source
// came from a fit, the methods and their accuracy, the assumptions and the cautions.
#include <string>

#include "strewn/assess.hpp"
#include "strewn/site_map.hpp"
#include "strewn/uncertainty.hpp"

namespace strewn::cli {

std::string html_report(const Site& s, const Assessment& a, const SiteMap& map, const Uncertainty* u);


}  // namespace strewn::cli

#endif
