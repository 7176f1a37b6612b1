#include "strewn/radial_profile.hpp"

#include <algorithm>
#include <cmath>
#include <sstream>

#include "strewn/constants.hpp"
#include "strewn/error.hpp"

namespace strewn {

RadialProfile::RadialProfile(std::vector<double> distance_m, std::vector<double> rate, std::string label)
    : distance_(std::move(distance_m)), rate_(std::move(rate)), label_(std::move(label)) {
  if (distance_.size() != rate_.size()) throw input_error("a profile needs as many rates as distances");
  if (distance_.size() < 2) throw input_error("a profile needs at least two rows (distance, rate)");
  bool any = false;
  for (std::size_t i = 0; i < distance_.size(); ++i) {
    std::ostringstream m;
    m << "profile row " << i + 1 << ": ";
    if (!(std::isfinite(distance_[i]) && distance_[i] >= 0.0 && distance_[i] <= 1e6))
      throw input_error(m.str() + "the distance must be a finite number in [0, 1e6] m");
    if (i > 0 && !(distance_[i] > distance_[i - 1]))
      throw input_error(m.str() + "distances must increase from row to row");
    if (!(std::isfinite(rate_[i]) && rate_[i] >= 0.0)) throw input_error(m.str() + "the rate must be a finite number >= 0");
    any = any || rate_[i] > 0.0;
  }
  if (!any) throw input_error("a profile needs a rate above 0 somewhere");
}

double RadialProfile::rate_at(double d) const {
  if (!(d <= distance_.back())) return 0.0;
  if (d <= distance_.front()) return rate_.front();
  const std::size_t i = static_cast<std::size_t>(std::upper_bound(distance_.begin(), distance_.end(), d) - distance_.begin()) - 1;
  if (i + 1 >= distance_.size()) return rate_.back();
  const double w = (d - distance_[i]) / (distance_[i + 1] - distance_[i]);
  return rate_[i] + w * (rate_[i + 1] - rate_[i]);
}

double RadialProfile::volume_rate() const {
  // The disk under the first rate, then each linear piece: with t = s - d_i and slope b,
  // integral of (v_i + b t)(d_i + t) dt from 0 to h = v_i d_i h + (v_i + b d_i) h^2/2 + b h^3/3.
  const double d0 = distance_.front();
  double v = 0.5 * rate_.front() * d0 * d0;
  for (std::size_t i = 0; i + 1 < distance_.size(); ++i) {
    const double h = distance_[i + 1] - distance_[i], b = (rate_[i + 1] - rate_[i]) / h;
    v += rate_[i] * distance_[i] * h + 0.5 * (rate_[i] + b * distance_[i]) * h * h + b * h * h * h / 3.0;
  }
  return 2.0 * kPi * v;
}

}  // namespace strewn
