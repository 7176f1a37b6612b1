// Reading a site (strewn/site_io.hpp): values from each table, and one located line per mistake.
#include <catch2/catch.hpp>
#include <unistd.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <string>

#include "strewn/input_file.hpp"
#include "strewn/error.hpp"
#include "strewn/site_io.hpp"

namespace {

const std::string kSite = R"([site]
name = "yard"

[settings]
tolerance = 1e-9

[[source]]
name = "nozzle"
aim = [1.0, 2.0]
bias = [0.5, 0.0]
spread = { sigma_major = 2.0, sigma_minor = 1.0, angle_deg = 30.0 }
events_per_session = 12
sessions_per_year = 50

[[zone]]
name = "path"
role = "keep_out"
shape = "rectangle"
params = { centre = [5.0, 0.0], width = 1.0, depth = 4.0 }
limit = 1e-3
limit_per = "year"
occupancy = 0.5
)";

std::string error_of(const std::string& text) {
  try {
    (void)strewn::load_site_text(text, "yard.toml", strewn::ShapeRegistry::with_default_search_path({}));
  } catch (const strewn::input_error& e) {
    return e.what();
  }
  return "";
}

}  // namespace

TEST_CASE("every table is read into plain values", "[site][io]") {
  const strewn::Site s = strewn::load_site_text(kSite, "yard.toml", strewn::ShapeRegistry::with_default_search_path({}));
  CHECK(s.site_name == "yard");
  CHECK(s.options.rel_tolerance == 1e-9);
  REQUIRE(s.sources.size() == 1);
  CHECK(s.sources[0].aim == strewn::Vec2(1.0, 2.0));
  CHECK(s.sources[0].model.components().front().gaussian.mean().isApprox(strewn::Vec2(1.5, 2.0)));
  CHECK(s.sources[0].exposure().events(strewn::Period::year) == 600.0);
  REQUIRE(s.zones.size() == 1);
  CHECK(s.zones[0].role == strewn::Role::keep_out);
  CHECK(*s.zones[0].limit == 1e-3);
  CHECK(s.zones[0].limit_per == strewn::Period::year);
  CHECK(*s.zones[0].occupancy == 0.5);
  CHECK(s.input_files == std::vector<std::string>{"yard.toml"});
}

TEST_CASE("a source given only its mean is aimed at it (bias 0), also on a projected site far from the origin",
          "[site][io][aim]") {
  const auto& shapes = strewn::ShapeRegistry::with_default_search_path({});
  // UTM zone 33N coordinates (x ~ 5e5 m, y ~ 5.4e6 m): an aim defaulting to the origin would
  // put a bias of 5.4e6 m on the source and the origin into every extent.
  const std::string head = "[site]\nname = \"far\"\n[[source]]\nname = \"edge\"\nmean = [512350.5, 5403712.25]\n"
                           "spread = { sigma_major = 2.0, sigma_minor = 0.05, angle_deg = 30 }\n";
  const std::string zone = "[[zone]]\nname = \"yard\"\nrole = \"keep_out\"\nshape = \"rectangle\"\n"
                           "params = { centre = [512350.5, 5403717.25], width = 10, depth = 10 }\n";
  const strewn::Site s = strewn::load_site_text(head + zone, "far.toml", shapes);
  const strewn::Vec2 mean(512350.5, 5403712.25);
  CHECK(s.sources[0].aim == mean);
  CHECK(s.sources[0].model.components().front().gaussian.mean() == mean);
  const strewn::BoundingBox box = strewn::site_extent(s);
  CHECK(box.min.x() > 512000.0);  // the origin is not part of the site
  CHECK(box.min.y() > 5403000.0);
  // A component's bias is from that aim, as the core's would be.
  const strewn::Site c = strewn::load_site_text(
      head + "[[source.component]]\nweight = 0.1\nspread = { sigma = 5 }\nbias = [1, 0]\n" + zone, "far.toml", shapes);
  CHECK(c.sources[0].model.components()[1].gaussian.mean() == mean + strewn::Vec2(1, 0));
  // An aim given beside the mean is kept: the bias is their difference.
  const strewn::Site a = strewn::load_site_text(
      "[site]\nname = \"far\"\n[[source]]\naim = [512350, 5403712]\nmean = [512350.5, 5403712.25]\nspread = { sigma = 1 }\n" + zone,
      "far.toml", shapes);
  CHECK(a.sources[0].aim == strewn::Vec2(512350, 5403712));
}

TEST_CASE("a misspelt key: file, line, column, key and the nearest accepted one", "[site][io]") {
  std::string text = kSite;
  text.replace(text.find("limit_per"), 9, "limit_pr");
  CHECK(error_of(text) == "yard.toml:21:1: zone[1].limit_pr: unknown key (did you mean 'limit_per'?)");
}

TEST_CASE("an error located inside a spread is passed on once, never wrapped again", "[site][io]") {
  std::string text = kSite;
  text.replace(text.find("sigma_minor = 1.0"), 17, "sigma_minor = \"x\"");
  const std::string e = error_of(text);
  CHECK(e.rfind("yard.toml:", 0) == 0);
  CHECK(e.find("yard.toml", 1) == std::string::npos);
  CHECK(e.find("source[1].spread.sigma_minor: must be a finite number") != std::string::npos);
  // An engine error inside the spread (not located) gets the spread's place.
  text = kSite;
  text.replace(text.find("sigma_minor = 1.0"), 17, "sigma_minor = -1.0");
  CHECK(error_of(text).rfind("yard.toml:11:10: source[1].spread: sigma_minor must be a positive", 0) == 0);
}

TEST_CASE("load_site reads a bundled demo with the default shape kinds", "[site][io]") {
  const strewn::Site s = strewn::load_site(STREWN_SOURCE_DIR "/shapes/throwing_lane.toml");
  CHECK(!s.zones.empty());
  CHECK(s.input_files.size() >= 2);  // the scenario and its template
}

TEST_CASE("two spread forms in one table are refused, naming the second", "[site][io]") {
  // `{ sigma = 0.3, cep = 0.4 }` ran before with one form silently winning by an undocumented
  // order (a new user's trial); each pair below names the key of the later form.
  const std::string axes = "spread = { sigma_major = 2.0, sigma_minor = 1.0, angle_deg = 30.0 }";
  const std::pair<const char*, const char*> cases[] = {
      {"spread = { sigma = 0.3, cep = 0.4 }", "source[1].spread.cep: a second spread form beside 'sigma'"},
      {"spread = { covariance = [[1.0, 0.0], [0.0, 1.0]], sigma = 2.0 }", "source[1].spread.covariance: a second spread form beside 'sigma'"},
      {"spread = { fraction = 0.5, radius = 1.0, sigma = 1.0 }", "source[1].spread.fraction: a second spread form beside 'sigma'"},
      {"spread = { sigma = 1.0, angle_deg = 10.0 }", "source[1].spread.sigma: a second spread form beside 'angle_deg'"},
      {"spread = { r95 = 1.0, sigma_major = 2.0, sigma_minor = 1.0 }", "source[1].spread.r95: a second spread form beside 'sigma_major'"}};
  for (const auto& [spread, message] : cases) {
    std::string text = kSite;
    text.replace(text.find(axes), axes.size(), spread);
    INFO(spread);
    CHECK(error_of(text).find(message) != std::string::npos);
  }
  // One form, complete, is still read.
  std::string text = kSite;
  text.replace(text.find(axes), axes.size(), "spread = { fraction = 0.5, radius = 1.0 }");
  CHECK(error_of(text).empty());
}

TEST_CASE("a spread's family and nu are read in sources and wild components, radii through the family's CDF",
          "[site][io][family]") {
  const std::string axes = "spread = { sigma_major = 2.0, sigma_minor = 1.0, angle_deg = 30.0 }";
  std::string text = kSite;
  text.replace(text.find(axes), axes.size(),
               "spread = { sigma = 0.5, family = \"student_t\", nu = 4 }\n"
               "wild = [{ weight = 0.1, spread = { r95 = 2.0, family = \"uniform\" } }]");
  const strewn::Site s = strewn::load_site_text(text, "yard.toml", strewn::ShapeRegistry::with_default_search_path({}));
  const auto& parts = s.sources[0].model.components();
  REQUIRE(parts.size() == 2);
  CHECK(parts[0].gaussian.family() == strewn::ScatterFamily::student_t(4.0));
  CHECK(parts[1].gaussian.family().kind() == strewn::FamilyKind::uniform);
  // The uniform's G(r) = r^2/4 in sigmas: 95% within 2 sqrt(0.95) sigma, so sigma = 2 / (2 sqrt 0.95).
  CHECK(parts[1].gaussian.axes().sigma_major == Approx(1.0 / std::sqrt(0.95)).epsilon(1e-14));
}

TEST_CASE("a wrong family, a missing or stray nu: file, line, key, and the nearest family", "[site][io][family]") {
  const std::string axes = "spread = { sigma_major = 2.0, sigma_minor = 1.0, angle_deg = 30.0 }";
  const std::pair<const char*, const char*> cases[] = {
      {"spread = { sigma = 1.0, family = \"studnet_t\", nu = 3 }",
       "yard.toml:11:34: source[1].spread.family: unknown family 'studnet_t' (did you mean 'student_t'?)"},
      {"spread = { sigma = 1.0, family = \"student_t\" }",
       "yard.toml:11:10: source[1].spread.nu: missing: student_t needs its degrees of freedom nu > 0"},
      {"spread = { sigma = 1.0, family = \"uniform\", nu = 3 }",
       "yard.toml:11:50: source[1].spread.nu: only the student_t family takes nu"},
      {"spread = { sigma = 1.0, family = \"student_t\", nu = 0 }",
       "yard.toml:11:52: source[1].spread.nu: must be a number above 0 and at most 1e6 (got 0; beyond 1e6 use the normal)"}};
  for (const auto& [spread, message] : cases) {
    std::string text = kSite;
    text.replace(text.find(axes), axes.size(), spread);
    INFO(spread);
    CHECK(error_of(text) == message);
  }
}

// Issue 15, item 8: a file in feet is read in metres, 0.3048 m per foot exactly (NIST SP 811,
// appendix B.8); a shape's defaults (a person's 0.5 m shoulders) stay metres.
TEST_CASE("a file in feet is converted to metres; a shape's defaults are not", "[site][io][units]") {
  const std::string body = R"(
[[source]]
aim = [10.0, 20.0]
bias = [1.0, 0.0]
spread = { sigma = 2.0 }
  [[source.component]]
  label = "wide"
  weight = 0.1
  spread = { covariance = [[9.0, 0.0], [0.0, 4.0]] }

[[zone]]
name = "person"
role = "report_only"
shape = "person"
params = { centre = [0.0, 0.0] }
offset = [10.0, 0.0]

[[zone]]
name = "strip"
role = "keep_out"
shape = "rectangle"
params = { centre = [0.0, 0.0], width = 10.0, depth = 2.0 }
)";
  const strewn::Site feet = strewn::load_site_text("[site]\nunits = \"ft\"\n" + body, "feet.toml", strewn::ShapeRegistry::with_default_search_path({}));
  const strewn::Site metres = strewn::load_site_text("[site]\nunits = \"m\"\n" + body, "metres.toml", strewn::ShapeRegistry::with_default_search_path({}));
  CHECK(feet.units == strewn::LengthUnit::foot);
  CHECK(metres.units == strewn::LengthUnit::metre);
  const double k = 0.3048;
  CHECK(feet.sources[0].aim.x() == 10.0 * k);
  CHECK(feet.sources[0].aim.y() == 20.0 * k);
  const auto& core = feet.sources[0].model.components()[0].gaussian;
  CHECK(core.mean().x() == Approx(11.0 * k).epsilon(1e-15));
  CHECK(core.axes().sigma_major == Approx(2.0 * k).epsilon(1e-14));
  const auto& wide = feet.sources[0].model.components()[1].gaussian;
  CHECK(wide.covariance()(0, 0) == Approx(9.0 * k * k).epsilon(1e-14));
  CHECK(feet.sources[0].component_labels == std::vector<std::string>{"core", "wide"});
  // Areas: the strip scales by k^2, the person (defaults in metres) not at all, only its place.
  CHECK(strewn::area(feet.zones[1].region) == Approx(20.0 * k * k).epsilon(1e-13));
  CHECK(strewn::area(feet.zones[0].region) == Approx(strewn::area(metres.zones[0].region)).epsilon(1e-13));
  CHECK(strewn::bounds(feet.zones[0].region).min.x() > 10.0 * k - 0.5);
  CHECK(strewn::bounds(feet.zones[0].region).max.x() < 10.0 * k + 0.5);
}

// A site with a crs is in the CRS's metres (docs/site-plans.md): feet beside it could only disagree.
TEST_CASE("units = ft beside a crs is refused with the file, line and key", "[site][io][units][crs]") {
  std::string text = kSite;
  text.replace(text.find("name = \"yard\""), 13, "name = \"yard\"\nunits = \"ft\"\ncrs = \"EPSG:32633\"");
  const std::string e = error_of(text);
  CHECK(e.find("yard.toml:3:9: site.units: a site with a crs is in metres") == 0);
}

namespace {

// A drop without drag or wind: the landing is the release plus v t along the track, with
// t = sqrt(2 h / g) (elementary kinematics, CHECKS.md "Falling objects").
std::string vacuum_drop(const std::string& units, const std::string& extra) {
  return R"([site]
name = "drop yard"
units = ")" + units + R"("

[[source]]
name = "box"
)" + extra + R"(
  [source.drop]
  release = [2.0, 1.0]
  height = 30.0
  ground_speed = 10.0
  heading_deg = 90.0
  mass = 1.0
  drag_area = 0.0
  falls = 400

  [source.drop.uncertainty]
  position = 1.0

[[zone]]
name = "path"
role = "keep_out"
shape = "rectangle"
params = { centre = [5.0, 0.0], width = 1.0, depth = 4.0 }
)";
}

}  // namespace

// Issue 17: a measured profile as a spread, its CSV relative to the scenario, lengths in the
// file's unit (NIST SP 811 B.8: 1 ft = 0.3048 m), and one located line per mistake.
namespace {

std::string profile_dir() {
  const std::filesystem::path dir = std::filesystem::temp_directory_path() / ("strewn_profile_" + std::to_string(::getpid()));
  std::filesystem::create_directories(dir);
  std::ofstream(dir / "leg.csv") << "# made-up leg test\ndistance_m, rate_mm_per_h\n0.5, 9\n3, 12\n6, 11\n9, 6\n12, 0\n";
  std::ofstream(dir / "bare.csv") << "distance, rate\n0, 1\n10, 0\n";
  std::ofstream(dir / "bad.csv") << "distance_m, rate\n0, 1\n5, 2\n4, 0\n";
  return dir.string();
}

std::string with_spread(const std::string& spread, bool feet = false) {
  const std::string axes = "spread = { sigma_major = 2.0, sigma_minor = 1.0, angle_deg = 30.0 }";
  std::string text = kSite;
  if (feet) text.replace(text.find("name = \"yard\""), 13, "name = \"yard\"\nunits = \"ft\"");
  text.replace(text.find(axes), axes.size(), spread);
  return text;
}

}  // namespace

TEST_CASE("a drop source's spread is its fall: vacuum kinematics in metres and in feet", "[site][io][drop]") {
  const auto& shapes = strewn::ShapeRegistry::with_default_search_path({});
  const double g = 9.80665;
  const strewn::Site m = strewn::load_site_text(vacuum_drop("m", ""), "yard.toml", shapes);
  REQUIRE(m.sources[0].drop.has_value());
  const strewn::Gaussian& core = m.sources[0].model.components().front().gaussian;
  // East at 10 m/s from (2, 1) for t = sqrt(60 / g); only the navigation error spreads it (1 m
  // per axis, a linear map: the unscented covariance is exactly the identity).
  CHECK(core.mean().x() == Approx(2.0 + 10.0 * std::sqrt(60.0 / g)).epsilon(1e-10));
  CHECK(core.mean().y() == Approx(1.0).epsilon(1e-10));
  CHECK(core.covariance()(0, 0) == Approx(1.0).epsilon(1e-9));
  CHECK(core.covariance()(1, 1) == Approx(1.0).epsilon(1e-9));
  CHECK(core.covariance()(0, 1) == Approx(0.0).margin(1e-9));
  CHECK(m.sources[0].aim.isApprox(core.mean()));  // no aim: the mean landing
  // The same file in feet: 30 ft = 9.144 m, 10 ft/s = 3.048 m/s, gravity stays 9.80665 m/s^2.
  const strewn::Site f = strewn::load_site_text(vacuum_drop("ft", "aim = [20.0, 1.0]\n"), "yard.toml", shapes);
  const strewn::Gaussian& fc = f.sources[0].model.components().front().gaussian;
  CHECK(fc.mean().x() == Approx(0.6096 + 3.048 * std::sqrt(2.0 * 9.144 / g)).epsilon(1e-10));
  CHECK(fc.covariance()(0, 0) == Approx(0.3048 * 0.3048).epsilon(1e-9));
  CHECK(f.sources[0].aim.isApprox(strewn::Vec2(6.096, 0.3048)));
}

TEST_CASE("a drop's mistakes are one located line naming the key", "[site][io][drop]") {
  const auto with = [](const std::string& from, const std::string& to) {
    std::string t = vacuum_drop("m", "");
    t.replace(t.find(from), from.size(), to);
    return t;
  };
  CHECK_THAT(error_of(with("  height = 30.0", "  heigth = 30.0")),
             Catch::Contains("source[1].drop.heigth: unknown key (did you mean 'height'?)"));
  CHECK_THAT(error_of(with("name = \"box\"", "name = \"box\"\nspread = { sigma = 1.0 }")),
             Catch::Contains("source[1].spread: a source with drop takes its spread from the drop's physics"));
  CHECK_THAT(error_of(with("  heading_deg = 90.0", "  heading_deg = 90.0\n  track = [[0.0, 0.0], [1.0, 0.0]]")),
             Catch::Contains("give heading_deg"));
  CHECK_THAT(error_of(with("  mass = 1.0", "  mass = 0.0")), Catch::Contains("source[1].drop.mass: must be a number from"));
  CHECK_THAT(error_of(with("  position = 1.0", "  position = 0.0")),
             Catch::Contains("yard.toml:") && Catch::Contains("spread along one line or not at all"));
  // A track of two points gives the heading: from (0, 0) toward (1, 1) is a bearing of 45 degrees.
  const strewn::Site s = strewn::load_site_text(with("  heading_deg = 90.0", "  track = [[0.0, 0.0], [1.0, 1.0]]"),
                                                "yard.toml", strewn::ShapeRegistry::with_default_search_path({}));
  CHECK(s.sources[0].drop->parameters.heading_deg == Approx(45.0));
}

TEST_CASE("a profile spread reads its CSV beside the scenario, with its arc and wind", "[site][io][profile]") {
  const std::string dir = profile_dir();
  const strewn::Site s = strewn::load_site_text(
      with_spread("spread = { family = \"profile\", profile = \"leg.csv\", arc_from_deg = 0, arc_to_deg = 90, "
                  "wind_stretch = 1.2, wind_shift = 0.5, downwind_deg = 0 }"),
      dir + "/yard.toml", strewn::ShapeRegistry::with_default_search_path({}));
  const strewn::Gaussian& g = s.sources[0].model.components()[0].gaussian;
  REQUIRE(g.family().kind() == strewn::FamilyKind::profile);
  CHECK(g.family().radial_profile()->wetted_radius() == 12.0);
  // The head at aim + bias = (1.5, 2), moved 0.5 m downwind (+x); sigma = R/2 = 6 m across the
  // wind and 1.2 x 6 m along it.
  CHECK(g.mean().x() == Approx(2.0));
  CHECK(g.mean().y() == Approx(2.0));
  CHECK(g.axes().sigma_major == Approx(7.2));
  CHECK(g.axes().sigma_minor == Approx(6.0));
  // The arc's rays along +x and +y are carried by a stretch along x: they stay on the axes.
  CHECK(g.family().arc_from_deg() == Approx(0.0).margin(1e-12));
  CHECK(g.family().arc_sweep_deg() == Approx(90.0));
  CHECK(std::find(s.input_files.begin(), s.input_files.end(), dir + "/leg.csv") != s.input_files.end());
  // A file in feet: a bare distance column and the shift are in feet.
  const strewn::Site ft = strewn::load_site_text(
      with_spread("spread = { family = \"profile\", profile = \"bare.csv\", wind_shift = 10 }", true),
      dir + "/yard.toml", strewn::ShapeRegistry::with_default_search_path({}));
  const strewn::Gaussian& f = ft.sources[0].model.components()[0].gaussian;
  CHECK(f.family().radial_profile()->wetted_radius() == Approx(3.048));
  CHECK(f.mean().x() == Approx((1.0 + 0.5 + 10.0) * 0.3048));
}

TEST_CASE("profile mistakes: file, line, key, and the CSV's own line", "[site][io][profile]") {
  const std::string dir = profile_dir();
  const auto error_in = [&dir](const std::string& spread) {
    try {
      (void)strewn::load_site_text(with_spread(spread), dir + "/yard.toml", strewn::ShapeRegistry::with_default_search_path({}));
    } catch (const strewn::input_error& e) {
      return std::string(e.what());
    }
    return std::string();
  };
  const std::string at = dir + "/yard.toml:11:";
  CHECK(error_in("spread = { family = \"profile\", profile = \"bad.csv\" }") ==
        at + "42: source[1].spread.profile: " + dir + "/bad.csv:4: distances must increase from row to row");
  CHECK(error_in("spread = { family = \"profile\", profile = \"leg.csv\", sigma = 1 }") ==
        at + "61: source[1].spread.sigma: the profile family takes its size from the profile's distances (site "
                  "lengths): leave out sigma");
  CHECK(error_in("spread = { family = \"profile\", profile = \"leg.csv\", arc_from_deg = 10 }").find(
            "source[1].spread.arc_from_deg: give both arc_from_deg and arc_to_deg") != std::string::npos);
  CHECK(error_in("spread = { sigma = 1, arc_from_deg = 0, arc_to_deg = 90 }").find(
            "source[1].spread.arc_from_deg: only the profile family takes arc_from_deg") != std::string::npos);
  CHECK(error_in("spread = { family = \"profile\" }").find("source[1].spread.profile: missing") != std::string::npos);
  CHECK(error_in("spread = { family = \"profile\", profile = \"leg.csv\", wind_strech = 1.1 }").find(
            "did you mean 'wind_stretch'?") != std::string::npos);
}

TEST_CASE("a value quoted in a message shows bytes that are not text as \\xNN, whole characters kept", "[site][errors]") {
  // A CSV cell of a UTF-16 byte-order mark (FF FE) was written raw to the terminal.
  CHECK(strewn::quoted_excerpt(std::string("\xFF\xFE")) == "\\xFF\\xFE");
  CHECK(strewn::quoted_excerpt("a\tb\x7F") == "a\\x09b\\x7F");
  // Well-formed UTF-8 (RFC 3629) is kept: e-acute, the euro sign, U+1F600.
  CHECK(strewn::quoted_excerpt("caf\xC3\xA9 \xE2\x82\xAC \xF0\x9F\x98\x80") == "caf\xC3\xA9 \xE2\x82\xAC \xF0\x9F\x98\x80");
  // Overlong (C0 AF), a surrogate (ED A0 80) and a lone continuation byte are not.
  CHECK(strewn::quoted_excerpt("\xC0\xAF|\xED\xA0\x80|\x80") == "\\xC0\\xAF|\\xED\\xA0\\x80|\\x80");
  // Cut at whole characters after `keep` bytes, the length said.
  CHECK(strewn::quoted_excerpt(std::string(10, 'x') + "\xC3\xA9" + "yz", 11) == "xxxxxxxxxx\xC3\xA9... (14 bytes)");
  CHECK(strewn::quoted_excerpt("short") == "short");
}
