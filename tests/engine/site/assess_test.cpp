// Assessing a site built in code (strewn/assess.hpp): a centred circular normal over a centred
// disk has the Rayleigh closed form P(r <= R) = 1 - exp(-R^2 / (2 sigma^2)).
#include <catch2/catch.hpp>
#include <cmath>

#include "strewn/assess.hpp"
#include "test_support.hpp"

namespace {

strewn::Site disk_site(double radius, double events, double sessions) {
  strewn::Site site;
  strewn::Source thrower;
  thrower.name = "thrower";
  thrower.model = strewn::Gaussian::from_axes({0, 0}, 1.0, 1.0, 0.0);
  thrower.events_per_session = events;
  thrower.sessions_per_year = sessions;
  site.sources.push_back(thrower);
  strewn::Zone zone;
  zone.name = "disk";
  zone.role = strewn::Role::keep_out;
  zone.region = strewn::test::disk({0, 0}, radius);
  site.zones.push_back(zone);
  return site;
}

// Source: Rayleigh distribution of the radius of a centred circular normal.
double rayleigh(double r) { return -std::expm1(-r * r / 2); }

}  // namespace

TEST_CASE("per event, session and year against the Rayleigh closed form", "[site][assess]") {
  const strewn::Site site = disk_site(0.5, 10, 5);
  const strewn::Assessment a = strewn::assess(site);
  REQUIRE(a.zones.size() == 1);
  const strewn::ZoneResult& z = a.zones[0];
  const double p = rayleigh(0.5);
  CHECK(z.sources[0].event.p == Approx(p).epsilon(1e-10));
  CHECK(std::fabs(z.sources[0].event.p - p) <= z.sources[0].event.abs_err + 1e-16);
  CHECK(z.total_per_session == Approx(1 - std::pow(1 - p, 10)).epsilon(1e-10));
  CHECK(z.total_per_year == Approx(1 - std::pow(1 - p, 50)).epsilon(1e-10));
  CHECK(z.total_expected_hits_per_year == Approx(50 * p).epsilon(1e-10));
  CHECK(z.zone == &site.zones[0]);
  CHECK(a.status == strewn::Status::converged);
  CHECK_FALSE(z.limit_holds.has_value());
  CHECK(strewn::limit_margin(z) == -1.0);
}

TEST_CASE("a limit holds on the upper bound; the margin's sign says so", "[site][assess]") {
  strewn::Site site = disk_site(0.1, 1, 1);
  const double p = rayleigh(0.1);  // 0.004988 per event
  site.zones[0].limit_per = strewn::Period::event;
  site.zones[0].limit = 2 * p;
  strewn::ZoneResult z = strewn::assess_zone(site.zones[0], site.sources, site.options);
  CHECK(*z.limit_holds);
  CHECK(z.limited_value == Approx(p).epsilon(1e-10));
  CHECK(z.limited_upper >= z.limited_value);
  CHECK(strewn::limit_margin(z) == Approx(-0.5).epsilon(1e-8));
  site.zones[0].limit = p / 2;
  z = strewn::assess_zone(site.zones[0], site.sources, site.options);
  CHECK_FALSE(*z.limit_holds);
  CHECK(strewn::limit_margin(z) == Approx(1.0).epsilon(1e-8));
  CHECK_FALSE(strewn::assess(site).all_limits_hold);
}

TEST_CASE("two sources: per-event limits see the worst single source, sessions the union", "[site][assess]") {
  strewn::Site site = disk_site(0.5, 4, 1);
  strewn::Source second = site.sources[0];
  second.name = "second";
  second.model = strewn::Gaussian::from_axes({0, 0}, 2.0, 2.0, 0.0);
  second.events_per_session = 6;
  site.sources.push_back(second);
  site.zones[0].limit = 0.5;
  site.zones[0].limit_per = strewn::Period::event;
  const strewn::ZoneResult z = strewn::assess(site).zones[0];
  const double p1 = rayleigh(0.5), p2 = rayleigh(0.25);  // sigma 2: R / sigma = 0.25
  CHECK(z.limited_value == Approx(std::max(p1, p2)).epsilon(1e-10));
  CHECK(z.total_per_session == Approx(1 - std::pow(1 - p1, 4) * std::pow(1 - p2, 6)).epsilon(1e-10));
}

TEST_CASE("individual risk with an occupancy f: 1 - (1 - P(no hit per year))^f", "[site][assess]") {
  strewn::Site site = disk_site(0.3, 20, 100);
  site.zones[0].occupancy = 0.25;
  const strewn::ZoneResult z = strewn::assess(site).zones[0];
  const double p = rayleigh(0.3);
  // Source: someone present for a fraction f of the 2000 events a year meets 500 of them.
  CHECK(*z.individual_risk_per_year == Approx(1 - std::pow(1 - p, 500)).epsilon(1e-10));
}
