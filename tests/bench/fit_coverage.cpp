// Long coverage simulations of the fit's intervals and of its outlier check (the short versions
// run in tests/engine/fit/fit_test.cpp). Seeded; prints one line per case. Not part of the test run.
//   build/bin/strewn_fit_coverage [replicates]      (default 20000 per case)
// Figures from it are quoted in docs/intervals.md.
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <random>
#include <vector>

#include "strewn/fit.hpp"

using namespace strewn;

namespace {

std::pair<Vec2, Mat2> moments(const std::vector<Vec2>& pts) {
  Vec2 m = Vec2::Zero();
  for (const Vec2& p : pts) m += p;
  m /= static_cast<double>(pts.size());
  Mat2 s = Mat2::Zero();
  for (const Vec2& p : pts) s += (p - m) * (p - m).transpose();
  return {m, s / static_cast<double>(pts.size() - 1)};
}

double se(double p, int reps) { return std::sqrt(p * (1 - p) / reps); }

}  // namespace

int main(int argc, char** argv) {
  const int reps = argc > 1 ? std::atoi(argv[1]) : 20000;
  std::mt19937_64 rng(20261202);
  std::normal_distribution<double> z;

  std::printf("Circular-equivalent sigma, 95%% intervals (Satterthwaite), %d data sets per case\n", reps);
  std::printf("%-10s %5s %10s %10s %12s\n", "axes", "n", "two-sided", "one-sided", "(+-1 s.e.)");
  for (const auto& axes : std::vector<std::pair<double, double>>{{1.0, 1.0}, {1.2, 1.0}, {1.5, 0.6}, {2.0, 0.2}, {10.0, 0.1}})
    for (int n : {4, 12, 40, 400}) {
      const double sigma = std::sqrt((axes.first * axes.first + axes.second * axes.second) / 2);
      int two = 0, one = 0;
      std::vector<Vec2> pts(n);
      for (int r = 0; r < reps; ++r) {
        for (Vec2& p : pts) p = Vec2(axes.first * z(rng), axes.second * z(rng));
        const Mat2 s = moments(pts).second;
        const Interval ci = circular_sigma_interval(s, n, 0.95);
        two += ci.low <= sigma && sigma <= ci.high;
        one += sigma <= circular_sigma_upper_bound(s, n, 0.95);
      }
      std::printf("%4.1f:%-5.1f %5d %9.2f%% %9.2f%% %11.2f%%\n", axes.first, axes.second, n, 100.0 * two / reps,
                  100.0 * one / reps, 100 * se(0.95, reps));
    }

  std::printf("\nOutlier check (Beta reference, 1%% family-wise): share of data sets with a flag\n");
  std::printf("%5s %14s %24s\n", "n", "normal data", "one impact shifted 6 sd");
  for (int n : {4, 8, 12, 20, 40, 100}) {
    int null_flags = 0, hits = 0;
    std::vector<Vec2> pts(n);
    for (int r = 0; r < reps; ++r) {
      for (Vec2& p : pts) p = Vec2(z(rng), z(rng));
      null_flags += !fit_normal(pts, Vec2::Zero(), FitOptions{0.95, 0, 1}).outliers.empty();
      pts[0].x() += 6.0;
      hits += !fit_normal(pts, Vec2::Zero(), FitOptions{0.95, 0, 1}).outliers.empty();
    }
    std::printf("%5d %13.2f%% %23.2f%%\n", n, 100.0 * null_flags / reps, 100.0 * hits / reps);
  }

  std::printf("\nCensored fit, 95%% likelihood-ratio interval (asymptotic): coverage of the true sigma = 1\n");
  std::printf("%7s %8s %12s %12s %10s\n", "throws", "radius", "mean inside", "two-sided", "one-sided");
  for (const auto& c : std::vector<std::pair<int, double>>{{10, 0.5}, {20, 0.5}, {20, 1.0}, {40, 0.5}, {40, 1.5}, {150, 0.6}, {150, 1.5}, {60, 0.4}, {200, 0.25}, {1000, 0.1}}) {
    int two = 0, one = 0, valid = 0;
    double inside = 0;
    for (int r = 0; r < reps; ++r) {
      std::vector<double> radii;
      std::uint64_t outside = 0;
      for (int i = 0; i < c.first; ++i) {
        const double rr = std::hypot(z(rng), z(rng));
        if (rr <= c.second) radii.push_back(rr);
        else ++outside;
      }
      if (radii.empty()) continue;  // no fit without a measured impact
      ++valid;
      inside += static_cast<double>(radii.size());
      const CensoredFit f = fit_censored(radii, outside, c.second);
      two += f.sigma_ci.low <= 1.0 && 1.0 <= f.sigma_ci.high;
      one += 1.0 <= f.sigma_upper;
    }
    std::printf("%7d %8.2f %12.1f %11.2f%% %9.2f%%\n", c.first, c.second, inside / valid, 100.0 * two / valid,
                100.0 * one / valid);
  }

  std::printf("\nCounts (Clopper-Pearson), 95%%: coverage of the true sigma = 1\n");
  std::printf("%7s %8s %12s %12s\n", "throws", "radius", "two-sided", "one-sided");
  for (const auto& c : std::vector<std::pair<int, double>>{{20, 1.0}, {60, 0.5}, {400, 0.5}}) {
    const double p = -std::expm1(-c.second * c.second / 2);
    std::binomial_distribution<std::uint64_t> b(c.first, p);
    int two = 0, one = 0;
    for (int r = 0; r < reps; ++r) {
      const CountFit f = fit_counts(b(rng), c.first, c.second);
      two += f.sigma_ci.low <= 1.0 && 1.0 <= f.sigma_ci.high;
      one += 1.0 <= f.sigma_upper;
    }
    std::printf("%7d %8.2f %11.2f%% %11.2f%%\n", c.first, c.second, 100.0 * two / reps, 100.0 * one / reps);
  }
  return 0;
}
