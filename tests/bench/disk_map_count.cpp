// The disk map of tests/bench/map_peer_bench.py (a disk of radius 0.25 m under a 0.30 x 0.18 m
// spread at 80 degrees, cells on x -2..2, y 4..8, at 1e-6 relative) on one thread, for
// instruction counts under callgrind (README, "Benchmarks"):
//   valgrind --tool=callgrind build/bin/strewn_disk_map_count 128
// Prints the cells, the largest relative bound and, with --nodes, how many cells took how many
// trapezoid nodes (one risk_at per cell: set-up per cell, so not for counting).
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <map>

#include "strewn/region_builders.hpp"
#include "strewn/risk_map.hpp"

using namespace strewn;

int main(int argc, char** argv) {
  const int cells = argc > 1 ? std::atoi(argv[1]) : 128;
  const bool nodes = argc > 2 && std::strcmp(argv[2], "--nodes") == 0;
  const std::vector<MapSource> sources{MapSource{Gaussian::from_axes({0.0, 6.0}, 0.30, 0.18, 80.0)}};
  const Region person = disk({0.0, 0.0}, 0.25);
  GridSpec grid;
  grid.origin = Vec2(-2.0, 4.0);
  grid.spacing = 4.0 / cells;
  grid.columns = grid.rows = cells;
  RiskMapOptions options;
  options.integrate.rel_tolerance = 1e-6;
  options.integrate.abs_tolerance = 1e-15;
  options.threads = 1;
  if (nodes) {
    std::map<std::uint64_t, int> histogram;
    for (int j = 0; j < cells; ++j)
      for (int i = 0; i < cells; ++i)
        ++histogram[risk_at(sources, person, grid.centre(i, j), Period::event, options.integrate).evaluations];
    for (const auto& [n, count] : histogram) std::printf("%llu evaluations: %d cells\n", (unsigned long long)n, count);
    return 0;
  }
  const RiskMap map = compute_risk_map(sources, person, grid, Period::event, options);
  double worst = 0.0;
  for (std::size_t k = 0; k < map.value.size(); ++k)
    if (map.value[k] > 0) worst = std::max(worst, map.abs_err[k] / map.value[k]);
  std::printf("%d x %d cells, converged %d, largest bound %.2e relative\n", cells, cells, map.converged ? 1 : 0, worst);
  return 0;
}
