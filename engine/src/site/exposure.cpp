#include "strewn/exposure.hpp"

#include <algorithm>
#include <cmath>

namespace strewn {
namespace {

// P(no hit) multiplies over independent sources and events: add N log1p(-p), with p kept in
// [0, 1 - 1e-300] so that a certain hit stays finite.
double log_none_of(double p, double events) { return events * std::log1p(-std::min(std::max(p, 0.0), 1.0 - 1e-300)); }

}  // namespace

const char* to_string(Period period) noexcept {
  switch (period) {
    case Period::event: return "event";
    case Period::session: return "session";
    case Period::year: return "year";
  }
  return "?";
}

void ExposureSum::add(double p, double abs_err, double events) {
  const double upper = std::min(1.0, p + abs_err), lower = std::max(0.0, p - abs_err);
  log_none_ += log_none_of(p, events);
  log_none_upper_ += log_none_of(upper, events);
  log_none_lower_ += log_none_of(lower, events);
  largest_ = std::max(largest_, p);
  largest_upper_ = std::max(largest_upper_, upper);
  largest_err_ = std::max(largest_err_, abs_err);
}

double ExposureSum::any() const { return -std::expm1(log_none_) + 0.0; }  // + 0.0: no -0 when nothing can hit

double ExposureSum::any_upper() const { return -std::expm1(log_none_upper_) + 0.0; }

double ExposureSum::any_abs_err() const {
  const double p = any();
  // 1 - (1 - p)^N grows with p, so the bound on each p maps to a bound on each side; the wider.
  return std::max(-std::expm1(log_none_upper_) - p, p + std::expm1(log_none_lower_));
}

}  // namespace strewn
