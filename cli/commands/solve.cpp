#include <CLI/CLI.hpp>
#include <nlohmann/json.hpp>
#include <iosfwd>
#include <sstream>
#include <string>
#include <vector>

#include "commands/checked_option.hpp"
#include "commands/command.hpp"
#include "commands/former_names.hpp"
#include "commands/request_option.hpp"
#include "output/assess_output.hpp"
#include "output/design_output.hpp"
#include "output/drop_output.hpp"
#include "output/progress_bar.hpp"
#include "run_cli.hpp"
#include "strewn/design.hpp"
#include "strewn/release.hpp"
#include "strewn/site_io.hpp"

namespace strewn::cli {

class SolveCommand final : public Command {
 public:
  explicit SolveCommand(CLI::App& parent);
  bool chosen() const override { return solve_->parsed(); }
  // Returns the exit status: 0 answered, 3 no answer exists in the window.
  int run(const CommandContext& context) const override;

 private:
  CLI::App* solve_;
  CLI::App* clearance_;
  CLI::App* spread_;
  CLI::App* aim_;
  CLI::App* release_;
  CLI::App* spacing_;
  std::string file_, format_ = "table", per_ = "year";
  std::vector<double> person_, direction_;
  ClearanceQuery clearance_query_;
  SpreadQuery spread_query_;
  AimQuery aim_query_;
  double min_target_ = 0.0;
  ReleaseQuery release_query_;
  std::vector<double> release_target_;
  std::string vary_ = "none";
  double least_ = 0.0, most_ = 0.0;
  SpacingQuery spacing_query_;
  double min_cu_ = 0.0, min_du_ = 0.0, max_water_ = 0.0, max_litres_former_ = 0.0;
  FormerNames former_;
};
namespace {

void common(CLI::App* app, std::string& file, std::string& format) {
  app->add_option("FILE", file, "Scenario file (TOML)")->required();
  app->add_option("--format", format, "table or json")->check(CLI::IsMember({"table", "json"}));
}

}  // namespace

SolveCommand::SolveCommand(CLI::App& parent) {
  solve_ = parent.add_subcommand("solve", "Design answers: clearance, allowed spread, best aim, release point of a drop,\n"
                                          "largest sprinkler spacing.\n"
                                          "On a terminal, a search expected to take a second or more says so on stderr first\n"
                                          "(its first evaluations timed, times the number it usually takes), then shows progress.\n"
                                          "Example: strewn solve clearance shapes/throwing_lane.toml --zone \"fire exit door\"");
  solve_->require_subcommand(1);
  clearance_ = solve_->add_subcommand(
      "clearance", "Smallest move of a zone, a person or a source along a direction at which the limit(s) hold.\n"
                   "Example: strewn solve clearance shapes/throwing_lane.toml --zone \"spectator bench\" --direction -1 0");
  common(clearance_, file_, format_);
  ClearanceQuery& c = clearance_query_;
  clearance_->add_option("--zone", c.zone, "Move this zone (it needs a limit)");
  clearance_->add_option("--person", person_, "Move a standing person footprint from X Y (in the scenario's unit)")->expected(2);
  clearance_->add_option("--source", c.source, "Move this source, aim and impacts (how far back must it be?)");
  clearance_->add_option("--direction", direction_, "Direction DX DY (default: away from the mean impact point)")
      ->expected(2);
  clearance_->add_option("--limit", c.person_limit, "Limit for --person (default 1e-6)")->check(number_in(1e-300, 1.0, "1e-300 to 1"));
  clearance_->add_option("--per", per_, "event, session or year, for --person (default year)")
      ->check(CLI::IsMember({"event", "session", "year"}));
  clearance_->add_option("--max-move", c.max_move, "Largest move considered, in the scenario's unit (default 50)")->check(number_in(1e-300, 1e9, "above 0, at most 1e9"));
  former_.add(clearance_, "--window", "--max-move", c.max_move, "former name of --max-move")->check(number_in(1e-300, 1e9, "above 0, at most 1e9"));
  clearance_->add_option("--steps", c.steps, "Scan steps from 0 to --max-move (default 200)")->transform(whole_number(1, 100000, "1 to 100000"));
  clearance_->add_option("--tolerance", c.tolerance, "Accuracy of the answer, in the scenario's unit (default 1e-4; at most --max-move)")->check(number_in(1e-300, 1e9, "above 0, at most 1e9"));

  spread_ = solve_->add_subcommand(
      "spread", "Largest factor on the spread (every source, or one) at which every limit holds.\n"
                "Example: strewn solve spread shapes/drone_drop.toml");
  common(spread_, file_, format_);
  spread_->add_option("--source", spread_query_.source, "Scale only this source");
  spread_->add_option("--min-factor", spread_query_.min_factor, "Smallest factor on the spread considered (default 0.01)")
      ->check(number_in(1e-6, 1e6, "1e-6 to 1e6"));
  spread_->add_option("--max-factor", spread_query_.max_factor, "Largest factor on the spread considered (default 100)")
      ->check(number_in(1e-6, 1e6, "1e-6 to 1e6"));
  former_.add(spread_, "--min", "--min-factor", spread_query_.min_factor, "former name of --min-factor")->check(number_in(1e-6, 1e6, "1e-6 to 1e6"));
  former_.add(spread_, "--max", "--max-factor", spread_query_.max_factor, "former name of --max-factor")->check(number_in(1e-6, 1e6, "1e-6 to 1e6"));

  aim_ = solve_->add_subcommand(
      "aim", "Aim point of one source with the most target hits within every limit, or the least keep-out\n"
             "risk with --min-target.\n"
             "Example: strewn solve aim shapes/drone_drop.toml --source \"parcel drop\"");
  common(aim_, file_, format_);
  aim_->add_option("--source", aim_query_.source, "The source to re-aim (default: the only one)");
  aim_->add_option("--target", aim_query_.target, "Target zone (default: the first with role target)");
  aim_->add_option("--min-target", min_target_, "Minimise keep-out risk with P(target) at least this")
      ->check(number_in(1e-12, 1.0 - 1e-12, "1e-12 to 1 - 1e-12"));
  aim_->add_option("--search-half-width", aim_query_.search_half_width,
                   "Half-width of the square searched about the current aim, in the scenario's unit (default 3 sigma)")
      ->check(number_in(1e-300, 1e9, "above 0, at most 1e9"));
  former_.add(aim_, "--window", "--search-half-width", aim_query_.search_half_width, "former name of --search-half-width")
      ->check(number_in(1e-300, 1e9, "above 0, at most 1e9"));
  aim_->add_option("--grid", aim_query_.grid, "Grid points per side (default 41)")->transform(whole_number(2, 1001, "2 to 1001"));

  release_ = solve_->add_subcommand(
      "release", "Release point of a drop from flight (a source with drop = {...}) that centres its mean landing\n"
                 "on the target, and with --vary the largest release height or wind speed at which every limit holds.\n"
                 "Example: strewn solve release shapes/drone_drop_flight.toml --vary wind");
  common(release_, file_, format_);
  release_->add_option("--source", release_query_.source, "The drop source (default: the only one)");
  release_->add_option("--target", release_target_, "Target point X Y in the scenario's unit (default: the source's aim)")
      ->expected(2);
  release_->add_option("--vary", vary_, "none, height or wind: the value to find the largest of (default none)")
      ->check(CLI::IsMember({"none", "height", "wind"}));
  release_->add_option("--least", least_, "Smallest value considered (height: default 1; wind: default 0), in the scenario's unit (per second for wind)")
      ->check(CLI::NonNegativeNumber);
  release_->add_option("--most", most_, "Largest value considered (default 4 x the scenario's, wind at least 20; at most the scenario's caps, 1e5 m of height, 200 m/s of wind), same unit")
      ->check(number_in(1e-300, 1e5, "above 0, at most 1e5"));
  release_->add_option("--steps", release_query_.steps, "Scan steps from --least to --most (default 30; each computes the spread again, 0.1-0.3 s)")
      ->transform(whole_number(1, 200, "1 to 200"));

  spacing_ = solve_->add_subcommand(
      "spacing", "Largest spacing of a sprinkler layout (its pattern kept) at which CU and DU reach their targets and\n"
                 "no keep-out zone gets more than a volume of water per run (litres, or US gallons in a US site;\n"
                 "judged on upper bounds). Exit 3 names the limit that fails even at the smallest spacing tried.\n"
                 "Example: strewn solve spacing shapes/sports_pitch_rotors.toml --min-cu 80 --max-water-per-zone 60 --most 2");
  common(spacing_, file_, format_);
  SpacingQuery& sq = spacing_query_;
  spacing_->add_option("--layout", sq.layout, "The layout to space (default: the only one)");
  spacing_->add_option("--min-cu", min_cu_, "Least Christiansen CU, percent (from the catch grid's cans)")->check(number_in(0.0, 100.0, "0 to 100"));
  spacing_->add_option("--min-du", min_du_, "Least low-quarter DU, percent (from the catch grid's cans)")->check(number_in(0.0, 100.0, "0 to 100"));
  spacing_->add_option("--max-water-per-zone", max_water_,
                       "Most water on each keep-out zone per run, in the scenario's volume unit: litres, or US gallons\n"
                       "in a US site ([site] units = \"us\")")
      ->check(CLI::NonNegativeNumber);
  // The former name was litres in every site, and stays so.
  former_.add(spacing_, "--max-litres-per-zone", "--max-water-per-zone", max_litres_former_,
              "former name of --max-water-per-zone, read in litres in every site")
      ->check(CLI::NonNegativeNumber);
  spacing_->add_option("--least", sq.least_of_radius, "Smallest spacing tried, as a share of the head's radius (default 0.3)")
      ->check(number_in(1e-300, 100, "above 0, at most 100"));
  spacing_->add_option("--most", sq.most_of_radius, "Largest spacing tried, as a share of the head's radius (default 1.3)")
      ->check(number_in(1e-300, 100, "above 0, at most 100"));
  spacing_->add_option("--steps", sq.steps, "Scan steps from --least to --most (default 20), then bisection")
      ->transform(whole_number(1, 1000, "1 to 1000"));
  spacing_->add_option("--tolerance", sq.tolerance_m, "Width of the final bracket, in the scenario's unit (default 0.01)")
      ->check(number_in(1e-300, 1e9, "above 0, at most 1e9"));
}

int SolveCommand::run(const CommandContext& context) const {
  const ShapeRegistry& shapes = context.shapes;
  std::ostream& out = context.out;
  former_.warn(context.err);
  // Options that belong to another mode were silently ignored (a --limit beside --zone, whose
  // own limit is used; --least without --vary): refused, naming what they go with.
  if (clearance_->parsed() && person_.empty())
    for (const char* o : {"--limit", "--per"})
      if (clearance_->count(o) > 0) throw input_error(std::string(o) + ": goes with --person (a zone or a source keeps the file's limits)");
  if (release_->parsed() && vary_ == "none")
    for (const char* o : {"--least", "--most", "--steps"})
      if (release_->count(o) > 0) throw input_error(std::string(o) + ": goes with --vary height or --vary wind");
  const Site s = load_scenario(file_, context);
  const bool json = format_ == "json";
  std::ostringstream rendered;  // nothing reaches the output unless the whole answer does
  bool found = false;
  try {
    // On a terminal, as the progress bar: a search of a second or more says what to expect
    // first (stderr that is a file or a pipe stays as the command's messages alone).
    const EstimateFn estimate = context.terminal ? print_estimate(context.err, kTimedEvaluations) : EstimateFn{};
    // Lengths on the command line are in the scenario's unit, the engine's in metres.
    const double k = metres_per(s.units);
    if (clearance_->parsed()) {
      ClearanceQuery q = clearance_query_;
      q.max_move *= k;
      q.tolerance *= k;
      if (person_.size() == 2) q.person = k * Vec2(person_[0], person_[1]);
      if (direction_.size() == 2) q.direction = Vec2(direction_[0], direction_[1]);
      q.person_per = per_ == "event" ? Period::event : per_ == "session" ? Period::session : Period::year;
      ClearanceAnswer a;
      {
        ProgressBar bar(context.err, context.terminal, "solve clearance");  // on a terminal, after a second
        a = solve_clearance(s, shapes, q, bar.callback(), estimate);
      }
      write_clearance(rendered, s, q, a, json);
      found = a.crossing.found;
    } else if (spread_->parsed()) {
      SpreadAnswer a;  // factors: no unit
      {
        ProgressBar bar(context.err, context.terminal, "solve spread");
        a = solve_spread(s, spread_query_, bar.callback(), estimate);
      }
      write_spread(rendered, s, spread_query_, a, json);
      found = a.crossing.found;
    } else if (release_->parsed()) {
      ReleaseQuery q = release_query_;
      if (release_target_.size() == 2) q.target = k * Vec2(release_target_[0], release_target_[1]);
      q.vary = vary_ == "height" ? ReleaseQuery::Vary::height : vary_ == "wind" ? ReleaseQuery::Vary::wind : ReleaseQuery::Vary::none;
      if (release_->count("--least") > 0) q.least = k * least_;
      if (release_->count("--most") > 0) q.most = k * most_;
      q.tolerance *= k;
      ReleaseAnswer a;
      {
        ProgressBar bar(context.err, context.terminal, "solve release");
        a = solve_release(s, q, bar.callback());
      }
      write_release(rendered, s, q, a, json);
      found = a.status != Status::no_answer;
    } else if (spacing_->parsed()) {
      SpacingQuery q = spacing_query_;
      q.tolerance_m *= k;
      if (spacing_->count("--min-cu") > 0) q.min_cu = min_cu_;
      if (spacing_->count("--min-du") > 0) q.min_du = min_du_;
      if (spacing_->count("--max-water-per-zone") > 0) // US gallons to litres exactly (strewn/units.hpp)
        q.max_litres_per_zone = s.units == LengthUnit::foot ? max_water_ * kLitresPerUsGallon : max_water_;
      if (spacing_->count("--max-litres-per-zone") > 0) q.max_litres_per_zone = max_litres_former_;
      SpacingAnswer a;
      {
        ProgressBar bar(context.err, context.terminal, "solve spacing");
        a = solve_spacing(s, q, bar.callback());
      }
      write_spacing(rendered, s, q, a, json);
      found = a.found;
    } else {
      AimQuery q = aim_query_;
      q.search_half_width *= k;
      if (aim_->count("--min-target") > 0) q.min_target = min_target_;
      AimAnswer a;
      {
        ProgressBar bar(context.err, context.terminal, "solve aim");
        a = solve_aim(s, q, bar.callback(), estimate);
      }
      write_aim(rendered, s, q, a, json);
      found = a.best.found;
    }
  } catch (const request_error& e) {
    // The engine names the query's field; the user set it with one of these options.
    throw_for_option(e, {{"subject", "--zone, --person or --source"}, {"direction", "--direction"},
                         {"source", "--source"}, {"target", "--target"}, {"min_target", "--min-target"},
                         {"factor_range", "--min-factor/--max-factor"}, {"range", "--least/--most/--steps"}, {"layout", "--layout"},
                         {"max_move", "--max-move"}, {"tolerance", "--tolerance"}, {"search_half_width", "--search-half-width"},
                         {"limits", "--min-cu, --min-du or --max-water-per-zone"}, {"grid", "--min-cu/--min-du"}});
  }
  // An answer on a fitted spread holds for that spread; whether the data show it holds is the
  // fit's upper bound's question (assess --uncertainty), which a design answer did not mention.
  std::vector<std::string> fitted;
  for (const Source& src : s.sources)
    if (src.fit) fitted.push_back("'" + src.name + "' (" + std::to_string(src.fit->n) + " impacts)");
  std::string text = rendered.str();
  if (!fitted.empty() && !json) {
    std::string names;
    for (const std::string& f : fitted) names += (names.empty() ? "" : ", ") + f;
    const std::string note = wrapped("Fitted sources: " + names + ". This answer is on the fitted spread; "
                                     "put it in the scenario and run `strewn assess FILE --uncertainty` to see whether "
                                     "the data show that every limit holds at the fit's upper bound.", "", 78);
    const std::size_t caution = text.rfind("\n" + std::string(kCaution).substr(0, 20));
    text.insert(caution == std::string::npos ? text.size() : caution + 1, note + "\n");
  } else if (!fitted.empty()) {
    auto j = nlohmann::json::parse(text);
    j["fitted_sources_note"] = "the answer is on the fitted spread; assess --uncertainty on it tells whether the data "
                               "show that every limit holds at the fit's upper bound";
    text = j.dump(2) + "\n";
  }
  out << text;
  return found ? kAllLimitsHold : kLimitExceeded;
}

std::unique_ptr<Command> make_solve_command(CLI::App& app) { return std::make_unique<SolveCommand>(app); }

}  // namespace strewn::cli
