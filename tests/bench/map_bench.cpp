// Risk-map speed: a standing-person footprint and a rectangle of the same size under a
// 3-component mixture, exact cells against a per-cell cubature baseline in the same run, and the
// full 1000 x 1000 maps.
// Run: build/bin/strewn_map_bench
#include <benchmark/benchmark.h>

#include <cmath>

#include "strewn/region_builders.hpp"
#include "strewn/risk_map.hpp"

using namespace strewn;

namespace {

std::vector<MapSource> mixture() {
  return {{ScatterModel::mixture({{0.90, Gaussian::from_axes({0.1, 0.0}, 0.35, 0.22, 80)},
                                  {0.08, Gaussian::from_axes({0.1, 0.0}, 0.9, 0.9, 0)},
                                  {0.02, Gaussian::from_axes({0.4, -0.2}, 2.2, 2.2, 0)}}),
           40, 150}};
}

// The person kind's ellipse (shoulders 0.5 m, depth 0.3 m), built directly to keep plugins out.
Region person() {
  Mat2 axes;
  axes << 0.25, 0.0, 0.0, 0.15;
  return ellipse(Vec2::Zero(), axes);
}

// The person's shoulders and depth as a rectangle (0.5 m x 0.3 m): the polygonal footprints' path.
Region shoulders() { return rectangle(Vec2(-0.25, -0.15), Vec2(0.25, 0.15)); }

GridSpec grid(int n) {
  const double width = 12.0;
  return {Vec2(-6.0 + width / (2 * n), -6.0 + width / (2 * n)), width / n, n, n};
}

void run_map(benchmark::State& state, Method method, const Region& footprint) {
  const int n = static_cast<int>(state.range(0));
  RiskMapOptions o;
  o.integrate.method = method;
  o.integrate.rel_tolerance = 1e-6;  // the map's accuracy target per cell
  RiskMap m;
  for (auto _ : state) m = compute_risk_map(mixture(), footprint, grid(n), Period::event, o);
  state.counters["cells"] = static_cast<double>(n) * n;
  state.counters["us_per_cell_thread"] = benchmark::Counter(static_cast<double>(n) * n / 2 * state.iterations(),
                                                            benchmark::Counter::kIsRate | benchmark::Counter::kInvert);
  double worst = 0.0;
  for (std::size_t k = 0; k < m.value.size(); ++k)
    if (m.value[k] > 0) worst = std::max(worst, m.abs_err[k] / m.value[k]);
  state.counters["worst_rel_bound"] = worst;
}

void map_exact(benchmark::State& state) { run_map(state, Method::exact, person()); }
void map_cubature(benchmark::State& state) { run_map(state, Method::cubature, person()); }
void map_exact_rectangle(benchmark::State& state) { run_map(state, Method::exact, shoulders()); }
void map_cubature_rectangle(benchmark::State& state) { run_map(state, Method::cubature, shoulders()); }

}  // namespace

BENCHMARK(map_exact)->Arg(40)->Unit(benchmark::kMillisecond)->UseRealTime()->Iterations(20);
BENCHMARK(map_cubature)->Arg(40)->Unit(benchmark::kMillisecond)->UseRealTime()->Iterations(1);
BENCHMARK(map_exact_rectangle)->Arg(40)->Unit(benchmark::kMillisecond)->UseRealTime()->Iterations(20);
BENCHMARK(map_cubature_rectangle)->Arg(40)->Unit(benchmark::kMillisecond)->UseRealTime()->Iterations(1);
BENCHMARK(map_exact)->Arg(1000)->Unit(benchmark::kMillisecond)->UseRealTime()->Iterations(1);
BENCHMARK(map_exact_rectangle)->Arg(1000)->Unit(benchmark::kMillisecond)->UseRealTime()->Iterations(1);
BENCHMARK_MAIN();
