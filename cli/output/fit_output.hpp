#ifndef STREWN_CLI_FIT_REPORT_HPP
#define STREWN_CLI_FIT_REPORT_HPP

// Writing what `strewn fit` found: a summary for people, JSON for scripts, a TOML source block
// that `strewn assess` reads unchanged, and a Q-Q plot of the squared Mahalanobis distances.
#include <iosfwd>
#include <optional>
#include <string>

#include "input/impact_data.hpp"
#include "strewn/fit.hpp"

namespace strewn::cli {

struct GroupFit {
  std::string name;                 // source name for the TOML block
  const ImpactGroup* group = nullptr;
  NormalFit normal;
  MixtureFit mixture;
};

struct FitRun {
  std::string data_file;
  double confidence = 0.95;
  bool design = false;   // write the design spread instead of the fitted one
  bool mixture = false;  // write the two-component mixture when it is preferred
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
