// Coverage of the Student-t fit's bootstrap intervals (docs/intervals.md), by seeded simulation:
//   strewn_t_fit_coverage SETS N NU [REPLICATES] [SEED]
#include <chrono>
#include <cstdio>
#include <cstdlib>

#include "../student_t_coverage.hpp"

int main(int argc, char** argv) {
  if (argc < 4) {
    std::fprintf(stderr, "usage: strewn_t_fit_coverage SETS N NU [REPLICATES] [SEED]\n");
    return 2;
  }
  const int sets = std::atoi(argv[1]);
  const auto n = static_cast<std::size_t>(std::atol(argv[2]));
  const double nu = std::atof(argv[3]);
  const int replicates = argc > 4 ? std::atoi(argv[4]) : 400;
  const std::uint64_t seed = argc > 5 ? std::strtoull(argv[5], nullptr, 10) : 17;
  const auto start = std::chrono::steady_clock::now();
  const strewn::coverage::TCoverage c = strewn::coverage::simulate_t(sets, n, nu, replicates, seed);
  const double seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  const auto pct = [&](int k) { return 100.0 * k / c.sets; };
  std::printf("n %zu nu %g sets %d replicates %d seed %llu: sigma %.1f%% (truth above %d) sigma_major %.1f%% "
              "cep %.1f%% (truth above %d) r95 %.1f%% (truth above %d) nu %.1f%% (truth below %d, above %d; open above in %d), percentile interval of nu %.1f%%, basic on log nu %.1f%%; nu at 100 in %d, at 1 in %d; "
              "sigma width %.3f; %.2f s per data set\n",
              n, nu, c.sets, replicates, static_cast<unsigned long long>(seed), pct(c.sigma), c.sigma_high,
              pct(c.sigma_major), pct(c.cep), c.cep_high, pct(c.r95), c.r95_high, pct(c.nu), c.nu_low, c.nu_high, c.nu_open_above, pct(c.nu_percentile), pct(c.nu_basic), c.nu_at_upper,
              c.nu_at_lower, c.sigma_width, seconds / c.sets);
  return 0;
}
