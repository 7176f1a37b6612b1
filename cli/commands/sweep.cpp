#include <CLI/CLI.hpp>
#include <algorithm>
#include <chrono>
#include <iosfwd>
#include <sstream>
#include <string>
#include <thread>
#include <vector>

#include "commands/checked_option.hpp"
#include "commands/command.hpp"
#include "output/gis_output.hpp"
#include "output/output_file.hpp"
#include "output/progress_bar.hpp"
#include "output/sweep_output.hpp"
#include "run_cli.hpp"
#include "strewn/sweep.hpp"

namespace strewn::cli {

class SweepCommand final : public Command {
 public:
  explicit SweepCommand(CLI::App& parent);
  bool chosen() const override { return app_->parsed(); }
  int run(const CommandContext& context) const override;
  bool distributed() const override { return true; }

 private:
  CLI::App* app_;
  std::string file_, csv_, gpkg_;
  int threads_ = 0;
};

SweepCommand::SweepCommand(CLI::App& parent) {
  app_ = parent.add_subcommand(
      "sweep", "Design sweep: vary a base scenario along axes, assess every combination, say which meet every limit.\n"
               "Example: strewn sweep shapes/studies/fire_door_study.toml --csv door_sweep.csv\n"
               "Example (4 processes, the same rows): mpirun -n 4 strewn sweep shapes/studies/fire_door_study.toml --csv door_sweep.csv\n"
               "Example (GIS tables): strewn sweep shapes/studies/fire_door_study.toml --gpkg door_sweep.gpkg");
  app_->add_option("STUDY", file_, "Study file (TOML, docs/sweeps.md)")->required();
  app_->add_option("--csv", csv_, "Write one row per combination and zone (CSV)");
  app_->add_option("--gpkg", gpkg_,
                   "Write a GeoPackage: table 'rows' (the CSV's rows), 'combinations' (each with meets_every_limit)\n"
                   "and 'study' (the summary as item, value)");
  app_->add_option("--threads", threads_, "Worker threads (default: all cores; under mpirun, 1 per process)")
      ->transform(whole_number(1, 256, "1 to 256"));
}

int SweepCommand::run(const CommandContext& context) const {
  const Study study = load_study(file_, context.shapes);
  for (const Warning& w : study.base.warnings) context.err << "strewn: warning: " << w.message << "\n";
  std::vector<std::string> inputs = study.base.input_files;
  inputs.push_back(file_);
  check_outputs({csv_, gpkg_}, inputs);
  SweepOptions options;
  options.distributor = context.distributor;
  options.threads = threads_ != 0 ? threads_ : context.distributor != nullptr ? 1 : 0;
  const auto start = std::chrono::steady_clock::now();
  SweepResult result;
  {
    // The bar shows at once when the estimate says the sweep takes more than a second.
    // Working in parallel: the computing ranks under mpirun (rank 0 hands out), else the threads.
    const int workers = context.distributor != nullptr ? std::max(1, context.distributor->processes() - 1)
                        : options.threads > 0 ? options.threads
                                              : static_cast<int>(std::max(1u, std::thread::hardware_concurrency()));
    ProgressBar bar(context.err, context.terminal, "sweep", sweep_work(study).seconds(workers));
    options.progress = bar.callback();
    result = run_sweep(study, options);
  }
  if (!context.writes()) return kAllLimitsHold;  // rank 0 writes the gathered rows
  const double seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  std::ostringstream summary;
  write_sweep_summary(summary, study, result, seconds);
  std::vector<OutputFile> files;  // all or none
  if (!csv_.empty()) {
    std::ostringstream rows;
    write_sweep_csv(rows, study, result);
    files.push_back({csv_, rows.str()});
  }
  if (!gpkg_.empty())
    files.push_back({gpkg_, sweep_geopackage(sweep_table(study, result), study.axes.size(), sweep_facts(study, result))});
  write_outputs(files);
  context.out << summary.str();
  for (const SweepCombination& c : result.combinations)
    if (c.meets_every_limit) return kAllLimitsHold;
  return kLimitExceeded;  // no combination meets every limit
}

std::unique_ptr<Command> make_sweep_command(CLI::App& app) { return std::make_unique<SweepCommand>(app); }

}  // namespace strewn::cli
