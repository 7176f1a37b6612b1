// `strewn assess`: a closed form, exit statuses, the second method, the demos, the golden JSON
// outputs against an independent method, the uncertainty of fitted sources, progress.
#include <boost/math/distributions/non_central_chi_squared.hpp>
#include <boost/math/distributions/normal.hpp>
#include <catch2/catch.hpp>
#include <fmt/format.h>
#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <limits>
#include <nlohmann/json.hpp>
#include <random>
#include <sstream>

#include "cli_support.hpp"
#include "golden_support.hpp"
#include "strewn/assess.hpp"
#include "strewn/integrate.hpp"
#include "strewn/risk_map.hpp"
#include "strewn/site_io.hpp"
#include "uncertainty_coverage.hpp"

namespace {

using strewn::test::data;
using strewn::test::demo;
using strewn::test::read_file;
using strewn::test::Result;
using strewn::test::run;
using strewn::test::xml_parses;

}  // namespace

namespace {

// The golden files' numbers against an independent method: every zone and source integrated
// again by adaptive cubature of the density at 1e-12 relative, else the tightest of 1e-10 and
// 1e-8 that it meets (a different method from the
// exact boundary integral that wrote them), and every derived number (per session, per year,
// expected hits, totals over sources, individual risk, the limit's compared value) recomputed
// from those reference probabilities as an interval [f(p - e), f(p + e)]. A number is accepted
// when it lies in the reference interval widened by its own stated bound. Returns the failures,
// one line each (empty: every number checked). Deliberate fault that made it fail: the lawn's
// p_event in drone_drop.json nudged in the 10th digit (0.9182195540282925 -> 0.9182195541282925),
// which the 1e-9 relative comparison alone let through.
struct Reference {
  double p, q, err;
};

std::vector<std::vector<Reference>> cubature_references(const strewn::Site& s) {
  strewn::IntegrateOptions cub;
  cub.method = strewn::Method::cubature;
  cub.rel_tolerance = 1e-12;
  cub.abs_tolerance = 1e-300;
  cub.max_evaluations = 50000000;
  std::vector<std::vector<Reference>> refs;
  for (const auto& zone : s.zones) {
    refs.emplace_back();
    for (const auto& src : s.sources) {
      // The tightest request cubature meets (a composite's polygonisation has many pieces).
      strewn::Estimate e;
      for (const double rel : {1e-12, 1e-10, 1e-8}) {
        cub.rel_tolerance = rel;
        e = strewn::integrate(src.model, zone.region, cub);
        if (e.converged) break;
      }
      // A region polygonised for a boolean operation (a composite) carries the polygonisation's
      // bound in abs_err for either method, above any request: that bound is the reference's.
      const bool usable = e.converged || zone.region.approximation_area > 0;
      refs.back().push_back({e.p, e.q, usable ? e.abs_err : std::nan("")});
    }
  }
  return refs;
}

// 1 - (1 - p)^n, the probability of at least one hit in n events; increasing in p.
double any_of(double p, double n) { return p >= 1.0 ? (n > 0 ? 1.0 : 0.0) : -std::expm1(n * std::log1p(-p)); }

std::vector<std::string> check_against_references(const nlohmann::json& j, const strewn::Site& s,
                                                  const std::vector<std::vector<Reference>>& refs) {
  std::vector<std::string> failures;
  int checked = 0;
  const auto expect = [&](bool ok, const std::string& what, double value, double lo, double hi) {
    ++checked;
    if (!ok) {
      std::ostringstream m;
      m.precision(17);
      m << what << " = " << value << " outside the independent reference [" << lo << ", " << hi << "]";
      failures.push_back(m.str());
    }
  };
  // value within [lo, hi] widened by its stated bound and a few ulps of rounding.
  const auto within = [&](const std::string& what, double value, double bound, double lo, double hi) {
    const double slack = bound + 4e-16 * std::fabs(value) + 1e-300;
    expect(value >= lo - slack && value <= hi + slack, what, value, lo, hi);
  };
  if (j["zones"].size() != s.zones.size()) return {"zone count differs from the scenario's"};
  for (std::size_t z = 0; z < s.zones.size(); ++z) {
    const auto& zj = j["zones"][z];
    const auto& zone = s.zones[z];
    const std::string zname = zj["name"].get<std::string>();
    if (zname != zone.name || zj["sources"].size() != s.sources.size()) {
      failures.push_back("zone " + zname + ": names or sources differ from the scenario's");
      continue;
    }
    double none_session_lo = 0, none_session_hi = 0, none_year_lo = 0, none_year_hi = 0;
    double hits_lo = 0, hits_hi = 0, err_sum = 0, worst_lo = 0, worst_hi = 0;
    bool zone_ok = true;
    for (std::size_t k = 0; k < s.sources.size(); ++k) {
      const auto& sj = zj["sources"][k];
      const Reference& r = refs[z][k];
      const std::string where = zname + " / " + sj["source"].get<std::string>() + ": ";
      if (!(r.err >= 0)) {
        failures.push_back(where + "the cubature reference did not converge");
        zone_ok = false;
        continue;
      }
      const double n_session = s.sources[k].events_per_session, n_year = n_session * s.sources[k].sessions_per_year;
      const double err = sj["abs_err"].get<double>();
      // The engine's bound must cover its distance from the reference (whose own error is r.err).
      const double lo = std::max(0.0, r.p - r.err), hi = std::min(1.0, r.p + r.err);
      within(where + "p_event", sj["p_event"].get<double>(), err, lo, hi);
      within(where + "p_outside_event", sj["p_outside_event"].get<double>(), err, std::max(0.0, r.q - r.err), std::min(1.0, r.q + r.err));
      within(where + "p_session", sj["p_session"].get<double>(), sj["p_session_abs_err"].get<double>(),
             any_of(lo, n_session), any_of(hi, n_session));
      within(where + "p_year", sj["p_year"].get<double>(), sj["p_year_abs_err"].get<double>(), any_of(lo, n_year),
             any_of(hi, n_year));
      within(where + "expected_hits_per_year", sj["expected_hits_per_year"].get<double>(), n_year * err, n_year * lo,
             n_year * hi);
      // The stated bounds of the derived numbers are at least what the event bound implies.
      const double p = sj["p_event"].get<double>();
      within(where + "p_session_abs_err covers the event bound", sj["p_session_abs_err"].get<double>(), 0.0,
             std::min(any_of(std::min(1.0, p + err), n_session) - sj["p_session"].get<double>(),
                      sj["p_session"].get<double>() - any_of(std::max(0.0, p - err), n_session)) * (1 - 1e-12),
             2.0);
      none_session_lo += n_session * std::log1p(-std::min(lo, 1 - 1e-300));
      none_session_hi += n_session * std::log1p(-std::min(hi, 1 - 1e-300));
      none_year_lo += n_year * std::log1p(-std::min(lo, 1 - 1e-300));
      none_year_hi += n_year * std::log1p(-std::min(hi, 1 - 1e-300));
      hits_lo += n_year * lo;
      hits_hi += n_year * hi;
      err_sum += err;
      worst_lo = std::max(worst_lo, lo);
      worst_hi = std::max(worst_hi, hi);
    }
    if (!zone_ok) continue;
    const auto& all = zj["all_sources"];
    const double err = all["abs_err_per_event"].get<double>();
    within(zname + ": abs_err_per_event is the sum of the sources' bounds", err, 0.0, err_sum * (1 - 1e-15),
           err_sum * (1 + 1e-15));
    const double n_total_year = [&] {
      double n = 0;
      for (const auto& src : s.sources) n += src.events_per_session * src.sessions_per_year;
      return n;
    }();
    within(zname + ": all_sources.expected_hits_per_year", all["expected_hits_per_year"].get<double>(),
           n_total_year * err, hits_lo, hits_hi);
    const double session_lo = -std::expm1(none_session_lo), session_hi = -std::expm1(none_session_hi);
    const double year_lo = -std::expm1(none_year_lo), year_hi = -std::expm1(none_year_hi);
    within(zname + ": all_sources.p_session", all["p_session"].get<double>(), all["p_session_abs_err"].get<double>(),
           session_lo, session_hi);
    within(zname + ": all_sources.p_year", all["p_year"].get<double>(), all["p_year_abs_err"].get<double>(), year_lo,
           year_hi);
    if (zone.occupancy) {
      const double f = *zone.occupancy;
      const double risk = zj["occupancy"]["individual_risk_per_year"].get<double>();
      // Its bound is the year's bound scaled down by the occupancy (1 - (1 - P)^f is concave in P).
      within(zname + ": individual_risk_per_year", risk, all["p_year_abs_err"].get<double>(),
             -std::expm1(f * none_year_lo), -std::expm1(f * none_year_hi));
      expect(zj["occupancy"]["fraction"].get<double>() == f, zname + ": occupancy fraction",
             zj["occupancy"]["fraction"].get<double>(), f, f);
    }
    if (zone.limit) {
      const auto& lj = zj["limit"];
      const double compared = lj["compared"].get<double>(), value = lj["value"].get<double>();
      expect(value == *zone.limit, zname + ": limit value from the scenario", value, *zone.limit, *zone.limit);
      switch (zone.limit_per) {
        case strewn::Period::event: within(zname + ": limit.compared", compared, err, worst_lo, worst_hi); break;
        case strewn::Period::session:
          within(zname + ": limit.compared", compared, all["p_session_abs_err"].get<double>(), session_lo, session_hi);
          break;
        case strewn::Period::year:
          within(zname + ": limit.compared", compared, all["p_year_abs_err"].get<double>(), year_lo, year_hi);
          break;
      }
      expect(lj["holds"].get<bool>() == (compared <= value), zname + ": limit.holds", compared, value, value);
    }
  }
  bool all_hold = true;
  for (const auto& zj : j["zones"])
    if (zj.contains("limit")) all_hold = all_hold && zj["limit"]["holds"].get<bool>();
  expect(j["all_limits_hold"].get<bool>() == all_hold, "all_limits_hold", all_hold, 0, 1);
  if (checked == 0) failures.push_back("no number was checked");
  return failures;
}

}  // namespace

TEST_CASE("assess reproduces the Rayleigh closed form for a centred disk", "[cli]") {
  // P = 1 - exp(-R^2 / (2 s^2)) with R = 1, s = 0.5 (Rayleigh distribution).
  const Result r = run({"assess", data + "closed_form_disk.toml", "--format", "json"});
  INFO(r.err);
  REQUIRE(r.status == 0);  // limit 0.9 per event holds
  const auto j = nlohmann::json::parse(r.out);
  const auto& s = j["zones"][0]["sources"][0];
  const double p = s["p_event"].get<double>();
  CHECK(std::fabs(p - (-std::expm1(-2.0))) <= s["abs_err"].get<double>() + 1e-15);
  // Per session of 10 events: 1 - (1 - p)^10; per year of 1000 events likewise.
  CHECK(s["p_session"].get<double>() == Approx(1 - std::pow(std::exp(-2.0), 10)).epsilon(1e-12));
  CHECK(s["expected_hits_per_year"].get<double>() == Approx(1000 * p).epsilon(1e-14));
  // Bounds carried to the session: the exact session value lies within them.
  CHECK(std::fabs(s["p_session"].get<double>() - (1 - std::pow(std::exp(-2.0), 10))) <=
        s["p_session_abs_err"].get<double>() + 1e-15);
  CHECK(j["all_limits_hold"] == true);
  CHECK_THAT(j["caution"].get<std::string>(), Catch::Contains("competent"));
}

TEST_CASE("the demo scenario reports exceeded limits with exit status 3", "[cli]") {
  const Result table = run({"assess", demo});
  CHECK(table.status == 3);
  CHECK_THAT(table.out, Catch::Contains("fire exit door") && Catch::Contains("EXCEEDED") &&
                            Catch::Contains("Caution"));
  for (const auto& line : [&] {
         std::vector<std::string> lines;
         std::istringstream in(table.out);
         for (std::string l; std::getline(in, l);) lines.push_back(l);
         return lines;
       }())
    if (line.rfind("Next: ", 0) != 0) CHECK(line.size() <= 80);  // a suggested command is never wrapped
  const Result csv = run({"assess", demo, "--format", "csv"});
  CHECK(csv.status == 3);
  CHECK_THAT(csv.out, Catch::StartsWith("zone,role,source,p_event,abs_err"));
  const Result verified = run({"assess", demo, "--verify", "--format", "json"});
  INFO(verified.err);
  CHECK(verified.status == 3);  // methods agree; limits still exceeded
  const auto j = nlohmann::json::parse(verified.out);
  CHECK(j["zones"][1]["sources"][0]["verification"]["agree"] == true);
}

TEST_CASE("every bundled scenario's exact results agree with cubature in every zone", "[cli][verify]") {
  // Two independent methods (boundary integral vs adaptive cubature of the density) within
  // their combined bounds. The drone demo's wild component has its mean exactly on the lawn's
  // rim, a case the exact method once got wrong by 0.17 with a tiny bound.
  for (const char* name : {"throwing_lane.toml", "lawn_sprinkler.toml", "drone_drop.toml", "small_lawn_heads.toml",
                           "seed_drop_zone.toml"}) {
    const Result r = run({"assess", std::string(STREWN_SOURCE_DIR "/shapes/") + name, "--verify", "--format", "json"});
    INFO(name << ": " << r.err);
    REQUIRE((r.status == 0 || r.status == 3));
    const auto j = nlohmann::json::parse(r.out);
    for (const auto& zone : j["zones"])
      for (const auto& source : zone["sources"]) {
        INFO(zone["name"] << " / " << source["source"] << ": " << source["verification"].dump());
        CHECK(source["verification"]["agree"] == true);
      }
  }
}

TEST_CASE("assess --verify exits 1 and says so when the two methods genuinely disagree", "[cli][verify]") {
  // A real disagreement: Monte Carlo at 50 samples whose 99.9% Clopper-Pearson interval misses
  // the exact value (at most 0.1% of seeds do; the seed is searched at the engine level first).
  // The second method for monte_carlo is the exact one, so --verify must report agree = false
  // and exit 1. Deliberate faults that made it fail: agree never set (default true, as before)
  // and verify() setting agree unconditionally; both passed the demos' "agree" checks.
  const auto g = strewn::Gaussian::from_axes({0.0, 0.0}, 1.0, 1.0, 0.0);
  strewn::Region rect;
  rect.loops.push_back({strewn::Edge::segment({-0.5, 0.0}, {1.0, 0.0}), strewn::Edge::segment({1.0, 0.0}, {1.0, 2.0}),
                        strewn::Edge::segment({1.0, 2.0}, {-0.5, 2.0}), strewn::Edge::segment({-0.5, 2.0}, {-0.5, 0.0})});
  const double truth = strewn::integrate(g, rect).p;
  strewn::IntegrateOptions mc;
  mc.method = strewn::Method::monte_carlo;
  mc.samples = 50;
  int miss = -1, hit = -1;
  for (int seed = 1; seed <= 20000 && (miss < 0 || hit < 0); ++seed) {
    mc.seed = static_cast<std::uint64_t>(seed);
    const strewn::Estimate e = strewn::integrate(g, rect, mc);
    const double off = std::fabs(e.p - truth);
    if (miss < 0 && off > e.abs_err + 1e-12) miss = seed;
    if (hit < 0 && off <= 0.5 * e.abs_err) hit = seed;
  }
  INFO("seed that misses " << miss << ", seed that covers " << hit);
  REQUIRE(miss > 0);
  REQUIRE(hit > 0);
  const std::string dir = std::string(STREWN_TEST_BINARY_DIR) + "/verify_disagreement";
  std::filesystem::create_directories(dir);
  for (const int seed : {miss, hit}) {
    const std::string file = dir + "/seed_" + std::to_string(seed) + ".toml";
    std::ofstream(file) << "[settings]\nmethod = \"monte_carlo\"\nsamples = 50\nseed = " << seed
                        << "\n\n[[source]]\nname = \"unit\"\naim = [0.0, 0.0]\nspread = { sigma = 1.0 }\n"
                           "events_per_session = 1\nsessions_per_year = 1\n\n[[zone]]\nname = \"strip\"\n"
                           "role = \"keep_out\"\nshape = \"rectangle\"\n"
                           "params = { centre = [0.25, 1.0], width = 1.5, depth = 2.0 }\nlimit = 1.0\nlimit_per = \"event\"\n";
    const Result r = run({"assess", file, "--verify", "--format", "json"});
    INFO("seed " << seed << ": " << r.err);
    const auto j = nlohmann::json::parse(r.out);
    const auto& v = j["zones"][0]["sources"][0]["verification"];
    INFO(v.dump());
    if (seed == miss) {
      CHECK(r.status == 1);
      CHECK(v["agree"] == false);
      CHECK_THAT(r.err, Catch::Contains("disagrees beyond the combined error bounds"));
    } else {
      CHECK(r.status == 0);
      CHECK(v["agree"] == true);
      CHECK(r.err.empty());
    }
  }
}

TEST_CASE("every bundled demo scenario validates and assesses with a known verdict", "[cli][demo]") {
  // Exit 3: each demo, as invented, has a limit that does not hold (that is what they show).
  for (const char* name : {"throwing_lane.toml", "lawn_sprinkler.toml", "drone_drop.toml"}) {
    const std::string file = std::string(STREWN_SOURCE_DIR "/shapes/") + name;
    INFO(name);
    CHECK(run({"validate", file}).status == 0);
    const Result r = run({"assess", file, "--format", "json"});
    INFO(r.err);
    CHECK(r.status == 3);
    const auto j = nlohmann::json::parse(r.out);
    for (const auto& zone : j["zones"])
      for (const auto& src : zone["sources"]) {
        // Composite zones are integrated over a polygonisation whose sagitta is set from the
        // zone's size (1e-6 of it), not yet from the requested accuracy: their bound is honest
        // but looser (DEVELOPERS.md, "Open work").
        const bool composite = zone["shape"] == "composite";
        const double rel = composite ? 1e-4 : 1e-8;
        INFO(zone["name"].get<std::string>());
        CHECK(src["abs_err"].get<double>() <= rel * std::max(src["p_event"].get<double>(), 1e-300) + 1e-15);
        if (!composite) CHECK(src["converged"] == true);
      }
  }
}

TEST_CASE("assess --format json matches the golden outputs", "[cli][golden]") {
  // Golden files pin every number of the demos and of the placement check. After a deliberate
  // change, regenerate them with STREWN_UPDATE_GOLDEN=1 and review the diff before committing.
  // Both the fresh output and the golden file are checked against the independent cubature
  // references above, so an update refuses to write values the references contradict, and a
  // golden file edited (or written) wrong fails even when the engine agrees with it. (The drone
  // demo's golden once held p = 0.92170 with a 1e-13 bound for a true 0.91822: the references
  // would have refused it.)
  const bool update = std::getenv("STREWN_UPDATE_GOLDEN") != nullptr;
  const strewn::ShapeRegistry shapes = strewn::ShapeRegistry::with_default_search_path({});
  for (const std::string& file :
       {std::string(STREWN_SOURCE_DIR "/shapes/throwing_lane.toml"), std::string(STREWN_SOURCE_DIR "/shapes/lawn_sprinkler.toml"),
        std::string(STREWN_SOURCE_DIR "/shapes/drone_drop.toml"), data + "placed_zones.toml"}) {
    const Result r = run({"assess", file, "--format", "json"});
    INFO(file << ": " << r.err);
    REQUIRE((r.status == 0 || r.status == 3));
    nlohmann::json got = nlohmann::json::parse(r.out);
    strewn::test::strip_local(got);
    const strewn::Site scenario = strewn::load_site(file, shapes);
    const auto refs = cubature_references(scenario);
    const std::vector<std::string> wrong_now = check_against_references(got, scenario, refs);
    for (const std::string& f : wrong_now) FAIL_CHECK("engine output: " << f);
    const std::string golden = STREWN_TEST_DATA_DIR "/golden/" + std::filesystem::path(file).stem().string() + ".json";
    if (update) {
      if (!wrong_now.empty()) FAIL("refusing to write " << golden << ": the output fails its independent check");
      std::ofstream(golden) << got.dump(2) << "\n";
    }
    std::ifstream in(golden);
    REQUIRE(in.good());
    const nlohmann::json want = nlohmann::json::parse(in);
    strewn::test::compare_golden(got, want, std::filesystem::path(golden).filename().string());
    for (const std::string& f : check_against_references(want, scenario, refs))
      FAIL_CHECK(std::filesystem::path(golden).filename().string() << ": " << f);
  }
}

TEST_CASE("--uncertainty covers at 95% for a half-plane and a disk about the mean at n = 12 (seeded simulation)",
          "[cli][uncertainty]") {
  // 300 data sets of n = 12 impacts from a known elliptical normal (axes 1 and 0.6 m at 30 deg),
  // each fitted and passed through assess_uncertainty (200 replicates, levels calibrated by the
  // default 100 x 100 double bootstrap); zones: a half-plane at true p = 1e-4 along the minor axis
  // and a disk of radius 0.5 m containing the mean (p 0.18), the zone the uncalibrated pivotal
  // draws covered worst. Truths from integrate() on the model. The binomial s.e. of a 95%
  // coverage is 1.3%; the checks sit 2.4 s.e. below 95%.
  // Here: half-plane 289 of 300 inside (4 below, 7 above), 282 under the upper bound; disk 283
  // inside (10 below, 7 above), 289 under the upper bound. About 35 s.
  // Can fail: with the calibration turned off (the deliberate fault: the last argument 100 below
  // set to 0, i.e. the pivotal draws read at the nominal levels, the method before this one) the
  // disk gave 274 inside (91.3%) with 24 misses above and 259 under the upper bound (86.3%), and
  // three checks failed.
  const strewn::Gaussian truth = strewn::Gaussian::from_axes({0.0, 0.0}, 1.0, 0.6, 30.0);
  strewn::coverage::ZoneCase central;
  central.name = "disk about the mean";
  central.region = strewn::coverage::disk(strewn::Vec2(0.2, 0.1), 0.5);
  const auto r = strewn::coverage::simulate(truth, {strewn::coverage::half_plane(truth, 120.0, 1e-4), central}, 12, 300,
                                            200, 0.95, 1012, 100);
  for (const auto& z : r.zones) {
    INFO(z.name << ", p " << z.p_true << ": inside " << z.inside << ", below " << z.below << ", above " << z.above
                << ", under the upper bound " << z.under_upper);
    CHECK(z.inside >= 0.92 * r.data_sets);
    CHECK(z.under_upper >= 0.92 * r.data_sets);
    CHECK(z.above <= 0.05 * r.data_sets);  // the unsafe side: truth above the interval
  }
}

TEST_CASE("--uncertainty from counts bounds p at least at the stated level (Clopper-Pearson draws)",
          "[cli][uncertainty]") {
  // 1000 data sets of n = 12 impacts from a centred circular normal (sigma 1 m), counted within
  // 1 m (true share 1 - exp(-1/2) = 0.393), as `strewn fit --counts` records them; the zone a
  // 0.5 m disk near the mean at true p 0.1, whose p falls as sigma grows (its upper bound is the
  // upper bound on the share). Clopper & Pearson (1934) one-sided bounds cover at least 95% for
  // every n and share. Here: 972 of 997 usable data sets under the upper bound (97.5%; 3 with
  // k = 0 are skipped, as fit refuses them). About 3 s.
  // Can fail: with Jeffreys' Beta(k + 1/2, n - k + 1/2) draws (the method before) 930 of 997
  // (93.3%), and the check fails.
  strewn::coverage::ZoneCase near;
  near.name = "0.5 m disk near the mean";
  near.region = strewn::coverage::disk(strewn::Vec2(0.62, 0.0), 0.5);
  // And a 0.1 m disk at sqrt(2) m, where p is largest over sigma (its peak is at the truth):
  // every draw's p lies below the true one, and the percentile bound covered 0% (0 of 300 data
  // sets at n = 40); the range over sigma's interval, its peak refined, covers (98.0% of 300).
  strewn::coverage::ZoneCase peak;
  peak.name = "0.1 m disk at the peak";
  peak.region = strewn::coverage::disk(strewn::Vec2(std::sqrt(2.0), 0.0), 0.1);
  const auto r = strewn::coverage::simulate_radial(strewn::FitRecord::Kind::counts, 1.0, {near, peak}, 12, 1.0, 1000, 300,
                                                   0.95, 65);
  const auto& top = r.zones[1];
  INFO("peak p " << top.p_true << ": under the upper bound " << top.under_upper << ", inside " << top.inside);
  CHECK(top.under_upper >= 0.94 * r.data_sets);
  CHECK(top.inside >= 0.94 * r.data_sets);
  const auto& z = r.zones[0];
  INFO("p " << z.p_true << ": under the upper bound " << z.under_upper << " of " << r.data_sets << "; inside " << z.inside
            << ", below " << z.below << ", above " << z.above);
  CHECK(z.p_true > 0.09);
  CHECK(z.p_true < 0.11);
  CHECK(z.under_upper >= 0.945 * r.data_sets);
  CHECK(z.above <= 0.025 * r.data_sets);
}

TEST_CASE("--uncertainty from censored radii bounds p at the stated level (exact confidence distribution)",
          "[cli][uncertainty]") {
  // 1000 data sets of n = 12 impacts from a centred circular normal (sigma 1 m), distances
  // measured within 1 m and the others only counted, as `strewn fit --outside --radius` records
  // them; the zone a 0.5 m disk near the mean at true p 0.1 (p falls as sigma grows) and a
  // half-plane at 1e-3 (p rises with sigma). Draws from the exact confidence distribution of
  // sigma (Schweder & Hjort 2016: the test on the estimate inverted) make each percentile the
  // one-sided bound at its level, so the coverage must be 95% within 1.5 binomial standard
  // errors (0.69%) or more, two-sided and one-sided.
  // Can fail: the parametric bootstrap with bias-corrected percentiles (the method before)
  // covered 90.9% two-sided and 92.3% one-sided at n = 12 (docs/intervals.md).
  strewn::coverage::ZoneCase near;
  near.name = "0.5 m disk near the mean";
  near.region = strewn::coverage::disk(strewn::Vec2(0.62, 0.0), 0.5);
  const strewn::Gaussian unit = strewn::Gaussian::from_axes({0.0, 0.0}, 1.0, 1.0, 0.0);
  // And the zone at the peak of p over sigma (as in the counts test above): 0% before the range
  // over sigma's interval was taken for outputs not monotone in sigma.
  strewn::coverage::ZoneCase peak;
  peak.name = "0.1 m disk at the peak";
  peak.region = strewn::coverage::disk(strewn::Vec2(std::sqrt(2.0), 0.0), 0.1);
  const auto r = strewn::coverage::simulate_radial(strewn::FitRecord::Kind::censored, 1.0,
                                                   {near, strewn::coverage::half_plane(unit, 0.0, 1e-3), peak}, 12, 1.0,
                                                   1000, 300, 0.95, 66);
  for (const auto& z : r.zones) {
    INFO(z.name << ", p " << z.p_true << ": under the upper bound " << z.under_upper << " of " << r.data_sets
                << "; inside " << z.inside << ", below " << z.below << ", above " << z.above);
    CHECK(z.under_upper >= 0.94 * r.data_sets);
    CHECK(z.inside >= 0.94 * r.data_sets);
    // Equal tails for the monotone zones; at the peak every miss is above (the interval is the
    // range of p over sigma's interval, which holds the truth exactly when sigma's does).
    if (z.name != peak.name) CHECK(z.above <= 0.03 * r.data_sets);
  }
}

TEST_CASE("--uncertainty bootstraps a fitted mixture whole, weights and every component", "[cli][uncertainty]") {
  // A core (sigma 0.1 m) and a wild component (weight 0.05, sigma 1 m) about the same mean, as
  // `strewn fit --mixture` writes them, from n = 40; a zone 2.5 m out, reached almost only by the
  // wild impacts. Resampling the core alone (the old code) left the wild part fixed and gave a
  // point ("0.00234 to 0.00234"); refitting the whole mixture spreads the interval over the
  // wild weight's sampling uncertainty (a weight from about 2 of 40 impacts: the interval spans
  // a factor of several).
  const std::string dir = std::string(STREWN_TEST_BINARY_DIR) + "/mixture_uncertainty";
  std::filesystem::create_directories(dir);
  std::ofstream(dir + "/scenario.toml") << R"([site]
name = "mixture check"

[[source]]
name = "with wild throws"
aim = [0, 0]
mean = [0, 0]
spread = { covariance = [[0.01, 0.0], [0.0, 0.01]] }
fit = { kind = "impacts", n = 40, mean = [0, 0], covariance = [[0.0595, 0.0], [0.0, 0.0595]], confidence = 0.95 }

  [[source.wild]]
  weight = 0.05
  bias = [0, 0]
  spread = { covariance = [[1.0, 0.0], [0.0, 1.0]] }

[[zone]]
name = "far bench"
role = "keep_out"
shape = "rectangle"
params = { centre = [2.5, 0.0], width = 1.0, depth = 2.0 }
limit = 1e-3
limit_per = "event"
)";
  const Result r = run({"assess", dir + "/scenario.toml", "--uncertainty", "--replicates", "300", "--format", "json"});
  INFO(r.err);
  REQUIRE((r.status == 0 || r.status == 3));
  const auto j = nlohmann::json::parse(r.out);
  const auto& u = j["zones"][0]["uncertainty"];
  const double lo = u["p_event"][0][0].get<double>(), hi = u["p_event"][0][1].get<double>();
  const double p = j["zones"][0]["sources"][0]["p_event"].get<double>();
  INFO("p " << p << " in [" << lo << ", " << hi << "]");
  CHECK(lo < p);
  CHECK(p < hi);
  CHECK(hi > 2.0 * lo);
  CHECK(u["upper_bound"]["p_event"][0].get<double>() <= hi);
  CHECK(u["upper_bound"]["p_event"][0].get<double>() > p);
  const Result table = run({"assess", dir + "/scenario.toml", "--uncertainty", "--replicates", "100"});
  CHECK_THAT(table.out, Catch::Contains("bootstrap of the whole mixture") && Catch::Contains("upper bound (one-sided)"));
}

TEST_CASE("--uncertainty states its method and a one-sided upper bound", "[cli][uncertainty]") {
  const Result r = run({"assess", data + "fitted_source.toml", "--uncertainty", "--replicates", "200", "--format", "json"});
  INFO(r.err);
  REQUIRE((r.status == 0 || r.status == 3));
  const auto j = nlohmann::json::parse(r.out);
  const auto& u = j["zones"][0]["uncertainty"];
  CHECK_THAT(u["method"].get<std::string>(), Catch::Contains("generalised pivotal"));
  // The one-sided 95% bound lies inside the two-sided 95% interval (between its 50% and 97.5% points).
  const double upper = u["upper_bound"]["p_session"].get<double>();
  CHECK(upper > u["p_session"][0].get<double>());
  CHECK(upper < u["p_session"][1].get<double>());
  CHECK(u["upper_bound"]["one_sided_confidence"].get<double>() == 0.95);
}

TEST_CASE("assess reports its progress per zone, source and block of Monte Carlo samples", "[cli][progress]") {
  // Old: a Monte Carlo assessment of 1e9 samples ran for minutes without a word (the bar is
  // drawn from these reports on a terminal only; its drawing is tested with the map's).
  const strewn::ShapeRegistry shapes = strewn::ShapeRegistry::with_default_search_path({});
  strewn::Site s = strewn::load_site(demo, shapes);
  s.options.method = strewn::Method::monte_carlo;
  s.options.samples = 3 << 20;  // three blocks of 2^20 samples per source and zone
  std::vector<double> heard;
  const strewn::Assessment a = strewn::assess(s, false, [&](double done) { heard.push_back(done); });
  REQUIRE(!heard.empty());
  CHECK(heard.size() >= 2 * s.zones.size() * s.sources.size());  // in-sample reports and zone ends
  CHECK(std::is_sorted(heard.begin(), heard.end()));
  CHECK(heard.front() > 0.0);
  CHECK(heard.back() == 1.0);
  CHECK(a.zones.size() == s.zones.size());
}

namespace {

std::vector<std::vector<std::string>> csv_rows(const std::string& text) {
  // RFC 4180 fields (quoted, "" inside quotes), enough for the assess CSV; not strewn's code.
  std::vector<std::vector<std::string>> rows(1, std::vector<std::string>(1));
  bool quoted = false;
  for (std::size_t i = 0; i < text.size(); ++i) {
    const char c = text[i];
    if (quoted) {
      if (c == '"' && i + 1 < text.size() && text[i + 1] == '"') rows.back().back() += '"', ++i;
      else if (c == '"') quoted = false;
      else rows.back().back() += c;
    } else if (c == '"') quoted = true;
    else if (c == ',') rows.back().emplace_back();
    else if (c == '\n') rows.emplace_back(1);
    else rows.back().back() += c;
  }
  if (rows.back().size() == 1 && rows.back()[0].empty()) rows.pop_back();
  return rows;
}

// The text with every run of spaces and line breaks as one space: the table wraps its notes.
std::string flat(const std::string& text) {
  std::string out;
  for (char c : text)
    if (!((c == ' ' || c == '\n') && !out.empty() && out.back() == ' ')) out += c == '\n' ? ' ' : c;
  return out;
}

std::size_t column(const std::vector<std::string>& header, const std::string& name) {
  const auto it = std::find(header.begin(), header.end(), name);
  REQUIRE(it != header.end());
  return static_cast<std::size_t>(it - header.begin());
}

}  // namespace

// Issue 15 item 4: the drone demo's pool (a composite zone) misses the 1e-8 request; JSON said so
// ("converged": false and a message) while the CSV showed only the number and the report claimed
// "a requested relative accuracy of 1e-08" regardless.
TEST_CASE("table, CSV and report say when a result did not meet the requested accuracy", "[cli][output]") {
  const std::string drone = STREWN_SOURCE_DIR "/shapes/drone_drop.toml";
  const Result json = run({"assess", drone, "--format", "json"});
  const auto j = nlohmann::json::parse(json.out);
  int not_met = 0, results = 0;
  double worst = 0.0;
  for (const auto& zone : j["zones"])
    for (const auto& src : zone["sources"]) {
      ++results;
      if (src["converged"] == false) ++not_met;
      const double p = src["p_event"].get<double>(), q = src["q_event"].get<double>();
      worst = std::max(worst, src["abs_err"].get<double>() / std::min(p, q));
    }
  REQUIRE(not_met >= 1);  // the case this test is about

  const Result table = run({"assess", drone});
  CHECK_THAT(flat(table.out), Catch::Contains("requested accuracy NOT MET: error bound") &&
                            Catch::Contains(fmt::format("{} of {} results did NOT meet the request", not_met, results)));
  CHECK_THAT(flat(table.out), Catch::Contains(fmt::format("the largest error bound is {:.2g}", worst)));

  const Result csv = run({"assess", drone, "--format", "csv"});
  const auto rows = csv_rows(csv.out);
  const std::size_t status = column(rows[0], "status"), message = column(rows[0], "message");
  int csv_not_met = 0;
  for (std::size_t r = 1; r < rows.size(); ++r) {
    CHECK(rows[r].size() == rows[0].size());
    if (rows[r][2] != "all sources" && rows[r][status] == "tolerance not met") {
      ++csv_not_met;
      CHECK_THAT(rows[r][message], Catch::Contains("exceeds the requested tolerance"));
    }
  }
  CHECK(csv_not_met == not_met);

  const std::string html = std::string(STREWN_TEST_BINARY_DIR) + "/accuracy_report.html";
  const Result report = run({"report", drone, "--out", html, "--cells", "20"});
  INFO(report.err);
  REQUIRE((report.status == 0 || report.status == 3));
  const std::string page = read_file(html);
  CHECK_THAT(page, Catch::Contains("Requested relative accuracy 1e-08 (or an error bound of at most 1e-15); reached: the largest error bound is") &&
                       Catch::Contains("did NOT meet the request"));
}

// Issue 15 item 4: `assess --verify` printed the same table as without it.
TEST_CASE("--verify shows the second method's value in the table and the CSV", "[cli][output][verify]") {
  const Result table = run({"assess", demo, "--verify"});
  CHECK(table.status == 3);
  CHECK_THAT(table.out, Catch::Contains("checked by cubature:") && Catch::Contains("agrees within both bounds"));
  const Result csv = run({"assess", demo, "--verify", "--format", "csv"});
  const Result json = run({"assess", demo, "--verify", "--format", "json"});
  const auto rows = csv_rows(csv.out);
  const auto j = nlohmann::json::parse(json.out);
  const std::size_t method = column(rows[0], "verify_method"), p = column(rows[0], "verify_p_event"),
                    agree = column(rows[0], "verify_agree");
  std::size_t r = 1;
  for (const auto& zone : j["zones"]) {
    for (const auto& src : zone["sources"]) {
      INFO(zone["name"] << " / " << src["source"]);
      CHECK(rows[r][method] == "cubature");
      CHECK(std::stod(rows[r][p]) == src["verification"]["p_event"].get<double>());
      CHECK(rows[r][agree] == "true");
      ++r;
    }
    CHECK(rows[r][2] == "all sources");
    CHECK(rows[r][method].empty());
    ++r;
  }
  const Result plain = run({"assess", demo, "--format", "csv"});
  CHECK(csv_rows(plain.out)[1][method].empty());
}

// Issue 15 item 4: "limit ... holds" was printed above a fit interval whose upper end breaks the
// limit, without a word. The fitted bench holds on the fitted spread (0.00575 per session
// against 0.01) while the fit's one-sided 95% upper bound is above 0.01.
TEST_CASE("a limit that holds on the fitted spread but not at the fit's upper bound says so", "[cli][output][uncertainty]") {
  const Result json = run({"assess", data + "fitted_source.toml", "--uncertainty", "--replicates", "200", "--format", "json"});
  const auto j = nlohmann::json::parse(json.out);
  const auto& zone = j["zones"][0];
  REQUIRE(zone["limit"]["holds"] == true);
  const double upper = zone["uncertainty"]["upper_bound"]["limited"].get<double>();
  REQUIRE(upper > zone["limit"]["value"].get<double>());  // the case this test is about
  const Result table = run({"assess", data + "fitted_source.toml", "--uncertainty", "--replicates", "200"});
  CHECK(table.status == 0);  // the verdict itself is on the fitted spread, as before
  CHECK_THAT(flat(table.out), Catch::Contains("holds (0.00575) on the fitted spread; see below") &&
                            Catch::Contains(fmt::format("BUT the 95% upper bound {:.3g} is above the limit 0.01", upper)));
  const Result csv = run({"assess", data + "fitted_source.toml", "--uncertainty", "--replicates", "200", "--format", "csv"});
  const auto rows = csv_rows(csv.out);
  CHECK(std::stod(rows[2][column(rows[0], "limit_upper_bound_from_fit")]) == upper);
  CHECK(rows[2][column(rows[0], "limit_verdict")] == "holds");
  // Without --uncertainty nothing is said of a fit.
  CHECK_THAT(run({"assess", data + "fitted_source.toml"}).out, !Catch::Contains("see below"));
}

// A mixture fitted from 25 impacts whose wild weight (0.048) rests on about one of them: most
// replicates draw no wild impact and refit one normal, so the calibrated level of the one-sided
// bound asks beyond the largest replicate. That largest replicate (0.0261 per session at 200 and
// 1000 replicates, 0.322 at 4000) was printed as the bound, below the limit 0.03, and nothing
// said the limit was not shown to hold (found by a new user's trial).
TEST_CASE("--uncertainty: a bound whose level lies beyond the replicates is 'at least' and shows no limit to hold",
          "[cli][output][uncertainty]") {
  const std::string dir = std::string(STREWN_TEST_BINARY_DIR) + "/uncertainty_at_least";
  std::filesystem::create_directories(dir);
  std::ofstream(dir + "/scenario.toml") << R"([site]
name = "invented yard"

[[source]]
name = "with wild throws"
aim = [0, 12]
mean = [0.547, 11.956]
spread = { covariance = [[0.19, 0.128], [0.128, 0.86]] }
events_per_session = 40
fit = { kind = "impacts", n = 25, mean = [0.744, 11.838], covariance = [[1.173, -0.453], [-0.453, 1.237]], confidence = 0.95 }

  [[source.component]]
  weight = 0.048
  bias = [0.547, -0.044]
  spread = { covariance = [[14.29, 0], [0, 14.29]] }

[[zone]]
name = "window"
role = "keep_out"
shape = "rectangle"
params = { centre = [-5.0, 11.0], width = 0.4, depth = 2.0, angle_deg = 10 }
limit = 0.03
limit_per = "session"
)";
  const std::string file = dir + "/scenario.toml";
  const auto upper_of = [&](const std::string& replicates) {
    const Result r = run({"assess", file, "--uncertainty", "--replicates", replicates, "--format", "json"});
    INFO(r.err);
    REQUIRE(r.status == 0);  // the verdict is on the fitted spread
    return nlohmann::json::parse(r.out)["zones"][0];
  };
  const auto zone = upper_of("200");
  REQUIRE(zone["limit"]["holds"] == true);
  const auto& upper = zone["uncertainty"]["upper_bound"];
  CHECK(upper["at_least"]["limited"] == true);
  const double at_200 = upper["limited"].get<double>();
  REQUIRE(at_200 < 0.03);  // the case this test is about: the largest replicate is below the limit
  // "At least" is what it says: more replicates raise the bound.
  CHECK(upper_of("4000")["uncertainty"]["upper_bound"]["limited"].get<double>() > at_200);
  const Result table = run({"assess", file, "--uncertainty", "--replicates", "200"});
  CHECK_THAT(flat(table.out), Catch::Contains(fmt::format("per session at least {:.3g}", at_200)) &&
                                  Catch::Contains("the limit 0.03 per session not shown to hold on it") &&
                                  Catch::Contains(fmt::format("BUT the 95% upper bound at least {:.3g} lies beyond the "
                                                              "replicates: the data do not show that the limit holds",
                                                              at_200)));
  const std::string html = dir + "/report.html";
  const Result report = run({"report", file, "--out", html, "--cells", "10", "--replicates", "200"});
  INFO(report.err);
  CHECK_THAT(read_file(html), Catch::Contains("upper bound lies beyond the 200 replicates"));
  // The fitted source's table says which spread is used, not only the impacts' moments.
  CHECK_THAT(read_file(html), Catch::Contains("used as a core and a wide component of weight 0.048"));
}

// Monte Carlo was never judged against the request: an assessment said "so every result met the
// request" with a bound 0.15 of p at 1e-8, and a mixture's message gave one component's hits
// beside the mixture's p (found by a new user's trial).
TEST_CASE("Monte Carlo results are judged against the request and count every component's hits", "[cli][output]") {
  const std::string dir = std::string(STREWN_TEST_BINARY_DIR) + "/monte_carlo_judged";
  std::filesystem::create_directories(dir);
  const auto scenario = [&](const std::string& tolerance) {
    const std::string file = dir + "/tolerance_" + tolerance + ".toml";
    std::ofstream(file) << "[site]\nname = \"sampled\"\n\n[settings]\nmethod = \"monte_carlo\"\nsamples = 20000\n"
                        << "seed = 7\ntolerance = " << tolerance << R"(

[[source]]
name = "two parts"
aim = [0, 0]
spread = { sigma = 1.0 }

  [[source.component]]
  weight = 0.1
  spread = { sigma = 3.0 }

[[zone]]
name = "bench"
role = "keep_out"
shape = "rectangle"
params = { centre = [1.5, 0.0], width = 2.0, depth = 2.0 }
)";
    return file;
  };
  const Result strict = run({"assess", scenario("1e-8"), "--format", "json"});
  INFO(strict.err);
  const auto src = nlohmann::json::parse(strict.out)["zones"][0]["sources"][0];
  CHECK(src["converged"] == false);
  const std::string message = src["message"].get<std::string>();
  CHECK_THAT(message, Catch::Contains("more samples would narrow it"));
  // p is the components' hits weighted: 0.9 h1 / n + 0.1 h2 / n.
  const std::size_t at = message.find(": hits ");
  REQUIRE(at != std::string::npos);
  std::istringstream hits(message.substr(at + 7));
  double h1 = 0, h2 = 0;
  char comma = 0;
  hits >> h1 >> comma >> h2;
  CHECK(comma == ',');
  CHECK(h1 > 0);
  CHECK(h2 > 0);
  CHECK(src["p_event"].get<double>() == Approx((0.9 * h1 + 0.1 * h2) / 20000).epsilon(1e-14));
  CHECK_THAT(flat(run({"assess", scenario("1e-8")}).out), Catch::Contains("1 of 1 results did NOT meet the request"));
  // A request the samples can meet is met (the 99.9% Clopper-Pearson half-width at 2e4 samples
  // is about 0.04 of p here).
  const Result loose = run({"assess", scenario("0.5")});
  CHECK_THAT(flat(loose.out), Catch::Contains("so every result met the request"));
}

// Issue 15, closing requirement: when a limit is exceeded, assess ends with the next command to
// run, with the run's own scenario path and the zone furthest over its limit; it runs as printed.
TEST_CASE("assess ends with the solve command to run when a limit is exceeded", "[cli][output]") {
  const std::string drone = STREWN_SOURCE_DIR "/shapes/drone_drop.toml";
  const Result table = run({"assess", drone});
  CHECK(table.status == 3);
  // The greenhouse is the drone demo's only exceeded limit (0.12 per year against 0.01).
  const std::string expected = "strewn solve clearance " + drone + " --zone greenhouse";
  CHECK_THAT(table.out, Catch::EndsWith("\nNext: " + expected + "\n"));
  const Result next = run({"solve", "clearance", drone, "--zone", "greenhouse"});
  CHECK(next.status == 0);
  CHECK_THAT(next.out, Catch::Contains("Move"));
  // The throwing lane: the zone with the largest ratio of upper bound to limit, quoted for a shell.
  const Result lane = run({"assess", demo, "--format", "json"});
  const auto j = nlohmann::json::parse(lane.out);
  std::string worst;
  double ratio = 0.0;
  for (const auto& z : j["zones"])
    if (z.contains("limit") && z["limit"]["holds"] == false &&
        z["limit"]["compared_upper_bound"].get<double>() / z["limit"]["value"].get<double>() > ratio) {
      ratio = z["limit"]["compared_upper_bound"].get<double>() / z["limit"]["value"].get<double>();
      worst = z["name"];
    }
  CHECK_THAT(run({"assess", demo}).out, Catch::EndsWith("--zone '" + worst + "'\n"));
  // Nothing is suggested when every limit holds, nor in CSV or JSON.
  CHECK_THAT(run({"assess", data + "fitted_source.toml"}).out, !Catch::Contains("Next:"));
  CHECK_THAT(lane.out, !Catch::Contains("Next:"));
}

TEST_CASE("assess with student_t and uniform spreads: the t's closed form, and --verify agrees everywhere",
          "[cli][family]") {
  const Result r = run({"assess", data + "heavy_tail_families.toml", "--verify", "--format", "json"});
  INFO(r.err);
  REQUIRE((r.status == 0 || r.status == 3));
  const auto j = nlohmann::json::parse(r.out);
  // CHECKS.md, "Elliptical families": 1 - (1 + R^2/(nu s^2))^(-nu/2), R = 1, s = 0.5, nu = 3.
  const auto& t = j["zones"][0]["sources"][0];
  REQUIRE(t["source"] == "thrower");
  const double p = 1.0 - std::pow(1.0 + 4.0 / 3.0, -1.5);
  CHECK(std::fabs(t["p_event"].get<double>() - p) <= t["abs_err"].get<double>() + 1e-15);
  CHECK(t["p_event"].get<double>() == Approx(p).epsilon(1e-8));
  for (const auto& zone : j["zones"])
    for (const auto& source : zone["sources"]) {
      INFO(zone["name"] << " / " << source["source"] << ": " << source["verification"].dump());
      CHECK(source["verification"]["agree"] == true);
    }
}

// Issue 18: a drop's spread is shown as the spread it became, in the table, CSV and JSON.
const std::string flight_demo = STREWN_SOURCE_DIR "/shapes/drone_drop_flight.toml";

TEST_CASE("assess shows the spread a drop became: the unscented normal, or a mixture when the check fails", "[cli][assess][drop]") {
  const Result t = run({"assess", flight_demo});
  INFO(t.err);
  REQUIRE(t.status == 0);
  std::string table = t.out;  // the paragraph is wrapped: read it as one line
  std::replace(table.begin(), table.end(), '\n', ' ');
  CHECK(table.find("parcel on a parachute: a drop from 25 m at 6 m/s") != std::string::npos);
  CHECK(table.find("Spread: normal from the unscented transform (19 sigma points)") != std::string::npos);
  const auto j = nlohmann::json::parse(run({"assess", flight_demo, "--format", "json"}).out);
  REQUIRE(j["sources_from_physics"].size() == 1);
  CHECK(j["sources_from_physics"][0]["shape"] == "normal");
  CHECK(j["sources_from_physics"][0]["monte_carlo_check"]["falls"] == 4000);
  const auto rows = csv_rows(run({"assess", flight_demo, "--format", "csv"}).out);
  CHECK(rows[1][column(rows[0], "source_spread")] == "normal (unscented transform)");

  // A crescent of landings fails the check: the table says so and the source is a mixture.
  const Result c = run({"assess", data + "drop_crescent.toml"});
  INFO(c.err);
  REQUIRE(c.status == 0);
  std::string words = c.out;  // the paragraph is wrapped: read it as one line
  std::replace(words.begin(), words.end(), '\n', ' ');
  CHECK(words.find("are NOT close to normal") != std::string::npos);
  CHECK(words.find("became a mixture of ") != std::string::npos);
  CHECK(words.find("with their own means") != std::string::npos);
  const auto cj = nlohmann::json::parse(run({"assess", data + "drop_crescent.toml", "--format", "json"}).out);
  CHECK(cj["sources_from_physics"][0]["shape"] == "mixture");
  const auto& check = cj["sources_from_physics"][0]["mixture_check"];
  CHECK(cj["sources_from_physics"][0]["components"].size() == check["components"].get<std::size_t>());
  CHECK(check["components"].get<int>() >= 2);
  CHECK(check["components"].get<int>() <= 3);
  // The table says whether the mixture's own check on the held-out falls passed, as the JSON does.
  CHECK(words.find(check["passed"].get<bool>() ? "the other half passed" : "the other half did NOT pass") != std::string::npos);
  CHECK(check["passed"].get<bool>() == (check["ks_p_value"].get<double>() >= 0.01));
}

TEST_CASE("assess shows the spread each thrower became and a row per barrier, in table, CSV and JSON", "[assess][barrier]") {
  const std::string lanes = STREWN_SOURCE_DIR "/shapes/netted_lanes.toml";
  const Result table = run({"assess", lanes});
  CHECK((table.status == 0 || table.status == 3));
  const std::string text = flat(table.out);
  CHECK(text.find("Throwers (the spread each became at its distance):") != std::string::npos);
  // lane B: D = 6 m, 3.5 deg across: 6 tan(3.5 deg) = 0.367 m (by hand); range_sigma 0.3 m.
  CHECK(text.find("'lane B thrower' stands at (1.8, 0) and throws toward (1.8, 6) m, distance 6 m: angular spread 3.5 deg "
                  "became sigma_across 0.367 m") != std::string::npos);
  CHECK(text.find("16 standing points") != std::string::npos);
  CHECK(text.find("'lane net' (catch 0.95, height 2.6 m) stops") != std::string::npos);
  const Result csv = run({"assess", lanes, "--format", "csv"});
  const auto rows = csv_rows(csv.out);
  const std::size_t role = column(rows[0], "role"), message = column(rows[0], "message");
  int barriers = 0, throwers = 0;
  for (const auto& r : rows) {
    CHECK(r.size() == rows[0].size());
    barriers += r[role] == "barrier";
    if (r[role] == "thrower") {
      ++throwers;
      CHECK(r[message].find("sigma_across") != std::string::npos);
    }
  }
  CHECK(barriers == 4);  // two barriers x two sources
  CHECK(throwers == 2);
  const nlohmann::json j = nlohmann::json::parse(run({"assess", lanes, "--format", "json"}).out);
  REQUIRE(j["throwers"].size() == 2);
  CHECK(j["throwers"][0]["standing_points"].size() == 16);
  CHECK(j["throwers"][1]["standing_points"][0]["sigma_across_m"].get<double>() == Approx(6 * std::tan(3.5 * M_PI / 180)));
  REQUIRE(j["barriers"].size() == 2);
  for (const auto& b : j["barriers"])
    for (const auto& stop : b["stops"]) {
      CHECK(stop["p_event"].get<double>() >= 0.0);
      CHECK(stop["p_event"].get<double>() <= b["catch"].get<double>());
    }
}

TEST_CASE("a barrier with a source that has no position is one line naming file, line and key, exit 2", "[assess][barrier]") {
  const std::string dir = STREWN_TEST_BINARY_DIR "/barrier_without_position";
  std::filesystem::create_directories(dir);
  const std::string file = dir + "/site.toml";
  std::ofstream(file) << "[[source]]\naim = [0, 6]\nspread = { sigma = 0.3 }\n\n[[barrier]]\npoints = [[-1, 3], [1, 3]]\n"
                         "catch = 1\n\n[[zone]]\nname = \"bench\"\nrole = \"keep_out\"\nshape = \"rectangle\"\n"
                         "params = { centre = [2.0, 7.0], width = 1.0, depth = 0.5 }\n";
  const Result r = run({"assess", file, "--format", "json"});
  CHECK(r.status == 2);
  CHECK(r.out.empty());
  CHECK(std::count(r.err.begin(), r.err.end(), '\n') == 1);
  CHECK(r.err.find(file + ":1:1: source[1].position: missing: the site has barriers") != std::string::npos);
}
