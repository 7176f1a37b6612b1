#ifndef STREWN_RADIAL_PROFILE_HPP
#define STREWN_RADIAL_PROFILE_HPP

/// \file
/// A measured radial pattern: the rate at which impacts (water, spray, debris) fall at each
/// distance from a head, as a sprinkler's catch-can leg test gives it. It is the radial part of
/// the `profile` scatter family (strewn/scatter_family.hpp); strewn/profile_spread.hpp places it
/// on a site.
///
/// The table is rows (d_i, v_i): distances in metres, strictly increasing, and rates >= 0 in any
/// unit per unit area and time (mm/h, say), not all zero. Between rows the rate is linear in the
/// distance; below the first distance it keeps the first rate (a leg test rarely has a can on the
/// head itself); beyond the last distance, the wetted radius R, it is 0. A last rate above 0 is
/// a step down to 0 at R, like the uniform family's edge.
///
/// Because v is piecewise linear in r, the volume within radius r,
///     V(r) = integral from 0 to r of v(s) 2 pi s ds,
/// is piecewise cubic, and the probability that one impact falls within r of the head is
/// G(r) = V(r) / V(R): the rates are normalised so that G(inf) = 1, and only their shape matters
/// to a probability. volume_rate() = V(R) (rate x m^2, e.g. mm/h x m^2 = L/h) keeps the absolute
/// scale for depths.
///
/// Example (a made-up leg test, metres and mm/h):
/// \code
///   strewn::RadialProfile leg({0.0, 3.0, 6.0, 9.0, 12.0}, {10.0, 12.0, 11.0, 6.0, 0.0});
///   double litres_per_hour = leg.volume_rate();       // mm/h x m^2 = L/h
///   auto from_csv = strewn::read_radial_profile_csv("leg_test.csv", std::nullopt);
/// \endcode

#include <optional>
#include <string>
#include <vector>

#include "strewn/export.hpp"
#include "strewn/units.hpp"

namespace strewn {

class STREWN_API RadialProfile {
 public:
  /// Throws strewn::input_error naming the first bad row (1-based) unless there are at least two
  /// rows, distances are finite, >= 0 and strictly increasing, rates finite and >= 0 and not all 0.
  RadialProfile(std::vector<double> distance_m, std::vector<double> rate, std::string label = "profile");

  const std::vector<double>& distance_m() const { return distance_; }
  const std::vector<double>& rate() const { return rate_; }
  /// Where the profile came from (a file name), for reports.
  const std::string& label() const { return label_; }
  /// The last distance: beyond it the rate is 0.
  double wetted_radius() const { return distance_.back(); }
  /// The rate at a distance in metres (linear between rows, see above).
  double rate_at(double distance_m) const;
  /// V(R): the integral of the rate over the plane, in rate x m^2.
  double volume_rate() const;

 private:
  std::vector<double> distance_, rate_;
  std::string label_;
};

/// Reads a profile from CSV text: a header `distance_m, rate` (or `distance_ft`, or a bare
/// `distance` in the unit `bare`; the rate's column name starts with `rate`, e.g.
/// `rate_mm_per_h`), then one row per distance; blank lines and lines starting with '#' are
/// skipped. `declared`, when given, is the unit the caller was told (a scenario's
/// `profile_unit`): a header's own unit must agree with it, and a bare column takes it. Throws
/// strewn::input_error "NAME:LINE: why" for the first bad line.
STREWN_API RadialProfile parse_radial_profile_csv(const std::string& text, const std::string& name,
                                                  std::optional<LengthUnit> declared,
                                                  LengthUnit bare = LengthUnit::metre);
/// The same from a file (read through strewn/input_file.hpp's size cap).
STREWN_API RadialProfile read_radial_profile_csv(const std::string& path, std::optional<LengthUnit> declared,
                                                 LengthUnit bare = LengthUnit::metre);

}  // namespace strewn

#endif
