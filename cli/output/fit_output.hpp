#ifndef STREWN_CLI_FIT_REPORT_HPP
#define STREWN_CLI_FIT_REPORT_HPP

// Writing what `strewn fit` found: a summary for people, JSON for scripts, a TOML source block
// that `strewn assess` reads unchanged, and a Q-Q plot of the squared Mahalanobis distances.
#include <iosfwd>
#include <optional>
#include <string>

#include "input/impact_data.hpp"
#include "output/lengths.hpp"
#include "strewn/fit.hpp"
#include "strewn/student_t_fit.hpp"

namespace strewn::cli {

struct GroupFit {
  std::string name;                 // source name for the TOML block
  const ImpactGroup* group = nullptr;
  NormalFit normal;
  MixtureFit mixture;
  std::optional<StudentTFit> student_t;  // absent above kMaxStudentTImpacts impacts, or not fitted
  std::string student_t_skipped;          // why it is absent
  std::optional<FitComparison> comparison;
  /// What the TOML block writes for this group, from the flags and the comparison.
  FitCandidate::Model written(bool mixture, bool student_t) const;
};

/// The Student-t fit's profile and bootstrap grow with n (about 0.1 s per bootstrap at n = 1000
/// on one core); above this many impacts it is not attempted, and the output says so.
inline constexpr std::size_t kMaxStudentTImpacts = 10000;

struct FitRun {
  std::string data_file;
  // The data's length unit: the fits below are in metres, and every length printed or written is
  // converted back to this unit and carries its symbol (the TOML block states it).
  Lengths lengths;
  double confidence = 0.95;
  bool design = false;   // write the design spread instead of the fitted one
  bool mixture = false;  // write the two-component mixture when it is preferred
  bool student_t = false;  // write the Student-t when BIC prefers it
  std::vector<GroupFit> groups;
  std::optional<CountFit> counts;
  std::optional<CensoredFit> censored;
  Vec2 aim = Vec2::Zero();
};

void write_fit_summary(std::ostream& out, const FitRun& run);
void write_fit_json(std::ostream& out, const FitRun& run);
std::string fit_toml(const FitRun& run);
std::string qq_plot_svg(const FitRun& run);

}  // namespace strewn::cli

#endif
