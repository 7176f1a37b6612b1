#ifndef STREWN_DROP_HPP
#define STREWN_DROP_HPP

/// \file
/// Drops from flight: where a parcel released from a moving aircraft lands, and how its landing
/// points spread when the flight, the wind and the parcel are known only to a standard deviation.
///
/// The fall (fall_of). A point mass m released at height h above flat ground with the aircraft's
/// ground velocity, no vertical speed. Its acceleration is gravity plus quadratic drag relative to
/// the air:
///   dv/dt = -g e_z - (rho C_dA(t) / (2 m)) |v - w(z)| (v - w(z)),
/// with C_dA the body's drag area (drag coefficient times area, m^2), plus the parachute's once
/// `deploy_delay` seconds have passed since release (an instant opening). The wind follows the
/// power law w(z) = speed (z / reference_height)^profile_exponent, horizontal, blowing from
/// `from_deg`; it is zero at and below the ground. Integrated with Boost.Odeint's adaptive
/// Dormand-Prince 5(4) stepper with dense output (Dormand & Prince 1980), the landing time found on
/// the dense output by bisection; the parachute's opening restarts the stepper at that instant.
///
/// Frame and units: site metres, x east, y north, z up from the ground, seconds, kilograms.
/// `heading_deg` and `wind.from_deg` are compass bearings, degrees clockwise from the site's +y
/// axis (north; in a projected CRS that is grid north, which differs from true north by the
/// meridian convergence: convert a true or magnetic bearing first). The wind blows FROM
/// `from_deg`: a west wind (from 270) carries the parcel east.
///
/// The spread (drop_spread). Each uncertain input is normal and independent with the standard
/// deviation in DropUncertainty. The unscented transform (Julier & Uhlmann 1997, "A new
/// extension of the Kalman filter to nonlinear systems", Proc. SPIE 3068) carries their mean
/// and covariance through the fall to the landing point: 2n + 1 sigma points for the n inputs
/// whose deviation is not zero, at the mean and at mean +- sqrt(n + kappa) times each column of
/// the inputs' Cholesky factor, weights kappa / (n + kappa) and 1 / (2 (n + kappa)), kappa =
/// max(0, 3 - n) (Julier & Uhlmann's n + kappa = 3 for normal inputs where it keeps the centre
/// weight non-negative). The result is checked by a seeded Monte Carlo of `falls` landings of the
/// same ODE: the squared Mahalanobis distances of the landings about their own mean and
/// covariance are compared with chi-square (2 d.o.f.) by the Kolmogorov-Smirnov test (as
/// strewn::fit_normal does); when its p-value is below `normality_level`, the landing cloud is not
/// close to normal and the source's scatter becomes a mixture fitted to the cloud, its 2 or 3
/// components each with its own mean and covariance (expectation-maximisation on the landings
/// of even index, the number of components by BIC), so a curved cloud (a crescent) is
/// followed; the mixture is checked in turn on the landings of odd index (Rosenblatt transform,
/// KS against chi-square with 2 d.o.f.), and DropSpread::shape says whether that check passed.
///
/// Assumptions (docs/scenario-format.md, "Drops from flight"): flat ground at z = 0, no bounce or
/// roll after landing, a point mass without lift or tumbling, a parachute that opens at once,
/// still air below the ground and a wind that is the same everywhere over the site at a given
/// height (no gusts, no turbulence beyond the wind's stated uncertainty).
///
/// Example:
///   strewn::DropParameters d;
///   d.height = 30; d.ground_speed = 8; d.heading_deg = 0;   // north at 8 m/s
///   d.wind = {4.0, 270.0, 10.0, 1.0 / 7.0};                 // 4 m/s from the west at 10 m
///   d.mass = 1.2; d.drag_area = 0.03;
///   const strewn::FallResult f = strewn::fall_of(d);        // f.landing: east and north of release
///   strewn::DropUncertainty u; u.position = 1.5; u.timing = 0.2;
///   const strewn::DropSpread s = strewn::drop_spread(d, u);  // s.model: the scatter

#include <cstdint>
#include <optional>
#include <string>

#include "strewn/export.hpp"
#include "strewn/scatter_model.hpp"
#include "strewn/work.hpp"

namespace strewn {

/// Standard gravity (CGPM 1901), m/s^2.
inline constexpr double kStandardGravity = 9.80665;

struct DropWind {
  double speed = 0.0;             ///< m/s at reference_height
  double from_deg = 0.0;          ///< compass bearing the wind blows from
  double reference_height = 10.0; ///< m above the ground, where `speed` was measured
  double profile_exponent = 1.0 / 7.0;  ///< power-law exponent (1/7: open ground, a common rule)
};

struct Parachute {
  double drag_area = 0.0;    ///< m^2, added to the body's once open
  double deploy_delay = 0.0; ///< s after release
};

struct DropParameters {
  Vec2 release = Vec2::Zero();  ///< the site point under the aircraft at release, m
  double height = 0.0;          ///< release height above the ground, m (> 0)
  double ground_speed = 0.0;    ///< m/s along the track
  double heading_deg = 0.0;     ///< the ground track's compass bearing
  DropWind wind;
  double mass = 1.0;            ///< kg (> 0)
  double drag_area = 0.0;       ///< body drag coefficient times reference area, m^2 (>= 0; 0: vacuum)
  std::optional<Parachute> parachute;
  double air_density = 1.225;   ///< kg/m^3 (ISA sea level)
  double gravity = kStandardGravity;

  /// Empty when valid, else one sentence naming the member ("height must be above 0 m").
  std::string invalid_reason() const;
};

/// One standard deviation of each input, all independent and normal; 0 leaves an input exact.
struct DropUncertainty {
  double position = 0.0;       ///< m, navigation error of the release point, per axis (circular)
  double timing = 0.0;         ///< s, release timing: moves the release along the track
  double height = 0.0;         ///< m
  double ground_speed = 0.0;   ///< m/s
  double heading_deg = 0.0;    ///< degrees
  double wind_speed = 0.0;     ///< m/s (at the reference height)
  double wind_from_deg = 0.0;  ///< degrees
  double drag = 0.0;           ///< relative, on every drag area (0.1: 10%)

  std::string invalid_reason() const;
};

struct FallOptions {
  double abs_tolerance = 1e-9;  ///< Dormand-Prince step control, on positions (m) and speeds (m/s)
  double rel_tolerance = 1e-9;
  double max_time = 1e5;        ///< s: a fall longer than this is refused (a parcel that floats)
};

struct FallResult {
  Vec2 landing = Vec2::Zero();   ///< site metres
  double time = 0.0;             ///< s from release to landing
  Vec2 horizontal_velocity = Vec2::Zero();  ///< m/s at landing, over the ground
  double vertical_speed = 0.0;   ///< m/s at landing (downward positive)
  int steps = 0;                 ///< accepted Dormand-Prince steps
};

/// The fall of one parcel; throws input_error for invalid parameters, and when the fall does not
/// end within options.max_time.
STREWN_API FallResult fall_of(const DropParameters& d, const FallOptions& options = {});

struct DropSpreadOptions {
  std::uint64_t falls = 4000;       ///< Monte Carlo landings of the check (>= 100)
  std::uint64_t seed = 20261203;
  double normality_level = 0.01;    ///< the KS test's level below which the cloud is not normal
  FallOptions fall;
  /// Told once, after the first falls, what the Monte Carlo check will cost (falls times the
  /// measured time of a fall: a high drop's falls take long, 20000 from 1e5 m about three
  /// minutes), then the share done now and then; empty for none.
  EstimateFn estimate;
  ProgressFn progress;
};

struct DropSpread {
  FallResult nominal;               ///< the fall at the inputs' means
  Vec2 ut_mean = Vec2::Zero();      ///< the unscented transform's landing mean, site metres
  Mat2 ut_covariance = Mat2::Zero();
  int sigma_points = 0;
  std::uint64_t falls = 0;          ///< the Monte Carlo check
  Vec2 mc_mean = Vec2::Zero();
  Mat2 mc_covariance = Mat2::Zero();
  double ks_statistic = 0.0, ks_p_value = 1.0;
  bool normal = true;               ///< the cloud passed the check: model is the unscented normal
  /// The scatter the source becomes: the unscented normal, or the mixture fitted to the cloud.
  ScatterModel model = Gaussian::from_axes({0, 0}, 1, 1, 0);
  double mixture_bic = 0.0, normal_bic = 0.0;  ///< when !normal: the mixture's and the single normal's BIC
  /// When !normal: the mixture's components (2 or 3, each with its own mean) and its own check
  /// on the landings it was not fitted to (Rosenblatt transform, KS; passed when its p-value is
  /// at least normality_level).
  int mixture_components = 0;
  double mixture_ks_statistic = 0.0, mixture_ks_p_value = 1.0;
  bool mixture_check_passed = false;
  /// "normal (unscented transform)" or "mixture of K fitted to N falls ...; checked on N other
  /// falls: passed (KS p = ...)"; words for outputs.
  std::string shape;
};

/// The landing scatter of a drop; throws input_error for invalid parameters or uncertainties
/// (the loader has named the key before), and when the spread has no extent in some direction
/// (every uncertainty zero, or only ones that move the landing along one line).
STREWN_API DropSpread drop_spread(const DropParameters& d, const DropUncertainty& u,
                                  const DropSpreadOptions& options = {});

}  // namespace strewn

#endif
