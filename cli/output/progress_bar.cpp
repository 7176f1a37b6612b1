#include "output/progress_bar.hpp"

#include <algorithm>
#include <fmt/format.h>
#include <fmt/ostream.h>
#include <ostream>

namespace strewn::cli {

ProgressBar::ProgressBar(std::ostream& err, bool terminal, std::string label, double estimated_seconds)
    : err_(err), terminal_(terminal), label_(std::move(label)), estimated_seconds_(estimated_seconds),
      start_(std::chrono::steady_clock::now()), last_(start_) {}

ProgressBar::~ProgressBar() {
  if (shown_) {
    err_ << "\n";
    err_.flush();
  }
}

void ProgressBar::update(double done) {
  if (!terminal_) return;
  const auto now = std::chrono::steady_clock::now();
  const double elapsed = std::chrono::duration<double>(now - start_).count();
  if (!shown_ && elapsed < 1.0 && estimated_seconds_ < 1.0) return;
  // At most ten redraws a second, and always the last one.
  if (shown_ && done < 1.0 && std::chrono::duration<double>(now - last_).count() < 0.1) return;
  shown_ = true;
  last_ = now;
  done = std::clamp(done, 0.0, 1.0);
  const int filled = static_cast<int>(done * 30);
  std::string eta;
  if (done > 0.02 && done < 1.0) eta = fmt::format(", about {:.0f} s left", elapsed * (1.0 - done) / done);
  fmt::print(err_, "\r{} {:3.0f}% [{}{}] {:.1f} s{}   ", label_, 100 * done, std::string(filled, '#'),
             std::string(30 - filled, ' '), elapsed, eta);
  err_.flush();
}

ProgressFn ProgressBar::callback() {
  return [this](double done) { update(done); };
}

std::string estimate_line(const WorkEstimate& w, int timed) {
  const double t = w.seconds();
  if (!(t >= 1.0)) return {};
  const std::string time = t < 120 ? fmt::format("{:.0f} s", t) : t < 7200 ? fmt::format("{:.0f} min", t / 60)
                                                                            : fmt::format("{:.1f} h", t / 3600);
  return fmt::format("strewn: {}; expect about {} (timed on the first {})\n", w.what, time, timed);
}

EstimateFn print_estimate(std::ostream& err, int timed) {
  return [&err, timed](const WorkEstimate& w) {
    const std::string line = estimate_line(w, timed);
    if (line.empty()) return;
    err << line;
    err.flush();
  };
}

}  // namespace strewn::cli
