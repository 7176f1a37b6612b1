// The strewn command end to end, in-process through run_cli(): the demo, a case with a closed
// form, exit statuses, output formats, and every class of bad input.
#include <boost/math/distributions/non_central_chi_squared.hpp>
#include <boost/math/distributions/normal.hpp>
#include <catch2/catch.hpp>
#include <random>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <sstream>

#include "assessment.hpp"
#include "map_command.hpp"
#include "run_cli.hpp"
#include "strewn/integrate.hpp"

namespace {

struct Result {
  int status;
  std::string out, err;
};

Result run(std::vector<std::string> args) {
  args.insert(args.begin(), "strewn");
  std::vector<const char*> argv;
  for (const auto& a : args) argv.push_back(a.c_str());
  std::ostringstream out, err;
  const int status = strewn::cli::run_cli(static_cast<int>(argv.size()), argv.data(), out, err);
  return {status, out.str(), err.str()};
}

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
           {"missing_geometry_file.toml", "cannot read '" + data + "geometry/nowhere.wkt'"},
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

TEST_CASE("assess --format json matches the golden outputs", "[cli][golden]") {
  // Golden files pin every number of the demos and of the placement check. After a deliberate
  // change, regenerate them with STREWN_UPDATE_GOLDEN=1 and review the diff before committing.
  const bool update = std::getenv("STREWN_UPDATE_GOLDEN") != nullptr;
  for (const std::string& file :
       {std::string(STREWN_SOURCE_DIR "/shapes/throwing_lane.toml"), std::string(STREWN_SOURCE_DIR "/shapes/lawn_sprinkler.toml"),
        std::string(STREWN_SOURCE_DIR "/shapes/drone_drop.toml"), data + "placed_zones.toml"}) {
    const Result r = run({"assess", file, "--format", "json"});
    INFO(file << ": " << r.err);
    REQUIRE((r.status == 0 || r.status == 3));
    nlohmann::json got = nlohmann::json::parse(r.out);
    strip_local(got);
    const std::string golden = STREWN_TEST_DATA_DIR "/golden/" + std::filesystem::path(file).stem().string() + ".json";
    if (update) std::ofstream(golden) << got.dump(2) << "\n";
    std::ifstream in(golden);
    REQUIRE(in.good());
    compare(got, nlohmann::json::parse(in), std::filesystem::path(golden).filename().string());
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
  CHECK(j["risk_over_limit_at_shift"].get<double>() <= 1.0);
  CHECK(j["risk_over_limit_just_short"].get<double>() > 1.0);
  // Default direction: away from the mean impact point, here +x too.
  const auto d = nlohmann::json::parse(
      run({"solve", "clearance", data + "solve_half_plane.toml", "--zone", "strip", "--format", "json"}).out);
  CHECK(d["direction"][0].get<double>() == Approx(1.0).margin(1e-3));
  // No answer within a window that is too short: exit 3 and the reason.
  const Result none = run({"solve", "clearance", data + "solve_half_plane.toml", "--zone", "strip", "--direction",
                           "1", "0", "--window", "0.2"});
  CHECK(none.status == 3);
  CHECK_THAT(none.out, Catch::Contains("No answer"));
  // Moving the source instead, the other way, gives the same distance.
  const auto src = nlohmann::json::parse(run({"solve", "clearance", data + "solve_half_plane.toml", "--source",
                                              "thrower", "--direction", "-1", "0", "--format", "json"})
                                             .out);
  CHECK(src["shift_m"].get<double>() == Approx(shift).margin(2e-4));
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
  CHECK(x == Approx(x_max).margin(2e-3));
  CHECK(y == Approx(5.0).margin(2e-3));
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
    CHECK(j["grid"]["cu_percent"].get<double>() > 0.0);
    CHECK(j["off_site"]["fraction"].get<double>() > 0.0);
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
  const strewn::ShapeRegistry shapes = strewn::ShapeRegistry::with_default_search_path({});
  const strewn::cli::Scenario s = strewn::cli::load_scenario(demo, shapes);
  strewn::cli::MapRequest r;
  r.cells = 24;
  r.per = "year";
  const strewn::cli::MapResult m = strewn::cli::make_risk_map(s, shapes, r, {});
  const strewn::GridSpec& g = m.map.grid;
  for (const auto& [i, j] : std::vector<std::pair<int, int>>{{3, 4}, {12, 12}, {20, 7}, {0, 0}}) {
    const strewn::Vec2 c = g.centre(i, j);
    strewn::cli::Zone person;
    person.name = "person";
    person.limit = 1.0;
    person.limit_per = strewn::cli::LimitPer::year;
    person.region = shapes.build("person", "{\"centre\": [" + std::to_string(c.x()) + ", " + std::to_string(c.y()) + "]}");
    const strewn::cli::ZoneResult z = strewn::cli::assess_zone(person, s.sources, s.options);
    INFO(i << ", " << j);
    // std::to_string keeps 6 decimals: the placed footprint may differ by 5e-7 m; the field's
    // slope is below 1e2 per m here, so 1e-6 relative covers it.
    CHECK(m.map.at(i, j) == Approx(z.total_per_year).epsilon(1e-4));
  }
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

// ---- Issue 13: intervals that cover, design answers that keep every limit, one per-event
// definition for maps and limits.

#include "strewn/risk_map.hpp"
#include "uncertainty_coverage.hpp"

TEST_CASE("--uncertainty covers at 95% for far zones at n = 12 and 40 (seeded simulation)", "[cli][uncertainty]") {
  // 1500 data sets of n impacts from a known elliptical normal (axes 1 and 0.6 m at 30 deg), each
  // fitted and passed through assess_uncertainty (200 replicates); zones are half-planes at true
  // p = 1e-2 (along the major axis) and 1e-4 (along the minor axis, the side where the old
  // percentile bootstrap of the fitted normal missed most). Truths from integrate() on the model.
  // Method: generalised pivotal quantities (uncertainty.hpp). The old percentile bootstrap gave
  // 89.3-94.2% two-sided (misses above 4.9-10.5%) and 86.0-92.2% for its 95% quantile here
  // (strewn_uncertainty_coverage, 2000 data sets, 1000 replicates); here 95.0-95.3% two-sided.
  // The binomial s.e. is 0.56%.
  const strewn::Gaussian truth = strewn::Gaussian::from_axes({0.0, 0.0}, 1.0, 0.6, 30.0);
  for (std::uint64_t n : {12u, 40u}) {
    const auto r = strewn::coverage::simulate(
        truth, {strewn::coverage::half_plane(truth, 30.0, 1e-2), strewn::coverage::half_plane(truth, 120.0, 1e-4)}, n,
        1500, 200, 0.95, 1000 + n);
    for (const auto& z : r.zones) {
      INFO("n " << n << ", " << z.name << ", p " << z.p_true << ": inside " << z.inside << ", below " << z.below
                << ", above " << z.above << ", under the upper bound " << z.under_upper);
      CHECK(z.p_true == Approx(z.name.find("120") != std::string::npos ? 1e-4 : 1e-2).epsilon(1e-6));
      CHECK(z.inside >= 0.94 * r.data_sets);
      CHECK(z.under_upper >= 0.94 * r.data_sets);
      CHECK(z.above <= 0.04 * r.data_sets);  // the unsafe side: truth above the interval
    }
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
  strewn::cli::Scenario s;
  strewn::cli::Source a, b;
  a.name = "west";
  a.model = strewn::Gaussian::from_axes({-1.0, 0.0}, 0.8, 0.8, 0.0);
  b.name = "east";
  b.model = strewn::Gaussian::from_axes({1.0, 0.0}, 0.8, 0.8, 0.0);
  s.sources = {a, b};
  strewn::cli::Zone spot;
  spot.name = "spot";
  spot.region = strewn::coverage::disk({0.0, 2.0}, 0.3);
  spot.limit = 0.002;  // each source gives 0.00156 here
  spot.limit_per = strewn::cli::LimitPer::event;
  const strewn::cli::ZoneResult zr = strewn::cli::assess_zone(spot, s.sources, s.options);
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
