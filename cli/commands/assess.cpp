// `strewn assess FILE`: every zone's probabilities and limits (strewn/assess.hpp), optionally with
// the uncertainty of fitted sources (strewn/uncertainty.hpp), as a table, CSV or JSON.
#include <fmt/format.h>
#include <fmt/ostream.h>

#include <optional>
#include <sstream>
#include <string>

#include "commands/checked_option.hpp"
#include "commands/command.hpp"
#include "commands/former_names.hpp"
#include "commands/request_option.hpp"
#include "output/assess_output.hpp"
#include "output/gis_output.hpp"
#include "output/output_file.hpp"
#include "output/progress_bar.hpp"
#include "run_cli.hpp"
#include "strewn/assess.hpp"
#include "strewn/site_io.hpp"
#include "strewn/uncertainty.hpp"
#include "strewn/work.hpp"

namespace strewn::cli {
namespace {

// The work an assessment will take, estimated and checked before it starts (strewn/work.hpp).
void check_assessment_work(const Site& s, int replicates, bool force) {
  double components = 0.0;
  for (const Source& src : s.sources) components += static_cast<double>(src.model.components().size());
  const double zones = static_cast<double>(s.zones.size());
  if (s.options.method == Method::monte_carlo) {
    std::size_t edges = 0;
    for (const Zone& z : s.zones)
      for (const Loop& loop : z.region.loops) edges += loop.size();
    WorkEstimate w = monte_carlo_work(s.options.samples, static_cast<std::size_t>(components), s.zones.size(), edges);
    w.what = s.file + ": " + w.what;
    check_work(w, kSampleWorkCeiling, force, "lower settings.samples, use --method exact, or pass --force to run it anyway");
  }
  if (replicates > 0) {
    WorkEstimate w;
    const double calibration = calibration_work(s, calibration_for(replicates));  // the double bootstrap's assessments
    w.what = s.file + ": " + std::to_string(replicates) + " bootstrap replicates" +
             (calibration > 0 ? fmt::format(" (+ {} for the calibration)", calibration) : std::string()) + " x " +
             fmt::format("{}", components) + " component(s) x " + std::to_string(s.zones.size()) + " zone(s)";
    w.units = (replicates + calibration) * components * zones *
              (s.options.method == Method::monte_carlo ? static_cast<double>(s.options.samples) * 5e-2 : 1.0);
    w.seconds_per_unit = 1e-5;  // one exact integration and its share of the refit
    check_work(w, kReplicateWorkCeiling, force, "use fewer --replicates, or pass --force to run it anyway");
  }
}

class AssessCommand final : public Command {
 public:
  explicit AssessCommand(CLI::App& parent) {
    app_ = parent.add_subcommand(
        "assess", "Probability of an impact in every zone per event, session and year; limits checked.\n"
                  "Example: strewn assess shapes/throwing_lane.toml --format json\n"
                  "Example: strewn assess shapes/town_park.toml --gpkg park_zones.gpkg");
    app_->add_option("FILE", file_, "Scenario file (TOML)")->required();
    app_->add_option("--format", format_, "table, csv or json")->check(CLI::IsMember({"table", "csv", "json"}));
    app_->add_option("--method", method_, "exact, cubature or monte_carlo (default: the file's, else exact)")
        ->check(CLI::IsMember({"exact", "cubature", "monte_carlo"}));
    app_->add_option("--tolerance", tolerance_, "Requested relative accuracy (default 1e-8)")
        ->check(number_in(1e-15, 0.5, "1e-15 to 0.5"));
    app_->add_option("--gpkg", gpkg_, "Also write the zones with their probabilities and verdicts (GeoPackage, the site's CRS)");
    app_->add_flag("--verify", verify_, "Also run a second method; disagreement beyond the bounds is an error");
    app_->add_flag("--force", force_,
                   "Run even above the work ceilings (Monte Carlo samples x components x zones > 2e9, "
                   "replicates x components x zones > 2e7)");
    CLI::Option* uncertainty = app_->add_flag("--uncertainty", uncertainty_,
                   "Intervals and one-sided upper bounds on each zone's risk from the fitted sources' sampling\n"
                   "uncertainty (generalised pivotal quantities; Clopper-Pearson draws for counts; the exact confidence distribution for censored fits; a bootstrap for mixtures and Student-t fits)");
    // Without --uncertainty they did nothing, without a word (a hostile trial).
    app_->add_option("--replicates", replicates_, "Replicates for --uncertainty (default 1000)")
        ->transform(whole_number(20, 100000, "20 to 100000"))
        ->needs(uncertainty);
    app_->add_option("--confidence", confidence_, "Confidence of the --uncertainty intervals (default 0.95)")
        ->check(number_in(0.5, 0.999, "0.5 to 0.999"))
        ->needs(uncertainty);
  }

  bool chosen() const override { return app_->parsed(); }

  int run(const CommandContext& c) const override {
    Site s = load_scenario(file_, c);
    check_outputs({gpkg_}, s.input_files);  // before any work
    if (!method_.empty()) s.options.method = method_from_string(method_);
    if (tolerance_ > 0) s.options.rel_tolerance = tolerance_;
    check_assessment_work(s, uncertainty_ ? replicates_ : 0, force_);
    Assessment a;
    {
      ProgressBar bar(c.err, c.terminal, "assess");
      a = assess(s, verify_, bar.callback());
    }
    std::optional<Uncertainty> u;
    if (uncertainty_) {
      ProgressBar bar(c.err, c.terminal, "bootstrap");
      try {
        u = assess_uncertainty(s, replicates_, confidence_, s.options.seed, bar.callback());
      } catch (const request_error& e) {
        throw_for_option(e, {{"replicates", "--replicates"}});
      }
    }
    const Uncertainty* up = u ? &*u : nullptr;
    // Render fully before writing, so that nothing partial reaches the output on failure.
    std::ostringstream rendered;
    if (format_ == "csv") write_csv(rendered, s, a, up);
    else if (format_ == "json") write_json(rendered, s, a, up);
    else write_table(rendered, s, a, up);
    if (!gpkg_.empty()) write_outputs({{gpkg_, site_geopackage(s, a, nullptr)}});
    c.out << rendered.str();
    if (!a.all_verified) {
      fmt::print(c.err, "strewn: the second method disagrees beyond the combined error bounds (see --format json)\n");
      return kInternalError;
    }
    return a.all_limits_hold ? kAllLimitsHold : kLimitExceeded;
  }

 private:
  CLI::App* app_;
  std::string file_, format_ = "table", method_, gpkg_;
  double tolerance_ = 0.0;
  bool verify_ = false, force_ = false, uncertainty_ = false;
  int replicates_ = 1000;
  double confidence_ = 0.95;
};

}  // namespace

std::unique_ptr<Command> make_assess_command(CLI::App& app) { return std::make_unique<AssessCommand>(app); }

}  // namespace strewn::cli
