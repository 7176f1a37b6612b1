// Risk maps and their contours against the noncentral chi-square closed form.
#include <boost/math/distributions/non_central_chi_squared.hpp>
#include <boost/math/quadrature/gauss_kronrod.hpp>
#include <catch2/catch.hpp>
#include <algorithm>
#include <cmath>
#include <iomanip>

#include "strewn/contours.hpp"
#include "strewn/risk_map.hpp"
#include "test_support.hpp"

using namespace strewn;

namespace {

Region disk(double r) {
  Region d;
  d.loops.push_back({Edge::arc(Vec2::Zero(), r * Mat2::Identity(), 0.0, 2 * M_PI)});
  return d;
}

// P(|Y - x| <= R) for Y ~ N(mu, s^2 I): F_ncx2(R^2 / s^2; 2, |x - mu|^2 / s^2) (Boost.Math).
double disk_closed_form(const Vec2& x, const Vec2& mu, double s, double R) {
  return boost::math::cdf(boost::math::non_central_chi_squared(2.0, (x - mu).squaredNorm() / (s * s)), R * R / (s * s));
}

struct Quadrature {
  double p, err;
};

// P(|Y - x| <= R) for Y ~ N(mu, Q diag(s1^2, s2^2) Q^T), Q the rotation by angle_deg: an
// independent reference by one-dimensional quadrature (not the engine's boundary integral or
// cubature). In the spread's principal frame the disk is centred at d = Q^T (x - mu); with
// u = d1 + R sin t, P = int_{-pi/2}^{pi/2} phi(u / s1) / s1 P(d2 - h < s2 Z < d2 + h) R cos t dt,
// h = R cos t, the normal interval by erfc differences in the tails (test_support.hpp).
// The 61-point Kronrod rule (Boost.Math) on 256 and on 512 equal pieces: the difference of the
// two is its error estimate.
Quadrature disk_by_quadrature(const Vec2& x, const Vec2& mu, double s1, double s2, double angle_deg, double R) {
  const double a = angle_deg * M_PI / 180, c = std::cos(a), s = std::sin(a);
  const Vec2 v = x - mu;
  const double d1 = c * v.x() + s * v.y(), d2 = -s * v.x() + c * v.y();
  const auto f = [&](double t) {
    const double u = d1 + R * std::sin(t), h = R * std::cos(t);
    const double density = std::exp(-0.5 * (u / s1) * (u / s1)) / (s1 * std::sqrt(2 * M_PI));
    return density * strewn::test::normal_interval((d2 - h) / s2, (d2 + h) / s2) * R * std::cos(t);
  };
  const auto sum = [&](int pieces) {
    double total = 0;
    for (int k = 0; k < pieces; ++k) {
      const double lo = -M_PI / 2 + M_PI * k / pieces, hi = -M_PI / 2 + M_PI * (k + 1) / pieces;
      total += boost::math::quadrature::gauss_kronrod<double, 61>::integrate(f, lo, hi, 0, 0.0);
    }
    return total;
  };
  const double coarse = sum(256), fine = sum(512);
  return {fine, std::fabs(fine - coarse) + 1e-14 * fine};
}

}  // namespace

TEST_CASE("map cells equal the noncentral chi-square closed form for an offset disk footprint", "[map]") {
  const Vec2 mu(1.0, -2.0);
  const double s = 0.8, R = 0.4;
  const std::vector<MapSource> sources = {{Gaussian::from_axes(mu, s, s, 0), 10, 20}};
  GridSpec g{Vec2(-3, -6), 0.5, 17, 17};
  RiskMapOptions o;
  o.threads = 2;
  const RiskMap m = compute_risk_map(sources, disk(R), g, MapPer::event, o);
  REQUIRE(m.value.size() == 17u * 17u);
  for (int j = 0; j < g.rows; j += 4)
    for (int i = 0; i < g.columns; i += 3) {
      const double exact = disk_closed_form(g.centre(i, j), mu, s, R);
      INFO(i << ", " << j);
      CHECK(std::fabs(m.at(i, j) - exact) <= m.abs_err[j * g.columns + i] + 1e-12 * exact);
      CHECK(m.at(i, j) == Approx(exact).epsilon(1e-6));
    }
  // Per year: 1 - (1 - p)^(10 * 20).
  const RiskMap y = compute_risk_map(sources, disk(R), g, MapPer::year, o);
  const double p = disk_closed_form(g.centre(5, 5), mu, s, R);
  CHECK(y.at(5, 5) == Approx(-std::expm1(200 * std::log1p(-p))).epsilon(1e-9));
}

TEST_CASE("contours pass where the field equals the level, within their stated accuracy", "[map][contours]") {
  const Vec2 mu(0.0, 0.0);
  const double s = 1.0, R = 0.3;
  const std::vector<MapSource> sources = {{Gaussian::from_axes(mu, s, s, 0), 1, 1}};
  GridSpec g{Vec2(-6, -6), 0.1, 121, 121};
  const RiskMap m = compute_risk_map(sources, disk(R), g, MapPer::event);
  for (double level : {1e-2, 1e-4, 1e-6}) {
    const ContourSet c = contour(m, level);
    INFO("level " << level << ", stated log10 error " << c.log10_error);
    REQUIRE(c.lines.size() == 1);  // one circle about the mean
    CHECK(c.lines[0].closed);
    CHECK(c.log10_error < 0.01);
    for (std::size_t k = 0; k < c.lines[0].points.size(); k += 7) {
      const double field = disk_closed_form(c.lines[0].points[k], mu, s, R);
      CHECK(std::fabs(std::log10(field / level)) <= c.log10_error + 1e-9);
    }
  }
  // A level above the map's maximum has no line.
  CHECK(contour(m, 0.5).lines.empty());
}

TEST_CASE("a map is the same on one thread or several, and reports its progress to the end", "[map]") {
  const std::vector<MapSource> sources = {{ScatterModel::mixture({{0.9, Gaussian::from_axes({0, 0}, 0.5, 0.3, 20)},
                                                                   {0.1, Gaussian::from_axes({0.2, 0}, 2.0, 2.0, 0)}}),
                                           5, 10}};
  const GridSpec g{Vec2(-3, -3), 0.25, 25, 25};
  RiskMapOptions one, many;
  one.threads = 1;
  many.threads = 3;
  std::vector<double> seen;
  many.progress = [&](double done) { seen.push_back(done); };
  const RiskMap a = compute_risk_map(sources, disk(0.3), g, MapPer::session, one);
  const RiskMap b = compute_risk_map(sources, disk(0.3), g, MapPer::session, many);
  CHECK(a.value == b.value);  // each cell is computed the same way whichever thread takes it
  REQUIRE_FALSE(seen.empty());
  CHECK(seen.back() == 1.0);
  CHECK(std::is_sorted(seen.begin(), seen.end()));
}

TEST_CASE("map cells of a whole-ellipse footprint agree with integrate() at the same place, within both bounds",
          "[map][footprint]") {
  // The map tables a whole ellipse's trapezoid nodes once per component (translated_footprint.cpp)
  // and falls back to integrate() for the cells it cannot settle; both must agree everywhere,
  // from inside the footprint out to the far tail. Spreads: circular, elliptical and
  // correlated, 50:1; footprints: a person-sized ellipse, a rotated one drawn clockwise with
  // reflected axes (still a counter-clockwise loop), a disk larger than the spread.
  Mat2 reflected;
  reflected << 0.0, 0.2, 0.35, 0.0;  // det < 0: s decreasing runs counter-clockwise
  Mat2 person;
  person << 0.25, 0.0, 0.0, 0.15;
  const std::vector<Region> footprints = {
      [&] { Region r; r.loops.push_back({Edge::arc(Vec2(0.05, -0.02), person, 0.0, 2 * M_PI)}); return r; }(),
      [&] { Region r; r.loops.push_back({Edge::arc(Vec2::Zero(), reflected, 0.3, 0.3 - 2 * M_PI)}); return r; }(),
      disk(3.0)};
  const std::vector<Gaussian> spreads = {Gaussian::from_axes({0.2, 0.1}, 0.5, 0.5, 0),
                                         Gaussian::from_axes({-0.3, 0.4}, 0.9, 0.3, 35),
                                         Gaussian::from_axes({0.0, 0.0}, 1.0, 0.02, 120)};
  // The disk of radius 3 under the 50:1 spread (sigma_minor 2 cm, the disk 150 sigma_minor
  // across) is where integrate() does not settle every cell to 1e-9: 141 of its 625 cells, where
  // a whitened boundary hundreds of sigma across passes near the mean and abs_err (3e-12 to
  // 5e-12, or more with the mean on the rim) says that rounding allows no better. The map falls
  // back to integrate() there, so comparing the two is no check: every cell of that pair is
  // compared with an independent reference instead, the one-dimensional quadrature above
  // (which agrees with cubature at 1e-12 to 1e-15 where checked).
  // Cells where the exact method is wrong beyond its bound (found by this reference, confirmed
  // by cubature at 1e-12 and 30-digit mpmath quadrature; engine faults reported with issue 12):
  // (12, 8) and (12, 16), the mean exactly on the disk's rim: 0.74627 +- 0.13 and 0.49199 +-
  // 7.3e-6 for a true 0.4999590 (tolerance not met, but the bound does not cover); and six cells
  // with the mean inside the disk 0.63 m (31 sigma_minor) from its rim, "converged" with bounds
  // of 4e-12 but off by 5e-11 to 1.6e-8 (e.g. (15, 11): 0.78215276414 for 0.78215276864).
  // When the engine is fixed this list must shrink: the CHECK on it fails until it is updated.
  const std::vector<std::pair<int, int>> known_wrong = {{12, 8}, {11, 9}, {13, 9}, {15, 11},
                                                         {9, 13}, {11, 15}, {13, 15}, {12, 16}};
  std::vector<std::pair<int, int>> wrong;
  int unconverged = 0, reference_checked = 0;
  for (const Region& footprint : footprints)
    for (const Gaussian& g : spreads) {
      const bool disk_50_to_1 = &footprint == &footprints[2] && &g == &spreads[2];
      const std::vector<MapSource> sources = {{ScatterModel(g), 1, 1}};
      const GridSpec grid{Vec2(-9.0, -9.0), 0.75, 25, 25};
      RiskMapOptions o;
      o.threads = 2;
      o.integrate.rel_tolerance = 1e-9;
      const RiskMap m = compute_risk_map(sources, footprint, grid, MapPer::event, o);
      for (int j = 0; j < grid.rows; ++j)
        for (int i = 0; i < grid.columns; ++i) {
          const Vec2 x = grid.centre(i, j);
          const Estimate direct = integrate(g, transformed(footprint, Mat2::Identity(), x), o.integrate);
          const std::size_t k = static_cast<std::size_t>(j) * grid.columns + i;
          INFO(std::setprecision(17) << "cell " << i << ", " << j << ": map " << m.value[k] << " +- " << m.abs_err[k]
                                     << ", integrate " << direct.p << " +- " << direct.abs_err);
          CHECK(std::fabs(m.value[k] - direct.p) <= m.abs_err[k] + direct.abs_err + 1e-15 * direct.p);
          // Where integrate() meets the request, so does the map.
          if (direct.converged) CHECK(m.abs_err[k] <= std::max(1e-15, 1e-9 * m.value[k]));
          if (!direct.converged) {
            ++unconverged;
            CHECK(disk_50_to_1);
          }
          if (!disk_50_to_1) continue;
          // Literal axes of the spread (not the engine's decomposition of its covariance).
          const Quadrature ref = disk_by_quadrature(x, Vec2::Zero(), 1.0, 0.02, 120.0, 3.0);
          ++reference_checked;
          INFO("quadrature " << ref.p << " +- " << ref.err);
          CHECK(ref.err <= 1e-12 * ref.p + 1e-300);
          const bool covered = std::fabs(m.value[k] - ref.p) <= m.abs_err[k] + ref.err;
          if (!covered) wrong.emplace_back(i, j);
          if (std::find(known_wrong.begin(), known_wrong.end(), std::make_pair(i, j)) == known_wrong.end())
            CHECK(covered);
        }
    }
  CHECK(unconverged == 141);
  CHECK(reference_checked == 625);
  CHECK(wrong == known_wrong);
}

TEST_CASE("map cells keep their relative accuracy in the far tail of an offset disk", "[map][tail]") {
  // Noncentral chi-square with 2 degrees of freedom (Boost.Math) from about 1e-3 down to 1e-100.
  const Vec2 mu(0.0, 0.0);
  const double s = 0.5, R = 0.3;
  const std::vector<MapSource> sources = {{Gaussian::from_axes(mu, s, s, 0), 1, 1}};
  const GridSpec g{Vec2(1.0, 0.3), 0.25, 40, 1};  // 2 to 22 sigma from the mean
  RiskMapOptions o;
  o.integrate.rel_tolerance = 1e-8;
  const RiskMap m = compute_risk_map(sources, disk(R), g, MapPer::event, o);
  for (int i = 0; i < g.columns; ++i) {
    const double exact = disk_closed_form(g.centre(i, 0), mu, s, R);
    INFO("x = " << g.centre(i, 0).transpose() << ": " << m.at(i, 0) << " vs " << exact);
    CHECK(m.at(i, 0) == Approx(exact).epsilon(1e-7));
    CHECK(m.abs_err[i] <= 1e-8 * exact);
  }
}
