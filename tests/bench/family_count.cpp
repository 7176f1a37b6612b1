// A fixed number of exact probabilities of one of issue 17's benchmark cases under one family
// (bench/family_cases.hpp, the cases of strewn_bench's `*/student_t4/*`, `*/profile*/*` ...),
// for instruction counts under callgrind:
//   valgrind --tool=callgrind build/bin/strewn_family_count elliptical_sector_offset student_t4 2000
// Prints the probability, its error bound, evaluations and the number of calls; divide
// callgrind's total (less a run with 0 calls, the start-up) by the calls for instructions per
// probability. Exact at 1e-10, as the benchmark. `list` prints the cases and families.
#include <cstdio>
#include <cstdlib>
#include <cstring>

#include "bench/family_cases.hpp"
#include "strewn/integrate.hpp"

using namespace strewn;

int main(int argc, char** argv) {
  if (argc == 2 && std::strcmp(argv[1], "list") == 0) {
    for (const bench::FamilyCase& c : bench::family_cases()) std::printf("case %s\n", c.name);
    for (const auto& f : bench::bench_families()) std::printf("family %s\n", f.first);
    return 0;
  }
  const bench::FamilyCase* c = argc == 4 ? bench::find_case(argv[1]) : nullptr;
  const ScatterFamily* family = argc == 4 ? bench::find_family(argv[2]) : nullptr;
  if (!c || !family) {
    std::fprintf(stderr, "usage: strewn_family_count CASE FAMILY CALLS (strewn_family_count list)\n");
    return 2;
  }
  const int calls = std::atoi(argv[3]);
  const Gaussian g = c->spread.with_family(*family);
  IntegrateOptions o;
  o.method = Method::exact;
  o.rel_tolerance = 1e-10;
  o.abs_tolerance = 1e-300;
  Estimate e;
  for (int i = 0; i < calls; ++i) e = integrate(g, c->region, o);
  std::printf("%s %s: p = %.17g, bound %.3g, evaluations %llu, %d calls\n", c->name, argv[2], e.p, e.abs_err,
              static_cast<unsigned long long>(e.evaluations), calls);
  return 0;
}
