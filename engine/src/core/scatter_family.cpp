#include "strewn/scatter_family.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <sstream>

#include "core/profile_table.hpp"
#include "core/t_power.hpp"
#include "strewn/closest_names.hpp"
#include "strewn/constants.hpp"
#include "strewn/error.hpp"

namespace strewn {

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
  ScatterFamily f(FamilyKind::student_t, nu);
  // line_density's constant, once per family: two lgamma calls cost more than the rest of an
  // edge's whitening bound.
  f.t_line_log_c_ = std::lgamma(0.5 * (nu + 1.0)) - std::lgamma(0.5 * nu) - 0.5 * std::log(nu * kPi);
  return f;
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
  int m = 0;
  switch (kind_) {
    case FamilyKind::normal: return std::exp(-0.5 * r * r);
    // (1 + r^2/nu)^(-nu/2) through log1p: no loss for small r^2/nu, no overflow for large r; a
    // small whole nu by products (core/t_power.hpp).
    case FamilyKind::student_t:
      if (detail::t_whole_nu(nu_, &m)) return detail::t_half_power(nu_ / (nu_ + r * r), m);
      return std::exp(-0.5 * nu_ * std::log1p(r * r / nu_));
    // 1 - r^2/4 as (2 - r)(2 + r)/4: exact near the edge, where 1 - r^2/4 would cancel.
    case FamilyKind::uniform: return r >= 2.0 ? 0.0 : 0.25 * (2.0 - r) * (2.0 + r);
    case FamilyKind::profile: return table_->survival(r);
  }
  return 0.0;
}

double ScatterFamily::cdf(double r) const {
  int m = 0;
  switch (kind_) {
    case FamilyKind::normal: return -std::expm1(-0.5 * r * r);
    case FamilyKind::student_t:
      if (detail::t_whole_nu(nu_, &m)) {
        const double r2 = r * r, q = nu_ + r2;
        return q < std::numeric_limits<double>::infinity() ? detail::t_half_power_complement(nu_ / q, r2 / q, m) : 1.0;
      }
      return -std::expm1(-0.5 * nu_ * std::log1p(r * r / nu_));
    case FamilyKind::uniform: return std::min(0.25 * r * r, 1.0);
    case FamilyKind::profile: return table_->cdf(r);
  }
  return 0.0;
}

double ScatterFamily::density(double r) const {
  int m = 0;
  switch (kind_) {
    case FamilyKind::normal: return kOneDivTwoPi * std::exp(-0.5 * r * r);
    case FamilyKind::student_t:
      if (detail::t_whole_nu(nu_, &m)) return kOneDivTwoPi * detail::t_half_power(nu_ / (nu_ + r * r), m + 2);
      return kOneDivTwoPi * std::exp(-0.5 * (nu_ + 2.0) * std::log1p(r * r / nu_));
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
      // (log of the constant: t_line_log_c_, set by student_t(); a small whole nu's power by
      // products, core/t_power.hpp)
      int m = 0;
      if (detail::t_whole_nu(nu_, &m)) return std::exp(t_line_log_c_) * detail::t_half_power(nu_ / (nu_ + d * d), m + 1);
      return std::exp(t_line_log_c_ - 0.5 * (nu_ + 1.0) * std::log1p(d * d / nu_));
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
