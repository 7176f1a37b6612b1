#ifndef STREWN_CLI_PROGRESS_BAR_HPP
#define STREWN_CLI_PROGRESS_BAR_HPP

// The one progress bar of every long command (map, report, assess with many samples or
// replicates): drawn on stderr only when it is a terminal, and only once the work has run for a
// second or is estimated to take longer (strewn/work.hpp). Ends its line when destroyed.
#include <chrono>
#include <iosfwd>
#include <string>

#include "strewn/work.hpp"

namespace strewn::cli {

class ProgressBar {
 public:
  // `terminal`: stderr is a terminal (isatty); otherwise the bar draws nothing.
  ProgressBar(std::ostream& err, bool terminal, std::string label, double estimated_seconds = 0.0);
  ~ProgressBar();
  ProgressBar(const ProgressBar&) = delete;
  ProgressBar& operator=(const ProgressBar&) = delete;

  void update(double done);
  // A callback for the engine (strewn::ProgressFn) that updates this bar.
  ProgressFn callback();

 private:
  std::ostream& err_;
  bool terminal_;
  std::string label_;
  double estimated_seconds_;
  std::chrono::steady_clock::time_point start_, last_;
  bool shown_ = false;
};

// "strewn: solve aim: about 1900 evaluations of the limits; expect about 40 s (timed on the
// first 3)" for an estimate of one second or more (a quick search says nothing), else empty.
std::string estimate_line(const WorkEstimate& w, int timed);

// An EstimateFn that prints estimate_line on `err` (a line of its own, before the bar).
EstimateFn print_estimate(std::ostream& err, int timed);

}  // namespace strewn::cli

#endif
