#ifndef STREWN_TESTS_BENCH_FAMILY_CASES_HPP
#define STREWN_TESTS_BENCH_FAMILY_CASES_HPP

// The zones, spreads and families of issue 17's benchmark (item 5: the t and the profile against
// the normal, exact, and against cubature), shared by strewn_bench (integration_bench.cpp) and
// the callgrind driver strewn_family_count (family_count.cpp), so that instruction counts and
// times are of the same cases.

#include <cmath>
#include <cstring>
#include <utility>
#include <vector>

#include "strewn/constants.hpp"
#include "strewn/profile_spread.hpp"
#include "strewn/region.hpp"
#include "strewn/region_builders.hpp"
#include "strewn/scatter_family.hpp"
#include "strewn/scatter_model.hpp"

namespace strewn::bench {

inline Region nonconvex_octagon() {
  return polygon({{1, 0}, {3, -1}, {4, 1}, {3, 1.5}, {3.5, 3}, {2, 2.2}, {1, 3}, {1.6, 1.2}});
}

// An annular sector of two concentric ellipses (3 x 2 and 1.5 x 1 about (2, 1)), 0.2 to 1.9 rad.
inline Region elliptical_sector() {
  Mat2 outer, inner;
  outer << 3.0, 0.0, 0.0, 2.0;
  inner << 1.5, 0.0, 0.0, 1.0;
  const Vec2 c(2.0, 1.0);
  const Edge o = Edge::arc(c, outer, 0.2, 1.9), i = Edge::arc(c, inner, 1.9, 0.2);
  Region r;
  r.loops.push_back({Edge::segment(i.to, o.from), o, Edge::segment(o.to, i.from), i});
  return normalised(r);
}

// The spread of the engine issue's cases: sigma 1.2 and 0.7 m at 25 degrees about (0.3, -0.2).
inline Gaussian case_spread() { return Gaussian::from_axes({0.3, -0.2}, 1.2, 0.7, 25.0); }

// A made-up leg test: a sprinkler's ring at 6 m, wetted radius 11 m.
inline RadialProfile leg_test() {
  return RadialProfile({0.5, 2.0, 4.0, 6.0, 8.0, 10.0, 11.0}, {9.0, 12.0, 11.0, 12.5, 8.0, 3.0, 0.0});
}

// The leg's head at the spread's mean with a light wind along 25 degrees (stretch 1.2): sigma
// 6.6 m by 5.5 m, wetted radius 11 m across the wind, so that the sector lies inside the wetted
// disk (whitened radii 0.3 to 0.9, crossing the rows at 2 and 4 m), where under case_spread()
// the sector's arcs lie beyond it (S = 0 there).
inline Gaussian wet_spread() { return profile_spread({0.3, -0.2}, leg_test(), ProfileWind{1.2, 0.0, 25.0}); }

struct FamilyCase {
  const char* name;
  Region region;
  Gaussian spread;  // normal family; each run puts its family on it
};

inline const std::vector<FamilyCase>& family_cases() {
  static const std::vector<FamilyCase> cases = {
      {"octagon_nonconvex", nonconvex_octagon(), case_spread()},
      {"elliptical_sector_offset", elliptical_sector(), case_spread()},
      {"elliptical_sector_wet", elliptical_sector(), wet_spread().with_family(ScatterFamily::normal())},
  };
  return cases;
}

// The families, by the labels of the benchmark's names (the normal's cases carry none).
inline const std::vector<std::pair<const char*, ScatterFamily>>& bench_families() {
  static const std::vector<std::pair<const char*, ScatterFamily>> families = {
      {"normal", ScatterFamily::normal()},
      {"student_t4", ScatterFamily::student_t(4.0)},
      {"student_t2.5", ScatterFamily::student_t(2.5)},
      {"uniform", ScatterFamily::uniform()},
      {"profile", ScatterFamily::profile(leg_test())},
      {"profile_arc", ScatterFamily::profile(leg_test()).with_arc(20.0, 250.0)}};
  return families;
}

inline const FamilyCase* find_case(const char* name) {
  for (const FamilyCase& c : family_cases())
    if (std::strcmp(c.name, name) == 0) return &c;
  return nullptr;
}

inline const ScatterFamily* find_family(const char* label) {
  for (const auto& [l, f] : bench_families())
    if (std::strcmp(l, label) == 0) return &f;
  return nullptr;
}

}  // namespace strewn::bench

#endif
