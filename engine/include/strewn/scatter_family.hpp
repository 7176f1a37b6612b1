#ifndef STREWN_SCATTER_FAMILY_HPP
#define STREWN_SCATTER_FAMILY_HPP

/// \file
/// Scatter families: the radial profile of an elliptical component.
///
/// Every component of a scatter model is elliptical: with L its spread's Cholesky factor and m
/// its mean, the whitened point z = L^{-1} (x - m) has a density f(|z|) that depends on the
/// radius r = |z| alone, and the density in site coordinates is f(|z|) / det L. The family
/// names f through its radial CDF
///     G(r) = P(|z| <= r) = integral from 0 to r of f(s) 2 pi s ds,
/// and its survival S(r) = 1 - G(r), each computed so that a small value keeps its digits:
///  - normal (the default): G(r) = 1 - exp(-r^2/2); the spread is the covariance.
///  - student_t with nu > 0 degrees of freedom (the bivariate t):
///        G(r) = 1 - (1 + r^2/nu)^(-nu/2),  f(r) = (1 + r^2/nu)^(-(nu+2)/2) / (2 pi);
///    the spread is the t's scale matrix (its covariance is nu/(nu - 2) times that for nu > 2,
///    infinite otherwise). It is a normal over sqrt(W/nu), W ~ chi-square(nu): heavier tails
///    than any normal, the normal again as nu -> infinity (Kotz & Nadarajah, "Multivariate t
///    distributions", 2004, ch. 1).
///  - uniform over the ellipse of semi-axes 2 sigma_major and 2 sigma_minor (whitened: the disk
///    of radius 2), so that, as for the normal, the spread is the covariance:
///        G(r) = min(r^2/4, 1),  f(r) = 1/(4 pi) for r < 2, 0 beyond.
///  - profile: a measured radial rate v(d) (strewn/radial_profile.hpp), linear between its rows,
///    0 beyond its wetted radius R, normalised to G(inf) = 1:
///        f(r) = v(r R/2) / Z,  G(r) = integral from 0 to r of f(s) 2 pi s ds (piecewise cubic),
///    Z = integral of v(r R/2) 2 pi r dr over the plane. Its whitened radius 2 is the wetted
///    radius, as for the uniform: the profile's distances are site metres, and the spread that
///    carries it has sigma = R/2 in every direction before a wind stretches it
///    (strewn/profile_spread.hpp); the rows are kinks of f, where quadrature is cut. A profile
///    that is constant to R is the uniform family.
///
/// A profile may fall on a part circle (a sprinkler's arc): with_arc() keeps the density only on
/// the wedge of directions from the mean between two angles and divides it by the wedge's share
/// of the whole, so that it still integrates to 1 (a part-circle head puts all of its flow into
/// its arc). Every method integrates a zone through the same clipping: P(zone) = P_full(zone &
/// wedge) / share, the wedge's rays running through the mean, where dtheta = 0 (DESIGN.md).
///
/// The exact method integrates (1 - G(r)) dtheta / (2 pi) along the whitened boundary
/// (DESIGN.md, "Scatter families"). Straight edges take a closed form for the normal (Owen's
/// T), the t with a whole nu (partial fractions) and the profile (G is cubic in r between rows,
/// so each piece integrates with atan, t and the integral of sec^3), falling back to
/// quadrature where the closed form would lose digits. The t with any other nu takes each
/// straight edge whole in the angle phi = atan(t / sqrt(nu + h^2)), its poles split off in
/// closed form and the rest analytic, by one Gauss-Legendre panel with a proven bound; arcs and
/// the other cases take the quadrature.
///
/// Example:
/// \code
///   auto t4 = strewn::Gaussian::from_axes({0.0, 6.0}, 0.30, 0.18, 80.0)
///                 .with_family(strewn::ScatterFamily::student_t(4.0));
/// \endcode

#include <memory>
#include <string>
#include <vector>

#include "strewn/export.hpp"
#include "strewn/radial_profile.hpp"

namespace strewn {

enum class FamilyKind { normal, student_t, uniform, profile };

namespace detail {
struct ProfileTable;  // the profile in whitened radii with its cumulative sums (scatter_family.cpp)
}

class STREWN_API ScatterFamily {
 public:
  /// The default: a bivariate normal.
  ScatterFamily() = default;
  static ScatterFamily normal() { return {}; }
  /// Throws strewn::input_error unless 0 < nu <= 1e6 (beyond, use the normal).
  static ScatterFamily student_t(double nu);
  static ScatterFamily uniform();
  /// The measured profile, whitened so that its wetted radius is r = 2.
  static ScatterFamily profile(const RadialProfile& profile);
  /// Parses "normal", "student_t" or "uniform" (with nu for student_t; throws input_error
  /// naming the choices otherwise).
  static ScatterFamily from_name(const std::string& name, double nu = 0.0);

  FamilyKind kind() const { return kind_; }
  bool is_normal() const { return kind_ == FamilyKind::normal; }
  /// Degrees of freedom of student_t; 0 for the others.
  double nu() const { return nu_; }
  /// The measured profile of the profile family; null for the others.
  const RadialProfile* radial_profile() const;
  /// Metres of site per whitened unit before any stretch: R/2 for a profile (the sigma its
  /// spread must have, strewn/profile_spread.hpp); 0 for the others.
  double profile_scale_m() const;

  /// The profile's table in whitened radii, for the engine's own closed forms (private:
  /// engine/src/core/profile_table.hpp); null for the other families.
  const detail::ProfileTable* profile_table() const { return table_.get(); }

  /// The same family on the wedge of directions from the mean that runs counter-clockwise from
  /// `from_deg` to `to_deg` (degrees from +x in site coordinates, as the wedge lies on the site:
  /// a wind's stretch is already applied). The sweep (to - from) mod 360 must lie in (0, 360);
  /// a whole circle has no arc. Throws input_error for other families (their support has no edge
  /// to close the wedge with) or a sweep of 0.
  ScatterFamily with_arc(double from_deg, double to_deg) const;
  bool has_arc() const { return arc_sweep_deg_ > 0.0; }
  /// The wedge's first ray, degrees from +x, in [0, 360).
  double arc_from_deg() const { return arc_from_deg_; }
  /// The wedge's counter-clockwise sweep, degrees in (0, 360); 0 without an arc.
  double arc_sweep_deg() const { return arc_sweep_deg_; }
  /// The same family on the whole circle.
  ScatterFamily without_arc() const;

  /// "normal", "student_t", "uniform" or "profile".
  const char* name() const;
  /// A one-line description with its parameter, e.g. "student_t (nu = 4)".
  std::string describe() const;

  /// G(r), r >= 0 the whitened radius.
  double cdf(double r) const;
  /// S(r) = 1 - G(r), to full relative accuracy in the tail.
  double survival(double r) const;
  /// The density f(r) per whitened unit area at radius r.
  double density(double r) const;
  /// The largest density at any radius >= d: a bound for everything beyond distance d.
  double density_bound(double d) const;
  /// Integral of the density along a whole line at distance d from the centre (the marginal
  /// density at d): bounds the density's integral along any segment at distance >= d. For a
  /// profile, an upper bound: the chord inside the wetted disk times density_bound(d).
  double line_density(double d) const;
  /// The radius r with G(r) = p, 0 < p < 1 (for CEP: p = 1/2; R95: p = 0.95).
  double radius_quantile(double p) const;
  /// Radii at which f is not smooth (the uniform's edge, a profile's rows); quadrature is cut
  /// there.
  std::vector<double> kinks() const;

  /// Profiles compare by their rows and label, arcs by their angles.
  bool operator==(const ScatterFamily& o) const;
  bool operator!=(const ScatterFamily& o) const { return !(*this == o); }

 private:
  ScatterFamily(FamilyKind kind, double nu) : kind_(kind), nu_(nu) {}
  FamilyKind kind_ = FamilyKind::normal;
  double nu_ = 0.0;
  std::shared_ptr<const detail::ProfileTable> table_;  // profile only; shared, never changed
  double arc_from_deg_ = 0.0, arc_sweep_deg_ = 0.0;
  double t_line_log_c_ = 0.0;  // student_t: log of Gamma((nu+1)/2) / (sqrt(nu pi) Gamma(nu/2))
};

}  // namespace strewn

#endif
