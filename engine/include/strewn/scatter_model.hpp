#ifndef STREWN_SCATTER_MODEL_HPP
#define STREWN_SCATTER_MODEL_HPP

/// \file
/// Scatter models: where impacts land, in site coordinates (metres, x east, y north).
///
/// A component is elliptical: a mean, a spread (below) and a family (strewn/scatter_family.hpp),
/// by default the bivariate normal N(mean, covariance). Its spread can be given as
///  - principal axes: sigma_major >= sigma_minor > 0 (metres), the major axis at angle_deg
///    degrees counter-clockwise from +x;  covariance = R diag(sigma_major^2, sigma_minor^2) R^T;
///  - a covariance matrix (symmetric positive definite, m^2);
///  - CEP (radius holding half the impacts) of a circular spread: sigma = CEP / sqrt(2 ln 2);
///  - R95 of a circular spread: sigma = R95 / sqrt(-2 ln 0.05);
///  - "a fraction p of impacts within radius a of the aim", circular and centred on the aim:
///    sigma = a / sqrt(-2 ln(1 - p))  (Rayleigh distribution).
/// The mean is aim + bias. A scatter model is a weighted mixture of components whose weights
/// sum to 1 (several throwers, or a narrow core plus a wide "wild" component).
///
/// Example:
/// \code
///   auto thrower = strewn::Gaussian::from_axes({0.0, 6.0}, 0.30, 0.18, 80.0);
///   strewn::ScatterModel model = strewn::ScatterModel::mixture(
///       {{0.95, thrower}, {0.05, strewn::Gaussian::from_axes({0.0, 6.0}, 0.9, 0.9, 0.0)}});
/// \endcode

#include <Eigen/Core>
#include <vector>

#include "strewn/export.hpp"
#include "strewn/scatter_family.hpp"

namespace strewn {

using Vec2 = Eigen::Vector2d;
using Mat2 = Eigen::Matrix2d;

/// Principal axes of a covariance: sigma_major >= sigma_minor, angle of the major axis in
/// degrees counter-clockwise from +x, in [0, 180).
struct SpreadAxes {
  double sigma_major;
  double sigma_minor;
  double angle_deg;
};

/// One elliptical component (a bivariate normal unless with_family() says otherwise; the name
/// stays for the normal, by far the commonest). Construct through the named factories, which
/// validate their input and throw strewn::input_error with a one-line reason. For another
/// family, covariance() and cholesky() are its scale matrix and factor: the whitening is the same.
class STREWN_API Gaussian {
 public:
  static Gaussian from_axes(const Vec2& mean, double sigma_major, double sigma_minor,
                            double angle_deg);
  static Gaussian from_covariance(const Vec2& mean, const Mat2& covariance);
  /// A copy from what mean(), covariance() and cholesky() returned (serialisation, e.g. the Python
  /// module's pickling): the same model to the last bit, which from_covariance cannot give for an
  /// elongated spread built from its axes (its factor does not come from the rounded covariance).
  /// Throws input_error unless `cholesky` is lower triangular with a positive diagonal and
  /// L L^T matches `covariance` within 1e-12 of its trace.
  static Gaussian from_parts(const Vec2& mean, const Mat2& covariance, const Mat2& cholesky);
  static Gaussian from_cep(const Vec2& mean, double cep);
  static Gaussian from_r95(const Vec2& mean, double r95);
  /// Circular spread such that `fraction` of impacts fall within `radius` of the mean.
  static Gaussian from_fraction_within(const Vec2& mean, double fraction, double radius);

  const Vec2& mean() const { return mean_; }
  const Mat2& covariance() const { return covariance_; }
  /// Lower Cholesky factor L with covariance = L L^T; z = L^{-1}(x - mean) is standard normal.
  const Mat2& cholesky() const { return cholesky_; }
  /// Inverse of the Cholesky factor: the whitening map.
  const Mat2& whitening() const { return whitening_; }
  SpreadAxes axes() const;
  /// The radial family (normal unless set).
  const ScatterFamily& family() const { return family_; }
  /// The same spread and mean with another family.
  Gaussian with_family(const ScatterFamily& family) const;
  /// Largest value of the density, f(0) / sqrt(det covariance) (the normal's
  /// 1 / (2 pi sqrt(det covariance))), per m^2.
  double peak_density() const;
  /// The same spread with the covariance multiplied by scale^2.
  Gaussian scaled(double scale) const;
  /// The same spread moved to another mean.
  Gaussian moved_to(const Vec2& mean) const;

 private:
  Gaussian(const Vec2& mean, const Mat2& covariance, const char* what);
  Gaussian(const Vec2& mean, const Mat2& covariance, const Mat2& cholesky, const char* what);
  void set_whitening(const char* what);
  Vec2 mean_;
  Mat2 covariance_;
  Mat2 cholesky_;
  Mat2 whitening_;
  ScatterFamily family_;
};

/// A component of a mixture with its weight.
struct WeightedGaussian {
  double weight;
  Gaussian gaussian;
};

/// A weighted mixture of bivariate normals; a single Gaussian is a mixture of one.
class STREWN_API ScatterModel {
 public:
  /// Throws strewn::input_error when the list is empty, a weight is not in (0, 1], or the weights
  /// do not sum to 1 within 1e-9; weights within that are divided by their sum.
  static ScatterModel mixture(std::vector<WeightedGaussian> components);
  ScatterModel(const Gaussian& single);  // NOLINT: a Gaussian is a one-component model

  const std::vector<WeightedGaussian>& components() const { return components_; }

 private:
  explicit ScatterModel(std::vector<WeightedGaussian> components);
  std::vector<WeightedGaussian> components_;
};

/// CEP of a circular spread: sigma * sqrt(2 ln 2) (Rayleigh median radius).
STREWN_API double cep_from_sigma(double sigma);
/// R95 of a circular spread: sigma * sqrt(-2 ln 0.05).
STREWN_API double r95_from_sigma(double sigma);

}  // namespace strewn

#endif
