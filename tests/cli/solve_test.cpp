// `strewn solve clearance | spread | aim`: answers against closed forms and grid searches, limits
// kept on upper bounds, and what is said when no answer exists.
#include <boost/math/distributions/non_central_chi_squared.hpp>
#include <boost/math/distributions/normal.hpp>
#include <catch2/catch.hpp>
#include <fmt/format.h>
#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <regex>
#include <limits>
#include <map>
#include <nlohmann/json.hpp>
#include <random>
#include <sstream>

#include "cli_support.hpp"
#include "output/progress_bar.hpp"
#include "strewn/assess.hpp"
#include "strewn/integrate.hpp"
#include "strewn/site_io.hpp"

namespace {

using strewn::test::data;
using strewn::test::demo;
using strewn::test::read_file;
using strewn::test::Result;
using strewn::test::run;
using strewn::test::xml_parses;

}  // namespace

namespace {

// z with Q(z) = 1e-3: the normal quantile from Boost.Math as the reference library.
double z_999() { return boost::math::quantile(boost::math::complement(boost::math::normal(), 1e-3)); }

}  // namespace

namespace {
std::string fmt_aim(double x, double y) {
  std::ostringstream o;
  o.precision(17);
  o << "aim = [" << x << ", " << y << "]";
  return o.str();
}
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

TEST_CASE("solve aim re-derives a thrower's spread and counts its barrier: the answer holds when put back as toward",
          "[cli][solve][thrower]") {
  // A new-user trial: the search kept a 7 m throw's spread while moving its aim to 10 m, and the
  // answer, put back as toward (the only way to write a thrower's aim), had the cold frame at
  // 0.292 per session against its limit of 0.01. Its keep-out sums also left out the fence.
  const std::string file = data + "solve_aim_thrower.toml";
  const Result r = run({"solve", "aim", file, "--format", "json"});
  INFO(r.err << r.out);
  REQUIRE(r.status == 0);
  const auto j = nlohmann::json::parse(r.out);
  // "now" is what assess says (the fence included): the keep-out sum is the cold frame's upper bound.
  const Result now = run({"assess", file, "--format", "json"});
  REQUIRE(now.status == 0);
  double frame_now = 0.0;
  const auto nj = nlohmann::json::parse(now.out);
  for (const auto& z : nj["zones"])
    if (z["name"] == "cold frame") frame_now = z["sources"][0]["p_event"].get<double>() + z["sources"][0]["abs_err"].get<double>();
  CHECK(j["current_keep_out_total_p"].get<double>() == Approx(frame_now).epsilon(1e-9));
  // Put back as toward: every limit holds, and P(target) is the answer's.
  const double x = j["aim"][0].get<double>(), y = j["aim"][1].get<double>();
  const std::string dir = std::string(STREWN_TEST_BINARY_DIR) + "/aim_thrower";
  std::filesystem::create_directories(dir);
  std::string text = read_file(file);
  text.replace(text.find("toward = [0.0, 7.0]"), 19, "toward" + fmt_aim(x, y).substr(3));  // "aim = [x, y]"
  std::ofstream(dir + "/at_answer.toml") << text;
  const Result a = run({"assess", dir + "/at_answer.toml", "--format", "json"});
  INFO(a.err << text);
  CHECK(a.status == 0);
  const auto aj = nlohmann::json::parse(a.out);
  for (const auto& z : aj["zones"])
    if (z["name"] == "far target")
      CHECK(z["sources"][0]["p_event"].get<double>() == Approx(j["target_p"].get<double>()).epsilon(1e-9));
}

// A new-user trial: solve spread answered a thrower's file in sigma factors, which a thrower
// cannot be given (it takes spread_angle_deg and range_fraction). The answer now also says the
// thrower's own settings; put back into the file, every limit holds (assess, exit 0) and the
// limiting zone sits just under its limit.
TEST_CASE("solve spread gives a thrower's own settings, and they hold when put back", "[cli][solve][thrower]") {
  const std::string file = data + "solve_aim_thrower.toml";
  const Result table = run({"solve", "spread", file});
  INFO(table.err << table.out);
  REQUIRE(table.status == 0);
  CHECK_THAT(table.out, Catch::Contains("as the thrower's own settings: spread_angle_deg = "));
  const Result r = run({"solve", "spread", file, "--format", "json"});
  REQUIRE(r.status == 0);
  const auto j = nlohmann::json::parse(r.out);
  const auto& t = j["spreads"][0]["thrower"];
  const double angle = t["spread_angle_deg"].get<double>(), fraction = t["range_fraction"].get<double>();
  // atan(f tan 4 deg) and f * 0.08 for the factor f (strewn/thrower.hpp: sigma_across = D tan(angle)).
  const double f = j["factor"].get<double>();
  CHECK(angle == Approx(std::atan(f * std::tan(4.0 * M_PI / 180)) * 180 / M_PI).epsilon(1e-12));
  CHECK(fraction == Approx(0.08 * f).epsilon(1e-12));
  const std::string dir = std::string(STREWN_TEST_BINARY_DIR) + "/spread_thrower";
  std::filesystem::create_directories(dir);
  std::string text = read_file(file);
  const auto put = [&](const std::string& key, double value) {
    const std::size_t at = text.find(key + " = "), end = text.find('\n', at);
    text.replace(at, end - at, key + " = " + fmt::format("{:.17g}", value));
  };
  put("spread_angle_deg", angle);
  put("range_fraction", fraction);
  std::ofstream(dir + "/at_answer.toml") << text;
  const Result a = run({"assess", dir + "/at_answer.toml", "--format", "json"});
  INFO(a.err << text);
  CHECK(a.status == 0);
  for (const auto& z : nlohmann::json::parse(a.out)["zones"])
    if (z["name"] == "cold frame") {
      const double upper = z["limit"]["compared_upper_bound"].get<double>();
      CHECK(z["limit"]["holds"] == true);
      CHECK(upper <= 1e-2);
      CHECK(upper >= 0.99e-2);  // the answer is the largest factor: the limit binds there
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

// Issue 15 item 5: "no point of the search grid meets every limit" (and clearance's "the limit
// does not hold anywhere in the window") named no limit; answers were printed to nine digits
// without the new position, and --person did not say which limit it used.
TEST_CASE("solve clearance without an answer names the limit and how far over it stays", "[cli][solve]") {
  // The strip's edge at x = 1, sigma 0.5: moved 0.2 m, P = Q(1.2 / 0.5) (Boost.Math's normal).
  const Result table = run({"solve", "clearance", data + "solve_half_plane.toml", "--zone", "strip", "--direction", "1",
                            "0", "--max-move", "0.2"});
  CHECK(table.status == 3);
  const double ratio = boost::math::cdf(boost::math::complement(boost::math::normal(), 1.2 / 0.5)) / 1e-3;
  std::string flat = table.out;
  std::replace(flat.begin(), flat.end(), '\n', ' ');
  CHECK_THAT(flat, Catch::Contains("No answer: no move considered meets the limit of zone 'strip' (0.001 per "
                                   "event): at the largest move, 0.2 m, its upper bound is still " +
                                   fmt::format("{:.3g}", ratio) + " x the limit"));
  const Result json = run({"solve", "clearance", data + "solve_half_plane.toml", "--zone", "strip", "--direction", "1",
                           "0", "--max-move", "0.2", "--format", "json"});
  const auto j = nlohmann::json::parse(json.out);
  CHECK(j["failing_limit"] == "the limit of zone 'strip' (0.001 per event)");
  CHECK(j["failing_ratio"].get<double>() == Approx(ratio).epsilon(1e-9));
}

TEST_CASE("solve spread without an answer names the limit that fails at the smallest factor", "[cli][solve]") {
  // Factors 5 to 10 on sigma 0.5: already at 5, P = Q(1 / 2.5) is 345 times the limit.
  const Result r = run({"solve", "spread", data + "solve_half_plane.toml", "--min-factor", "5", "--max-factor", "10", "--format", "json"});
  CHECK(r.status == 3);
  const auto j = nlohmann::json::parse(r.out);
  const double ratio = boost::math::cdf(boost::math::complement(boost::math::normal(), 1.0 / 2.5)) / 1e-3;
  CHECK(j["failing_limit"] == "the limit of zone 'strip' (0.001 per event)");
  CHECK(j["failing_ratio"].get<double>() == Approx(ratio).epsilon(1e-9));
  const Result table = run({"solve", "spread", data + "solve_half_plane.toml", "--min-factor", "5", "--max-factor", "10"});
  CHECK_THAT(table.out, Catch::Contains("no factor in the range meets the limit of zone 'strip'"));
}

TEST_CASE("solve clearance prints the new position with the digits its tolerance carries", "[cli][solve]") {
  const Result json = run({"solve", "clearance", data + "solve_half_plane.toml", "--zone", "strip", "--direction", "1",
                           "0", "--format", "json"});
  const auto j = nlohmann::json::parse(json.out);
  // The strip's box is centred at (51, 5); moved along +x by the shift.
  CHECK(j["start"][0].get<double>() == 51.0);
  CHECK(j["start"][1].get<double>() == 5.0);
  const double shift = j["shift_m"].get<double>();
  CHECK(j["moved_to"][0].get<double>() == Approx(51.0 + shift).epsilon(1e-15));
  const Result table = run({"solve", "clearance", data + "solve_half_plane.toml", "--zone", "strip", "--direction", "1", "0"});
  // The move rounded up to the tolerance's digits (the limits hold from the answer on), the
  // position from that move.
  const double shown = std::ceil(shift * 1e4) / 1e4;
  CHECK_THAT(table.out, Catch::Contains(fmt::format("Move {:.4f} m: from (51.0000, 5.0000) to ({:.4f}, 5.0000).", shown,
                                                    51.0 + shown)));
  CHECK_THAT(table.out, !Catch::Contains("1.000000"));  // no nine-digit ratios
  // The two ratios at the bracket's ends, 1 to four digits, as 1 minus and plus their gaps.
  const std::size_t there = table.out.find("There risk / limit");
  REQUIRE(there != std::string::npos);
  CHECK_THAT(table.out.substr(there, table.out.find('\n', there) - there),
             Catch::Matches("There risk / limit = 1 - [0-9.e-]+ \\(upper bound\\); at [0-9.]+ m it is 1 \\+ [0-9.e-]+: the limit,"));
  // A finer tolerance carries more digits.
  const Result fine = run({"solve", "clearance", data + "solve_half_plane.toml", "--zone", "strip", "--direction", "1",
                           "0", "--tolerance", "1e-7"});
  CHECK_THAT(fine.out, Catch::Contains(fmt::format("Move {:.7f} m", shift).substr(0, 9)));
}

TEST_CASE("solve clearance --person states the limit it used", "[cli][solve]") {
  const Result plain = run({"solve", "clearance", demo, "--person", "0", "10"});
  CHECK_THAT(plain.out, Catch::Contains("limit used for the person: 1e-06 per year"));
  const Result set = run({"solve", "clearance", demo, "--person", "0", "10", "--limit", "1e-5", "--per", "session",
                          "--format", "json"});
  const auto j = nlohmann::json::parse(set.out);
  CHECK(j["person_limit"]["value"].get<double>() == 1e-5);
  CHECK(j["person_limit"]["per"] == "session");
  // A zone's own limit is in the file: no person limit is mentioned.
  CHECK_THAT(run({"solve", "clearance", data + "solve_half_plane.toml", "--zone", "strip"}).out,
             !Catch::Contains("limit used for the person"));
}

TEST_CASE("solve spread under student_t and uniform spreads: the limit holds at the factor and fails beyond",
          "[cli][solve][family]") {
  // The t's heavy tail reaches the bench 10 sigma out. Every spread scaled by the factor found
  // (families kept) must meet the bench's limit, and scaled by factor_fails must not, judged by
  // assess of the scaled site (upper bounds, as solve judges).
  const Result r = run({"solve", "spread", data + "heavy_tail_families.toml", "--format", "json"});
  INFO(r.err);
  REQUIRE(r.status == 0);
  const auto j = nlohmann::json::parse(r.out);
  REQUIRE(j["found"] == true);
  const strewn::Site s = strewn::load_site(data + "heavy_tail_families.toml");
  const auto bench_at = [&](double factor) {
    std::vector<strewn::Source> sources = s.sources;
    for (strewn::Source& src : sources) {
      std::vector<strewn::WeightedGaussian> parts = src.model.components();
      for (auto& c : parts) c.gaussian = c.gaussian.scaled(factor);
      src.model = strewn::ScatterModel::mixture(parts);
    }
    const strewn::ZoneResult z = strewn::assess_zone(s.zones[1], sources, s.options);
    return std::pair<double, double>{z.total_per_session, z.total_per_session_err};
  };
  REQUIRE(s.sources[0].model.components()[0].gaussian.family().kind() == strewn::FamilyKind::student_t);
  const auto [p_ok, e_ok] = bench_at(j["factor"].get<double>());
  CHECK(p_ok + e_ok <= 0.05);
  const auto [p_bad, e_bad] = bench_at(j["factor_fails"].get<double>());
  CHECK(p_bad + e_bad > 0.05);
}

// solve release (strewn/release.hpp) on a vacuum drop, where everything has a closed form:
// elementary kinematics (t = sqrt(2 h / g), drift v t) and the normal tail Q from Boost.Math.
TEST_CASE("solve release centres a vacuum drop on its target and finds the largest height from Q", "[cli][solve][release]") {
  const Result r = run({"solve", "release", data + "release_vacuum.toml", "--format", "json"});
  INFO(r.err);
  REQUIRE(r.status == 0);
  const auto j = nlohmann::json::parse(r.out);
  const double g = 9.80665, t20 = std::sqrt(2.0 * 20.0 / g);
  // The drift is v t(h) north, so the release is that far south of the target.
  CHECK(j["release_m"][0].get<double>() == Approx(0.0).margin(1e-9));
  CHECK(j["release_m"][1].get<double>() == Approx(-10.0 * t20).epsilon(1e-9));
  CHECK(j["drift_m"][1].get<double>() == Approx(10.0 * t20).epsilon(1e-9));
  CHECK(j["limits_hold_at_release"].get<bool>());

  // Along the track the landing's standard deviation is s(h) = sqrt(0.5^2 + (1 m/s t(h))^2); the
  // strip's limit 1e-3 holds while Q(10 / s(h)) <= 1e-3, i.e. up to t^2 = (10 / z)^2 - 0.25,
  // h = g t^2 / 2 (a linear map of normal inputs: the unscented transform is exact here).
  const Result v = run({"solve", "release", data + "release_vacuum.toml", "--vary", "height", "--format", "json"});
  INFO(v.err);
  REQUIRE(v.status == 0);
  const auto k = nlohmann::json::parse(v.out);
  const double t2 = std::pow(10.0 / z_999(), 2) - 0.25, h = g * t2 / 2.0;
  REQUIRE(k["found"].get<bool>());
  CHECK(k["spread"].get<std::string>().find("normal") == 0);
  CHECK(k["largest"].get<double>() <= h + 1e-6);       // conservative: compared with upper bounds
  CHECK(k["largest"].get<double>() >= h - 0.011);      // the default tolerance, 0.01 m
  CHECK(k["limiting_zone"] == "north strip");
  CHECK(k["release_at_largest_m"][1].get<double>() == Approx(-10.0 * std::sqrt(2.0 * k["largest"].get<double>() / g)).epsilon(1e-9));

  // The table says what is solved for before the answer, and gives it in the scenario's unit.
  const Result table = run({"solve", "release", data + "release_vacuum.toml", "--vary", "height"});
  CHECK(table.out.find("the release point that puts the mean landing on the target") != std::string::npos);
  CHECK(table.out.find("Largest height: ") != std::string::npos);
}

TEST_CASE("solve release exits 3 naming the limit that no release, height or wind keeps", "[cli][solve][release]") {
  const Result r = run({"solve", "release", data + "release_impossible.toml"});
  CHECK(r.status == 3);
  CHECK(r.out.find("No answer: the limit of zone 'pond' (1e-06 per event)") != std::string::npos);
  const Result w = run({"solve", "release", data + "release_impossible.toml", "--vary", "wind", "--steps", "4"});
  CHECK(w.status == 3);
  CHECK(w.out.find("meets the limit of zone 'pond'") != std::string::npos);
  // A source that is no drop, and a window out of order, are refused naming the option.
  const Result n = run({"solve", "release", data + "solve_half_plane.toml"});
  CHECK(n.status == 2);
  CHECK(n.err.find("no source is a drop from flight") != std::string::npos);
  const Result o = run({"solve", "release", data + "release_vacuum.toml", "--vary", "height", "--least", "50", "--most", "10"});
  CHECK(o.status == 2);
  CHECK(o.err.find("--least/--most") != std::string::npos);
}

// Issue 15 item 5: a solve that may be long says so before it runs most of its evaluations; a
// quick one says nothing (the estimate comes from the engine's EstimateFn, tested in
// tests/engine/site/design_test.cpp; here its wording).
TEST_CASE("solve's estimate is one line on stderr from one second on, none below", "[cli][solve][work]") {
  strewn::WorkEstimate slow{"solve aim: about 1809 evaluations of the limits", 1809.0, 0.02};
  CHECK(strewn::cli::estimate_line(slow, 3) ==
        "strewn: solve aim: about 1809 evaluations of the limits; expect about 36 s (timed on the first 3)\n");
  slow.seconds_per_unit = 0.2;
  CHECK_THAT(strewn::cli::estimate_line(slow, 3), Catch::Contains("expect about 6 min"));
  const strewn::WorkEstimate quick{"solve spread: about 241 evaluations of the limits", 241.0, 1e-4};
  CHECK(strewn::cli::estimate_line(quick, 3).empty());
  // Through the command, whose stderr here is not a terminal: no estimate line, ever (it would
  // depend on the machine's load).
  const Result r = run({"solve", "spread", demo, "--format", "json"});
  INFO(r.err);
  CHECK(r.err.find("expect about") == std::string::npos);
}

// `strewn solve spacing` on the demo pitch (shapes/sports_pitch_rotors.toml): the answer and the
// spacing just beyond it are checked by separate `strewn deposition` runs of the demo with that
// spacing typed in, CU and DU computed here from the cans by their definitions:
//   CU = 100 (1 - sum |x_i - mean| / sum x_i)            (Christiansen 1942, Univ. of California
//                                                         Agricultural Experiment Station Bulletin 670)
//   DU = 100 mean(lowest quarter of the cans) / mean      (the low-quarter distribution uniformity)
// and the keep-out litres per run as the deposition prints them, scaled to the run that applies
// the target depth (upper bounds on both).
namespace {

const std::string kPitch = STREWN_SOURCE_DIR "/shapes/sports_pitch_rotors.toml";

struct PitchFigures {
  double cu = 0.0, du = 0.0;
  std::size_t heads = 0;
  std::map<std::string, double> keep_out_upper;  // litres per run
};

PitchFigures pitch_at(double spacing_m, const std::string& name) {
  std::string text = read_file(kPitch);
  const auto replace = [&](const std::string& from, const std::string& to) {
    const std::size_t at = text.find(from);
    REQUIRE(at != std::string::npos);
    text.replace(at, from.size(), to);
  };
  replace("spacing = \"head-to-head\"", fmt::format("spacing = {:.17g}", spacing_m));
  replace("\"field_data/rotor_profile.csv\"", "\"" STREWN_SOURCE_DIR "/shapes/field_data/rotor_profile.csv\"");
  const std::string path = std::string(STREWN_TEST_BINARY_DIR) + "/" + name + ".toml";
  std::ofstream(path) << text;
  const Result r = run({"deposition", path, "--format", "json"});
  REQUIRE(r.status == 0);
  const auto j = nlohmann::json::parse(r.out);
  std::vector<double> x;
  for (const auto& c : j["cans"]) x.push_back(c["depth"].get<double>());
  std::sort(x.begin(), x.end());
  double sum = 0.0, dev = 0.0, low = 0.0;
  for (double v : x) sum += v;
  const double mean = sum / static_cast<double>(x.size());
  for (double v : x) dev += std::fabs(v - mean);
  const std::size_t quarter = x.size() / 4;  // 96 cans: 24
  for (std::size_t i = 0; i < quarter; ++i) low += x[i];
  PitchFigures f;
  f.cu = 100.0 * (1.0 - dev / sum);
  f.du = 100.0 * (low / static_cast<double>(quarter)) / mean;
  f.heads = j["heads"].size();
  const double run_share = (j["run_time"]["minutes"].get<double>() + j["run_time"]["minutes_err"].get<double>()) / 60.0 /
                           j["hours"].get<double>();
  for (const auto& z : j["zones"])
    if (z["role"] == "keep_out")
      f.keep_out_upper[z["name"].get<std::string>()] = run_share * (z["amount"].get<double>() + z["amount_err"].get<double>());
  return f;
}

bool meets(const PitchFigures& f, double min_cu, double min_du, double max_litres) {
  bool ok = f.cu >= min_cu && f.du >= min_du;
  for (const auto& [zone, litres] : f.keep_out_upper) ok = ok && litres <= max_litres;
  return ok;
}

}  // namespace

TEST_CASE("solve spacing: every limit holds at the answer and one fails just beyond it", "[cli][solve][spacing]") {
  const double min_cu = 80.0, min_du = 75.0, max_litres = 60.0;
  const Result r = run({"solve", "spacing", kPitch, "--min-cu", "80", "--min-du", "75", "--max-water-per-zone", "60", "--most",
                        "2", "--format", "json"});
  REQUIRE(r.status == 0);
  const auto j = nlohmann::json::parse(r.out);
  REQUIRE(j["found"] == true);
  REQUIRE(j.contains("beyond"));
  const double answer = j["answer"]["spacing_m"].get<double>(), beyond = j["beyond"]["spacing_m"].get<double>();
  CHECK(beyond > answer);
  CHECK(beyond - answer <= 0.01);  // the default tolerance
  const PitchFigures at = pitch_at(answer, "spacing_answer");
  const PitchFigures past = pitch_at(beyond, "spacing_beyond");
  CHECK(meets(at, min_cu, min_du, max_litres));
  CHECK_FALSE(meets(past, min_cu, min_du, max_litres));
  // What the solver printed is what the separate runs give.
  CHECK(j["answer"]["cu_percent"].get<double>() == Approx(at.cu).epsilon(1e-9));
  CHECK(j["answer"]["du_percent"].get<double>() == Approx(at.du).epsilon(1e-9));
  CHECK(j["answer"]["heads"].get<std::size_t>() == at.heads);
  CHECK(j["beyond"]["heads"].get<std::size_t>() == past.heads);
}

TEST_CASE("solve spacing finds the largest passing spacing when a keep-out limit fails at small ones", "[cli][solve][spacing]") {
  // Close heads put more water over the pitch's edge onto the footpath: at 0.3 x the radius
  // the footpath limit fails, so the answer lies above the smallest spacing tried.
  const Result r = run({"solve", "spacing", kPitch, "--max-water-per-zone", "60", "--most", "1", "--format", "json"});
  REQUIRE(r.status == 0);
  const auto j = nlohmann::json::parse(r.out);
  const PitchFigures small = pitch_at(0.3 * 15.0, "spacing_small");
  CHECK_FALSE(meets(small, 0.0, 0.0, 60.0));
  CHECK(meets(pitch_at(j["answer"]["spacing_m"].get<double>(), "spacing_large"), 0.0, 0.0, 60.0));
}

TEST_CASE("solve spacing exits 3 naming the limit that fails even at the smallest spacing", "[cli][solve][spacing]") {
  const Result du = run({"solve", "spacing", kPitch, "--min-du", "99"});
  CHECK(du.status == 3);
  CHECK_THAT(du.out, Catch::Contains("DU >= target cannot be met"));
  const Result path = run({"solve", "spacing", kPitch, "--max-water-per-zone", "15", "--format", "json"});
  CHECK(path.status == 3);
  const auto j = nlohmann::json::parse(path.out);
  CHECK(j["found"] == false);
  CHECK_THAT(j["why"].get<std::string>(), Catch::Contains("litres on zone 'footpath'"));
}

TEST_CASE("solve spacing rejects an unknown layout or no limit with exit 2", "[cli][solve][spacing]") {
  const Result layout = run({"solve", "spacing", kPitch, "--layout", "pitch rotor", "--min-cu", "80"});
  CHECK(layout.status == 2);
  CHECK_THAT(layout.err, Catch::Contains("--layout") && Catch::Contains("did you mean 'pitch rotors'"));
  CHECK(layout.out.empty());
  const Result none = run({"solve", "spacing", kPitch});
  CHECK(none.status == 2);
  CHECK_THAT(none.err, Catch::Contains("--min-cu, --min-du or --max-water-per-zone"));
}

namespace {

// The demo pitch written in US units: every length in feet (x / 0.3048), the target depth in
// inches (/ 25.4), the flow kept in its stated L/min and the profile CSV in its stated metres.
// The same physical site, so every answer must agree with the metric one after the exact
// conversions (NIST SP 811, 2008, appendix B.8: ft = 0.3048 m, in = 25.4 mm, US gal =
// 3.785411784 L).
std::string pitch_in_feet() {
  const auto ft = [](double m) { return fmt::format("{:.17g}", m / 0.3048); };
  const std::string path = std::string(STREWN_TEST_BINARY_DIR) + "/pitch_in_feet.toml";
  std::ofstream f(path);
  f << "[site]\nname = \"pitch in feet\"\nunits = \"us\"\n\n[deposition]\nhours = 1.0\ntarget_depth = "
    << fmt::format("{:.17g}", 10.0 / 25.4) << "\nsite_boundary = \"pitch\"\ncatch_grid = { origin = [" << ft(2.5) << ", " << ft(2.5)
    << "], spacing = " << ft(5.0) << ", columns = 12, rows = 8, can_diameter = " << ft(0.15) << " }\n\n"
    << "[[layout]]\nname = \"pitch rotors\"\nzone = \"pitch\"\npattern = \"square\"\nspacing = \"head-to-head\"\nradius = " << ft(15.0)
    << "\nflow = 28.0\nflow_unit = \"L/min\"\nprofile = \"" << STREWN_SOURCE_DIR << "/shapes/field_data/rotor_profile.csv\"\n";
  const auto rect = [&](const char* name, const char* role, double cx, double cy, double w, double d) {
    f << "\n[[zone]]\nname = \"" << name << "\"\nrole = \"" << role << "\"\nshape = \"rectangle\"\nparams = { centre = [" << ft(cx)
      << ", " << ft(cy) << "], width = " << ft(w) << ", depth = " << ft(d) << " }\n";
  };
  rect("pitch", "target", 30.0, 20.0, 60.0, 40.0);
  rect("footpath", "keep_out", 30.0, -1.5, 80.0, 2.0);
  rect("pavilion windows", "keep_out", 52.0, 41.5, 12.0, 1.0);
  return path;
}

}  // namespace

TEST_CASE("solve spacing in a US site: gallons and feet give the metric answer; the former option keeps litres",
          "[cli][solve][spacing][units]") {
  const double gallon = 3.785411784, foot = 0.3048;
  const Result metric = run({"solve", "spacing", kPitch, "--min-cu", "80", "--max-water-per-zone", "60", "--most", "2", "--format", "json"});
  const std::string feet = pitch_in_feet();
  const Result us = run({"solve", "spacing", feet, "--min-cu", "80", "--max-water-per-zone", fmt::format("{:.17g}", 60.0 / gallon), "--most", "2",
                         "--tolerance", fmt::format("{:.17g}", 0.01 / foot), "--format", "json"});
  REQUIRE(metric.status == 0);
  REQUIRE(us.status == 0);
  const auto m = nlohmann::json::parse(metric.out), u = nlohmann::json::parse(us.out);
  CHECK(u["units"]["length"] == "ft");
  for (const char* at : {"answer", "beyond"}) {
    INFO(at);
    CHECK(u[at]["spacing_ft"].get<double>() * foot == Approx(m[at]["spacing_m"].get<double>()).epsilon(1e-9));
    CHECK(u[at]["heads"] == m[at]["heads"]);
    CHECK(u[at]["cu_percent"].get<double>() == Approx(m[at]["cu_percent"].get<double>()).epsilon(1e-9));
    REQUIRE(u[at]["limits"].size() == m[at]["limits"].size());
    for (std::size_t k = 0; k < m[at]["limits"].size(); ++k) {
      const auto &a = m[at]["limits"][k], &b = u[at]["limits"][k];
      const double to_metric = a["unit"] == "L" ? gallon : 1.0;
      CHECK(b["unit"] == (a["unit"] == "L" ? "gal" : "%"));
      CHECK(b["value"].get<double>() * to_metric == Approx(a["value"].get<double>()).epsilon(1e-9));
      CHECK(b["target"].get<double>() * to_metric == Approx(a["target"].get<double>()).epsilon(1e-12));
    }
  }
  CHECK_THAT(u["answer"]["limits"][1]["limit"].get<std::string>(), Catch::Contains("US gallons on zone 'footpath'"));
  // The former name, in litres in either site, with a warning; both names together are refused.
  const Result former = run({"solve", "spacing", feet, "--min-cu", "80", "--max-litres-per-zone", "60", "--most", "2", "--tolerance",
                             fmt::format("{:.17g}", 0.01 / foot), "--format", "json"});
  REQUIRE(former.status == 0);
  CHECK_THAT(former.err, Catch::Contains("--max-litres-per-zone is the former name of --max-water-per-zone"));
  CHECK(nlohmann::json::parse(former.out)["answer"] == u["answer"]);
  const Result both = run({"solve", "spacing", kPitch, "--max-litres-per-zone", "60", "--max-water-per-zone", "60"});
  CHECK(both.status == 2);
  CHECK(both.out.empty());
}

TEST_CASE("solve clearance on a UTM site names the mean impact point to the millimetre", "[cli][solve][position_text]") {
  // The trial's file: mean (512350.5, 5403712.25) in EPSG:32633 metres. "%g" printed
  // (512350, 5.40371e+06): 0.5 m and 2.25 m off.
  const Result r = run({"solve", "clearance", data + "utm/mean_only.toml", "--zone", "yard"});
  INFO(r.err);
  REQUIRE(r.status == 0);
  CHECK_THAT(r.out, Catch::Contains("away from the mean impact point (512350.5, 5403712.25) m"));
  CHECK_THAT(r.out, !Catch::Contains("e+06"));
}

// A design answer printed past the failing point: "Largest factor 0.36832" from 0.3683165372
// with the limit failing at 0.3683165372 (found by a new user's trial). Every printed answer is
// rounded towards the side where the limits hold.
TEST_CASE("solve's printed answers are rounded towards the side where every limit holds", "[cli][solve]") {
  const auto number_after = [](const std::string& text, const std::string& words) {
    const std::size_t at = text.find(words);
    REQUIRE(at != std::string::npos);
    return std::stod(text.substr(at + words.size()));
  };
  for (const std::string& scenario : {data + "solve_half_plane.toml", demo}) {
    INFO(scenario);
    const Result json = run({"solve", "spread", scenario, "--format", "json"});
    const Result table = run({"solve", "spread", scenario});
    REQUIRE(json.status == 0);
    const auto j = nlohmann::json::parse(json.out);
    REQUIRE(j["holds_over_whole_window"] == false);
    const double factor = j["factor"].get<double>(), fails = j["factor_fails"].get<double>();
    const double shown = number_after(table.out, "Largest factor on the spread of every source: ");
    CHECK(shown <= factor);
    CHECK(shown > factor * (1 - 1e-4));  // five significant digits
    CHECK(number_after(table.out, "(at ") >= fails);
  }
  const Result json = run({"solve", "spacing", kPitch, "--min-cu", "80", "--min-du", "75", "--max-water-per-zone", "60",
                           "--most", "2", "--format", "json"});
  const Result table = run({"solve", "spacing", kPitch, "--min-cu", "80", "--min-du", "75", "--max-water-per-zone", "60",
                            "--most", "2"});
  const auto j = nlohmann::json::parse(json.out);
  REQUIRE(j["found"] == true);
  CHECK(number_after(table.out, "Largest spacing meeting every limit: ") <= j["answer"]["spacing_m"].get<double>());
  CHECK(number_after(table.out, "Just beyond it, a limit fails at ") >= j["beyond"]["spacing_m"].get<double>());
}

TEST_CASE("solve release: the printed height or wind and release point, put back in the scenario, keep every limit",
          "[cli][solve][release]") {
  // A second hostile trial: "Largest height: 26.3794 m ... released over (-2.246, 4.23) m" put
  // back in the demo gave the neighbour's garden 1.000094 x its limit (the release point at the
  // millimetre, on an answer that sits on its limit); now to 0.1 mm, and every limit holds.
  const std::string demo_text = read_file(std::string(STREWN_SOURCE_DIR) + "/shapes/drone_drop_flight.toml");
  for (const std::string vary : {"height", "wind"}) {
    INFO(vary);
    const Result table = run({"solve", "release", std::string(STREWN_SOURCE_DIR) + "/shapes/drone_drop_flight.toml", "--vary", vary});
    REQUIRE(table.status == 0);
    const std::string flat = std::regex_replace(table.out, std::regex("\\s+"), " ");
    std::smatch m;
    REQUIRE(std::regex_search(flat, m, std::regex("Largest [a-z ]+: ([0-9.]+) .*released over \\(([-0-9.]+), ([-0-9.]+)\\) m")));
    std::string text = demo_text;
    text = std::regex_replace(text, std::regex("release = \\[-1\\.5, 4\\.7\\]"), "release = [" + m[2].str() + ", " + m[3].str() + "]");
    if (vary == "height") text = std::regex_replace(text, std::regex("  height = 25\\.0 "), "  height = " + m[1].str() + " ");
    else text = std::regex_replace(text, std::regex("wind = \\{ speed = 3\\.5,"), "wind = { speed = " + m[1].str() + ",");
    REQUIRE(text != demo_text);
    std::ofstream(std::string(STREWN_TEST_BINARY_DIR) + "/release_put_back.toml") << text;
    const Result check = run({"assess", std::string(STREWN_TEST_BINARY_DIR) + "/release_put_back.toml"});
    INFO(text);
    CHECK(check.status == 0);
    CHECK_THAT(check.out, Catch::Contains("All limits hold."));
  }
  // Beyond what a scenario may state (wind to 200 m/s, height to 1e5 m): refused, not "every limit
  // holds up to 1000 m/s" (the limit fails at 4.3 m/s) nor a scan for minutes.
  const std::string flight = std::string(STREWN_SOURCE_DIR) + "/shapes/drone_drop_flight.toml";
  const Result wind = run({"solve", "release", flight, "--vary", "wind", "--most", "1000", "--steps", "2"});
  CHECK(wind.status == 2);
  CHECK_THAT(wind.err, Catch::Contains("--least/--most/--steps: release: the wind speeds considered must satisfy 0 <= least < most <= 200 m/s"));
  const Result height = run({"solve", "release", flight, "--vary", "height", "--most", "1e6", "--steps", "2"});
  CHECK(height.status == 2);
  CHECK_THAT(height.err, Catch::Contains("--most: must be a number above 0, at most 1e5"));
}

TEST_CASE("solve: values that overflow or underflow are refused with the option's name, not an internal error",
          "[cli][solve][errors]") {
  // From a second hostile trial: NaN probabilities ("internal error") at a spread factor of
  // 1e-300 or a half-width of 1e300, a direction (1e308, 1e308) taken as (0, 0), and "Value 0
  // not in range 0.000000 to 1.8e+308".
  struct Case {
    std::vector<std::string> args;
    std::string says;
  };
  for (const Case& c : std::vector<Case>{
           {{"solve", "spread", demo, "--min-factor", "1e-300"}, "--min-factor: must be a number from 1e-6 to 1e6 (got '1e-300')"},
           {{"solve", "aim", demo, "--source", "league thrower", "--search-half-width", "1e300"},
            "--search-half-width: must be a number above 0, at most 1e9"},
           {{"solve", "clearance", demo, "--zone", "serving hatch", "--max-move", "0"}, "--max-move: must be a number above 0, at most 1e9 (got '0')"},
           {{"solve", "clearance", demo, "--zone", "serving hatch", "--tolerance", "100"},
            "--tolerance: clearance: the tolerance must be above 0 and at most the largest move"},
           // Options of another mode, silently ignored before.
           {{"solve", "clearance", demo, "--zone", "serving hatch", "--limit", "1e-3"}, "--limit: goes with --person"},
           {{"solve", "release", std::string(STREWN_SOURCE_DIR) + "/shapes/drone_drop_flight.toml", "--least", "5"},
            "--least: goes with --vary height or --vary wind"},
           // A keep-out zone as the target had its hits maximised.
           {{"solve", "aim", demo, "--source", "league thrower", "--target", "spectator bench"},
            "--target: aim: zone 'spectator bench' is a keep-out zone"}}) {
    const Result r = run(c.args);
    INFO(c.says << ": " << r.err);
    CHECK(r.status == 2);
    CHECK_THAT(r.err, Catch::Contains(c.says));
    CHECK(std::count(r.err.begin(), r.err.end(), '\n') == 1);
  }
  const Result huge = run({"solve", "clearance", demo, "--zone", "serving hatch", "--direction", "1e308", "1e308", "--format", "json"});
  REQUIRE(huge.status == 0);
  const auto j = nlohmann::json::parse(huge.out);
  CHECK(j["direction"][0].get<double>() == Approx(std::sqrt(0.5)).epsilon(1e-12));
}

TEST_CASE("solve on a fitted source says the answer is on the fitted spread and how to check it on the data",
          "[cli][solve]") {
  // A second hostile trial: an aim solved on fitted sources held in assess, and assess
  // --uncertainty then said for every limit that the data do not show it; solve said nothing.
  const Result table = run({"solve", "spread", data + "fitted_source.toml"});
  INFO(table.err);
  REQUIRE((table.status == 0 || table.status == 3));
  const std::string flat = std::regex_replace(table.out, std::regex("\\s+"), " ");
  CHECK_THAT(flat, Catch::Contains("This answer is on the fitted spread; put it in the scenario and run `strewn assess FILE "
                                   "--uncertainty`"));
  const Result json = run({"solve", "spread", data + "fitted_source.toml", "--format", "json"});
  CHECK(nlohmann::json::parse(json.out).contains("fitted_sources_note"));
  CHECK_THAT(run({"solve", "spread", demo}).out, !Catch::Contains("Fitted sources"));
  CHECK_FALSE(nlohmann::json::parse(run({"solve", "spread", demo, "--format", "json"}).out).contains("fitted_sources_note"));
}
