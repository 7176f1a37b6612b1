// Risk maps and their contours against the noncentral chi-square closed form.
#include <boost/math/distributions/non_central_chi_squared.hpp>
#include <catch2/catch.hpp>
#include <algorithm>
#include <cmath>

#include "strewn/contours.hpp"
#include "strewn/risk_map.hpp"

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
