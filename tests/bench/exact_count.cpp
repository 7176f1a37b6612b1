// A fixed number of exact probabilities of one polygon, for instruction counts under callgrind
// (README, "Benchmarks"): the polygons of tests/bench/polygon_peer.py, the same model.
//   valgrind --tool=callgrind build/bin/strewn_exact_count octagon 10000
// Prints the probability, its error bound and the number of calls; divide callgrind's total
// (less a run with 0 calls, the start-up) by the calls for instructions per probability.
// With --time, also the CPU time per call (std::clock over the calls; tests/bench/edge_bench.py).
#include <cmath>
#include <ctime>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <vector>

#include "strewn/constants.hpp"
#include "strewn/integrate.hpp"
#include "strewn/region_builders.hpp"

using namespace strewn;

namespace {

std::vector<Vec2> polygon_of(const char* name) {
  std::vector<Vec2> pts = {{0.1, 5.7}, {0.5, 5.8}, {0.8, 6.1}, {0.7, 6.5},
                           {0.4, 6.7}, {0.0, 6.6}, {-0.2, 6.3}, {-0.1, 5.9}};
  if (std::strcmp(name, "octagon") == 0) return pts;
  if (std::strcmp(name, "tail") == 0) {
    for (Vec2& p : pts) p += Vec2(2.0, 0.4);
    return pts;
  }
  pts.clear();
  for (int i = 0; i < 200; ++i) {
    const double a = 2 * kPi * i / 200;
    pts.emplace_back(0.2 + 0.5 * std::cos(a), 6.1 + 0.35 * std::sin(a));
  }
  return pts;
}

}  // namespace

int main(int argc, char** argv) {
  const bool timed = argc == 4 && std::strcmp(argv[3], "--time") == 0;
  if ((argc != 3 && !timed) || (std::strcmp(argv[1], "octagon") != 0 && std::strcmp(argv[1], "tail") != 0 &&
                    std::strcmp(argv[1], "gon200") != 0)) {
    std::fprintf(stderr, "usage: strewn_exact_count octagon|tail|gon200 CALLS [--time]\n");
    return 2;
  }
  const int calls = std::atoi(argv[2]);
  Mat2 cov;
  cov << 0.09, 0.03, 0.03, 0.04;
  const Gaussian g = Gaussian::from_covariance(Vec2(0.0, 6.0), cov);
  const Region r = polygon(polygon_of(argv[1]));
  IntegrateOptions o;
  o.method = Method::exact;
  o.rel_tolerance = 1e-8;
  Estimate e;
  const std::clock_t start = std::clock();
  for (int i = 0; i < calls; ++i) e = integrate(g, r, o);
  const double seconds = static_cast<double>(std::clock() - start) / CLOCKS_PER_SEC;
  std::printf("%s: p = %.17g, bound %.3g, %d calls", argv[1], e.p, e.abs_err, calls);
  if (timed) std::printf(", cpu_ns_per_call=%.1f", calls > 0 ? 1e9 * seconds / calls : 0.0);
  std::printf("\n");
  return 0;
}
