#ifndef STREWN_CLI_HTML_REPORT_HPP
#define STREWN_CLI_HTML_REPORT_HPP

// `strewn report FILE --out report.html`: one self-contained HTML page (no network, no external
// files) that a colleague can read or print on A4/Letter: the job, the scenario, the assessment
// with error bounds and verdicts, the risk map, the fit summary and uncertainty where a source
// came from a fit, the methods and their accuracy, the assumptions and the cautions.

#include <CLI/CLI.hpp>
#include <string>

#include "assessment.hpp"
#include "risk_map_output.hpp"
#include "uncertainty.hpp"

namespace strewn::cli {

std::string html_report(const Scenario& s, const Assessment& a, const MapResult& map, const Uncertainty* u);

class ReportCommand {
 public:
  explicit ReportCommand(CLI::App& parent);
  bool chosen() const { return app_->parsed(); }
  int run(const ShapeRegistry& shapes, std::ostream& out, std::ostream& err, bool terminal) const;

 private:
  CLI::App* app_;
  std::string file_, out_file_;
  int cells_ = 120;
  bool force_ = false;
};

}  // namespace strewn::cli

#endif
