#include "run_cli.hpp"

#include <CLI/CLI.hpp>
#include <fmt/format.h>
#include <fmt/ostream.h>

#include <nlohmann/json.hpp>
#include <cctype>
#include <cstdlib>
#include <iostream>
#include <optional>
#include <unistd.h>
#include <ostream>

#include "assessment.hpp"
#include "checked_option.hpp"
#include "input_file.hpp"
#include "report.hpp"
#include "scenario.hpp"
#include "solve_command.hpp"
#include "deposition_command.hpp"
#include "fit_command.hpp"
#include "html_report.hpp"
#include "map_command.hpp"
#include "progress_bar.hpp"
#include "strewn/error.hpp"
#include "strewn/version.hpp"
#include "strewn/work.hpp"

namespace strewn::cli {
namespace {

ShapeRegistry load_shapes(const std::vector<std::string>& plugin_dirs, std::ostream& err) {
  ShapeRegistry shapes = ShapeRegistry::with_default_search_path(plugin_dirs);
  for (const std::string& w : shapes.warnings()) fmt::print(err, "strewn: warning: {}\n", w);
  return shapes;
}

void print_shapes(std::ostream& out, const ShapeRegistry& shapes) {
  for (const ShapeKindInfo& k : shapes.kinds()) {
    fmt::print(out, "{}: {}\n", k.name, k.summary);
    const auto desc = nlohmann::json::parse(k.params_json, nullptr, false);
    if (desc.is_discarded() || !desc.contains("params")) continue;
    for (const auto& p : desc["params"]) {
      std::string extra;
      if (p.value("required", false)) extra = "required";
      else if (p.contains("default")) extra = "default " + p["default"].dump();
      else extra = "optional";
      fmt::print(out, "    {:<18} {:<12} {:<4} {} ({})\n", p.value("name", "?"), p.value("type", "?"),
                 p.value("unit", ""), p.value("description", ""), extra);
    }
    fmt::print(out, "    from {}\n", k.module_path);
  }
}

// The work an assessment will take, estimated and checked before it starts (strewn/work.hpp).
void check_assessment_work(const Scenario& s, int replicates, bool force) {
  double components = 0.0;
  for (const Source& src : s.sources) components += static_cast<double>(src.model.components().size());
  const double zones = static_cast<double>(s.zones.size());
  if (s.options.method == Method::monte_carlo) {
    WorkEstimate w;
    w.what = s.file + ": " + std::to_string(s.options.samples) + " Monte Carlo samples x " +
             fmt::format("{}", components) + " component(s) x " + std::to_string(s.zones.size()) + " zone(s)";
    w.units = static_cast<double>(s.options.samples) * components * zones;
    w.seconds_per_unit = 1e-7;  // measured: 2e7 samples of one component on a rectangle, 1.7 s on one core
    check_work(w, kSampleWorkCeiling, force, "lower settings.samples, use --method exact, or pass --force to run it anyway");
  }
  if (replicates > 0) {
    WorkEstimate w;
    const double calibration = calibration_work(s);  // the double bootstrap's assessments
    w.what = s.file + ": " + std::to_string(replicates) + " bootstrap replicates" +
             (calibration > 0 ? fmt::format(" (+ {} for the calibration)", calibration) : std::string()) + " x " +
             fmt::format("{}", components) + " component(s) x " + std::to_string(s.zones.size()) + " zone(s)";
    w.units = (replicates + calibration) * components * zones *
              (s.options.method == Method::monte_carlo ? static_cast<double>(s.options.samples) * 5e-2 : 1.0);
    w.seconds_per_unit = 1e-5;  // one exact integration and its share of the refit
    check_work(w, kReplicateWorkCeiling, force, "use fewer --replicates, or pass --force to run it anyway");
  }
}

// CLI11's range checks print their bounds in fixed notation: DBL_MAX as 309 digits. Any run of
// more than 15 digits in a message is shown with 3 significant digits instead.
std::string short_numbers(const std::string& text) {
  std::string out;
  for (std::size_t i = 0; i < text.size();) {
    std::size_t j = i;
    while (j < text.size() && std::isdigit(static_cast<unsigned char>(text[j]))) ++j;
    std::size_t k = j;
    if (k < text.size() && text[k] == '.' && j > i) {
      ++k;
      while (k < text.size() && std::isdigit(static_cast<unsigned char>(text[k]))) ++k;
    }
    if (j - i > 15) {
      out += fmt::format("{:.3g}", std::strtod(text.substr(i, k - i).c_str(), nullptr));
      i = k;
    } else if (j > i) {
      out.append(text, i, j - i);
      i = j;
    } else {
      out += text[i++];
    }
  }
  return out;
}

}  // namespace

int run_cli(int argc, const char* const* argv, std::ostream& out, std::ostream& err) {
  CLI::App app{"strewn: how likely scattered impacts are to land in the zones of a site plan.\n"
               "Exit status: 0 all limits hold, 3 a limit is exceeded, 2 bad input, 1 internal error."};
  app.set_version_flag("--version", std::string("strewn ") + library_version());
  app.require_subcommand(1);
  std::vector<std::string> plugin_dirs;
  app.add_option("--plugin-dir", plugin_dirs, "Extra directory of shape plugins (repeatable)");

  auto* assess_cmd = app.add_subcommand(
      "assess", "Probability of an impact in every zone per event, session and year; limits checked.\n"
                "Example: strewn assess shapes/throwing_lane.toml --format json");
  std::string file, format = "table", method;
  double tolerance = 0.0;
  bool verify_flag = false;
  assess_cmd->add_option("FILE", file, "Scenario file (TOML)")->required();
  assess_cmd->add_option("--format", format, "table, csv or json")->check(CLI::IsMember({"table", "csv", "json"}));
  assess_cmd->add_option("--method", method, "exact, cubature or monte_carlo (default: the file's, else exact)")
      ->check(CLI::IsMember({"exact", "cubature", "monte_carlo"}));
  assess_cmd->add_option("--tolerance", tolerance, "Requested relative accuracy (default 1e-8)")
      ->check(CLI::Range(1e-15, 0.5));
  assess_cmd->add_flag("--verify", verify_flag, "Also run a second method; disagreement beyond the bounds is an error");
  bool force = false;
  assess_cmd->add_flag("--force", force,
                       "Run even above the work ceilings (Monte Carlo samples x components x zones > 2e9, "
                       "replicates x components x zones > 2e7)");
  bool uncertainty_flag = false;
  int replicates = 1000;
  double confidence = 0.95;
  assess_cmd->add_flag("--uncertainty", uncertainty_flag,
                       "Intervals and one-sided upper bounds on each zone's risk from the fitted sources' sampling\n"
                       "uncertainty (generalised pivotal quantities; a bootstrap for mixtures and censored fits)");
  assess_cmd->add_option("--replicates", replicates, "Replicates for --uncertainty (default 1000)")
      ->transform(whole_number(20, 100000, "20 to 100000"));
  assess_cmd->add_option("--confidence", confidence, "Confidence of the --uncertainty intervals (default 0.95)")
      ->check(CLI::Range(0.5, 0.999));

  auto* validate_cmd = app.add_subcommand(
      "validate", "Check a scenario file and every zone's geometry without computing.\n"
                  "Example: strewn validate shapes/throwing_lane.toml");
  std::string validate_file;
  validate_cmd->add_option("FILE", validate_file, "Scenario file (TOML)")->required();

  app.add_subcommand("shapes", "List the shape kinds found (built-in and plugins) with their parameters.\n"
                               "Example: strewn shapes");
  const SolveCommand solve(app);
  const DepositionCommand deposition(app);
  const FitCommand fit(app);
  const MapCommand map(app);
  const ReportCommand report(app);

  try {
    app.parse(argc, argv);
  } catch (const CLI::CallForHelp& e) {
    out << app.help(e.get_exit_code() == 0 ? "" : "", CLI::AppFormatMode::Normal);
    return kAllLimitsHold;
  } catch (const CLI::CallForVersion&) {
    out << "strewn " << library_version() << "\n";
    return kAllLimitsHold;
  } catch (const CLI::ParseError& e) {
    std::ostringstream o, er;
    const int code = app.exit(e, o, er);
    out << o.str();
    if (code == 0) return kAllLimitsHold;
    // One line, as every other input error: the option and what is wrong, then where to look.
    std::string what = short_numbers(e.what());
    for (char& c : what)
      if (c == '\n') c = ' ';
    // A mistyped command ("asess") is an unknown word, not a missing command: name the nearest.
    std::vector<std::string> commands;
    for (const CLI::App* sub : app.get_subcommands([](const CLI::App*) { return true; })) commands.push_back(sub->get_name());
    const bool no_command = what.find("subcommand is required") != std::string::npos ||
                            what.find("were not expected") != std::string::npos;
    for (int i = 1; no_command && i < argc; ++i) {
      const std::string word = argv[i];
      if (word.empty() || word[0] == '-') {
        if (word.rfind("--", 0) == 0 && word.find('=') == std::string::npos) ++i;  // its value
        continue;
      }
      if (std::find(commands.begin(), commands.end(), word) != commands.end()) break;
      const auto close = word.size() <= 64 ? closest_names(word, commands) : std::vector<std::string>{};
      what = "unknown command '" + quoted_excerpt(word) + "'" + (close.empty() ? "" : " (did you mean '" + close.front() + "'?)");
      break;
    }
    err << "strewn: error: " << what << " (strewn --help, or strewn COMMAND --help)\n";
    return kBadInput;
  }

  try {
    const ShapeRegistry shapes = load_shapes(plugin_dirs, err);
    if (app.got_subcommand("shapes")) {
      print_shapes(out, shapes);
      return kAllLimitsHold;
    }
    if (solve.chosen()) return solve.run(shapes, out);
    if (deposition.chosen()) return deposition.run(shapes, out);
    if (fit.chosen()) return fit.run(out);
    const bool terminal = &err == &std::cerr && ::isatty(2) == 1;  // progress bars only on a terminal
    if (report.chosen()) return report.run(shapes, out, err, terminal);
    if (map.chosen()) return map.run(shapes, out, err, terminal);
    if (app.got_subcommand("validate")) {
      const Scenario s = load_scenario(validate_file, shapes);
      fmt::print(out, "{}: valid ({} sources, {} zones)\n", validate_file, s.sources.size(), s.zones.size());
      return kAllLimitsHold;
    }
    Scenario s = load_scenario(file, shapes);
    if (!method.empty()) s.options.method = method_from_string(method);
    if (tolerance > 0) s.options.rel_tolerance = tolerance;
    check_assessment_work(s, uncertainty_flag ? replicates : 0, force);
    Assessment a;
    {
      ProgressBar bar(err, &err == &std::cerr && ::isatty(2) == 1, "assess");
      a = assess(s, verify_flag, bar.callback());
    }
    std::optional<Uncertainty> u;
    if (uncertainty_flag) {
      ProgressBar bar(err, &err == &std::cerr && ::isatty(2) == 1, "bootstrap");
      u = assess_uncertainty(s, replicates, confidence, s.options.seed, bar.callback());
    }
    const Uncertainty* up = u ? &*u : nullptr;
    // Render fully before writing, so that nothing partial reaches the output on failure.
    std::ostringstream rendered;
    if (format == "csv") write_csv(rendered, s, a, up);
    else if (format == "json") write_json(rendered, s, a, up);
    else write_table(rendered, s, a, up);
    out << rendered.str();
    if (!a.all_verified) {
      fmt::print(err, "strewn: the second method disagrees beyond the combined error bounds (see --format json)\n");
      return kInternalError;
    }
    return a.all_limits_hold ? kAllLimitsHold : kLimitExceeded;
  } catch (const input_error& e) {
    fmt::print(err, "strewn: error: {}\n", e.what());
    return kBadInput;
  } catch (const std::exception& e) {
    fmt::print(err, "strewn: internal error: {}\n", e.what());
    return kInternalError;
  }
}

}  // namespace strewn::cli
