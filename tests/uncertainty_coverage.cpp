// The long coverage run of `assess --uncertainty` (not part of ctest; cli_assess_test runs a short
// version). Figures go into docs/intervals*.md.
//   build/bin/strewn_uncertainty_coverage [data_sets=1000] [replicates=1000] [seed=1] [all|normal|mixture|small|counts|censored]
//                                         [calibration=100]
// For n = 12 and 40 impacts from an elliptical normal (axes 1 and 0.6 m at 30 degrees), zones
// that are half-planes at true p = 1e-1 .. 1e-5 along and across the spread (and oblique), disks
// of radius 0.5 m at p = 1e-1 .. 1e-5 (at 75 degrees, between the axes) and at 1e-2 and 1e-4 along
// each axis, a 0.5 m square near the mean and a disk containing the mean: coverage of the central
// 95% interval, misses below and above, and coverage of the one-sided 95% upper bound.
// `calibration` is passed to assess_uncertainty (0: the uncalibrated pivotal draws).
#include <fmt/format.h>

#include <algorithm>
#include <cstdlib>

#include "uncertainty_coverage.hpp"

using namespace strewn;

namespace {

// A disk of radius r centred on the ray from the mean at `angle_deg`, at the distance where its
// true probability is p (bisection on the distance; p falls with it).
coverage::ZoneCase disk_at(const Gaussian& truth, double angle_deg, double r, double p) {
  const double a = angle_deg * M_PI / 180.0;
  const Vec2 u(std::cos(a), std::sin(a));
  double lo = 0.0, hi = 50.0;
  for (int k = 0; k < 100; ++k) {
    const double mid = (lo + hi) / 2;
    if (integrate(truth, coverage::disk(truth.mean() + mid * u, r)).p > p) lo = mid;
    else hi = mid;
  }
  coverage::ZoneCase z;
  z.name = fmt::format("disk r {} at {} deg", r, angle_deg);
  z.region = coverage::disk(truth.mean() + lo * u, r);
  return z;
}

}  // namespace

int main(int argc, char** argv) {
  const int data_sets = argc > 1 ? std::atoi(argv[1]) : 1000;
  const int replicates = argc > 2 ? std::atoi(argv[2]) : 1000;
  const std::uint64_t seed = argc > 3 ? std::strtoull(argv[3], nullptr, 10) : 1;
  const std::string part = argc > 4 ? argv[4] : "all";  // all, normal or mixture
  const int calibration = argc > 5 ? std::atoi(argv[5]) : 100;
  const Gaussian truth = Gaussian::from_axes({0.0, 0.0}, 1.0, 0.6, 30.0);
  std::vector<coverage::ZoneCase> zones;
  for (double p : {1e-1, 1e-2, 1e-3, 1e-4, 1e-5}) {
    zones.push_back(coverage::half_plane(truth, 30.0, p));   // along the major axis
    zones.push_back(coverage::half_plane(truth, 120.0, p));  // along the minor axis
    zones.push_back(coverage::half_plane(truth, 0.0, p));    // oblique
  }
  for (double p : {1e-1, 1e-2, 1e-3, 1e-4, 1e-5}) zones.push_back(disk_at(truth, 75.0, 0.5, p));
  for (double p : {1e-2, 1e-4}) zones.push_back(disk_at(truth, 30.0, 0.5, p));
  for (double p : {1e-2, 1e-4}) zones.push_back(disk_at(truth, 120.0, 0.5, p));
  coverage::ZoneCase square;  // 0.5 m square, its near corner 0.56 m from the mean
  square.name = "square 0.5 at (1, 0.5)";
  square.region = coverage::rectangle({0.75, 0.25}, {1.25, 0.75});
  zones.push_back(square);
  coverage::ZoneCase central;  // a disk that contains the mean
  central.name = "disk r 0.5 at (0.2, 0.1)";
  central.region = coverage::disk(Vec2(0.2, 0.1), 0.5);
  zones.push_back(central);
  if (part == "small") {  // the zones nearest the mean only, n = 12: the hardest cases, quickly
    std::vector<coverage::ZoneCase> hard;
    for (const coverage::ZoneCase& z : zones)
      if (z.name.rfind("square", 0) == 0 || z.name.rfind("disk r 0.5 at (", 0) == 0 ||
          (z.name == "disk r 0.5 at 75 deg" && &z == &zones[15]) || (z.name == "half-plane 120 deg" && &z == &zones[7]))
        hard.push_back(z);
    zones = hard;
  }
  fmt::print("assess --uncertainty coverage: {} data sets per n, {} replicates, calibration {} x {}, 95% two-sided and one-sided, seed {}\n",
             data_sets, replicates, calibration, calibration, seed);
  fmt::print("truth: axes 1 and 0.6 m at 30 deg; binomial s.e. of a 95% coverage: {:.1f}%\n\n",
             100 * std::sqrt(0.95 * 0.05 / data_sets));
  fmt::print("{:>4} {:<26} {:>9} {:>9} {:>7} {:>7} {:>10}\n", "n", "zone", "p true", "two-sided", "below", "above",
             "upper bnd");
  for (std::uint64_t n : {12u, 40u}) {
    if ((part != "all" && part != "normal" && part != "small") || (part == "small" && n != 12)) break;
    const coverage::Run r = coverage::simulate(truth, zones, n, data_sets, replicates, 0.95, seed + n, calibration);
    for (const coverage::ZoneCase& z : r.zones)
      fmt::print("{:>4} {:<26} {:>9.2e} {:>8.1f}% {:>7} {:>7} {:>9.1f}%\n", n, z.name, z.p_true,
                 100.0 * z.inside / r.data_sets, z.below, z.above, 100.0 * z.under_upper / r.data_sets);
  }
  // Mixtures: a core (axes 0.3 and 0.2 m) and a wild component (weight 0.05, sigma 1.2 m) about
  // the same mean; half-planes where the wild part dominates. Only data sets that the fit writes
  // as a mixture count (at n = 40 not all do).
  const ScatterModel mixture = ScatterModel::mixture({{0.95, Gaussian::from_axes({0.0, 0.0}, 0.3, 0.2, 0.0)},
                                                      {0.05, Gaussian::from_axes({0.0, 0.0}, 1.2, 1.2, 0.0)}});
  const Gaussian wild = mixture.components()[1].gaussian;
  std::vector<coverage::ZoneCase> far;
  for (double p : {1e-3, 1e-4}) {  // of the wild part alone: x 0.05 for the mixture
    far.push_back(coverage::half_plane(wild, 0.0, p / 0.05));
    far.back().name = "mixture " + far.back().name;
  }
  if (part == "all" || part == "mixture")
    fmt::print("\nmixture: core axes 0.3, 0.2 m; wild weight 0.05, sigma 1.2 m (whole-mixture bootstrap, levels calibrated by a double bootstrap)\n");
  for (std::uint64_t n : {40u, 100u}) {
    if (part != "all" && part != "mixture") break;
    const coverage::Run r = coverage::simulate_mixture(mixture, far, n, data_sets, replicates, 0.95, seed + 7 * n);
    for (const coverage::ZoneCase& z : r.zones)
      fmt::print("{:>4} {:<24} {:>9.2e} {:>8.1f}% {:>7} {:>7} {:>9.1f}%   ({} of {} data sets fitted as a mixture)\n", n,
                 z.name, z.p_true, 100.0 * z.inside / std::max(1, r.data_sets), z.below, z.above,
                 100.0 * z.under_upper / std::max(1, r.data_sets), r.data_sets, data_sets);
  }
  // Counts and censored radii: a centred circular spread of 1 m, the counted (or measured)
  // radius 1 m (39% within); zones are half-planes and 0.5 m disks at p = 1e-1 .. 1e-5.
  for (const auto kind : {FitRecord::Kind::counts, FitRecord::Kind::censored}) {
    const bool counts = kind == FitRecord::Kind::counts;
    if (part != "all" && part != (counts ? "counts" : "censored")) continue;
    const Gaussian unit = Gaussian::from_axes({0.0, 0.0}, 1.0, 1.0, 0.0);
    std::vector<coverage::ZoneCase> radial;
    for (double p : {1e-1, 1e-3, 1e-5}) {
      radial.push_back(coverage::half_plane(unit, 0.0, p));
      radial.push_back(disk_at(unit, 0.0, 0.5, p));
    }
    fmt::print("\n{}: centred circular spread sigma 1 m, radius 1 m ({})\n", counts ? "counts" : "censored radii",
               counts ? "Clopper-Pearson draws of the share within the radius" : "exact confidence distribution of sigma, test inversion");
    for (std::uint64_t n : {12u, 40u, 200u}) {
      const coverage::Run r = coverage::simulate_radial(kind, 1.0, radial, n, 1.0, data_sets, replicates, 0.95, seed + 11 * n);
      for (const coverage::ZoneCase& z : r.zones)
        fmt::print("{:>4} {:<26} {:>9.2e} {:>8.1f}% {:>7} {:>7} {:>9.1f}%   ({} of {} data sets usable)\n", n, z.name,
                   z.p_true, 100.0 * z.inside / std::max(1, r.data_sets), z.below, z.above,
                   100.0 * z.under_upper / std::max(1, r.data_sets), r.data_sets, data_sets);
    }
  }
  return 0;
}
