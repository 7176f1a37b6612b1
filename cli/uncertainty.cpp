#include "uncertainty.hpp"

#include <Eigen/LU>
#include <algorithm>
#include <cmath>
#include <random>

#include "strewn/error.hpp"

namespace strewn::cli {
namespace {

Interval percentile(std::vector<double> v, double confidence) {
  std::sort(v.begin(), v.end());
  const auto at = [&](double q) {
    const double pos = q * static_cast<double>(v.size() - 1);
    const auto i = static_cast<std::size_t>(std::floor(pos));
    const double f = pos - static_cast<double>(i);
    return i + 1 < v.size() ? v[i] * (1 - f) + v[i + 1] * f : v[i];
  };
  return {at((1 - confidence) / 2), at((1 + confidence) / 2)};
}

// The core component redrawn: a fitted normal N(m, S) becomes N(m*, S*) from a resampled data
// set; a core that was derived from the fit (a design scaling, say) follows through the same
// affine map, x -> m* + L* L^-1 (x - m), with L, L* the Cholesky factors of S and S*.
Gaussian redrawn(const Gaussian& core, const Vec2& m, const Mat2& S, const Vec2& m_star, const Mat2& S_star) {
  const Mat2 L = Gaussian::from_covariance(m, S).cholesky();
  const Mat2 A = Gaussian::from_covariance(m_star, S_star).cholesky() * L.inverse();
  return Gaussian::from_covariance(m_star + A * (core.mean() - m), A * core.covariance() * A.transpose());
}

Gaussian replicate_core(const Gaussian& core, const FitRecord& f, std::mt19937_64& rng) {
  std::normal_distribution<double> z;
  switch (f.kind) {
    case FitRecord::Kind::impacts: {
      const Mat2 L = Gaussian::from_covariance(f.mean, f.covariance).cholesky();
      std::vector<Vec2> pts(f.n);
      Vec2 m = Vec2::Zero();
      for (Vec2& p : pts) {
        p = f.mean + L * Vec2(z(rng), z(rng));
        m += p;
      }
      m /= static_cast<double>(f.n);
      Mat2 S = Mat2::Zero();
      for (const Vec2& p : pts) S += (p - m) * (p - m).transpose();
      S /= static_cast<double>(f.n - 1);
      return redrawn(core, f.mean, f.covariance, m, S);
    }
    case FitRecord::Kind::counts: {
      // Resample k ~ Binomial(n, p) with p = 1 - exp(-a^2 / (2 sigma^2)) of the fitted sigma.
      const double sigma = std::sqrt(core.covariance().trace() / 2);
      const double p = -std::expm1(-f.radius * f.radius / (2 * sigma * sigma));
      std::binomial_distribution<std::uint64_t> b(f.n, std::clamp(p, 0.0, 1.0));
      const double n = static_cast<double>(f.n);
      // k = 0 or n would give an infinite or zero sigma; half a count keeps it finite.
      const double share = std::clamp(static_cast<double>(b(rng)), 0.5, n - 0.5) / n;
      return core.scaled(f.radius / std::sqrt(-2.0 * std::log1p(-share)) / sigma);
    }
    case FitRecord::Kind::censored: {
      const double sigma = std::sqrt(core.covariance().trace() / 2);
      std::vector<double> radii;
      std::uint64_t outside = 0;
      while (radii.empty()) {
        radii.clear();
        outside = 0;
        for (std::uint64_t i = 0; i < f.measured + f.outside; ++i) {
          const double r = sigma * std::hypot(z(rng), z(rng));
          if (r <= f.radius) radii.push_back(r);
          else ++outside;
        }
      }
      return core.scaled(fit_censored(radii, outside, f.radius).sigma / sigma);
    }
  }
  return core;
}

}  // namespace

Uncertainty assess_uncertainty(const Scenario& s, int replicates, double confidence, std::uint64_t seed,
                               const ProgressFn& progress) {
  Uncertainty u;
  u.confidence = confidence;
  u.replicates = replicates;
  for (const Source& src : s.sources)
    if (src.fit) u.fitted_sources.push_back(src.name);
  if (u.fitted_sources.empty())
    throw input_error(s.file + ": --uncertainty needs at least one source with a fit record (written by strewn fit)");
  if (replicates < 20) throw input_error("--replicates must be at least 20");
  std::mt19937_64 rng(seed);
  const std::size_t nz = s.zones.size(), ns = s.sources.size();
  std::vector<std::vector<std::vector<double>>> p_event(nz, std::vector<std::vector<double>>(ns));
  std::vector<std::vector<double>> session(nz), year(nz), limited(nz);
  for (int b = 0; b < replicates; ++b) {
    std::vector<Source> sources = s.sources;
    for (Source& src : sources) {
      if (!src.fit) continue;
      std::vector<WeightedGaussian> parts = src.model.components();
      parts.front().gaussian = replicate_core(parts.front().gaussian, *src.fit, rng);
      src.model = ScatterModel::mixture(parts);
    }
    for (std::size_t z = 0; z < nz; ++z) {
      const ZoneResult r = assess_zone(s.zones[z], sources, s.options);
      for (std::size_t k = 0; k < ns; ++k) p_event[z][k].push_back(r.sources[k].event.p);
      session[z].push_back(r.total_per_session);
      year[z].push_back(r.total_per_year);
      limited[z].push_back(r.limited_value);
    }
    if (progress) progress(static_cast<double>(b + 1) / replicates);
  }
  for (std::size_t z = 0; z < nz; ++z) {
    ZoneUncertainty zu;
    for (std::size_t k = 0; k < ns; ++k) zu.p_event.push_back(percentile(p_event[z][k], confidence));
    zu.p_session = percentile(session[z], confidence);
    zu.p_year = percentile(year[z], confidence);
    zu.limited = percentile(limited[z], confidence);
    u.zones.push_back(zu);
  }
  return u;
}

}  // namespace strewn::cli
