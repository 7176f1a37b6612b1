// Map cells of footprints made of straight edges (rectangle, doorway, polygon, composite), which
// the map sums from whitened vertices tabled once per component (translated_polygon.cpp):
// against integrate() of the footprint moved to the cell, and against the product of two normal
// intervals for an axis-aligned rectangle (CHECKS.md).
#include <catch2/catch.hpp>
#include <cmath>
#include <iomanip>
#include <random>

#include "strewn/integrate.hpp"
#include "strewn/risk_map.hpp"
#include "test_support.hpp"

using namespace strewn;

namespace {

// Footprints about the origin: a rotated rectangle (a person's shoulders and depth), an L-shaped
// doorway with its swing cut square (non-convex), a square with a square hole, and two separate
// rectangles (a composite of two outer loops).
std::vector<Region> footprints() {
  const Mat2 turn = test::rotation(20 * kPi / 180);
  std::vector<Vec2> box = {{-0.3, -0.15}, {0.3, -0.15}, {0.3, 0.15}, {-0.3, 0.15}};
  for (Vec2& v : box) v = turn * v;
  Region two = rectangle(Vec2(-0.9, -0.2), Vec2(-0.3, 0.2));
  two.loops.push_back(rectangle(Vec2(0.2, -0.1), Vec2(0.7, 0.5)).loops.front());
  return {polygon(box),
          polygon({{-0.5, -0.5}, {0.4, -0.5}, {0.4, 0.1}, {-0.1, 0.1}, {-0.1, 0.6}, {-0.5, 0.6}}),
          test::with_hole({{-0.6, -0.6}, {0.6, -0.6}, {0.6, 0.6}, {-0.6, 0.6}},
                          {{-0.2, -0.2}, {-0.2, 0.25}, {0.3, 0.25}, {0.3, -0.2}}),
          normalised(two)};
}

}  // namespace

TEST_CASE("map cells of a polygonal footprint agree with integrate() at the same place, within both bounds",
          "[map][footprint][polygon]") {
  // Source of the comparison: integrate() of the moved footprint, itself checked against
  // scipy and mpmath references (reference_test). Cells at random offsets out to the far tail
  // (edges 3 sigma and more from the mean take the map's own quadrature), and the mean placed on
  // every vertex and on the middle of every edge (where the map must leave the cell to
  // integrate()'s fractional winding), a nanometre off them and a millimetre off each edge's
  // middle, near the origin and at UTM-sized
  // coordinates (x ~ 5e5, y ~ 5.4e6 m), under circular, elliptical and 50:1 correlated spreads.
  std::mt19937_64 random(22);
  std::uniform_real_distribution<double> unit(-1.0, 1.0);
  int cells = 0;
  for (const Vec2& site : {Vec2(0.2, 0.1), Vec2(512345.625, 5412345.75)})
    for (const Gaussian& g : {Gaussian::from_axes(site, 0.5, 0.5, 0), Gaussian::from_axes(site, 0.9, 0.3, 35),
                              Gaussian::from_axes(site, 1.0, 0.02, 120)})
      for (const Region& footprint : footprints()) {
        std::vector<Vec2> where;
        for (int k = 0; k < 40; ++k) where.push_back(site + Vec2(6 * unit(random), 6 * unit(random)));
        for (const Loop& loop : footprint.loops)
          for (const Edge& e : loop) {
            where.push_back(site - e.from);                   // mean on a vertex
            where.push_back(site - 0.5 * (e.from + e.to));    // mean on an edge
            where.push_back(site - e.from + Vec2(1e-9, 0));  // a nanometre off the vertex
            const Vec2 along = (e.to - e.from).normalized();
            for (double off : {1e-9, -1e-9, 1e-3})  // just off the edge's middle, either side
              where.push_back(site - 0.5 * (e.from + e.to) + off * Vec2(-along.y(), along.x()));
          }
        const std::vector<MapSource> sources = {{ScatterModel(g), 1, 1}};
        // At UTM-sized coordinates the input's own rounding (eps |mean| / sigma_minor, up to 6e-8
        // sigma) allows no better than about 1e-7: the map's usual 1e-6 there.
        IntegrateOptions o;
        o.rel_tolerance = site.norm() > 1e3 ? 1e-6 : 1e-9;
        for (const Vec2& x : where) {
          const Estimate map = risk_at(sources, footprint, x, Period::event, o);
          const Estimate direct = integrate(g, transformed(footprint, Mat2::Identity(), x), o);
          INFO(std::setprecision(17) << "mean " << site.transpose() << ", cell " << x.transpose() << ": map "
                                     << map.p << " +- " << map.abs_err << ", integrate " << direct.p << " +- "
                                     << direct.abs_err);
          CHECK(std::fabs(map.p - direct.p) <= map.abs_err + direct.abs_err + 1e-15 * direct.p);
          CHECK(std::fabs(map.q - direct.q) <= map.abs_err + direct.abs_err + 1e-15);
          // Where integrate() meets the request, so does the map.
          if (direct.converged)
            CHECK(map.abs_err <= std::max(o.abs_tolerance, o.rel_tolerance * std::min(map.p, map.q)));
          ++cells;
        }
      }
  CHECK(cells > 1000);
}

TEST_CASE("map cells of an axis-aligned rectangle footprint equal the product of two normal intervals",
          "[map][footprint][polygon]") {
  // Independent normals over an axis-aligned rectangle: the product of two one-dimensional
  // probabilities (CHECKS.md, "Bivariate normal over simple regions"), from erf and erfc
  // differences (test_support.hpp). Cells from inside the footprint out to about 1e-30, near the
  // origin and at UTM-sized coordinates.
  const double sx = 0.4, sy = 0.25, w = 0.6, d = 0.3;
  for (const Vec2& mean : {Vec2(0.1, -0.2), Vec2(498765.5, 5401234.25)}) {
    const std::vector<MapSource> sources = {{ScatterModel(Gaussian::from_axes(mean, sx, sy, 0)), 1, 1}};
    const Region footprint = rectangle(Vec2(-0.5 * w, -0.5 * d), Vec2(0.5 * w, 0.5 * d));
    const GridSpec grid{mean + Vec2(-3.0, -2.0), 0.19, 33, 23};
    RiskMapOptions o;
    o.threads = 2;
    // At UTM-sized coordinates the input's own rounding (eps |mean| / sigma_minor = 5e-9 sigma)
    // allows no better than about 1e-8: the map's usual 1e-6 there.
    const double tolerance = mean.norm() > 1e3 ? 1e-6 : 1e-10;
    o.integrate.rel_tolerance = tolerance;
    o.integrate.abs_tolerance = 1e-300;  // relative accuracy in the far tail too
    const RiskMap m = compute_risk_map(sources, footprint, grid, Period::event, o);
    CHECK(m.converged);
    for (int j = 0; j < grid.rows; ++j)
      for (int i = 0; i < grid.columns; ++i) {
        const Vec2 x = grid.centre(i, j) - mean;
        const double exact = test::normal_interval((x.x() - 0.5 * w) / sx, (x.x() + 0.5 * w) / sx) *
                             test::normal_interval((x.y() - 0.5 * d) / sy, (x.y() + 0.5 * d) / sy);
        const std::size_t k = static_cast<std::size_t>(j) * grid.columns + i;
        INFO(std::setprecision(17) << "cell " << i << ", " << j << ": map " << m.value[k] << " +- " << m.abs_err[k]
                                   << ", product " << exact);
        CHECK(std::fabs(m.value[k] - exact) <= m.abs_err[k] + 1e-13 * exact);
        CHECK(m.abs_err[k] <= tolerance * m.value[k]);
      }
  }
}
