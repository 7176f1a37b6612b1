#include "strewn/scatter_model.hpp"

#include <Eigen/Cholesky>
#include <Eigen/Eigenvalues>
#include <Eigen/LU>
#include <algorithm>
#include <cmath>
#include <sstream>

#include "strewn/constants.hpp"
#include "strewn/error.hpp"

namespace strewn {
namespace {


std::string fmt(double v) {
  std::ostringstream s;
  s.precision(10);
  s << v;
  return s.str();
}

void require_finite_positive(double v, const char* name) {
  if (!std::isfinite(v) || v <= 0.0)
    throw input_error(std::string(name) + " must be a positive finite number (got " + fmt(v) + ")");
}

void require_finite(const Vec2& v, const char* name) {
  if (!v.allFinite()) throw input_error(std::string(name) + " must be finite");
}

// Validation of a spread's size, apart from the numerics: a standard deviation from 1e-12 m to
// 1e12 m along every axis. Beyond these no site or measurement has meaning, and within them the
// covariance (at most 1e24 m^2), its determinant (1e-48 .. 1e48 m^4) and the whitening (at most
// 1e12 per m) are far from overflow and underflow; outside them sigma = 1e100 gave a determinant
// of inf that passed the positive-definite check and NaN probabilities.
constexpr double kMinSigma = 1e-12, kMaxSigma = 1e12;

void require_sigma_in_range(double v, const char* name) {
  if (!(v >= kMinSigma && v <= kMaxSigma))
    throw input_error(std::string(name) + " must be between 1e-12 and 1e12 m (got " + fmt(v) + ")");
}

// The covariance's variances along its principal axes, from the diagonal (checked first, so
// that nothing below can overflow) and the determinant.
void require_covariance_in_range(const Mat2& c, const char* what) {
  const double most = kMaxSigma * kMaxSigma, least = kMinSigma * kMinSigma;
  if (!(c(0, 0) <= most && c(1, 1) <= most))
    throw input_error(std::string(what) + ": spread too large: variances must be at most 1e24 m^2 (sigma 1e12 m; got " +
                      fmt(std::max(c(0, 0), c(1, 1))) + " m^2)");
  const double tr = c(0, 0) + c(1, 1), det = c(0, 0) * c(1, 1) - c(0, 1) * c(1, 0);
  const double major = 0.5 * (tr + std::sqrt(std::max(tr * tr - 4 * det, 0.0)));
  // A matrix that is not positive definite is left to the constructor's own message.
  if (c(0, 0) > 0.0 && c(1, 1) > 0.0 && det > 0.0 && !(det / major >= least))
    throw input_error(std::string(what) + ": spread too small: every axis needs sigma of at least 1e-12 m");
}

}  // namespace

// det [[a, b], [b, d]] = a d - b^2 to a few eps relative (Kahan's product difference with a
// fused multiply-add): at 1e6:1 the two products agree to 12 digits.
static double accurate_det(double a, double d, double b) {
  const double bb = b * b;
  const double err = std::fma(b, b, -bb);  // bb - b^2 exactly
  const double diff = std::fma(a, d, -bb);
  return diff - err;
}

Gaussian::Gaussian(const Vec2& mean, const Mat2& covariance, const char* what)
    : mean_(mean), covariance_(covariance) {
  require_finite(mean, "mean impact point");
  if (!covariance.allFinite())
    throw input_error(std::string(what) + ": covariance must be finite");
  if (std::fabs(covariance(0, 1) - covariance(1, 0)) >
      1e-12 * (std::fabs(covariance(0, 0)) + std::fabs(covariance(1, 1))))
    throw input_error(std::string(what) + ": covariance must be symmetric");
  covariance_(1, 0) = covariance_(0, 1);
  require_covariance_in_range(covariance_, what);
  const double det = accurate_det(covariance_(0, 0), covariance_(1, 1), covariance_(0, 1));
  if (covariance_(0, 0) <= 0.0 || covariance_(1, 1) <= 0.0 || !(det > 0.0) || !std::isfinite(det))
    throw input_error(std::string(what) + ": covariance must be positive definite (det = " +
                      fmt(det) + " m^4)");
  // Cholesky with the last pivot as det / c00 rather than c11 - l10^2, which cancels for an
  // elongated spread (relative error eps * cond^2 in l11 otherwise).
  const double l00 = std::sqrt(covariance_(0, 0));
  cholesky_ << l00, 0.0, covariance_(0, 1) / l00, std::sqrt(det / covariance_(0, 0));
  if (!cholesky_.allFinite() || !(cholesky_(1, 1) > 0.0))
    throw input_error(std::string(what) + ": covariance must be positive definite");
  set_whitening(what);
}

Gaussian::Gaussian(const Vec2& mean, const Mat2& covariance, const Mat2& cholesky, const char* what)
    : mean_(mean), covariance_(covariance), cholesky_(cholesky) {
  require_finite(mean, "mean impact point");
  if (!covariance.allFinite() || !cholesky.allFinite())
    throw input_error(std::string(what) + ": covariance must be finite");
  set_whitening(what);
}

void Gaussian::set_whitening(const char* what) {
  // The inverse of a lower triangular 2 x 2 factor, each entry to a few eps relative.
  const double a = cholesky_(0, 0), c = cholesky_(1, 0), d = cholesky_(1, 1);
  whitening_ << 1.0 / a, 0.0, -(c / a) / d, 1.0 / d;
  if (!whitening_.allFinite() || !(a > 0.0) || !(d > 0.0))
    throw input_error(std::string(what) + ": spread is too small to whiten in double precision");
}

Gaussian Gaussian::from_axes(const Vec2& mean, double sigma_major, double sigma_minor,
                             double angle_deg) {
  require_finite_positive(sigma_major, "sigma_major");
  require_finite_positive(sigma_minor, "sigma_minor");
  require_sigma_in_range(sigma_major, "sigma_major");
  require_sigma_in_range(sigma_minor, "sigma_minor");
  if (!std::isfinite(angle_deg)) throw input_error("angle_deg must be finite");
  // Exact multiples of 90 degrees give exact zeros (cos(pi / 2) is 6e-17, not 0).
  double c, sn;
  const double quarter = angle_deg / 90.0;
  if (quarter == std::floor(quarter)) {
    const long k = static_cast<long>(std::fmod(quarter, 4.0) + 4) % 4;
    c = k == 0 ? 1.0 : k == 2 ? -1.0 : 0.0;
    sn = k == 1 ? 1.0 : k == 3 ? -1.0 : 0.0;
  } else {
    const double t = angle_deg * kPi / 180.0;
    c = std::cos(t);
    sn = std::sin(t);
  }
  const double a2 = sigma_major * sigma_major, b2 = sigma_minor * sigma_minor;
  Mat2 cov;
  cov << c * c * a2 + sn * sn * b2, c * sn * (a2 - b2), c * sn * (a2 - b2), sn * sn * a2 + c * c * b2;
  if (!cov.allFinite()) throw input_error("spread: the covariance overflows (sigma too large)");
  // The Cholesky factor straight from the axes, F = R diag(sigma_major, sigma_minor), rotated so
  // that its first row is (|row|, 0): L L^T = F F^T, every entry to a few eps relative. Going
  // through the covariance would lose eps * cond^2 in the minor direction (1.2e-5 relative in p
  // at 1e6:1).
  const double l00 = std::hypot(c * sigma_major, sn * sigma_minor);
  Mat2 L;
  L << l00, 0.0, c * sn * ((sigma_major - sigma_minor) * (sigma_major + sigma_minor)) / l00,
      sigma_major * sigma_minor / l00;
  return Gaussian(mean, cov, L, "spread");
}

Gaussian Gaussian::from_covariance(const Vec2& mean, const Mat2& covariance) {
  return Gaussian(mean, covariance, "covariance");
}

Gaussian Gaussian::from_parts(const Vec2& mean, const Mat2& covariance, const Mat2& cholesky) {
  const char* what = "spread";
  if (!covariance.allFinite() || !cholesky.allFinite())
    throw input_error(std::string(what) + ": covariance and its factor must be finite");
  if (cholesky(0, 1) != 0.0 || !(cholesky(0, 0) > 0.0) || !(cholesky(1, 1) > 0.0))
    throw input_error(std::string(what) + ": the Cholesky factor must be lower triangular with a positive diagonal");
  require_covariance_in_range(covariance, what);
  const Mat2 product = cholesky * cholesky.transpose();
  const double scale = std::fabs(covariance(0, 0)) + std::fabs(covariance(1, 1));
  if (!((product - covariance).cwiseAbs().maxCoeff() <= 1e-12 * scale) || covariance(0, 1) != covariance(1, 0))
    throw input_error(std::string(what) + ": the Cholesky factor does not match the covariance");
  return Gaussian(mean, covariance, cholesky, what);
}

Gaussian Gaussian::from_cep(const Vec2& mean, double cep) {
  require_finite_positive(cep, "cep");
  const double s = cep / std::sqrt(2.0 * std::log(2.0));
  require_sigma_in_range(s, "the sigma of this cep");
  return from_axes(mean, s, s, 0.0);
}

Gaussian Gaussian::from_r95(const Vec2& mean, double r95) {
  require_finite_positive(r95, "r95");
  const double s = r95 / std::sqrt(-2.0 * std::log(0.05));
  require_sigma_in_range(s, "the sigma of this r95");
  return from_axes(mean, s, s, 0.0);
}

Gaussian Gaussian::from_fraction_within(const Vec2& mean, double fraction, double radius) {
  require_finite_positive(radius, "radius");
  if (!(fraction > 0.0 && fraction < 1.0))
    throw input_error("fraction within radius must be strictly between 0 and 1 (got " +
                      fmt(fraction) + ")");
  // Rayleigh: P(R <= a) = 1 - exp(-a^2 / (2 s^2))  =>  s = a / sqrt(-2 ln(1 - p)).
  const double s = radius / std::sqrt(-2.0 * std::log1p(-fraction));
  require_sigma_in_range(s, "the sigma of this fraction and radius");
  return from_axes(mean, s, s, 0.0);
}

SpreadAxes Gaussian::axes() const {
  Eigen::SelfAdjointEigenSolver<Mat2> eig(covariance_);
  const Vec2 values = eig.eigenvalues();      // ascending
  const Vec2 major = eig.eigenvectors().col(1);
  double angle = std::atan2(major.y(), major.x()) * 180.0 / kPi;
  if (angle < 0.0) angle += 180.0;
  if (angle >= 180.0) angle -= 180.0;
  return {std::sqrt(values(1)), std::sqrt(std::max(values(0), 0.0)), angle};
}

double Gaussian::peak_density() const {
  if (family_.is_normal()) return 1.0 / (2.0 * kPi * cholesky_(0, 0) * cholesky_(1, 1));
  return family_.density_bound(0.0) / (cholesky_(0, 0) * cholesky_(1, 1));
}

Gaussian Gaussian::with_family(const ScatterFamily& family) const {
  Gaussian g = *this;
  g.family_ = family;
  return g;
}

Gaussian Gaussian::scaled(double scale) const {
  require_finite_positive(scale, "spread scale");
  return Gaussian(mean_, covariance_ * (scale * scale), cholesky_ * scale, "scaled spread").with_family(family_);
}

Gaussian Gaussian::moved_to(const Vec2& mean) const {
  return Gaussian(mean, covariance_, cholesky_, "spread").with_family(family_);
}

ScatterModel::ScatterModel(const Gaussian& single) : components_{{1.0, single}} {}

ScatterModel::ScatterModel(std::vector<WeightedGaussian> components)
    : components_(std::move(components)) {}

ScatterModel ScatterModel::mixture(std::vector<WeightedGaussian> components) {
  if (components.empty()) throw input_error("a scatter model needs at least one component");
  double total = 0.0;
  for (std::size_t i = 0; i < components.size(); ++i) {
    const double w = components[i].weight;
    if (!std::isfinite(w) || w <= 0.0 || w > 1.0)
      throw input_error("weight of component " + std::to_string(i + 1) +
                        " must be in (0, 1] (got " + fmt(w) + ")");
    total += w;
  }
  if (std::fabs(total - 1.0) > 1e-9)
    throw input_error("mixture weights must sum to 1 (they sum to " + fmt(total) + ")");
  // Within that tolerance the weights are taken as meant to sum to 1 and divided by their sum:
  // kept as given, p + q summed the weights' 5e-10 excess, which the integrators' final check
  // (p + q = 1 within the bound) rejected as an internal error.
  if (total != 1.0)
    for (WeightedGaussian& c : components) c.weight /= total;
  return ScatterModel(std::move(components));
}

double cep_from_sigma(double sigma) { return sigma * std::sqrt(2.0 * std::log(2.0)); }
double r95_from_sigma(double sigma) { return sigma * std::sqrt(-2.0 * std::log(0.05)); }

}  // namespace strewn
