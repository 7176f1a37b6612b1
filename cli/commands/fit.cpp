#include <CLI/CLI.hpp>
#include <cmath>
#include <cstdint>
#include <cstdlib>
#include <fmt/format.h>
#include <fmt/ostream.h>
#include <iosfwd>
#include <sstream>
#include <string>
#include <vector>

#include "commands/checked_option.hpp"
#include "commands/command.hpp"
#include "commands/former_names.hpp"
#include "input/impact_data.hpp"
#include "output/fit_output.hpp"
#include "output/leg_test_output.hpp"
#include "output/lengths.hpp"
#include "output/output_file.hpp"
#include "output/progress_bar.hpp"
#include "run_cli.hpp"
#include "strewn/closest_names.hpp"
#include "strewn/error.hpp"
#include "strewn/input_file.hpp"
#include "strewn/leg_test.hpp"
#include "strewn/units.hpp"

namespace strewn::cli {

class FitCommand final : public Command {
 public:
  explicit FitCommand(CLI::App& parent);
  bool chosen() const override { return app_->parsed(); }
  int run(const CommandContext& context) const override;

 private:
  CLI::App* app_;
  std::string data_, format_ = "table", out_file_, plot_file_, profile_, units_, site_file_;
  int run_profile(const CommandContext& context) const;
  std::vector<double> aim_;
  std::vector<std::uint64_t> counts_;
  double radius_ = 0.0, confidence_ = 0.95;
  std::uint64_t outside_ = 0;
  std::uint64_t seed_ = 20261202;
  bool design_ = false, mixture_ = false, student_t_ = false;
  FormerNames former_;
};
namespace {

// CLI::PositiveNumber says "Value 0 not in range 0.000000 to 1797693134862315708...000" (309
// digits of DBL_MAX); this says what is wanted.
const CLI::Validator kPositiveLength(
    [](const std::string& text) -> std::string {
      char* end = nullptr;
      const double v = std::strtod(text.c_str(), &end);
      if (end == text.c_str() || *end != '\0' || !(v > 0.0 && v <= 1e12))
        return "must be a positive length (in the data's unit), at most 1e12, found '" + quoted_excerpt(text, 20) + "'";
      return {};
    },
    "POSITIVE");

const CLI::Validator kCoordinate(
    [](const std::string& text) -> std::string {
      char* end = nullptr;
      const double v = std::strtod(text.c_str(), &end);
      if (end == text.c_str() || *end != '\0' || !(std::fabs(v) <= 1e12))
        return "must be a coordinate (in the data's unit) within +-1e12, found '" + quoted_excerpt(text, 20) + "'";
      return {};
    },
    "COORDINATE");

}  // namespace

FitCommand::FitCommand(CLI::App& parent) {
  app_ = parent.add_subcommand(
      "fit", "Calibrate a spread from field data, with confidence intervals; writes a source block.\n"
             "Example: strewn fit shapes/field_data/lane_marks.csv --out fitted.toml --plot qq.svg\n"
             "Example: strewn fit shapes/field_data/lane_marks_ft.csv --units ft --out fitted_ft.toml   (lengths in feet)\n"
             "Example: strewn fit shapes/field_data/lane_marks.csv --student-t --out fitted_t.toml   (heavy tails)\n"
             "Example: strewn fit --counts 41 60 --radius 0.3 --aim 0 6\n"
             "Example: strewn fit shapes/field_data/board_marks.csv --outside 7 --radius 0.6   (7 more missed the board)\n"
             "Example: strewn fit --profile shapes/field_data/rotor_leg_test.csv --out rotor_profile.csv   (a leg test)\n"
             "Example: strewn fit --profile shapes/field_data/rotor_leg_test.csv --units us   (printed in ft, in, in/h, gal)");
  app_->add_option("DATA", data_,
                   "CSV of impacts with a header row: x,y (site coordinates) or distance,bearing_deg (distance from the\n"
                   "aim, degrees clockwise from north), optional group; any case; ',' or ';' separated; lengths in\n"
                   "--units (metres unless told)");
  app_->add_option("--units", units_,
                   "Length unit of the data, --aim, --radius and every length printed or written: m or ft\n"
                   "(also metres, meters, feet; metric or us, whose depths, rates and volumes --profile prints in\n"
                   "mm, mm/h and L, or in, in/h and US gal); default the --site scenario's unit, else metres\n"
                   "(with --profile: the leg test's own, feet when its distances are)");
  app_->add_option("--site", site_file_,
                   "A scenario whose [site] units the data share (read for its unit only; give --units to check it)");
  app_->add_option("--aim", aim_, "Aim point X Y (overrides a '# aim = X, Y' line), each within +-1e12 (data unit)")
      ->expected(2)
      ->check(kCoordinate);
  app_->add_option("--counts", counts_, "K N: K of N impacts landed within --radius of the aim")
      ->expected(2)
      ->transform(whole_number(0, 1e12, "0 to 1e12"));
  app_->add_option("--outside", outside_, "Impacts known only to be beyond --radius (censored data), 0 to 1e12")
      ->transform(whole_number(0, 1e12, "0 to 1e12"));
  app_->add_option("--radius", radius_, "Radius for --counts or --outside (data unit)")->check(kPositiveLength);
  app_->add_option("--confidence", confidence_, "Confidence of the intervals (default 0.95)")
      ->check(number_in(0.5, 0.9999, "0.5 to 0.9999"));
  app_->add_option("--format", format_, "table or json")->check(CLI::IsMember({"table", "json"}));
  app_->add_option("--out", out_file_,
                   "Write the fitted [[source]] block(s) (TOML); copy them into a scenario with your zones,\n"
                   "set the exposure, then strewn assess it (the block alone has no zones to assess);\n"
                   "with --profile: the radial profile CSV (distance_m, rate_mm_per_h; or distance_ft,\n"
                   "rate_in_per_h in US units)");
  app_->add_option("--profile", profile_,
                   "A single head's leg test (CSV): '# duration_min = 30', '# opening_diameter_mm = 100',\n"
                   "'# flow_l_per_min = 12' lines, then distance_m (or distance_ft) and depth_mm (or depth_in or\n"
                   "volume_ml);\n"
                   "gives the radial profile (rate vs distance; --out writes its CSV) and the volume balance");
  app_->add_option("--plot", plot_file_, "Write a Q-Q plot (SVG) of the squared Mahalanobis distances");
  app_->add_flag("--conservative-spread", design_,
                 "Write the conservative spread (one-sided upper confidence bound on sigma) instead of the fitted one");
  former_.add_flag(app_, "--design", "--conservative-spread", design_);
  app_->add_flag("--mixture", mixture_, "Write the two-component mixture when it fits better");
  app_->add_flag("--student-t", student_t_,
                 "Write the Student-t fit (family = \"student_t\", nu) when BIC prefers it to the normal\n"
                 "(and, with --mixture, to the mixture); the comparison is printed either way.\n"
                 "nu's interval is one-sided, \"nu above L\", when no nu up to 100 is ruled out");
  app_->add_option("--seed", seed_, "Seed of the bootstrap (default 20261202), 0 to 2^53")
      ->transform(whole_number(0, 9007199254740992.0, "0 to 2^53"));
}

int FitCommand::run_profile(const CommandContext& context) const {
  if (!data_.empty() || !counts_.empty() || !plot_file_.empty() || app_->count("--outside") > 0 || !aim_.empty())
    throw input_error("fit --profile takes a leg test alone (no DATA, --counts, --outside, --aim or --plot)");
  check_outputs({out_file_}, {profile_, site_file_});  // before the leg test is read
  // The unit system printed: --units, else the --site scenario's, else the leg test's own
  // (feet, inches and gpm when its distances are in feet).
  std::optional<LengthUnit> unit;
  if (!units_.empty()) {
    unit = length_unit_from(units_);
    if (!unit)
      throw input_error("fit --units: '" + quoted_excerpt(units_) + "' is not a length unit" +
                        did_you_mean(units_, length_unit_spellings()) + " (accepted: m, metres, metric, ft, feet, us)");
  }
  if (!site_file_.empty()) {
    const LengthUnit site_unit = load_scenario(site_file_, context).units;
    if (unit && *unit != site_unit)
      throw input_error(fmt::format("fit: --units {} contradicts {}, which is in {}", symbol(*unit), site_file_, symbol(site_unit)));
    unit = site_unit;
  }
  const LegTest leg = read_leg_test_csv(profile_);
  const LengthUnit u = unit.value_or(leg.units);
  const LegTestProfile p = profile_from_leg_test(leg);
  std::ostringstream rendered;
  if (format_ == "json") write_leg_test_json(rendered, leg, p, u);
  else write_leg_test_table(rendered, leg, p, u);
  if (!out_file_.empty()) write_file_atomically(out_file_, radial_profile_csv(leg, p, u));
  context.out << rendered.str();
  if (!out_file_.empty() && format_ != "json")
    fmt::print(context.out, "\nWrote {}: distance_{}, rate_{}_per_h. Give it to a source as its profile\n"
                            "(docs/scenario-format.md).\n", out_file_, symbol(u), depth_symbol(u));
  return kAllLimitsHold;
}

int FitCommand::run(const CommandContext& context) const {
  std::ostream& out = context.out;
  former_.warn(context.err);
  if (!profile_.empty()) return run_profile(context);
  FitRun run;
  // The data's unit: every length read is converted to metres here and the engine fits in metres;
  // the renderers convert back (output/lengths.hpp), so feet and metres give one physical fit.
  std::optional<LengthUnit> unit;
  if (!units_.empty()) {
    unit = length_unit_from(units_);
    if (!unit)
      throw input_error("fit --units: '" + quoted_excerpt(units_) + "' is not a length unit" +
                        did_you_mean(units_, length_unit_spellings()) + " (accepted: m, metres, meters, ft, feet)");
  }
  if (!site_file_.empty()) {
    const LengthUnit site_unit = load_scenario(site_file_, context).units;
    if (unit && *unit != site_unit)
      throw input_error(fmt::format("fit: --units {} contradicts the lengths of {}, which are in {}", symbol(*unit),
                                    site_file_, symbol(site_unit)));
    unit = site_unit;
  }
  run.lengths.unit = unit.value_or(LengthUnit::metre);
  const double metres_per_unit = metres_per(run.lengths.unit);
  run.confidence = confidence_;
  run.design = design_;
  run.mixture = mixture_;
  run.student_t = student_t_;
  if (student_t_ && design_)
    throw input_error("fit: --conservative-spread scales the normal fit; it cannot be combined with --student-t");
  const std::optional<Vec2> aim = aim_.size() == 2 ? std::optional<Vec2>(Vec2(aim_[0], aim_[1])) : std::nullopt;
  const double radius = metres_per_unit * radius_;
  check_outputs({out_file_, plot_file_}, {data_, site_file_});  // before the data is read
  ImpactData data;
  // Options of another mode are refused, not ignored (a statistician's trial: --counts with
  // --outside or --student-t dropped the second silently, --radius alone did nothing).
  if (!counts_.empty() && app_->count("--outside") > 0) throw input_error("fit: --counts and --outside are two kinds of data; give one");
  if (!counts_.empty() && (student_t_ || mixture_))
    throw input_error(std::string("fit: ") + (student_t_ ? "--student-t" : "--mixture") + " needs impacts (a CSV), not --counts");
  if (counts_.empty() && app_->count("--outside") == 0 && app_->count("--radius") > 0 && profile_.empty())
    throw input_error("fit: --radius goes with --counts or --outside");
  if (!counts_.empty()) {
    if (!data_.empty()) throw input_error("fit: --counts takes no data file");
    if (radius_ <= 0.0) throw input_error("fit: --counts needs --radius");
    if (!aim) throw input_error("fit: --counts needs --aim X Y (where the counted circle is centred)");
    run.data_file = "counts";
    run.aim = metres_per_unit * *aim;
    run.counts = fit_counts(counts_[0], counts_[1], radius, confidence_);
    // None inside: the data bound sigma from below only, and a lower bound on a spread is no
    // safe basis for anything; refuse rather than write sigma = inf.
    if (run.counts->k == 0)
      throw input_error(fmt::format(
          "fit --counts: 0 of {} impacts within {:g} {}: the data only bound sigma from below (sigma >= {:.4g} {}, "
          "one-sided {:g}%) and give no spread that could be written; count within a larger radius",
          run.counts->n, radius_, run.lengths.symbol(), run.lengths(run.counts->sigma_lower), run.lengths.symbol(),
          100 * confidence_));
  } else {
    if (data_.empty()) throw input_error("fit: give a CSV of impacts, or --counts K N --radius A");
    data = read_impacts(data_, aim);
    for (ImpactGroup& g : data.groups)
      for (Vec2& p : g.points) p *= metres_per_unit;
    if (data.aim) *data.aim *= metres_per_unit;
    run.data_file = data_;
    if (!data.aim) throw input_error(data_ + ": no aim point: give --aim X Y or a '# aim = X, Y' line");
    run.aim = *data.aim;
    if (app_->count("--outside") > 0) {
      if (radius <= 0.0) throw input_error("fit: --outside needs --radius");
      if (data.groups.size() != 1) throw input_error(data_ + ": censored data must hold one group");
      std::vector<double> radii;
      for (const Vec2& p : data.groups.front().points) radii.push_back((p - run.aim).norm());
      try {
        run.censored = fit_censored(radii, outside_, radius, confidence_);
      } catch (const input_error& e) {
        throw input_error(data_ + ": " + e.what());
      }
    } else {
      FitOptions o;
      o.confidence = confidence_;
      o.seed = seed_;
      for (const ImpactGroup& g : data.groups) {
        GroupFit gf;
        gf.name = g.name.empty() ? "fitted source" : g.name;
        gf.group = &g;
        try {
          gf.normal = fit_normal(g.points, run.aim, o);
        } catch (const input_error& e) {
          throw input_error(data_ + (g.name.empty() ? "" : " group '" + quoted_excerpt(g.name) + "'") + ": " + e.what());
        }
        gf.mixture = fit_two_component(g.points, gf.normal);
        if (g.points.size() > kMaxStudentTImpacts) {
          gf.student_t_skipped = fmt::format("not fitted above {} impacts (its profile and bootstrap would take minutes)",
                                             kMaxStudentTImpacts);
        } else {
          StudentTFitOptions to;
          to.confidence = confidence_;
          to.seed = seed_;
          to.bootstrap_replicates = student_t_default_replicates(g.points.size());
          try {  // the normal fit stands without it: a t the data cannot support is reported, not fatal
            // (its bootstrap profiles each refit's figures: seconds, more at extreme axis ratios)
            ProgressBar bar(context.err, context.terminal, "t fit");
            to.progress = bar.callback();
            gf.student_t = fit_student_t(g.points, to);
            gf.comparison = compare_fits(gf.normal, gf.mixture, *gf.student_t);
          } catch (const input_error& e) {
            gf.student_t_skipped = std::string("not fitted: ") + e.what();
          }
        }
        run.groups.push_back(gf);
      }
    }
  }
  if (!plot_file_.empty() && run.groups.empty())
    throw input_error("fit: --plot needs impact coordinates (counts and censored data have no distances to plot)");
  // Everything is computed and rendered before the first file is written.
  std::ostringstream rendered;
  if (format_ == "json") write_fit_json(rendered, run);
  else write_fit_summary(rendered, run);
  const std::string toml = fit_toml(run);
  const std::string svg = plot_file_.empty() ? "" : qq_plot_svg(run);
  std::vector<OutputFile> files;
  if (!out_file_.empty()) files.push_back({out_file_, toml});
  if (!plot_file_.empty()) files.push_back({plot_file_, svg});
  write_outputs(files);  // all or none
  out << rendered.str();
  if (!out_file_.empty() && format_ != "json")  // JSON stays one document
    fmt::print(out, "\nWrote {}: [[source]] block(s) without zones. Copy them into a scenario file with\n"
                    "your [[zone]] tables, set events_per_session and sessions_per_year, then run\n"
                    "strewn assess SCENARIO (add --uncertainty for the fit's effect on the risk).\n",
               out_file_);
  return kAllLimitsHold;
}

std::unique_ptr<Command> make_fit_command(CLI::App& app) { return std::make_unique<FitCommand>(app); }

}  // namespace strewn::cli
