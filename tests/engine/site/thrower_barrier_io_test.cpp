// Reading throwers and barriers (docs/scenario-format.md, "Throwers and barriers"): the values,
// and one located line (file:line:column: key: why) for each mistake.
#include <catch2/catch.hpp>
#include <cmath>
#include <string>

#include "strewn/error.hpp"
#include "strewn/site_io.hpp"

namespace {

const std::string kZone = R"(
[[zone]]
name = "bench"
role = "keep_out"
shape = "rectangle"
params = { centre = [2.0, 7.0], width = 1.0, depth = 0.5 }
)";

strewn::Site read(const std::string& text) {
  return strewn::load_site_text(text + kZone, "lane.toml", strewn::ShapeRegistry::with_default_search_path({}));
}

std::string error_of(const std::string& text) {
  try {
    (void)read(text);
  } catch (const strewn::input_error& e) {
    return e.what();
  }
  return "no error";
}

}  // namespace

TEST_CASE("a thrower's keys give the spread at its distance, aim = toward, one position per component", "[site_io][thrower]") {
  const strewn::Site s = read(R"([[source]]
name = "thrower"
position = [0.0, 0.0]
toward = [0.0, 6.0]
spread_angle_deg = 2.0
range_fraction = 0.03
release_height = 1.8
)");
  const strewn::Source& src = s.sources.at(0);
  REQUIRE(src.thrower);
  CHECK(src.aim.isApprox(strewn::Vec2(0, 6)));
  CHECK(src.positions.size() == 1);
  CHECK(*src.release_height == 1.8);
  // 6 tan(2 deg) across (x), 0.18 along (y), by hand (thrower_test has the same case).
  CHECK(src.model.components()[0].gaussian.covariance()(0, 0) == Approx(0.2095246169504864 * 0.2095246169504864));
  CHECK(src.model.components()[0].gaussian.covariance()(1, 1) == Approx(0.18 * 0.18));
}

TEST_CASE("a throwing line position becomes line_components standing points", "[site_io][thrower]") {
  const strewn::Site s = read(R"([[source]]
position = [[-1.0, 0.0], [1.0, 0.0]]
toward = [0.0, 6.0]
spread_angle_deg = 2.0
range_sigma = 0.2
line_components = 6
)");
  CHECK(s.sources[0].model.components().size() == 6);
  CHECK(s.sources[0].positions.size() == 6);
  CHECK(s.sources[0].positions[0].isApprox(strewn::Vec2(-1.0 + 1.0 / 6.0, 0)));
}

TEST_CASE("barriers are read and given to every source, which then needs a position", "[site_io][barrier]") {
  const strewn::Site s = read(R"([[source]]
aim = [0.0, 6.0]
position = [0.0, 0.0]
spread = { sigma_major = 0.3, sigma_minor = 0.2, angle_deg = 90 }

[[barrier]]
name = "net"
points = [[-2.0, 3.0], [2.0, 3.0], [3.0, 5.0]]
catch = 0.95
height = 2.5
)");
  REQUIRE(s.barriers.size() == 1);
  CHECK(s.barriers[0].points.size() == 3);
  CHECK(s.barriers[0].catch_share == 0.95);
  CHECK(*s.barriers[0].height == 2.5);
  CHECK(s.sources[0].barriers.size() == 1);
  CHECK(s.sources[0].positions.size() == 1);
}

TEST_CASE("each mistake in throwers and barriers is one line naming file, line and key", "[site_io][errors]") {
  const std::string plain = R"([[source]]
aim = [0.0, 6.0]
spread = { sigma_major = 0.3, sigma_minor = 0.2, angle_deg = 90 }
)";
  CHECK(error_of(plain + "[[barrier]]\npoints = [[-2.0, 3.0], [2.0, 3.0]]\ncatch = 1\n") ==
        "lane.toml:1:1: source[1].position: missing: the site has barriers, whose shadows start at each source's "
        "position; give position = [x, y] (where the thrower stands)");
  const std::string positioned = plain + "position = [0.0, 0.0]\n";
  CHECK(error_of(positioned + "[[barrier]]\npoints = [[-2.0, 3.0], [2.0, 3.0]]\ncach = 1\n") ==
        "lane.toml:7:1: barrier[1].cach: unknown key (did you mean 'catch'?)");
  CHECK(error_of(positioned + "[[barrier]]\npoints = [[-2.0, 3.0], [2.0, 3.0]]\ncatch = 1.5\n").find(
            "lane.toml:7:9: barrier[1].catch: must be a number from 0 to 1") == 0);
  CHECK(error_of(positioned + "[[barrier]]\npoints = [[-2.0, 3.0]]\ncatch = 1\n").find("barrier[1].points: must be a line") !=
        std::string::npos);
  CHECK(error_of(R"([[source]]
position = [0.0, 0.0]
toward = [0.0, 6.0]
spread_angle_deg = 2.0
range_fraction = 0.03
spread = { sigma_major = 0.3, sigma_minor = 0.2, angle_deg = 90 }
)").find("lane.toml:6:10: source[1].spread: does not go with toward") == 0);
  CHECK(error_of(R"([[source]]
toward = [0.0, 6.0]
spread_angle_deg = 2.0
range_fraction = 0.03
)").find("source[1].position: missing: a thrower (toward) needs its position") != std::string::npos);
  CHECK(error_of(plain + "spread_angle_deg = 2.0\n").find("source[1].spread_angle_deg: only goes with toward") !=
        std::string::npos);
  CHECK(error_of(R"([[source]]
position = [0.0, 0.0]
toward = [0.0, 6.0]
spread_angle_deg = 2.0
)").find("give the spread along the throw as range_fraction") != std::string::npos);
}
