// The law of the Student-t fit's profile likelihood-ratio statistic W at the truth, and what an
// oracle cut-off would cover on the coverage run's own data sets (docs/intervals.md):
//   strewn_t_lr_law LAW_SETS SETS N NU [SEED]
// LAW_SETS data sets (a seed of their own) give W's 95% point per scale figure, W = 2 (l_max -
// l_p(truth)) with nu profiled (the statistic the intervals invert); then the SETS data sets of
// `strewn_t_fit_coverage SETS N NU R SEED` (the same draws, set for set) are counted under that
// point: the coverage a cut-off equal to W's true 95% point would have on them. No refits: the
// fits are the point fits, and the whole run costs seconds, not hours.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <vector>

#include "../student_t_coverage.hpp"

namespace {

using strewn::TScaleFigure;

constexpr TScaleFigure kFigures[] = {TScaleFigure::sigma, TScaleFigure::sigma_major, TScaleFigure::cep, TScaleFigure::r95};
constexpr const char* kNames[] = {"sigma", "sigma_major", "CEP", "R95"};

// W of every figure for every data set.
std::vector<std::array<double, 4>> statistics(const std::vector<std::vector<strewn::Vec2>>& data, double nu) {
  const strewn::Gaussian truth = strewn::coverage::t_truth(nu);
  const double at_truth[4] = {std::sqrt(truth.covariance().trace() / 2.0), truth.axes().sigma_major,
                              strewn::containment_radius(truth, truth.mean(), 0.5),
                              strewn::containment_radius(truth, truth.mean(), 0.95)};
  std::vector<std::array<double, 4>> w(data.size());
  strewn::StudentTFitOptions point;
  point.bootstrap_replicates = 0;
  strewn::coverage::on_every_core(data.size(), [&](std::size_t s) {
    const double l_max = strewn::fit_student_t(data[s], point).log_likelihood;
    for (int k = 0; k < 4; ++k)
      w[s][k] = std::max(0.0, 2.0 * (l_max - strewn::student_t_profile_log_likelihood(data[s], kFigures[k], at_truth[k])));
  });
  return w;
}

}  // namespace

int main(int argc, char** argv) {
  if (argc < 5) {
    std::fprintf(stderr, "usage: strewn_t_lr_law LAW_SETS SETS N NU [SEED]\n");
    return 2;
  }
  const int law_sets = std::atoi(argv[1]), sets = std::atoi(argv[2]);
  const auto n = static_cast<std::size_t>(std::atol(argv[3]));
  const double nu = std::atof(argv[4]);
  const std::uint64_t seed = argc > 5 ? std::strtoull(argv[5], nullptr, 10) : 17;
  // The law's own data sets: another seed's sequence, so that they are not the coverage run's.
  const auto law = statistics(strewn::coverage::draw_t_data_sets(law_sets, n, nu, seed ^ 0x5DEECE66DULL).data, nu);
  const auto run = statistics(strewn::coverage::draw_t_data_sets(sets, n, nu, seed).data, nu);
  std::printf("n %zu nu %g: W's 95%% point from %d data sets; the coverage run's %d data sets (seed %llu) under it, "
              "and their own 95%% point\n", n, nu, law_sets, sets, static_cast<unsigned long long>(seed));
  for (int k = 0; k < 4; ++k) {
    std::vector<double> a, b;
    for (const auto& w : law) a.push_back(w[k]);
    for (const auto& w : run) b.push_back(w[k]);
    std::sort(a.begin(), a.end());
    std::sort(b.begin(), b.end());
    const double point = a[static_cast<std::size_t>(0.95 * (a.size() - 1))];
    const auto under = std::upper_bound(b.begin(), b.end(), point) - b.begin();
    std::printf("  %-12s 95%% point %.3f; covers %.1f%% of the run's data sets (their own 95%% point %.3f)\n", kNames[k],
                point, 100.0 * static_cast<double>(under) / static_cast<double>(b.size()),
                b[static_cast<std::size_t>(0.95 * (b.size() - 1))]);
  }
  return 0;
}
