// The radial profile table and its CSV reader, and the profile family's radial CDF: G against
// elementary integrals of a piecewise linear rate, its inverse, and one-line messages for bad
// files.
#include <catch2/catch.hpp>
#include <cmath>

#include "strewn/constants.hpp"
#include "strewn/error.hpp"
#include "strewn/radial_profile.hpp"
#include "strewn/scatter_family.hpp"

using namespace strewn;

TEST_CASE("a constant profile's G is the share of the disk's area, (r / 2)^2 in whitened radii", "[profile]") {
  // Source: a constant rate to R puts a share (d / R)^2 of the volume within d (area ratio).
  const ScatterFamily f = ScatterFamily::profile(RadialProfile({0.0, 8.0}, {3.0, 3.0}));
  CHECK(f.profile_scale_m() == 4.0);
  for (double r : {0.0, 0.3, 1.0, 1.7, 1.999}) {
    CHECK(f.cdf(r) == Approx(0.25 * r * r).margin(1e-16));
    CHECK(f.survival(r) == Approx(0.25 * (2.0 - r) * (2.0 + r)).epsilon(1e-14));
  }
  CHECK(f.cdf(2.0) == 1.0);
  CHECK(f.survival(2.5) == 0.0);
  CHECK(f.density(1.0) == Approx(1.0 / (4.0 * kPi)));
}

TEST_CASE("a cone's G is 3x^2 - 2x^3 and radius_quantile inverts it", "[profile]") {
  // Source: v = 1 - d/R; V(a) / V(R) = 3 (a/R)^2 - 2 (a/R)^3 (elementary calculus).
  const ScatterFamily f = ScatterFamily::profile(RadialProfile({0.0, 10.0}, {1.0, 0.0}));
  for (double x : {0.001, 0.1, 0.5, 0.9, 0.999}) {
    const double g = 3 * x * x - 2 * x * x * x;
    CHECK(f.cdf(2 * x) == Approx(g).epsilon(1e-14));
    // S = 1 - 3x^2 + 2x^3 = (1 - x)^2 (1 + 2x): its digits near the edge, where 1 - G would lose them.
    CHECK(f.survival(2 * x) == Approx((1 - x) * (1 - x) * (1 + 2 * x)).epsilon(1e-13));
    CHECK(f.radius_quantile(g) == Approx(2 * x).epsilon(1e-12));
  }
  REQUIRE(f.kinks().size() == 1);
  CHECK(f.kinks()[0] == 2.0);
}

TEST_CASE("a profile's density bound covers a ring that rises with the distance", "[profile]") {
  const ScatterFamily f = ScatterFamily::profile(RadialProfile({0.0, 5.0, 8.0, 10.0}, {1.0, 4.0, 2.0, 0.0}));
  CHECK(f.density_bound(0.0) == Approx(f.density(1.0)));  // r = 1 is the 5 m row
  CHECK(f.density_bound(0.0) > f.density(0.0));
  CHECK(f.density_bound(2.0) == 0.0);
  CHECK(f.kinks().size() == 3);
}

TEST_CASE("profile CSV: units from the header, feet converted, comments skipped", "[profile][csv]") {
  const RadialProfile m = parse_radial_profile_csv("# leg test\ndistance_m, rate_mm_per_h\n0, 10\n5, 8\n\n10, 0\n", "leg.csv", std::nullopt);
  CHECK(m.wetted_radius() == 10.0);
  CHECK(m.rate_at(2.5) == Approx(9.0));
  const RadialProfile ft = parse_radial_profile_csv("distance_ft,rate\n0,1\n10,0\n", "leg.csv", std::nullopt);
  CHECK(ft.wetted_radius() == Approx(3.048));  // NIST SP 811: 1 ft = 0.3048 m exactly
  const RadialProfile bare = parse_radial_profile_csv("distance,rate\n0,1\n10,0\n", "leg.csv", std::nullopt, LengthUnit::foot);
  CHECK(bare.wetted_radius() == Approx(3.048));
  // Volume of a cone of height 1 and radius 10: pi R^2 / 3.
  CHECK(m.volume_rate() > 0.0);
  CHECK(RadialProfile({0.0, 10.0}, {1.0, 0.0}).volume_rate() == Approx(kPi * 100.0 / 3.0));
}

TEST_CASE("profile CSV: bad files give one line naming file and line", "[profile][csv]") {
  const auto message = [](const std::string& text) {
    try {
      parse_radial_profile_csv(text, "leg.csv", std::nullopt);
    } catch (const input_error& e) {
      return std::string(e.what());
    }
    return std::string("no error");
  };
  CHECK(message("distance_m,rate\n0,1\n5,x\n") == "leg.csv:3: rate must be a finite number (found 'x')");
  CHECK(message("distance_m,rate\n0,1\n5,2\n4,0\n") == "leg.csv:4: distances must increase from row to row");
  CHECK(message("distance_m,rate\n0,1\n5,-2\n") == "leg.csv:3: the rate must be a finite number >= 0");
  CHECK(message("distnce_m,rate\n0,1\n") .find("leg.csv:1: the first column must be") == 0);
  CHECK(message("distance_yd,rate\n0,1\n").find("leg.csv:1: unknown unit in column 'distance_yd'") == 0);
  CHECK(message("distance_m,rate\n0,1\n") == "leg.csv:2: a profile needs at least two rows (distance, rate)");
  CHECK(message("distance_m,rate\n0,0\n1,0\n") == "leg.csv:3: a profile needs a rate above 0 somewhere");
  CHECK(message("distance_m,rate,x\n") == "leg.csv:1: expected two columns (distance, rate), found 3");
  CHECK(message("") == "leg.csv:0: no header: the first line must be 'distance_m, rate' (or distance_ft)");
}

TEST_CASE("only a profile takes an arc, and its sweep must be above 0", "[profile][arc]") {
  CHECK_THROWS_AS(ScatterFamily::uniform().with_arc(0.0, 90.0), input_error);
  const ScatterFamily f = ScatterFamily::profile(RadialProfile({0.0, 4.0}, {1.0, 0.0}));
  CHECK_THROWS_AS(f.with_arc(10.0, 370.0), input_error);
  const ScatterFamily a = f.with_arc(-90.0, 90.0);
  CHECK(a.arc_from_deg() == 270.0);
  CHECK(a.arc_sweep_deg() == 180.0);
  CHECK(a != f);
  CHECK(a.without_arc() == f);
}
