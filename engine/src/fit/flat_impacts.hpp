// Why a fit cannot start: impacts whose sample covariance is singular to rounding. Said apart
// when one impact lies far from all the others (1e12 m among impacts a metre apart: it holds
// the whole spread, and the message "identical or on one line" sent a user to the wrong place;
// a hostile trial), so that the user checks that impact.
#ifndef STREWN_FIT_FLAT_IMPACTS_HPP
#define STREWN_FIT_FLAT_IMPACTS_HPP

#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

#include <fmt/format.h>

#include "strewn/scatter_model.hpp"

namespace strewn::detail {

inline std::string flat_impacts_message(const std::vector<Vec2>& points) {
  const std::string plain = "the impacts are identical or lie on one line; no two-dimensional spread can be fitted";
  if (points.size() < 3) return plain;
  // The coordinate-wise median stands for the bulk; one impact a million times farther from it
  // than the typical impact is the one to check.
  std::vector<double> xs, ys;
  for (const Vec2& p : points) {
    xs.push_back(p.x());
    ys.push_back(p.y());
  }
  const auto median = [](std::vector<double> v) {
    std::nth_element(v.begin(), v.begin() + static_cast<std::ptrdiff_t>(v.size() / 2), v.end());
    return v[v.size() / 2];
  };
  const Vec2 centre(median(xs), median(ys));
  std::vector<double> d;
  for (const Vec2& p : points) d.push_back((p - centre).norm());
  const std::size_t far = static_cast<std::size_t>(std::max_element(d.begin(), d.end()) - d.begin());
  const double typical = median(d);
  if (!(d[far] > 1e6 * typical)) return plain;
  return fmt::format(
      "impact {} of {}, at ({:.6g}, {:.6g}), lies {:.3g} from the others' median, {:.3g} times the typical impact's "
      "distance: it holds the whole spread, and no two-dimensional spread can be fitted; check its coordinates",
      far + 1, points.size(), points[far].x(), points[far].y(), d[far], d[far] / std::max(typical, 1e-300));
}

}  // namespace strewn::detail

#endif
