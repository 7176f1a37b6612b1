// Coordinate reference systems (strewn/crs.hpp) against published example points and against
// PROJ's own command-line tools (cs2cs, projinfo from Debian's proj-bin), run at test time.
#include <catch2/catch.hpp>
#include <cmath>
#include <sstream>

#include "gis_tools.hpp"
#include "strewn/crs.hpp"
#include "strewn/error.hpp"
#include "strewn/region_io.hpp"

using namespace strewn;
using strewn::test::run_tool;

namespace {

// cs2cs's answer for one point: "x y" in, "x y z" out, six decimals.
Vec2 cs2cs(const std::string& from, const std::string& to, double a, double b) {
  std::ostringstream cmd;
  cmd.precision(17);
  cmd << "echo '" << a << " " << b << "' | cs2cs -f %.9f " << from << " +to " << to;
  const auto r = run_tool(cmd.str());
  REQUIRE(r.status == 0);
  std::istringstream in(r.out);
  double x = NAN, y = NAN;
  in >> x >> y;
  REQUIRE(std::isfinite(x));
  return Vec2(x, y);
}

}  // namespace

TEST_CASE("Transverse Mercator: the British National Grid example of IOGP Guidance Note 7-2", "[crs]") {
  // IOGP Guidance Note 7-2, Transverse Mercator worked example: OSGB 1936 latitude 50 deg 30' N,
  // longitude 0 deg 30' E -> E 577274.99 m, N 69740.50 m (two decimals; CHECKS.md). Input in
  // traditional GIS order: [lon, lat].
  const Vec2 en = CrsTransform("EPSG:4277", "EPSG:27700").forward({0.5, 50.5});
  CHECK(std::abs(en.x() - 577274.99) < 0.01);
  CHECK(std::abs(en.y() - 69740.50) < 0.01);
  // PROJ's cs2cs on the same pair (authority order for EPSG:4277: latitude first).
  const Vec2 ref = cs2cs("EPSG:4277", "EPSG:27700", 50.5, 0.5);
  CHECK(std::abs(en.x() - ref.x()) < 1e-6);
  CHECK(std::abs(en.y() - ref.y()) < 1e-6);
  // And back.
  const Vec2 ll = CrsTransform("EPSG:4277", "EPSG:27700").inverse(en);
  CHECK(std::abs(ll.x() - 0.5) < 1e-10);
  CHECK(std::abs(ll.y() - 50.5) < 1e-10);
}

TEST_CASE("WGS 84 to UTM zone 33N takes [lon, lat] and gives [easting, northing] as cs2cs does", "[crs]") {
  // EPSG:4326 is latitude first by definition; strewn reads it longitude first (GIS order).
  for (const Vec2& ll : {Vec2(15.0, 48.0), Vec2(15.1663, 48.7865), Vec2(12.3, 0.5), Vec2(17.9, 70.2)}) {
    const Vec2 en = CrsTransform(lon_lat_crs(), "EPSG:32633").forward(ll);
    const Vec2 ref = cs2cs("EPSG:4326", "EPSG:32633", ll.y(), ll.x());  // cs2cs: EPSG:4326 as latitude, longitude
    CHECK(std::abs(en.x() - ref.x()) < 1e-6);
    CHECK(std::abs(en.y() - ref.y()) < 1e-6);
  }
  // On the central meridian (15 E) the easting is the false easting exactly (UTM's definition).
  CHECK(std::abs(CrsTransform(lon_lat_crs(), "EPSG:32633").forward({15.0, 48.0}).x() - 500000.0) < 1e-6);
}

TEST_CASE("The local frame about an origin is PROJ's transverse Mercator centred there", "[crs]") {
  const GeoOrigin origin{-1.47, 44.5};
  const std::string local = local_frame_definition(origin);
  for (const Vec2& ll : {Vec2(-1.47, 44.5), Vec2(-1.469, 44.501), Vec2(-1.2, 44.9), Vec2(-1.9, 44.1)}) {
    const Vec2 xy = project_to_site(origin, ll.x(), ll.y());
    // cs2cs from WGS 84 longitude/latitude (a PROJ string: longitude first) to the same definition.
    const Vec2 ref = cs2cs("+proj=longlat +datum=WGS84 +type=crs", "'" + local + "'", ll.x(), ll.y());
    CHECK(std::abs(xy.x() - ref.x()) < 1e-6);
    CHECK(std::abs(xy.y() - ref.y()) < 1e-6);
    const Vec2 back = site_to_lon_lat(origin, xy);
    CHECK(std::abs(back.x() - ll.x()) < 1e-11);
    CHECK(std::abs(back.y() - ll.y()) < 1e-11);
  }
  CHECK(project_to_site(origin, -1.47, 44.5).norm() < 1e-9);  // the origin is (0, 0)
}

TEST_CASE("A CRS's name is PROJ's, as projinfo prints it", "[crs]") {
  const auto r = run_tool("projinfo EPSG:32633 -o WKT2:2019 -q");
  REQUIRE(r.status == 0);
  // projinfo's first line: PROJCRS["WGS 84 / UTM zone 33N",
  const auto open = r.out.find('"'), close = r.out.find('"', open + 1);
  REQUIRE(close != std::string::npos);
  CHECK(crs_name("EPSG:32633") == r.out.substr(open + 1, close - open - 1));
  CHECK(site_frame_crs_name("EPSG:27700") == "OSGB36 / British National Grid");
  CHECK(site_frame_crs_name("+proj=utm +zone=33 +datum=WGS84 +units=m +type=crs") != "");
}

TEST_CASE("Unknown CRSs, geographic CRSs and CRSs in feet are refused in one line", "[crs][errors]") {
  CHECK_THROWS_WITH(crs_name("EPSG:99999"), Catch::StartsWith("unknown CRS 'EPSG:99999' (PROJ: "));
  CHECK_THROWS_WITH(crs_name("not a crs"), Catch::StartsWith("unknown CRS 'not a crs'"));
  CHECK_THROWS_WITH(crs_name("+proj=tmerc +lat_0=1"), Catch::Contains("is not a coordinate reference system"));
  CHECK_THROWS_WITH(site_frame_crs_name("EPSG:4326"), Catch::Contains("is not a projected CRS"));
  // NAD83 / Texas Central (ftUS): a projected CRS whose axes are US survey feet.
  CHECK_THROWS_WITH(site_frame_crs_name("EPSG:2277"), Catch::Contains("the site frame needs metres"));
  CHECK_THROWS_AS(CrsTransform("EPSG:4326", "EPSG:99999"), input_error);
  // A point outside the projection's domain.
  CHECK_THROWS_WITH(CrsTransform("EPSG:32633", lon_lat_crs()).forward({1e30, 1e30}), Catch::Contains("cannot be transformed"));
  CHECK_THROWS_AS(CrsTransform(lon_lat_crs(), "EPSG:32633").forward({NAN, 0.0}), input_error);
}
