// The strewn command end to end, in-process through run_cli(): the demo, a case with a closed
// form, exit statuses, output formats, and every class of bad input.
#include <boost/math/distributions/non_central_chi_squared.hpp>
#include <boost/math/distributions/normal.hpp>
#include <catch2/catch.hpp>
#include <algorithm>
#include <random>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <limits>
#include <nlohmann/json.hpp>
#include <sstream>

#include "strewn/assess.hpp"
#include "strewn/site_io.hpp"
#include "strewn/site_map.hpp"
#include "output/progress_bar.hpp"
#include "cli_run.hpp"
#include "run_cli.hpp"
#include "strewn/integrate.hpp"

namespace {

using strewn::test::Result;
using strewn::test::run;

const std::string data = STREWN_TEST_DATA_DIR "/cli/";
const std::string demo = STREWN_SOURCE_DIR "/shapes/throwing_lane.toml";
bool xml_parses(const std::string& path);

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
    CHECK(line.size() <= 80);
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
                           "params = { centre = [0.25, 1.0], width = 1.5, height = 2.0 }\nlimit = 1.0\nlimit_per = \"event\"\n";
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

TEST_CASE("validate, shapes, version and help", "[cli]") {
  CHECK(run({"validate", demo}).status == 0);
  const Result shapes = run({"shapes"});
  CHECK(shapes.status == 0);
  CHECK_THAT(shapes.out, Catch::Contains("doorway") && Catch::Contains("annular_sector"));
  CHECK_THAT(run({"--version"}).out, Catch::Contains("0."));
  for (const std::vector<std::string>& cmd :
       std::vector<std::vector<std::string>>{{"assess"}, {"validate"}, {"shapes"}, {"solve"}, {"solve", "clearance"},
                                             {"solve", "spread"}, {"solve", "aim"}, {"deposition"}, {"fit"}, {"map"}, {"report"}}) {
    std::vector<std::string> args = cmd;
    args.push_back("--help");
    const Result h = run(args);
    INFO(args[0]);
    CHECK(h.status == 0);
    CHECK_THAT(h.out, Catch::Contains("Example"));
  }
}

TEST_CASE("bad input: one clear line, exit status 2, nothing on standard output", "[cli][errors]") {
  struct Case {
    std::string file, expected;
  };
  for (const Case& c : std::vector<Case>{
           {"typo_key.toml", "typo_key.toml:10:1: zone[1].limt: unknown key (did you mean 'limit'?)"},
           {"bad_syntax.toml", "bad_syntax.toml:3:"},
           {"negative_sigma.toml", "source[1].spread: sigma_major must be a positive finite number"},
           {"bow_tie.toml", "self-intersection at (1, 1)"},
           {"does_not_exist.toml", "does_not_exist.toml"},
           {"geojson_no_origin.toml", "geojson_no_origin.toml:7:12: zone[1] 'lot'.geometry: GeoJSON positions are "
                                      "longitude/latitude (RFC 7946): set site.origin"},
           {"geojson_unknown_feature.toml", "no feature named 'strp' (did you mean 'strip'?)"},
           {"missing_geometry_file.toml", data + "geometry/nowhere.wkt: cannot be read: No such file or directory"},
           {"shape_and_geometry.toml", "zone[1] 'lot': give either shape (with params) or geometry"},
           {"bad_template.toml", "bad_template.toml:4:1: template.parms: unknown key (did you mean 'params'?)"}}) {
    const Result r = run({"assess", data + c.file});
    INFO(c.file << ": " << r.err);
    CHECK(r.status == 2);
    CHECK(r.out.empty());
    CHECK_THAT(r.err, Catch::Contains(c.expected));
    CHECK(std::count(r.err.begin(), r.err.end(), '\n') == 1);
  }
  const Result bad_option = run({"assess", demo, "--format", "xml"});
  CHECK(bad_option.status == 2);
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

TEST_CASE("a zone placed from a template, WKT or GeoJSON equals the same polygon given directly", "[cli]") {
  // The four zones of placed_zones.toml are one strip; the corners of "direct" were rotated and
  // shifted by hand (see the file), so equal probabilities check offset, rotation_deg and the
  // three geometry sources together.
  const Result r = run({"assess", data + "placed_zones.toml", "--format", "json"});
  INFO(r.err);
  REQUIRE(r.status == 0);
  const auto j = nlohmann::json::parse(r.out);
  const double direct = j["zones"][0]["sources"][0]["p_event"].get<double>();
  CHECK(direct > 0.01);
  for (int z = 1; z < 4; ++z) {
    INFO(j["zones"][z]["name"].get<std::string>());
    CHECK(j["zones"][z]["sources"][0]["p_event"].get<double>() == Approx(direct).epsilon(1e-12));
  }
  CHECK_THAT(j["zones"][2]["geometry_file"].get<std::string>(), Catch::EndsWith("strip.wkt"));
  // Individual risk at occupancy f over N = 4 x 50 events a year: 1 - (1 - p)^(f N).
  const double expected = 1.0 - std::pow(1.0 - direct, 0.25 * 200);
  CHECK(j["zones"][0]["occupancy"]["individual_risk_per_year"].get<double>() == Approx(expected).epsilon(1e-12));
  CHECK_FALSE(j["zones"][1].contains("occupancy"));
}

namespace {

// Paths and the version differ between checkouts and releases; everything else must not.
void strip_local(nlohmann::json& j) {
  if (j.is_object()) {
    for (const char* k : {"file", "geometry_file"})
      if (j.contains(k)) j[k] = std::filesystem::path(j[k].get<std::string>()).filename().string();
    j.erase("strewn_version");
  }
  if (j.is_structured())
    for (auto& v : j) strip_local(v);
}

// Numbers agree to 1e-9 relative (room for another libm's last bits), the rest exactly. Error
// bounds and evaluation counts describe how a result was computed, not the result: a bound may
// move with the implementation but must stay within a factor of 10 of the reviewed one (so a
// bound that grows out of proportion still shows), and counts are not compared.
void compare(const nlohmann::json& got, const nlohmann::json& want, const std::string& where) {
  INFO(where);
  if (want.is_number() && got.is_number()) {
    const double g = got.get<double>(), w = want.get<double>();
    const std::string key = where.substr(where.rfind('.') + 1);
    if (key == "evaluations") return;
    if (key.find("abs_err") != std::string::npos) {
      CHECK(g <= 10 * w + 1e-300);
      CHECK(w <= 10 * g + 1e-300);
      return;
    }
    CHECK(std::fabs(g - w) <= 1e-9 * std::max(std::fabs(w), 1e-300));
    return;
  }
  REQUIRE(got.type() == want.type());
  if (want.is_object()) {
    for (auto it = want.begin(); it != want.end(); ++it) {
      CHECK(got.contains(it.key()));
      if (got.contains(it.key())) compare(got[it.key()], it.value(), where + "." + it.key());
    }
    for (auto it = got.begin(); it != got.end(); ++it) CHECK(want.contains(it.key()));
  } else if (want.is_array()) {
    REQUIRE(got.size() == want.size());
    for (std::size_t i = 0; i < want.size(); ++i) compare(got[i], want[i], where + "[" + std::to_string(i) + "]");
  } else {
    CHECK(got == want);
  }
}

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
      within(where + "q_event", sj["q_event"].get<double>(), err, std::max(0.0, r.q - r.err), std::min(1.0, r.q + r.err));
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
    strip_local(got);
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
    compare(got, want, std::filesystem::path(golden).filename().string());
    for (const std::string& f : check_against_references(want, scenario, refs))
      FAIL_CHECK(std::filesystem::path(golden).filename().string() << ": " << f);
  }
}

namespace {

// z with Q(z) = 1e-3: the normal quantile from Boost.Math as the reference library.
double z_999() { return boost::math::quantile(boost::math::complement(boost::math::normal(), 1e-3)); }

}  // namespace

TEST_CASE("solve clearance moves a strip to where Q(d / sigma) meets its limit", "[cli][solve]") {
  // Strip edge at x = 1, mean at x = 0, sigma 0.5: the limit 1e-3 holds from d = 0.5 z - 1 on.
  const Result r = run({"solve", "clearance", data + "solve_half_plane.toml", "--zone", "strip", "--direction", "1",
                        "0", "--format", "json"});
  INFO(r.err);
  REQUIRE(r.status == 0);
  const auto j = nlohmann::json::parse(r.out);
  const double exact = 0.5 * z_999() - 1.0, shift = j["shift_m"].get<double>();
  CHECK(shift >= exact - 1e-12);  // conservative: compared with upper bounds
  CHECK(shift - exact <= 1e-4);   // the requested tolerance
  // The stated bracket holds the exact answer, and asked for 1e-9 the answer meets 1e-9 (the
  // limit is judged on p + abs_err with abs_err ~1e-12 of p, which moves it by ~1e-12 m).
  // Deliberate fault that made it fail: --tolerance not passed to the search (1e-4 used).
  CHECK(j["shift_fails_m"].get<double>() < exact);
  CHECK(shift - exact <= j["bracket_width_m"].get<double>() + 1e-12);
  const auto fine = nlohmann::json::parse(run({"solve", "clearance", data + "solve_half_plane.toml", "--zone", "strip",
                                               "--direction", "1", "0", "--tolerance", "1e-9", "--format", "json"})
                                              .out);
  CHECK(fine["bracket_width_m"].get<double>() <= 1e-9);
  CHECK(fine["shift_m"].get<double>() >= exact - 1e-12);
  CHECK(fine["shift_m"].get<double>() - exact <= 1e-9);
  CHECK(j["risk_over_limit_at_shift"].get<double>() <= 1.0);
  CHECK(j["risk_over_limit_just_short"].get<double>() > 1.0);
  // Default direction: away from the mean impact point, here +x too.
  const auto d = nlohmann::json::parse(
      run({"solve", "clearance", data + "solve_half_plane.toml", "--zone", "strip", "--format", "json"}).out);
  CHECK(d["direction"][0].get<double>() == Approx(1.0).margin(1e-15));
  CHECK(d["direction"][1].get<double>() == Approx(0.0).margin(1e-15));
  // No answer within a window that is too short: exit 3 and the reason.
  const Result none = run({"solve", "clearance", data + "solve_half_plane.toml", "--zone", "strip", "--direction",
                           "1", "0", "--window", "0.2"});
  CHECK(none.status == 3);
  CHECK_THAT(none.out, Catch::Contains("No answer"));
  // Moving the source instead, the other way, gives the same distance.
  const auto src = nlohmann::json::parse(run({"solve", "clearance", data + "solve_half_plane.toml", "--source",
                                              "thrower", "--direction", "-1", "0", "--format", "json"})
                                             .out);
  CHECK(src["shift_m"].get<double>() == Approx(shift).margin(1e-12));
}

TEST_CASE("solve spread finds the sigma at which the strip meets its limit", "[cli][solve]") {
  // Q(1 / (0.5 k)) = 1e-3  =>  k = 1 / (0.5 z); the CEP of sigma = 0.5 k is sigma sqrt(2 ln 2).
  const Result r = run({"solve", "spread", data + "solve_half_plane.toml", "--format", "json"});
  INFO(r.err);
  REQUIRE(r.status == 0);
  const auto j = nlohmann::json::parse(r.out);
  const double k = 1.0 / (0.5 * z_999());
  CHECK(j["factor"].get<double>() <= k * (1 + 1e-12));
  CHECK(j["factor"].get<double>() == Approx(k).epsilon(1e-5));
  // The limit is judged on upper bounds (p + abs_err, abs_err about 1e-12 of p here: the
  // whitening of vertices 600 sigma out), so the bracket may sit below k by about that much.
  CHECK(j["factor_fails"].get<double>() > k * (1 - 1e-12));
  const double sigma = 0.5 * j["factor"].get<double>();
  CHECK(j["spreads"][0]["components"][0]["sigma_major_m"].get<double>() == Approx(sigma).epsilon(1e-12));
  CHECK(j["spreads"][0]["cep_m"].get<double>() == Approx(sigma * std::sqrt(2 * std::log(2.0))).epsilon(1e-8));
}

TEST_CASE("solve aim keeps the strip's limit and beats a grid search", "[cli][solve]") {
  // The target pulls the aim to x = 0; the strip allows x <= 1 - 0.5 z at most.
  const Result r = run({"solve", "aim", data + "solve_half_plane.toml", "--format", "json"});
  INFO(r.err);
  REQUIRE(r.status == 0);
  const auto j = nlohmann::json::parse(r.out);
  const double x = j["aim"][0].get<double>(), y = j["aim"][1].get<double>();
  const double x_max = 1.0 - 0.5 * z_999();
  CHECK(x <= x_max + 1e-9);
  // The answer claims no distance to the optimum (search_guarantee), but on this convex problem
  // it lies within its final step (5.9e-4 m here; measured 3.4e-4 and 1.3e-4 off).
  CHECK_THAT(j["search_guarantee"].get<std::string>(), Catch::Contains("every limit holds"));
  const double located = j["final_step_m"].get<double>();
  CHECK(located <= 1e-3);
  CHECK(std::fabs(x - x_max) <= located);
  CHECK(std::fabs(y - 5.0) <= located);
  // A plain grid over the same square (+- 1.5 m, 0.05 m steps), the constraint checked with the
  // closed form Q((1 - x) / 0.5) <= 1e-3 and P(target) from the noncentral chi-square closed form
  // (Rayleigh-Rice: P(|X - c| <= R) for a circular normal whose mean is d from c), evaluated by
  // Boost's non_central_chi_squared with 2 degrees of freedom.
  double grid_best = 0.0;
  for (int i = 0; i <= 60; ++i)
    for (int k = 0; k <= 60; ++k) {
      const double gx = -1.5 + 0.05 * i, gy = 3.5 + 0.05 * k;
      if ((1.0 - gx) / 0.5 < z_999()) continue;
      const double lambda = (gx * gx + (gy - 5.0) * (gy - 5.0)) / 0.25;
      const double p = boost::math::cdf(boost::math::non_central_chi_squared(2.0, lambda), 1.0 / 0.25);
      grid_best = std::max(grid_best, p);
    }
  CHECK(j["target_p"].get<double>() >= grid_best - 1e-12);
}

TEST_CASE("deposition: a can on the mean catches the Rayleigh share, and amounts add up", "[cli][deposition]") {
  const Result r = run({"deposition", data + "deposition_single_can.toml", "--format", "json"});
  INFO(r.err);
  REQUIRE(r.status == 0);
  const auto j = nlohmann::json::parse(r.out);
  const double emitted = 0.5 * 100 * 2.0;  // amount_per_event * events_per_hour * hours
  CHECK(j["emitted"].get<double>() == Approx(emitted).epsilon(1e-15));
  // The centre can (index 4 of 3 x 3): depth = E (1 - exp(-a^2 / (2 s^2))) / (pi a^2), in mm.
  const double a = 0.05, s2 = 0.25;
  const double depth = emitted * -std::expm1(-a * a / (2 * s2)) / (M_PI * a * a);
  const auto& can = j["cans"][4];
  CHECK(can["x"].get<double>() == 0.0);
  CHECK(std::fabs(can["depth"].get<double>() - depth) <= can["depth_err"].get<double>() + 1e-12 * depth);
  // Additivity: the cells tile the square zone; the square and what is off site make the total.
  const auto& g = j["grid"];
  const double square = j["zones"][0]["amount"].get<double>();
  CHECK(std::fabs(g["on_grid"].get<double>() - square) <= g["on_grid_err"].get<double>() + j["zones"][0]["amount_err"].get<double>());
  CHECK(std::fabs(g["on_grid"].get<double>() + g["off_grid"].get<double>() - emitted) <=
        g["on_grid_err"].get<double>() + g["off_grid_err"].get<double>() + 1e-13 * emitted);
  CHECK(std::fabs(square + j["off_site"]["amount"].get<double>() - emitted) <= 1e-12 * emitted);
  // The square is +-1.5 sigma... 3 sigma on each side: P = (1 - 2 Q(3))^2 (product of 1-D normals).
  const double q3 = 0.5 * std::erfc(3.0 / std::sqrt(2.0));
  CHECK(square == Approx(emitted * std::pow(1 - 2 * q3, 2)).epsilon(1e-12));
  double cells = 0.0;
  for (const auto& c : j["cans"]) cells += c["cell_amount"].get<double>();
  CHECK(cells == Approx(g["on_grid"].get<double>()).epsilon(1e-14));
}

TEST_CASE("deposition: a flat field has CU and DU of 100%", "[cli][deposition]") {
  const Result r = run({"deposition", data + "deposition_uniform.toml", "--format", "json"});
  INFO(r.err);
  REQUIRE(r.status == 0);
  const auto j = nlohmann::json::parse(r.out);
  CHECK(j["grid"]["cu_percent"].get<double>() == Approx(100.0).epsilon(1e-6));
  CHECK(j["grid"]["du_low_quarter_percent"].get<double>() == Approx(100.0).epsilon(1e-6));
}

TEST_CASE("deposition: the demo lawn, its SVG plan, its CSV, and missing amounts", "[cli][deposition]") {
  const std::string svg = std::string(STREWN_TEST_BINARY_DIR) + "/lawn_deposition.svg";
  std::filesystem::remove(svg);
  const Result r = run({"deposition", STREWN_SOURCE_DIR "/shapes/small_lawn_heads.toml", "--svg", svg});
  INFO(r.err);
  REQUIRE(r.status == 0);
  CHECK_THAT(r.out, Catch::Contains("CU ") && Catch::Contains("DU (low quarter)") && Catch::Contains("Caution"));
  std::ifstream in(svg);
  const std::string text((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  // Well formed enough for any SVG reader: one root, every group closed, a rect per cell.
  CHECK_THAT(text, Catch::StartsWith("<?xml") && Catch::EndsWith("</svg>\n"));
  const auto count = [&](const std::string& what) {
    std::size_t n = 0;
    for (std::size_t at = text.find(what); at != std::string::npos; at = text.find(what, at + 1)) ++n;
    return n;
  };
  CHECK(count("<g ") == count("</g>"));
  CHECK(count("<circle") == 48 + 4);  // 8 x 6 cans, and a mean-impact dot per head
  CHECK(xml_parses(svg));
  const Result csv = run({"deposition", STREWN_SOURCE_DIR "/shapes/small_lawn_heads.toml", "--format", "csv"});
  CHECK(std::count(csv.out.begin(), csv.out.end(), '\n') == 49);
  const std::string not_written = std::string(STREWN_TEST_BINARY_DIR) + "/not_written.svg";
  const Result bad = run({"deposition", data + "deposition_no_amount.toml", "--svg", not_written});
  CHECK(bad.status == 2);
  CHECK_THAT(bad.err, Catch::Contains("source 'head': deposition needs amount_per_event and events_per_hour"));
  CHECK_FALSE(std::filesystem::exists(not_written));
}

TEST_CASE("the deposition demos validate and run", "[cli][demo][deposition]") {
  for (const char* name : {"small_lawn_heads.toml", "seed_drop_zone.toml"}) {
    const std::string file = std::string(STREWN_SOURCE_DIR "/shapes/") + name;
    INFO(name);
    CHECK(run({"validate", file}).status == 0);
    const Result r = run({"deposition", file, "--format", "json"});
    INFO(r.err);
    CHECK(r.status == 0);
    const auto j = nlohmann::json::parse(r.out);
    CHECK(j["off_site"]["fraction"].get<double>() > 0.0);
    // CU and DU recomputed from the reported cans by the published definitions (CHECKS.md:
    // Christiansen 1942, CU = 100 (1 - sum |z - m| / (n m)); DU = 100 mean of the lowest quarter
    // / mean), not just "cu > 0". Deliberate fault that made it fail: the deviations in
    // christiansen_cu taken from 1.01 times the mean.
    std::vector<double> depths;
    for (const auto& c : j["cans"]) depths.push_back(c["depth"].get<double>());
    REQUIRE(depths.size() >= 8);
    double mean = 0, dev = 0;
    for (double z : depths) mean += z / static_cast<double>(depths.size());
    for (double z : depths) dev += std::fabs(z - mean);
    const double cu = 100.0 * (1.0 - dev / (static_cast<double>(depths.size()) * mean));
    std::sort(depths.begin(), depths.end());
    const double quarter = static_cast<double>(depths.size()) / 4.0;
    const std::size_t whole = static_cast<std::size_t>(quarter);
    double low = 0;
    for (std::size_t i = 0; i < whole; ++i) low += depths[i];
    if (whole < depths.size()) low += (quarter - static_cast<double>(whole)) * depths[whole];
    const double du = 100.0 * (low / quarter) / mean;
    CHECK(j["grid"]["cu_percent"].get<double>() == Approx(cu).epsilon(1e-12));
    CHECK(j["grid"]["du_low_quarter_percent"].get<double>() == Approx(du).epsilon(1e-12));
    CHECK(cu > 0.0);
    CHECK(cu < 100.0);
  }
}

TEST_CASE("solve aim --min-target moves away from the strip until the target share is just met", "[cli][solve]") {
  // Least strip risk with P(target) >= 0.5: the aim slides to -x (away from the strip) until the
  // target disk holds exactly half, P = F_ncx2(R^2 / s^2; 2, d^2 / s^2) = 0.5 (noncentral
  // chi-square, Boost.Math), so the answer's target share is 0.5 to the search's accuracy.
  const Result r = run({"solve", "aim", data + "solve_half_plane.toml", "--min-target", "0.5", "--format", "json"});
  INFO(r.err);
  REQUIRE(r.status == 0);
  const auto j = nlohmann::json::parse(r.out);
  CHECK(j["target_p"].get<double>() - j["target_abs_err"].get<double>() >= 0.5);
  CHECK(j["target_p"].get<double>() == Approx(0.5).margin(2e-3));
  CHECK(j["aim"][0].get<double>() < 0.0);
  const double d = std::hypot(j["aim"][0].get<double>(), j["aim"][1].get<double>() - 5.0);
  const double p = boost::math::cdf(boost::math::non_central_chi_squared(2.0, d * d / 0.25), 1.0 / 0.25);
  CHECK(p == Approx(j["target_p"].get<double>()).epsilon(1e-9));
  CHECK(j["keep_out_total_p"].get<double>() < j["current_keep_out_total_p"].get<double>());
}

namespace {

std::string read_file(const std::string& path) {
  std::ifstream in(path);
  return std::string((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
}

// A real XML parse of a written SVG, by Python's xml.etree (Debian's python3), not by strewn.
bool xml_parses(const std::string& path) {
  const std::string cmd = "/usr/bin/python3 -c 'import sys, xml.etree.ElementTree as E; "
                          "r = E.parse(sys.argv[1]).getroot(); sys.exit(0 if r.tag.endswith(\"svg\") else 1)' \"" +
                          path + "\"";
  return std::system(cmd.c_str()) == 0;
}

const std::string kBenchZone = R"([[zone]]
name = "bench"
role = "keep_out"
shape = "rectangle"
params = { centre = [1.0, 0.2], width = 0.6, height = 1.5 }
limit = 0.5
limit_per = "event"
)";

}  // namespace

TEST_CASE("fit -> assess: the fitted source reproduces the true model within its interval", "[cli][fit]") {
  // 80 impacts from a known elliptical normal (seeded), fitted, fed back through assess with
  // --uncertainty: the true model's probability for a zone must lie inside the reported 95%
  // interval, and the point estimate must equal the fitted normal's own probability.
  const std::string dir = std::string(STREWN_TEST_BINARY_DIR) + "/fit_round_trip";
  std::filesystem::create_directories(dir);
  const strewn::Gaussian truth = strewn::Gaussian::from_axes({0.15, -0.1}, 0.5, 0.3, 30.0);
  std::mt19937_64 rng(99);
  std::normal_distribution<double> z;
  {
    std::ofstream csv(dir + "/impacts.csv");
    csv << "# aim = 0, 0\nx,y\n";
    csv.precision(17);
    for (int i = 0; i < 80; ++i) {
      const strewn::Vec2 p = truth.mean() + truth.cholesky() * strewn::Vec2(z(rng), z(rng));
      csv << p.x() << "," << p.y() << "\n";
    }
  }
  const Result fit = run({"fit", dir + "/impacts.csv", "--out", dir + "/source.toml", "--plot", dir + "/qq.svg"});
  INFO(fit.err);
  REQUIRE(fit.status == 0);
  CHECK_THAT(fit.out, Catch::Contains("Hotelling") && Catch::Contains("CEP") && Catch::Contains("design spread"));
  std::ofstream(dir + "/scenario.toml") << read_file(dir + "/source.toml") << "\n" << kBenchZone;
  const Result r = run({"assess", dir + "/scenario.toml", "--uncertainty", "--format", "json"});
  INFO(r.err);
  REQUIRE(r.status == 0);
  const auto j = nlohmann::json::parse(r.out);
  strewn::Region bench;
  bench.loops.push_back({strewn::Edge::segment({0.7, -0.55}, {1.3, -0.55}), strewn::Edge::segment({1.3, -0.55}, {1.3, 0.95}),
                         strewn::Edge::segment({1.3, 0.95}, {0.7, 0.95}), strewn::Edge::segment({0.7, 0.95}, {0.7, -0.55})});
  const double true_p = strewn::integrate(truth, bench).p;
  const auto& interval = j["zones"][0]["uncertainty"]["p_event"][0];
  INFO("true " << true_p << " in [" << interval[0] << ", " << interval[1] << "]");
  CHECK(interval[0].get<double>() <= true_p);
  CHECK(true_p <= interval[1].get<double>());
  CHECK(interval[0].get<double>() < j["zones"][0]["sources"][0]["p_event"].get<double>());
  // The Q-Q plot was written and holds one point per impact.
  const std::string svg = read_file(dir + "/qq.svg");
  std::size_t circles = 0;
  for (std::size_t at = svg.find("<circle"); at != std::string::npos; at = svg.find("<circle", at + 1)) ++circles;
  CHECK(circles == 80);
  CHECK(xml_parses(dir + "/qq.svg"));
}

TEST_CASE("fit from counts and from censored data", "[cli][fit]") {
  // 41 of 60 within 0.3 m: sigma = 0.3 / sqrt(-2 ln(1 - 41/60)) (Rayleigh distribution).
  const Result c = run({"fit", "--counts", "41", "60", "--radius", "0.3", "--aim", "0", "6", "--format", "json"});
  INFO(c.err);
  REQUIRE(c.status == 0);
  const auto cj = nlohmann::json::parse(c.out);
  CHECK(cj["counts"]["sigma"].get<double>() == Approx(0.3 / std::sqrt(-2 * std::log1p(-41.0 / 60))).epsilon(1e-14));
  CHECK(cj["counts"]["sigma_ci"][0].get<double>() < cj["counts"]["sigma"].get<double>());
  // Censored, the closed form sigma^2 = (sum r^2 + m a^2) / (2 n_measured): two impacts at
  // 0.3 m and 0.4 m, one beyond 0.5 m: (0.09 + 0.16 + 0.25) / 4 = 0.125.
  const std::string dir = std::string(STREWN_TEST_BINARY_DIR);
  std::ofstream(dir + "/censored.csv") << "# aim = 1, 1\nx,y\n1.3,1\n1,0.6\n";
  const Result cs = run({"fit", dir + "/censored.csv", "--outside", "1", "--radius", "0.5", "--format", "json"});
  INFO(cs.err);
  REQUIRE(cs.status == 0);
  CHECK(nlohmann::json::parse(cs.out)["censored"]["sigma"].get<double>() == Approx(std::sqrt(0.125)).epsilon(1e-14));
}

TEST_CASE("fit: bad data gives one line naming the file and row, and writes nothing", "[cli][fit][errors]") {
  const std::string fit_data = STREWN_TEST_DATA_DIR "/fit/";
  const std::string out = std::string(STREWN_TEST_BINARY_DIR) + "/must_not_exist.toml";
  std::filesystem::remove(out);
  struct Case {
    std::vector<std::string> args;
    std::string expected;
  };
  for (const Case& c : std::vector<Case>{
           {{fit_data + "two_points.csv", "--aim", "0", "0"}, "needs at least 3 impacts (2 given)"},
           {{fit_data + "identical.csv"}, "identical or lie on one line"},
           {{fit_data + "not_a_number.csv"}, "not_a_number.csv:4: column 'y': 'abc' is not a number"},
           {{fit_data + "missing_column.csv"}, "missing_column.csv:2: unknown column 'z' (did you mean 'x'?)"},
           {{fit_data + "short_row.csv"}, "short_row.csv:4: expected 2 cells, found 1"},
           {{"--counts", "7", "5", "--radius", "1", "--aim", "0", "0"}, "k (7) cannot exceed n (5)"},
           {{fit_data + "two_points.csv"}, "no aim point"}}) {
    std::vector<std::string> args = {"fit"};
    args.insert(args.end(), c.args.begin(), c.args.end());
    args.insert(args.end(), {"--out", out});
    const Result r = run(args);
    INFO(c.expected << ": " << r.err);
    CHECK(r.status == 2);
    CHECK(r.out.empty());
    CHECK_THAT(r.err, Catch::Contains(c.expected));
    CHECK(std::count(r.err.begin(), r.err.end(), '\n') == 1);
    CHECK_FALSE(std::filesystem::exists(out));
  }
}

TEST_CASE("the field-data demo fits both throwers and offers the heavier-tailed mixture", "[cli][fit][demo]") {
  const Result r = run({"fit", STREWN_SOURCE_DIR "/shapes/field_data/lane_marks.csv", "--format", "json"});
  INFO(r.err);
  REQUIRE(r.status == 0);
  const auto j = nlohmann::json::parse(r.out);
  REQUIRE(j["groups"].size() == 2);
  for (const auto& g : j["groups"]) CHECK(g["mixture"]["preferred"] == true);  // two wild throws each
}

TEST_CASE("map cells equal assess for the same footprint placed there", "[cli][map]") {
  // Per session (all sources together): values from 7e-7 to 0.986, not the saturated per-year 1.0 that
  // equalled 1.0 whatever either side computed. The footprint is placed at the cell centre to 17
  // digits, so both sides integrate the same region and must agree within their bounds, and to
  // 1e-9 relative (the request is 1e-8 on each). Deliberate fault that made it fail: the cell
  // centre passed with std::to_string's 6 decimals (5e-7 m off: the old 1e-4 hid it).
  const strewn::ShapeRegistry shapes = strewn::ShapeRegistry::with_default_search_path({});
  const strewn::Site s = strewn::load_site(demo, shapes);
  strewn::SiteMapRequest r;
  r.cells = 24;
  r.per = strewn::Period::session;
  const strewn::SiteMap m = strewn::make_site_map(s, shapes, r, {});
  const strewn::GridSpec& g = m.map.grid;
  int compared = 0;
  for (const auto& [i, j] : std::vector<std::pair<int, int>>{{3, 4}, {12, 12}, {20, 7}, {0, 0}, {10, 14}}) {
    const strewn::Vec2 c = g.centre(i, j);
    strewn::Zone person;
    person.name = "person";
    person.limit = 1.0;
    person.limit_per = strewn::Period::session;
    std::ostringstream params;
    params.precision(17);
    params << "{\"centre\": [" << c.x() << ", " << c.y() << "]}";
    person.region = shapes.build("person", params.str());
    const strewn::ZoneResult z = strewn::assess_zone(person, s.sources, s.options);
    const double map_value = m.map.at(i, j), map_err = m.map.abs_err[static_cast<std::size_t>(j) * g.columns + i];
    INFO(i << ", " << j << ": map " << map_value << " +- " << map_err << ", assess " << z.total_per_session << " +- "
           << z.total_per_session_err);
    if (z.total_per_session < 1e-300) continue;  // far outside: nothing to compare relatively
    CHECK(z.total_per_session < 0.999);  // not saturated
    CHECK(std::fabs(map_value - z.total_per_session) <= map_err + z.total_per_session_err + 1e-14 * z.total_per_session);
    CHECK(map_value == Approx(z.total_per_session).epsilon(1e-9));
    ++compared;
  }
  CHECK(compared >= 4);
}

TEST_CASE("map writes a well-formed SVG, CSV and GeoJSON in longitude/latitude", "[cli][map]") {
  const std::string dir = std::string(STREWN_TEST_BINARY_DIR) + "/map_outputs";
  std::filesystem::create_directories(dir);
  const Result r = run({"map", STREWN_SOURCE_DIR "/shapes/drone_drop.toml", "--cells", "40", "--per", "event", "--svg",
                        dir + "/map.svg", "--csv", dir + "/map.csv", "--geojson", dir + "/contours.geojson", "--format", "json"});
  INFO(r.err);
  REQUIRE(r.status == 0);
  const auto j = nlohmann::json::parse(r.out);
  CHECK(j["grid"]["columns"].get<int>() >= 2);
  const std::string svg = read_file(dir + "/map.svg");
  CHECK(xml_parses(dir + "/map.svg"));
  for (const char* part : {"id=\"field\"", "id=\"contours\"", "id=\"zones\"", "id=\"colour-bar\"", "id=\"scale-bar\"", "neighbour"})
    CHECK_THAT(svg, Catch::Contains(part));
  const std::string csv = read_file(dir + "/map.csv");
  CHECK(static_cast<int>(std::count(csv.begin(), csv.end(), '\n')) ==
        1 + j["grid"]["columns"].get<int>() * j["grid"]["rows"].get<int>());
  const auto geo = nlohmann::json::parse(read_file(dir + "/contours.geojson"));
  CHECK(geo["type"] == "FeatureCollection");
  REQUIRE(!geo["features"].empty());
  // The drone site has an origin: positions are longitude/latitude near it (RFC 7946).
  const auto& first = geo["features"][0]["geometry"]["coordinates"][0][0];
  CHECK(first[0].get<double>() == Approx(-1.4702).margin(0.01));
  CHECK(first[1].get<double>() == Approx(53.3801).margin(0.01));
  // Every contour position, taken back to site metres with the ellipsoid's local radii at the
  // origin (WGS 84: x = dlon N cos phi0, y = dlat M; off by d^2 / R < 2 mm within 100 m),
  // lies on the map's grid to 1 cm: the degrees are checked to ~1e-7, not +-0.01 (1 km).
  // Deliberate fault that made it fail: the origin's latitude taken as 53.3802 in this check.
  const double a = 6378137.0, e2 = 0.00669437999014, lat0 = 53.3801 * M_PI / 180, lon0 = -1.4702;
  const double w = 1 - e2 * std::sin(lat0) * std::sin(lat0);
  const double n_radius = a / std::sqrt(w), m_radius = a * (1 - e2) / (w * std::sqrt(w));
  const double x0 = j["grid"]["origin"][0].get<double>(), y0 = j["grid"]["origin"][1].get<double>();
  const double step = j["grid"]["spacing_m"].get<double>();
  const double x1 = x0 + step * j["grid"]["columns"].get<int>(), y1 = y0 + step * j["grid"]["rows"].get<int>();
  int positions = 0;
  for (const auto& f : geo["features"])
    for (const auto& ring : f["geometry"]["coordinates"])
      for (const auto& pos : ring) {
        const double x = (pos[0].get<double>() - lon0) * M_PI / 180 * n_radius * std::cos(lat0);
        const double y = (pos[1].get<double>() - 53.3801) * M_PI / 180 * m_radius;
        INFO("position " << pos.dump() << " at site (" << x << ", " << y << ")");
        CHECK(x >= x0 - step - 0.01);
        CHECK(x <= x1 + step + 0.01);
        CHECK(y >= y0 - step - 0.01);
        CHECK(y <= y1 + step + 0.01);
        ++positions;
      }
  CHECK(positions >= 10);
  CHECK(geo["features"][0]["properties"].contains("log10_accuracy"));
}

TEST_CASE("report: one self-contained page with the fit section for a fitted source", "[cli][report]") {
  const std::string html = std::string(STREWN_TEST_BINARY_DIR) + "/fitted_report.html";
  std::filesystem::remove(html);
  const Result r = run({"report", data + "fitted_source.toml", "--out", html, "--cells", "30"});
  INFO(r.err);
  REQUIRE((r.status == 0 || r.status == 3));
  const std::string page = read_file(html);
  for (const char* part : {"<!DOCTYPE html>", "id=\"assessment\"", "id=\"map\"", "<svg", "Fitted sources",
                           "40 measured impacts", "from the fit:", "Assumptions", "Caution"})
    CHECK_THAT(page, Catch::Contains(part));
  // Nothing fetched from the network (the SVG namespace URI names, it does not fetch).
  for (const char* fetch : {"src=\"http", "href=\"http", "url(http", "@import"}) CHECK_THAT(page, !Catch::Contains(fetch));
  // A report of a file that does not load writes nothing.
  const std::string none = std::string(STREWN_TEST_BINARY_DIR) + "/no_report.html";
  CHECK(run({"report", data + "typo_key.toml", "--out", none}).status == 2);
  CHECK_FALSE(std::filesystem::exists(none));
}

// Issue 12 item 8: `map --footprint polygon|doorway|composite` always failed ("unknown parameter
// 'centre'": the map injected a centre those kinds do not take). Every kind now works: a kind
// with a centre stands on it, any other kind on the centre of its bounding box; each cell equals
// assess of the same footprint placed there as a zone.
TEST_CASE("map: every footprint kind works and a cell equals assess of the zone placed there", "[cli][map][footprint]") {
  const strewn::ShapeRegistry shapes = strewn::ShapeRegistry::with_default_search_path({});
  const strewn::Site s = strewn::load_site(demo, shapes);
  struct Case {
    std::string kind, params;
    bool has_centre;
  };
  const std::vector<Case> cases = {
      {"polygon", R"({"outer": [[10, 20], [10.6, 20], [10.6, 20.3], [10.2, 20.5]]})", false},
      {"rectangle", R"({"width": 0.5, "height": 0.3, "angle_deg": 30})", true},
      {"doorway", R"({"hinge": [0, 0], "latch": [0.9, 0], "approach_depth": 0.4})", false},
      {"composite", R"({"parts": [{"kind": "rectangle", "params": {"centre": [0, 0], "width": 0.8, "height": 0.6}},)"
                    R"( {"kind": "rectangle", "operation": "difference", "params": {"centre": [0.3, 0.2], "width": 0.3, "height": 0.3}}]})",
       false},
      {"disk", R"({"radius": 0.35})", true},
      {"person", R"({"facing_deg": 45})", true}};
  for (const Case& c : cases) {
    INFO(c.kind);
    strewn::SiteMapRequest r;
    r.cells = 12;
    r.per = strewn::Period::event;
    r.footprint_kind = c.kind;
    r.footprint_params = c.params;
    strewn::SiteMap m;
    REQUIRE_NOTHROW(m = strewn::make_site_map(s, shapes, r, {}));
    const strewn::GridSpec& g = m.map.grid;
    for (const auto& [i, j] : std::vector<std::pair<int, int>>{{5, 7}, {6, 10}}) {
      const strewn::Vec2 at = g.centre(i, j);
      // The same footprint as a zone with its reference point on the cell centre.
      nlohmann::json p = nlohmann::json::parse(c.params);
      strewn::Region region;
      if (c.has_centre) {
        p["centre"] = {at.x(), at.y()};
        region = shapes.build(c.kind, p.dump());
      } else {
        const strewn::Region drawn = shapes.build(c.kind, p.dump());
        const strewn::BoundingBox b = strewn::bounds(drawn);
        region = strewn::transformed(drawn, strewn::Mat2::Identity(), at - 0.5 * (b.min + b.max));
      }
      strewn::Zone zone;
      zone.name = "footprint";
      zone.region = region;
      const strewn::ZoneResult z = strewn::assess_zone(zone, s.sources, s.options);
      // Per event the map shows the largest single source, as per-event limits are judged.
      double sum = 0.0, err = 0.0;
      for (const auto& src : z.sources) {
        sum = std::max(sum, src.event.p);
        err = std::max(err, src.event.abs_err);
      }
      INFO(i << ", " << j << ": map " << m.map.at(i, j) << ", assess " << sum);
      CHECK(std::fabs(m.map.at(i, j) - sum) <= m.map.abs_err[static_cast<std::size_t>(j) * g.columns + i] + err + 1e-12 * sum);
      CHECK(sum > 1e-6);  // a cell with something in it
    }
  }
  // Through the command line too, for the kinds that failed.
  for (const Case& c : cases) {
    const Result r = run({"map", demo, "--cells", "10", "--footprint", c.kind, "--footprint-params", c.params});
    INFO(c.kind << ": " << r.err);
    CHECK(r.status == 0);
  }
}

// Issue 12 item 5: a cell that threw on a worker thread aborted the program (SIGABRT,
// "terminate called without an active exception"; with --threads 1, exit 2 without a location).
// The old code kills this test binary. A 1 mm footprint at 1e9 m makes every cell throw as long
// as areas are computed on absolute coordinates (item 1); once that is fixed the map may succeed.
TEST_CASE("map: a cell that fails on a worker thread is one error line naming the cell, no abort", "[cli][map][threads]") {
  for (const char* threads : {"1", "2", "4"}) {
    const Result r = run({"map", demo, "--footprint", "rectangle", "--footprint-params", R"({"width": 1e-3, "height": 1e-3})",
                          "--window", "1e9", "1e9", "1.00000001e9", "1.00000001e9", "--cells", "10", "--threads", threads});
    INFO(threads << ": " << r.err);
    if (r.status != 0) {
      CHECK(r.status == 2);
      CHECK_THAT(r.err, Catch::StartsWith("strewn: error: " + demo + ": map with footprint rectangle") &&
                            Catch::Contains("map cell ("));
      CHECK(std::count(r.err.begin(), r.err.end(), '\n') == 1);
    }
  }
}

// Issue 12 item 9: a --plugin-dir module without the entry symbol (or of another ABI) was a
// warning and the command went on with exit 0.
TEST_CASE("--plugin-dir: a broken module is an error naming the file, exit 2", "[cli][plugins]") {
  const Result r = run({"--plugin-dir", STREWN_BROKEN_PLUGIN_DIR, "shapes"});
  CHECK(r.status == 2);
  CHECK_THAT(r.err, Catch::StartsWith("strewn: error: cannot load plugin") && Catch::Contains("constructor_no_entry.so"));
  CHECK(r.out.empty());
}

namespace {
// A one-source, one-zone scenario with the given pieces, written beside the test binary.
std::string scenario_with(const std::string& name, const std::string& settings, const std::string& spread,
                          const std::string& exposure, const std::string& params, const std::string& zone_extra) {
  const std::string path = std::string(STREWN_TEST_BINARY_DIR) + "/" + name + ".toml";
  std::ofstream f(path);
  f << "[settings]\n" << settings << "\n[[source]]\nmean = [0, 0]\nspread = " << spread << "\n" << exposure
    << "\n[[zone]]\nname = \"z\"\nrole = \"keep_out\"\nshape = \"disk\"\nparams = " << params << "\n" << zone_extra << "\n";
  return path;
}
}  // namespace

// Issue 12 items 6 and 7: counts wrapped or truncated (samples = -1 became 2^64 - 1, "1e30" said
// "must be at least 1", --outside -1 became 1.8e19) and values that overflow gave NaN with exit
// 0 (sigma 1e100, covariance 1e308), "events must be >= 0" (events 1e308 x 1e308), "internal
// error: bad numeric conversion" (radius 1e308), or "region is not normalised" without a place
// (offset [nan, 0], rotation_deg 1e308). Each is now one line naming file, line and key, exit 2.
TEST_CASE("counts and overflowing values are refused with file, line, key and range", "[cli][errors][ranges]") {
  const std::string ok_spread = "{sigma = 1}", ok_disk = "{centre = [1, 0], radius = 0.5}";
  struct Case {
    std::string settings, spread, exposure, params, zone_extra, expected;
  };
  const std::vector<Case> cases = {
      {"samples = -1", ok_spread, "", ok_disk, "", ":2:11: settings.samples: must be a whole number from 1 to 1000000000000, found -1"},
      {"samples = 1e30", ok_spread, "", ok_disk, "", "settings.samples: must be a whole number from 1 to 1000000000000, found 1e+30"},
      {"samples = 2.5", ok_spread, "", ok_disk, "", "settings.samples: must be a whole number"},
      {"seed = -1", ok_spread, "", ok_disk, "", "settings.seed: must be a whole number from 0 to"},
      {"", "{sigma = 1e100}", "", ok_disk, "", "source[1].spread: sigma_major must be between 1e-12 and 1e12 m (got 1e+100)"},
      {"", "{sigma = 1e-13}", "", ok_disk, "", "source[1].spread: sigma_major must be between 1e-12 and 1e12 m"},
      {"", "{covariance = [[1e308, 0], [0, 1e308]]}", "", ok_disk, "", "source[1].spread: covariance: spread too large"},
      {"", "{sigma_major = 1, sigma_minor = 1, angle_deg = 1e308}", "", ok_disk, "", "source[1].spread.angle_deg: must be a number from -3600 to 3600"},
      {"", ok_spread, "events_per_session = 1e308\nsessions_per_year = 1e308", ok_disk, "",
       ":6:22: source[1].events_per_session: must be a number from 0 to 1e+12 (got 1e+308)"},
      {"", ok_spread, "events_per_session = -1", ok_disk, "", "source[1].events_per_session: must be a number from 0 to 1e+12 (got -1)"},
      {"", ok_spread, "", "{centre = [1, 0], radius = 1e308}", "", "zone[1] 'z': shape 'disk': parameter 'radius' must be a finite number from -1e12 to 1e12 (got 1e+308)"},
      {"", ok_spread, "", "{centre = [1e300, 0], radius = 1}", "", "zone[1] 'z': shape 'disk': parameter 'centre' must be a point"},
      {"", ok_spread, "", ok_disk, "offset = [nan, 0]", ":12:10: zone[1].offset: must be a point [x, y] of finite numbers within +-1e12 m (got [nan, 0])"},
      {"", ok_spread, "", ok_disk, "rotation_deg = 1e308", ":12:16: zone[1].rotation_deg: must be a number from -3600 to 3600 degrees (got 1e+308)"},
  };
  int n = 0;
  for (const Case& c : cases) {
    const std::string path = scenario_with("range_case_" + std::to_string(++n), c.settings, c.spread, c.exposure, c.params, c.zone_extra);
    const Result r = run({"assess", path, "--format", "json"});
    INFO(path << ": " << r.err);
    CHECK(r.status == 2);
    CHECK_THAT(r.err, Catch::StartsWith("strewn: error: " + path + ":") && Catch::Contains(c.expected));
    CHECK(std::count(r.err.begin(), r.err.end(), '\n') == 1);
    CHECK(r.out.empty());
  }
  // The largest exposure allowed: 1e24 events a year is finite and certain, not NaN.
  const Result big = run({"assess", scenario_with("range_big_exposure", "", ok_spread, "events_per_session = 1e12\nsessions_per_year = 1e12", ok_disk, ""),
                          "--format", "json"});
  INFO(big.err);
  REQUIRE(big.status == 0);
  const auto j = nlohmann::json::parse(big.out);
  CHECK(j["zones"][0]["sources"][0]["p_year"].get<double>() == 1.0);
  // Endless exposure (an engine caller may pass it): any chance of a hit makes one certain.
  CHECK(strewn::probability_of_any(1e-300, std::numeric_limits<double>::infinity()) == 1.0);
  CHECK(strewn::probability_of_any(0.0, std::numeric_limits<double>::infinity()) == 0.0);
}

TEST_CASE("command-line counts are whole numbers in their range, never wrapped", "[cli][errors][ranges]") {
  const std::string marks = std::string(STREWN_TEST_BINARY_DIR) + "/range_marks.csv";
  {
    std::ofstream f(marks);
    f << "x,y\n0,0.1\n0.2,0\n-0.1,0.3\n0.3,-0.2\n0,0\n";
  }
  for (const std::vector<std::string>& args : std::vector<std::vector<std::string>>{
           {"fit", marks, "--aim", "0", "0", "--outside", "-1", "--radius", "1"},
           {"fit", marks, "--aim", "0", "0", "--outside", "1e30", "--radius", "1"},
           {"fit", marks, "--aim", "0", "0", "--seed", "-1"},
           {"fit", "--counts", "-1", "5", "--radius", "1", "--aim", "0", "0"},
           {"map", demo, "--cells", "1e30"},
           {"map", demo, "--threads", "-1"},
           {"assess", demo, "--uncertainty", "--replicates", "-5"},
           {"solve", demo, "clearance", "--zone", "bench", "--steps", "-1"}}) {
    const Result r = run(args);
    INFO(args[0] << " " << args[args.size() - 2] << " " << args.back() << ": " << r.err);
    CHECK(r.status == 2);
    CHECK_THAT(r.err, Catch::Contains("must be a whole number from"));
  }
  // An exponent that names a whole number in range is that number.
  const Result cells = run({"map", demo, "--cells", "1e1", "--format", "json"});
  INFO(cells.err);
  REQUIRE(cells.status == 0);
  CHECK(std::max(nlohmann::json::parse(cells.out)["grid"]["columns"].get<int>(),
                 nlohmann::json::parse(cells.out)["grid"]["rows"].get<int>()) == 10);
}

// Issue 12 item 6: a map or a Monte Carlo run of any size started and ran silently (31
// components at 4000 cells: 90 s+; samples = 1e11: for ever). The work is now estimated first
// and refused above the documented ceiling unless --force.
TEST_CASE("work above the ceiling is refused with the estimate unless --force", "[cli][errors][work]") {
  const Result map = run({"map", demo, "--cells", "4000", "--footprint", "rectangle", "--footprint-params",
                          R"({"width": 0.5, "height": 0.3})"});
  CHECK(map.status == 2);
  CHECK_THAT(map.err, Catch::Contains("map of") && Catch::Contains("units of work") && Catch::Contains("ceiling of 2e+08") &&
                          Catch::Contains("--force"));
  const std::string mc = scenario_with("work_monte_carlo", "method = \"monte_carlo\"\nsamples = 1e11", "{sigma = 1}", "",
                                       "{centre = [1, 0], radius = 0.5}", "");
  const Result r = run({"assess", mc});
  CHECK(r.status == 2);
  CHECK_THAT(r.err, Catch::Contains("100000000000 Monte Carlo samples") && Catch::Contains("ceiling of 2e+09") &&
                        Catch::Contains("--force"));
}

// Issue 12 item 7: GeoJSON coordinates of 1e300 overflowed the validity test's integer
// rescaling: "internal error: bad numeric conversion", exit 1.
TEST_CASE("geometry with coordinates beyond 1e12 m is bad input naming the file and key", "[cli][errors][ranges]") {
  const std::string dir = std::string(STREWN_TEST_BINARY_DIR) + "/huge_geometry";
  std::filesystem::create_directories(dir);
  {
    std::ofstream g(dir + "/far.geojson");
    g << R"({"type": "Polygon", "coordinates": [[[1e300, 0], [1e300, 1], [0, 1], [1e300, 0]]]})";
    std::ofstream w(dir + "/far.wkt");
    w << "POLYGON ((0 0, 1e300 0, 1e300 1, 0 0))";
  }
  for (const char* file : {"far.geojson", "far.wkt"}) {
    const std::string path = dir + "/" + std::string(file) + ".toml";
    {
      std::ofstream f(path);
      f << "[[source]]\nmean = [0, 0]\nspread = {sigma = 1}\n[[zone]]\nname = \"z\"\nrole = \"keep_out\"\ngeometry = \""
        << file << "\"\n" << (std::string(file).find("geojson") != std::string::npos ? "positions = \"site_metres\"\n" : "");
    }
    const Result r = run({"assess", path});
    INFO(r.err);
    CHECK(r.status == 2);
    CHECK_THAT(r.err, Catch::StartsWith("strewn: error: " + path + ":7:") && Catch::Contains("zone[1] 'z'.geometry") &&
                          Catch::Contains("beyond +-1e12 m"));
  }
}

TEST_CASE("the progress bar draws only on a terminal and only for work of a second or more", "[cli][work]") {
  std::ostringstream quiet, quick, slow;
  {
    strewn::cli::ProgressBar bar(quiet, false, "map", 100.0);
    bar.update(0.5);
    bar.update(1.0);
  }
  CHECK(quiet.str().empty());  // not a terminal
  {
    strewn::cli::ProgressBar bar(quick, true, "map", 0.01);
    bar.callback()(1.0);
  }
  CHECK(quick.str().empty());  // done within the first second
  {
    strewn::cli::ProgressBar bar(slow, true, "map", 5.0);
    bar.callback()(0.5);
    bar.callback()(1.0);
  }
  CHECK_THAT(slow.str(), Catch::StartsWith("\rmap  50% [###############               ]") && Catch::Contains("100%") &&
                             Catch::EndsWith("\n"));
}

TEST_CASE("map: a window beyond 1e12 m is refused before any cell is computed", "[cli][errors][ranges]") {
  const Result r = run({"map", demo, "--window", "-1e308", "-1e308", "1e308", "1e308"});
  CHECK(r.status == 2);
  CHECK(r.err == "strewn: error: --window coordinates must be finite numbers within +-1e12 m\n");
}

// ---- Issue 13: intervals that cover, design answers that keep every limit, one per-event
// definition for maps and limits.

#include "strewn/risk_map.hpp"
#include "uncertainty_coverage.hpp"

TEST_CASE("--uncertainty covers at 95% for a half-plane and a disk about the mean at n = 12 (seeded simulation)",
          "[cli][uncertainty]") {
  // 300 data sets of n = 12 impacts from a known elliptical normal (axes 1 and 0.6 m at 30 deg),
  // each fitted and passed through assess_uncertainty (200 replicates, levels calibrated by the
  // default 100 x 100 double bootstrap); zones: a half-plane at true p = 1e-4 along the minor axis
  // and a disk of radius 0.5 m containing the mean (p 0.18), the zone the uncalibrated pivotal
  // draws covered worst. Truths from integrate() on the model. The binomial s.e. of a 95%
  // coverage is 1.3%; the checks sit 2.4 s.e. below 95%.
  // Here: half-plane 288 of 300 inside (5 below, 7 above), 282 under the upper bound; disk 283
  // inside (10 below, 7 above), 288 under the upper bound. About 35 s.
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
params = { centre = [2.5, 0.0], width = 1.0, height = 2.0 }
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

namespace {
std::string fmt_aim(double x, double y) {
  std::ostringstream o;
  o.precision(17);
  o << "aim = [" << x << ", " << y << "]";
  return o.str();
}
}  // namespace

TEST_CASE("solve aim --min-target keeps every zone's limit on upper bounds", "[cli][solve]") {
  // Least keep-out risk pulls the aim east, away from the hall, towards a door whose per-event
  // limit is 1e-4. The old search ignored the limit and exited 0 with the door over it.
  const Result r = run({"solve", "aim", data + "solve_aim_door.toml", "--min-target", "0.5", "--format", "json"});
  INFO(r.err << r.out);
  REQUIRE(r.status == 0);
  const auto j = nlohmann::json::parse(r.out);
  CHECK(j["target_p"].get<double>() - j["target_abs_err"].get<double>() >= 0.5);
  // Re-assess at the answer: the door's limit holds on its upper bound.
  const double x = j["aim"][0].get<double>(), y = j["aim"][1].get<double>();
  const std::string dir = std::string(STREWN_TEST_BINARY_DIR) + "/aim_door";
  std::filesystem::create_directories(dir);
  std::string text = read_file(data + "solve_aim_door.toml");
  text.replace(text.find("aim = [0.0, 0.0]"), 16, fmt_aim(x, y));
  std::ofstream(dir + "/at_answer.toml") << text;
  const Result a = run({"assess", dir + "/at_answer.toml", "--format", "json"});
  INFO(a.err);
  CHECK(a.status == 0);
  const auto aj = nlohmann::json::parse(a.out);
  for (const auto& z : aj["zones"])
    if (z["name"] == "door") {
      const auto& s = z["sources"][0];
      CHECK(s["p_event"].get<double>() + s["abs_err"].get<double>() <= 1e-4);
    }
}

TEST_CASE("solve aim exits 3 naming the limit that no aim can meet, in both modes", "[cli][solve]") {
  for (const std::vector<std::string>& extra : {std::vector<std::string>{}, std::vector<std::string>{"--min-target", "0.5"}}) {
    std::vector<std::string> args = {"solve", "aim", data + "solve_aim_impossible.toml"};
    args.insert(args.end(), extra.begin(), extra.end());
    const Result table = run(args);
    CHECK(table.status == 3);
    CHECK_THAT(table.out, Catch::Contains("limit of zone 'door'"));
    args.insert(args.end(), {"--format", "json"});
    const Result r = run(args);
    CHECK(r.status == 3);
    const auto j = nlohmann::json::parse(r.out);
    CHECK(j["found"] == false);
    CHECK_THAT(j["failing_limit"].get<std::string>(), Catch::Contains("'door'"));
    CHECK(j["failing_ratio"].get<double>() > 1.0);
  }
}

TEST_CASE("solve aim claims no accuracy it cannot bound; clearance words its bracket as what it is", "[cli][solve]") {
  // The compass search's last step was printed as the aim's accuracy ("compass search to
  // 0.001 m", aim_located_to_m) though an answer was 0.013 m from the optimum.
  const Result r = run({"solve", "aim", data + "solve_half_plane.toml", "--format", "json"});
  REQUIRE(r.status == 0);
  const auto j = nlohmann::json::parse(r.out);
  CHECK_FALSE(j.contains("aim_located_to_m"));
  CHECK(j.contains("final_step_m"));
  CHECK_THAT(j["search_guarantee"].get<std::string>(), Catch::Contains("not bounded"));
  const Result t = run({"solve", "aim", data + "solve_half_plane.toml"});
  CHECK_THAT(t.out, !Catch::Contains("compass search to"));
  // A clearance was printed "within 2e-12 m of the exact crossing" and was 1.2e-11 m from it.
  const Result c = run({"solve", "clearance", data + "solve_half_plane.toml", "--zone", "strip", "--direction", "1", "0"});
  INFO(c.out);
  CHECK_THAT(c.out, !Catch::Contains("of the exact"));
  CHECK_THAT(c.out, Catch::Contains("judged on upper bounds"));
  const Result cj = run({"solve", "clearance", data + "solve_half_plane.toml", "--zone", "strip", "--direction", "1", "0",
                         "--format", "json"});
  const auto k = nlohmann::json::parse(cj.out);
  CHECK_FALSE(k.contains("shift_error_bound_m"));
  CHECK(k.contains("bracket_width_m"));
}

TEST_CASE("a per-event map cell and a per-event limit use one definition", "[cli][map]") {
  // Two sources; a disk zone 'spot' with a per-event limit that the largest single source meets
  // but their sum does not. assess compares the largest single source (docs/scenario-format.md);
  // the per-event map summed the sources, so it drew "limit of 'spot'" around a zone whose limit
  // holds. A map cell with the zone's own shape as footprint, placed on the zone, must equal the
  // value assess compares.
  strewn::Site s;
  strewn::Source a, b;
  a.name = "west";
  a.model = strewn::Gaussian::from_axes({-1.0, 0.0}, 0.8, 0.8, 0.0);
  b.name = "east";
  b.model = strewn::Gaussian::from_axes({1.0, 0.0}, 0.8, 0.8, 0.0);
  s.sources = {a, b};
  strewn::Zone spot;
  spot.name = "spot";
  spot.region = strewn::coverage::disk({0.0, 2.0}, 0.3);
  spot.limit = 0.002;  // each source gives 0.00156 here
  spot.limit_per = strewn::Period::event;
  const strewn::ZoneResult zr = strewn::assess_zone(spot, s.sources, s.options);
  const double each = zr.sources[0].event.p;
  INFO("single source " << each << ", compared " << zr.limited_value);
  REQUIRE(each < *spot.limit);
  REQUIRE(2 * each > *spot.limit);  // the sum would exceed the limit
  CHECK(*zr.limit_holds);
  const std::vector<strewn::MapSource> ms = {{a.model, 1, 1}, {b.model, 1, 1}};
  const strewn::Estimate cell =
      strewn::risk_at(ms, strewn::coverage::disk({0.0, 0.0}, 0.3), {0.0, 2.0}, strewn::MapPer::event);
  CHECK(std::fabs(cell.p - zr.limited_value) <= cell.abs_err + zr.total_abs_err_per_event);
  CHECK(cell.p <= *spot.limit);
}

TEST_CASE("command-line mistakes: one line, the option or the word, and the nearest command", "[cli][errors]") {
  // Old: two lines without the "strewn: error:" prefix, and "strewn asess" said only "A
  // subcommand is required".
  const Result typo = run({"asess", "site.toml"});
  CHECK(typo.status == 2);
  CHECK(typo.err == "strewn: error: unknown command 'asess' (did you mean 'assess'?) (strewn --help, or strewn COMMAND --help)\n");
  const Result after_option = run({"--plugin-dir", "/nonexistent", "asess"});
  CHECK_THAT(after_option.err, Catch::Contains("did you mean 'assess'?"));
  const Result bad_value = run({"fit", "--counts", "1", "2", "--radius", "0", "--aim", "0", "0"});
  CHECK(bad_value.status == 2);
  CHECK_THAT(bad_value.err, Catch::StartsWith("strewn: error: --radius:"));
  CHECK(std::count(bad_value.err.begin(), bad_value.err.end(), '\n') == 1);
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

TEST_CASE("site units: metres under their usual spellings; anything else named with the accepted ones", "[cli][errors]") {
  // Old: "meters" and "m" were refused with "only metres are supported" and no hint.
  const std::string dir = std::string(STREWN_TEST_BINARY_DIR) + "/units";
  std::filesystem::create_directories(dir);
  const std::string body = "[[source]]\nname = \"s\"\nspread = { sigma = 1 }\n[[zone]]\nname = \"z\"\nrole = "
                           "\"watch\"\nshape = \"disk\"\nparams = { centre = [1, 0], radius = 1 }\n";
  for (const std::string units : {"metres", "meters", "m", "ft"}) {
    const std::string file = dir + "/" + units + ".toml";
    std::ofstream(file) << "[site]\nunits = \"" << units << "\"\n" << body;
    const Result r = run({"validate", file});
    INFO(units << ": " << r.err);
    if (units == "ft") {
      CHECK(r.status == 2);
      CHECK_THAT(r.err, Catch::Contains("site.units") && Catch::Contains("\"meters\""));
    } else {
      CHECK(r.status == 0);
    }
  }
}
