#include "strewn/scatter_family.hpp"

#include <algorithm>
#include <cmath>
#include <sstream>

#include "strewn/closest_names.hpp"
#include "strewn/constants.hpp"
#include "strewn/error.hpp"

namespace strewn {

namespace detail {

// A profile in whitened radii r = 2 d / R (the wetted radius at r = 2), with the mass of each
// linear piece so that G and S both come from sums of positive terms: G(r) = below[i] + the
// piece's part up to r, S(r) = above[i + 1] + the piece's part beyond r, neither as 1 minus
// the other (a small S keeps its digits near the edge).
struct ProfileTable {
  RadialProfile source;
  double scale_m = 0.0;             // metres per whitened unit, R/2
  std::vector<double> r, v;         // rows, from r = 0 to r = 2, and their rates
  std::vector<double> below, above; // G(r_i), S(r_i)
  double z = 0.0;                   // integral of v over the whitened plane

  explicit ProfileTable(const RadialProfile& p) : source(p) {
    scale_m = 0.5 * p.wetted_radius();
    if (!(scale_m > 0.0)) throw input_error("a profile's last distance (its wetted radius) must be above 0");
    if (p.distance_m().front() > 0.0) {
      r.push_back(0.0);
      v.push_back(p.rate().front());
    }
    for (std::size_t i = 0; i < p.distance_m().size(); ++i) {
      r.push_back(p.distance_m()[i] / scale_m);
      v.push_back(p.rate()[i]);
    }
    r.back() = 2.0;
    const std::size_t n = r.size();
    std::vector<double> mass(n - 1);
    for (std::size_t i = 0; i + 1 < n; ++i) mass[i] = piece(i, 0.0, r[i + 1] - r[i]);
    below.assign(n, 0.0);
    above.assign(n, 0.0);
    for (std::size_t i = 0; i + 1 < n; ++i) below[i + 1] = below[i] + mass[i];
    for (std::size_t i = n - 1; i-- > 0;) above[i] = above[i + 1] + mass[i];
    z = below.back();
    for (double& b : below) b /= z;
    for (double& a : above) a /= z;
  }

  // 2 pi times the integral of (v_i + b u)(r_i + u) du from t0 to t1 within piece i (b its
  // slope), factored so that no difference of large terms appears.
  double piece(std::size_t i, double t0, double t1) const {
    const double b = (v[i + 1] - v[i]) / (r[i + 1] - r[i]);
    return kTwoPi * (t1 - t0) *
           (v[i] * r[i] + 0.5 * (v[i] + b * r[i]) * (t1 + t0) + b * (t1 * t1 + t1 * t0 + t0 * t0) / 3.0);
  }
  std::size_t index(double x) const {
    const std::size_t i = static_cast<std::size_t>(std::upper_bound(r.begin(), r.end(), x) - r.begin()) - 1;
    return std::min(i, r.size() - 2);
  }
  double cdf(double x) const {
    if (!(x < 2.0)) return 1.0;
    if (!(x > 0.0)) return 0.0;
    const std::size_t i = index(x);
    return below[i] + piece(i, 0.0, x - r[i]) / z;
  }
  double survival(double x) const {
    if (!(x < 2.0)) return 0.0;
    if (!(x > 0.0)) return 1.0;
    const std::size_t i = index(x);
    return above[i + 1] + piece(i, x - r[i], r[i + 1] - r[i]) / z;
  }
  double rate(double x) const {
    if (!(x < 2.0)) return 0.0;
    if (!(x > 0.0)) return v.front();
    const std::size_t i = index(x);
    return v[i] + (x - r[i]) / (r[i + 1] - r[i]) * (v[i + 1] - v[i]);
  }
  double largest_rate_beyond(double x) const {
    if (!(x < 2.0)) return 0.0;
    double m = rate(std::max(x, 0.0));
    for (std::size_t i = 0; i < r.size(); ++i)
      if (r[i] > x) m = std::max(m, v[i]);
    return m;
  }
  double quantile(double p) const {
    // The piece holding p, then bisection on G within it: G is increasing, and 200 halvings
    // reach the spacing of doubles.
    std::size_t i = 0;
    while (i + 2 < r.size() && below[i + 1] <= p) ++i;
    double lo = r[i], hi = r[i + 1];
    for (int k = 0; k < 200; ++k) {
      const double mid = 0.5 * (lo + hi);
      if (!(mid > lo && mid < hi)) break;
      (cdf(mid) < p ? lo : hi) = mid;
    }
    return 0.5 * (lo + hi);
  }
};

}  // namespace detail

ScatterFamily ScatterFamily::profile(const RadialProfile& profile) {
  ScatterFamily f(FamilyKind::profile, 0.0);
  f.table_ = std::make_shared<const detail::ProfileTable>(profile);
  return f;
}

const RadialProfile* ScatterFamily::radial_profile() const { return table_ ? &table_->source : nullptr; }

double ScatterFamily::profile_scale_m() const { return table_ ? table_->scale_m : 0.0; }

ScatterFamily ScatterFamily::with_arc(double from_deg, double to_deg) const {
  if (kind_ != FamilyKind::profile) throw input_error(std::string("only the profile family takes an arc (not ") + name() + ")");
  if (!(std::isfinite(from_deg) && std::isfinite(to_deg) && std::fabs(from_deg) <= 1e4 && std::fabs(to_deg) <= 1e4))
    throw input_error("an arc's angles must be finite numbers of degrees");
  const double sweep = std::fmod(std::fmod(to_deg - from_deg, 360.0) + 360.0, 360.0);
  if (!(sweep > 0.0))
    throw input_error("an arc's sweep (to - from) mod 360 must be above 0 degrees (leave the arc out for a whole circle)");
  ScatterFamily f = *this;
  f.arc_from_deg_ = std::fmod(std::fmod(from_deg, 360.0) + 360.0, 360.0);
  if (f.arc_from_deg_ >= 360.0) f.arc_from_deg_ = 0.0;
  f.arc_sweep_deg_ = sweep;
  return f;
}

ScatterFamily ScatterFamily::without_arc() const {
  ScatterFamily f = *this;
  f.arc_from_deg_ = f.arc_sweep_deg_ = 0.0;
  return f;
}

bool ScatterFamily::operator==(const ScatterFamily& o) const {
  if (kind_ != o.kind_ || nu_ != o.nu_ || arc_from_deg_ != o.arc_from_deg_ || arc_sweep_deg_ != o.arc_sweep_deg_) return false;
  if (table_ == o.table_) return true;
  if (!table_ || !o.table_) return false;
  const RadialProfile &a = table_->source, &b = o.table_->source;
  return a.distance_m() == b.distance_m() && a.rate() == b.rate() && a.label() == b.label();
}

ScatterFamily ScatterFamily::student_t(double nu) {
  // Beyond 1e6 degrees of freedom the t differs from the normal by less than 1e-6 relative
  // anywhere within 10 sigma; below, (1 + r^2/nu)^(-nu/2) is evaluated without overflow.
  if (!(nu > 0.0 && nu <= 1e6)) {
    std::ostringstream m;
    m << "nu (degrees of freedom of student_t) must be in (0, 1e6] (got " << nu << ")";
    throw input_error(m.str());
  }
  return ScatterFamily(FamilyKind::student_t, nu);
}

ScatterFamily ScatterFamily::uniform() { return ScatterFamily(FamilyKind::uniform, 0.0); }

ScatterFamily ScatterFamily::from_name(const std::string& name, double nu) {
  if (name == "normal") return normal();
  if (name == "student_t") return student_t(nu);
  if (name == "uniform") return uniform();
  if (name == "profile") throw input_error("the profile family needs its table: use ScatterFamily::profile");
  const std::string hint = did_you_mean(name, {"normal", "student_t", "uniform", "profile"});
  throw input_error("unknown family '" + name + "'" + (hint.empty() ? " (use normal, student_t, uniform or profile)" : hint));
}

const char* ScatterFamily::name() const {
  switch (kind_) {
    case FamilyKind::normal: return "normal";
    case FamilyKind::student_t: return "student_t";
    case FamilyKind::uniform: return "uniform";
    case FamilyKind::profile: return "profile";
  }
  return "unknown";
}

std::string ScatterFamily::describe() const {
  std::ostringstream s;
  if (kind_ == FamilyKind::student_t) {
    s << "student_t (nu = " << nu_ << ")";
  } else if (kind_ == FamilyKind::profile) {
    s << "profile (" << table_->source.label() << ", " << table_->source.distance_m().size()
      << " rows, wetted radius " << table_->source.wetted_radius() << " m";
    if (has_arc()) s << ", arc of " << arc_sweep_deg_ << " deg from " << arc_from_deg_ << " deg";
    s << ")";
  } else {
    s << name();
  }
  return s.str();
}

double ScatterFamily::survival(double r) const {
  switch (kind_) {
    case FamilyKind::normal: return std::exp(-0.5 * r * r);
    // (1 + r^2/nu)^(-nu/2) through log1p: no loss for small r^2/nu, no overflow for large r.
    case FamilyKind::student_t: return std::exp(-0.5 * nu_ * std::log1p(r * r / nu_));
    // 1 - r^2/4 as (2 - r)(2 + r)/4: exact near the edge, where 1 - r^2/4 would cancel.
    case FamilyKind::uniform: return r >= 2.0 ? 0.0 : 0.25 * (2.0 - r) * (2.0 + r);
    case FamilyKind::profile: return table_->survival(r);
  }
  return 0.0;
}

double ScatterFamily::cdf(double r) const {
  switch (kind_) {
    case FamilyKind::normal: return -std::expm1(-0.5 * r * r);
    case FamilyKind::student_t: return -std::expm1(-0.5 * nu_ * std::log1p(r * r / nu_));
    case FamilyKind::uniform: return std::min(0.25 * r * r, 1.0);
    case FamilyKind::profile: return table_->cdf(r);
  }
  return 0.0;
}

double ScatterFamily::density(double r) const {
  switch (kind_) {
    case FamilyKind::normal: return kOneDivTwoPi * std::exp(-0.5 * r * r);
    case FamilyKind::student_t: return kOneDivTwoPi * std::exp(-0.5 * (nu_ + 2.0) * std::log1p(r * r / nu_));
    case FamilyKind::uniform: return r < 2.0 ? 0.5 * kOneDivTwoPi : 0.0;
    case FamilyKind::profile: return table_->rate(r) / table_->z;
  }
  return 0.0;
}

double ScatterFamily::density_bound(double d) const {
  // A measured profile may rise with r (a sprinkler's ring); the others never do.
  if (kind_ == FamilyKind::profile) return table_->largest_rate_beyond(d) / table_->z;
  return density(std::max(d, 0.0));
}

double ScatterFamily::line_density(double d) const {
  d = std::fabs(d);
  switch (kind_) {
    case FamilyKind::normal: return kOneDivRootTwoPi * std::exp(-0.5 * d * d);
    case FamilyKind::student_t: {
      // The marginal of a bivariate t is the univariate t with the same nu:
      // Gamma((nu+1)/2) / (sqrt(nu pi) Gamma(nu/2)) (1 + d^2/nu)^(-(nu+1)/2).
      const double log_c = std::lgamma(0.5 * (nu_ + 1.0)) - std::lgamma(0.5 * nu_) - 0.5 * std::log(nu_ * kPi);
      return std::exp(log_c - 0.5 * (nu_ + 1.0) * std::log1p(d * d / nu_));
    }
    // A chord of the disk of radius 2 at distance d is 2 sqrt(4 - d^2) long, at density 1/(4 pi).
    case FamilyKind::uniform: return d >= 2.0 ? 0.0 : std::sqrt((2.0 - d) * (2.0 + d)) / (2.0 * kPi);
    // A bound, not the marginal: the chord of the wetted disk times the largest density on it.
    case FamilyKind::profile: return d >= 2.0 ? 0.0 : 2.0 * std::sqrt((2.0 - d) * (2.0 + d)) * density_bound(d);
  }
  return 0.0;
}

double ScatterFamily::radius_quantile(double p) const {
  if (!(p > 0.0 && p < 1.0)) throw input_error("a fraction within a radius must be strictly between 0 and 1");
  switch (kind_) {
    case FamilyKind::normal: return std::sqrt(-2.0 * std::log1p(-p));
    // S(r) = 1 - p:  r^2 = nu ((1 - p)^(-2/nu) - 1).
    case FamilyKind::student_t: return std::sqrt(nu_ * std::expm1(-2.0 / nu_ * std::log1p(-p)));
    case FamilyKind::uniform: return 2.0 * std::sqrt(p);
    case FamilyKind::profile: return table_->quantile(p);
  }
  return 0.0;
}

std::vector<double> ScatterFamily::kinks() const {
  if (kind_ == FamilyKind::uniform) return {2.0};
  if (kind_ == FamilyKind::profile) return std::vector<double>(table_->r.begin() + 1, table_->r.end());
  return {};
}

}  // namespace strewn
