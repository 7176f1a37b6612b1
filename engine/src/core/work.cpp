#include "strewn/work.hpp"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <exception>
#include <mutex>
#include <sstream>
#include <thread>
#include <vector>

#include "strewn/error.hpp"

namespace strewn {
namespace {

std::string short_number(double v) {
  std::ostringstream s;
  s.precision(3);
  s << v;
  return s.str();
}

std::string duration(double seconds) {
  if (seconds < 120) return short_number(seconds) + " s";
  if (seconds < 7200) return short_number(seconds / 60) + " min";
  if (seconds < 172800) return short_number(seconds / 3600) + " h";
  return short_number(seconds / 86400) + " days";
}

std::string work_summary(const WorkEstimate& w, double ceiling) {
  return w.what + ": about " + short_number(w.units) + " units of work (roughly " + duration(w.seconds()) +
         " on one core), above the ceiling of " + short_number(ceiling);
}

}  // namespace

work_error::work_error(const WorkEstimate& w, double ceiling, const std::string& how_to_proceed)
    : input_error(work_summary(w, ceiling) + (how_to_proceed.empty() ? "" : "; " + how_to_proceed)),
      summary_(work_summary(w, ceiling)),
      units_(w.units),
      ceiling_(ceiling) {}

WorkEstimate monte_carlo_work(std::uint64_t samples, std::size_t components, std::size_t regions, std::size_t edges) {
  WorkEstimate w;
  w.what = std::to_string(samples) + " Monte Carlo samples x " + std::to_string(components) + " component(s) x " +
           std::to_string(regions) + " region(s) of " + std::to_string(edges) + " edge(s)";
  w.units = static_cast<double>(samples) * static_cast<double>(components) *
            (static_cast<double>(regions) + static_cast<double>(edges) / 8.0);
  w.seconds_per_unit = 1e-7;  // measured: 2e7 samples of one component on a rectangle, 1.7 s on one core
  return w;
}

void check_work(const WorkEstimate& w, double ceiling, bool force, const std::string& how_to_proceed) {
  if (force || w.units <= ceiling) return;
  throw work_error(w, ceiling, how_to_proceed);
}

void parallel_for(std::size_t count, int threads, const std::function<void(std::size_t)>& body,
                  const ProgressFn& progress) {
  if (threads <= 0) threads = static_cast<int>(std::max(1u, std::thread::hardware_concurrency()));
  threads = static_cast<int>(std::min<std::size_t>(static_cast<std::size_t>(threads), std::max<std::size_t>(count, 1)));
  std::atomic<std::size_t> next{0}, done{0};
  std::atomic<bool> stop{false};
  std::exception_ptr first;
  std::mutex first_mutex;
  const auto work = [&](bool report) {
    for (std::size_t i = next++; i < count && !stop; i = next++) {
      try {
        body(i);
      } catch (...) {
        const std::lock_guard<std::mutex> lock(first_mutex);
        if (!first) first = std::current_exception();
        stop = true;
        return;
      }
      ++done;
      if (report && progress) progress(static_cast<double>(done) / static_cast<double>(count));
    }
  };
  std::vector<std::thread> pool;
  pool.reserve(static_cast<std::size_t>(threads - 1));
  try {
    for (int t = 1; t < threads; ++t) pool.emplace_back(work, false);
  } catch (...) {
    // No thread could be started: the calling thread does the rest alone.
  }
  try {
    work(true);
  } catch (...) {
    // Only the progress callback can get here; stop the others and keep its exception.
    const std::lock_guard<std::mutex> lock(first_mutex);
    if (!first) first = std::current_exception();
    stop = true;
  }
  for (std::thread& t : pool) t.join();
  if (first) std::rethrow_exception(first);
  if (progress) progress(1.0);
}

std::uint64_t checked_count(double value, std::uint64_t least, std::uint64_t most, const std::string& name) {
  if (!(value >= static_cast<double>(least) && value <= static_cast<double>(most) && value == std::floor(value)))
    throw input_error(name + " must be a whole number from " + std::to_string(least) + " to " + std::to_string(most) +
                      " (got " + short_number(value) + ")");
  return static_cast<std::uint64_t>(value);
}

}  // namespace strewn
