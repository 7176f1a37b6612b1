// Whole-process time of `strewn assess` on a generated site of 100 zones and 5 sources (500
// probabilities), by the exact method and by cubature: process start, plugin loading, parsing,
// geometry, integration and output. Run: build/bin/strewn_assess_bench
#include <benchmark/benchmark.h>
#include <fcntl.h>
#include <spawn.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <random>
#include <stdexcept>
#include <string>

extern char** environ;

namespace {

// An invented venue: five throwing positions along a line, a hundred zones of every built-in
// kind scattered over 40 m x 30 m.
std::string write_site() {
  const auto path = std::filesystem::temp_directory_path() / "strewn_assess_bench_site.toml";
  std::ofstream f(path);
  std::mt19937_64 rng(20261202);
  std::uniform_real_distribution<double> x(-20, 20), y(-15, 15), size(0.3, 3.0), angle(0, 180);
  f << "[site]\nname = \"benchmark hall\"\n\n";
  for (int s = 0; s < 5; ++s)
    f << "[[source]]\nname = \"stand " << s + 1 << "\"\naim = [" << -8 + 4 * s << ", 0]\n"
      << "bias = [0.2, -0.1]\nspread = { sigma_major = " << 1.5 + 0.3 * s << ", sigma_minor = 0.8, angle_deg = "
      << 20 * s << " }\nevents_per_session = 50\nsessions_per_year = 200\n\n"
      << "  [[source.wild]]\n  weight = 0.03\n  spread = { sigma = 6.0 }\n\n";
  for (int z = 0; z < 100; ++z) {
    const double cx = x(rng), cy = y(rng), a = size(rng), b = size(rng);
    f << "[[zone]]\nname = \"zone " << z + 1 << "\"\nrole = \"keep_out\"\nlimit = 0.5\nlimit_per = \"event\"\n";
    switch (z % 6) {
      case 0:
        f << "shape = \"rectangle\"\nparams = { centre = [" << cx << ", " << cy << "], width = " << a
          << ", depth = " << b << ", angle_deg = " << angle(rng) << " }\n\n";
        break;
      case 1:
        f << "shape = \"disk\"\nparams = { centre = [" << cx << ", " << cy << "], radius = " << a / 2 << " }\n\n";
        break;
      case 2:
        f << "shape = \"polygon\"\nparams = { outer = [[" << cx << ", " << cy << "], [" << cx + a << ", " << cy
          << "], [" << cx + a << ", " << cy + b << "], [" << cx + a / 2 << ", " << cy + b / 3 << "], [" << cx
          << ", " << cy + b << "]] }\n\n";
        break;
      case 3:
        f << "shape = \"ring_sector\"\nparams = { centre = [" << cx << ", " << cy << "], inner_radius = " << a / 3
          << ", outer_radius = " << a << ", from_angle_deg = 10, to_angle_deg = 130 }\n\n";
        break;
      case 4:
        f << "shape = \"doorway\"\nparams = { hinge = [" << cx << ", " << cy << "], latch = [" << cx + 0.9 << ", "
          << cy << "], approach_depth = 0.3 }\n\n";
        break;
      default:
        f << "shape = \"person\"\nparams = { centre = [" << cx << ", " << cy << "], facing_deg = " << angle(rng)
          << " }\n\n";
    }
  }
  return path.string();
}

int run_strewn(const std::string& site, const char* method) {
  const std::string binary = STREWN_BINARY;
  const char* argv[] = {binary.c_str(), "assess", site.c_str(), "--method", method, "--format", "csv", nullptr};
  posix_spawn_file_actions_t actions;
  posix_spawn_file_actions_init(&actions);
  posix_spawn_file_actions_addopen(&actions, STDOUT_FILENO, "/dev/null", O_WRONLY, 0);
  pid_t pid;
  if (posix_spawn(&pid, binary.c_str(), &actions, nullptr, const_cast<char* const*>(argv), environ) != 0)
    throw std::runtime_error("cannot start " + binary);
  posix_spawn_file_actions_destroy(&actions);
  int status = 0;
  waitpid(pid, &status, 0);
  return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}

void assess_100_zones_5_sources(benchmark::State& state, const char* method) {
  const std::string site = write_site();
  for (auto _ : state) {
    const int status = run_strewn(site, method);
    if (status != 0 && status != 3) {
      state.SkipWithError("strewn assess failed");
      break;
    }
  }
}

}  // namespace

BENCHMARK_CAPTURE(assess_100_zones_5_sources, exact, "exact")->Unit(benchmark::kMillisecond)->UseRealTime();
BENCHMARK_CAPTURE(assess_100_zones_5_sources, cubature, "cubature")->Unit(benchmark::kMillisecond)->UseRealTime();
BENCHMARK_MAIN();
