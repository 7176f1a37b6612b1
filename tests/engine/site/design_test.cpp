// Design answers (strewn/design.hpp) on a strip beside a circular normal of sigma 1 at the origin:
// P(strip x >= d) = Q(d) (the normal tail), so a per-event limit L is met from d = Q^-1(L) on.
#include <boost/math/distributions/normal.hpp>
#include <catch2/catch.hpp>
#include <algorithm>
#include <cmath>
#include <vector>

#include "strewn/assess.hpp"
#include "strewn/design.hpp"
#include "strewn/error.hpp"
#include "strewn/shape_registry.hpp"
#include "test_support.hpp"

namespace {

// Source: the normal quantile from Boost.Math, z with Q(z) = 1e-3.
double z_999() { return boost::math::quantile(boost::math::complement(boost::math::normal(), 1e-3)); }

strewn::Site strip_site(double d) {
  strewn::Site site;
  strewn::Source s;
  s.name = "thrower";
  s.model = strewn::Gaussian::from_axes({0, 0}, 1.0, 1.0, 0.0);
  site.sources.push_back(s);
  strewn::Zone target;
  target.name = "target";
  target.role = strewn::Role::target;
  target.region = strewn::test::disk({0, 0}, 1.0);
  site.zones.push_back(target);
  strewn::Zone strip;
  strip.name = "strip";
  strip.role = strewn::Role::keep_out;
  strip.region = strewn::rectangle({d, -200}, {d + 200, 200});  // a half-plane to 1e-8000
  strip.limit = 1e-3;
  strip.limit_per = strewn::Period::event;
  site.zones.push_back(strip);
  return site;
}

}  // namespace

TEST_CASE("clearance: the strip moves to where Q(d) meets its limit, and the limit holds there", "[site][design]") {
  const strewn::Site site = strip_site(1.0);
  strewn::ClearanceQuery q;
  q.zone = "strip";
  q.direction = strewn::Vec2(1, 0);
  q.max_move = 10;
  const strewn::ClearanceAnswer a =
      strewn::solve_clearance(site, strewn::ShapeRegistry::with_default_search_path({}), q);
  REQUIRE(a.status == strewn::Status::converged);
  CHECK(1.0 + a.crossing.x == Approx(z_999()).margin(1e-3));
  strewn::Zone moved = site.zones[1];
  moved.region = strewn::transformed(moved.region, strewn::Mat2::Identity(), strewn::Vec2(a.crossing.x, 0));
  const strewn::ZoneResult z = strewn::assess_zone(moved, site.sources, site.options);
  CHECK(*z.limit_holds);  // the answer meets the limit on the upper bound
}

TEST_CASE("spread: the largest factor k with Q(d / k) within the limit", "[site][design]") {
  const strewn::Site site = strip_site(2.0);
  const strewn::SpreadAnswer a = strewn::solve_spread(site, {});
  REQUIRE(a.status == strewn::Status::converged);
  CHECK(a.factor == Approx(2.0 / z_999()).epsilon(1e-5));
  REQUIRE(a.spreads.size() == 1);
  // The CEP of a circular normal is sigma sqrt(2 ln 2) (Rayleigh median).
  CHECK(a.spreads[0].cep == Approx(a.factor * std::sqrt(2 * std::log(2.0))).epsilon(1e-9));
}

TEST_CASE("aim: the answer keeps the strip's limit; an impossible limit is no answer", "[site][design]") {
  const strewn::Site site = strip_site(1.0);
  const strewn::AimAnswer a = strewn::solve_aim(site, {});
  REQUIRE(a.status == strewn::Status::converged);
  CHECK(a.best.found);
  strewn::Site moved = site;
  moved.sources[0].model = strewn::Gaussian::from_axes(a.best.x, 1.0, 1.0, 0.0);
  CHECK(*strewn::assess_zone(moved.zones[1], moved.sources, moved.options).limit_holds);
  strewn::Site impossible = site;
  impossible.zones[1].region = strewn::rectangle({-200, -200}, {200, 200});  // covers every aim
  const strewn::AimAnswer none = strewn::solve_aim(impossible, {});
  CHECK(none.status == strewn::Status::no_answer);
  CHECK_FALSE(none.failing_limit.empty());
}

// Issue 15 item 5: solve aim took 8-36 s on a composite zone without a word; every search now
// reports its share done (the command draws it as a progress bar on a terminal).
TEST_CASE("every design search reports its progress, rising to 1 at the end", "[site][design][progress]") {
  const strewn::Site site = strip_site(1.0);
  const auto check = [](const std::vector<double>& seen) {
    REQUIRE(seen.size() >= 2);
    CHECK(std::is_sorted(seen.begin(), seen.end()));
    CHECK(seen.front() > 0.0);
    CHECK(seen.back() == 1.0);
    CHECK(std::count(seen.begin(), seen.end(), 1.0) == 1);  // below 1 until the search is done
  };
  std::vector<double> clearance, spread, aim;
  strewn::ClearanceQuery q;
  q.zone = site.zones[1].name;
  strewn::solve_clearance(site, strewn::ShapeRegistry::with_default_search_path({}), q,
                          [&](double d) { clearance.push_back(d); });
  check(clearance);
  strewn::solve_spread(site, {}, [&](double d) { spread.push_back(d); });
  check(spread);
  strewn::solve_aim(site, {}, [&](double d) { aim.push_back(d); });
  check(aim);
}

// Issue 15: a search that may be long says what to expect before most of it runs: the count of
// evaluations its progress is measured against, times the measured cost of the first few.
TEST_CASE("every search gives one estimate, early, of the evaluations it usually takes", "[site][design][work]") {
  const strewn::Site site = strip_site(3.0);
  struct Seen {
    std::vector<strewn::WorkEstimate> estimates;
    std::size_t progress_calls_before = 0;
  };
  const auto watch = [](Seen& seen, std::size_t& calls) {
    return std::pair<strewn::ProgressFn, strewn::EstimateFn>{
        [&calls](double) { ++calls; },
        [&seen, &calls](const strewn::WorkEstimate& w) {
          seen.estimates.push_back(w);
          seen.progress_calls_before = calls;
        }};
  };
  Seen clearance, spread, aim;
  std::size_t c1 = 0, c2 = 0, c3 = 0;
  strewn::ClearanceQuery q;
  q.zone = site.zones[1].name;
  auto [p1, e1] = watch(clearance, c1);
  strewn::solve_clearance(site, strewn::ShapeRegistry::with_default_search_path({}), q, p1, e1);
  auto [p2, e2] = watch(spread, c2);
  const strewn::SpreadQuery sq;
  strewn::solve_spread(site, sq, p2, e2);
  auto [p3, e3] = watch(aim, c3);
  const strewn::AimQuery aq;
  strewn::solve_aim(site, aq, p3, e3);
  for (const Seen* seen : {&clearance, &spread, &aim}) {
    REQUIRE(seen->estimates.size() == 1);
    // Called after the timed evaluations, before the rest of the search.
    CHECK(seen->progress_calls_before == static_cast<std::size_t>(strewn::kTimedEvaluations) - 1);
    CHECK(seen->estimates[0].seconds_per_unit >= 0.0);
    CHECK_THAT(seen->estimates[0].what, Catch::Contains("evaluations of the limits"));
  }
  // The counts the progress is measured against: a scan of `steps` + 1 points and a few dozen
  // root-finding steps; the aim grid (grid^2) and its compass search.
  CHECK(clearance.estimates[0].units == q.steps + 1.0 + 40.0);
  CHECK(spread.estimates[0].units == sq.steps + 1.0 + 40.0);
  CHECK(aim.estimates[0].units >= static_cast<double>(aq.grid) * aq.grid);
  CHECK(c3 > static_cast<std::size_t>(strewn::kTimedEvaluations));
}

// Issue 14: a bad query is a request_error naming the query's field in the engine's own words.
TEST_CASE("a bad query names its field, never a command-line option", "[site][design][errors]") {
  const strewn::Site site = strip_site(3.0);
  const strewn::ShapeRegistry shapes = strewn::ShapeRegistry::with_default_search_path({});
  const auto field_of = [](const auto& call) -> std::string {
    try {
      call();
    } catch (const strewn::request_error& e) {
      CHECK(std::string(e.what()).find("--") == std::string::npos);
      return e.field();
    }
    return "no error";
  };
  strewn::ClearanceQuery c;
  c.zone = "strip";
  c.direction = strewn::Vec2(0, 0);
  CHECK(field_of([&] { strewn::solve_clearance(site, shapes, c); }) == "direction");
  c.source = "thrower";
  CHECK(field_of([&] { strewn::solve_clearance(site, shapes, c); }) == "subject");
  strewn::SpreadQuery s;
  s.min_factor = 2;
  s.max_factor = 1;
  CHECK(field_of([&] { strewn::solve_spread(site, s); }) == "factor_range");
  strewn::AimQuery a;
  a.min_target = 1.5;
  CHECK(field_of([&] { strewn::solve_aim(site, a); }) == "min_target");
  strewn::Site two = site;
  two.sources.push_back(site.sources[0]);
  two.sources[1].name = "second";
  CHECK(field_of([&] { strewn::solve_aim(two, strewn::AimQuery{}); }) == "source");
}
