// Site plans in a CRS and from GIS layers, read by the site loader (site_io.cpp): `[site] crs`,
// zones from vector sources (`geometry` with `layer`, `feature`, `where`) and `[[zone_layer]]`.
#include <catch2/catch.hpp>
#include <cmath>

#include "strewn/assess.hpp"
#include "strewn/error.hpp"
#include "strewn/input_file.hpp"
#include "strewn/integrate.hpp"
#include "strewn/region.hpp"
#include "strewn/region_io.hpp"
#include "strewn/site_io.hpp"

using namespace strewn;

namespace {

const std::string kShapes = STREWN_SOURCE_DIR "/shapes/";

Site load(const std::string& text) {
  // Named inside shapes/, so that "sites/..." finds the demo's plan.
  return load_site_text(text, kShapes + "site_plans_test.toml", ShapeRegistry::with_default_search_path({}));
}

std::string load_error(const std::string& text) {
  try {
    load(text);
  } catch (const input_error& e) {
    return e.what();
  }
  return "(no error)";
}

// One site at a chosen false origin (E0, N0): a source with a centimetre spread and zones a few
// centimetres to decimetres from its mean. Every offset is a short binary fraction, so the plan
// is the same set of points, exactly, at either origin.
std::string centimetre_site(const std::string& site_table, double e0, double n0) {
  char b[2048];
  std::snprintf(b, sizeof b, R"(%s
[settings]
tolerance = 1e-12
[[source]]
mean = [%.17g, %.17g]
spread = { sigma_major = 0.03, sigma_minor = 0.02, angle_deg = 30 }
events_per_session = 10
[[zone]]
name = "strip"
role = "keep_out"
shape = "rectangle"
params = { centre = [%.17g, %.17g], width = 0.25, depth = 0.015625 }
[[zone]]
name = "cap"
role = "keep_out"
shape = "disk"
params = { centre = [%.17g, %.17g], radius = 0.03125 }
[[zone]]
name = "far corner"
role = "report_only"
shape = "polygon"
params = { outer = [[%.17g, %.17g], [%.17g, %.17g], [%.17g, %.17g]] }
)",
                site_table.c_str(), e0, n0, e0 + 0.0625, n0 - 0.046875, e0 - 0.015625, n0 + 0.03125, e0 + 0.125,
                n0 + 0.125, e0 + 0.25, n0 + 0.125, e0 + 0.125, n0 + 0.1875);
  return b;
}

}  // namespace

TEST_CASE("A site in UTM coordinates gives the probabilities of the same site near (0, 0)", "[crs][large]") {
  // The engine subtracts a local reference point before whitening (DESIGN.md, "Coordinates at
  // real-world scale"); the check is that the result does not depend on where the site lies:
  // x ~ 5e5 m, y ~ 5.4e6 m with spreads of 2-3 cm against the same plan about the origin.
  const Site utm = load(centimetre_site("[site]\ncrs = \"EPSG:32633\"", 512300.0, 5403740.0));
  const Site local = load(centimetre_site("", 0.0, 0.0));
  CHECK(utm.crs == "EPSG:32633");
  const Assessment a = assess(utm), b = assess(local);
  REQUIRE(a.zones.size() == 3);
  for (std::size_t i = 0; i < a.zones.size(); ++i) {
    INFO(a.zones[i].zone->name);
    const double p = a.zones[i].sources[0].event.p, q = b.zones[i].sources[0].event.p;
    CHECK(q > 1e-12);  // every zone has a probability worth comparing
    CHECK(std::abs(p - q) <= 1e-9 * q);
  }
}

TEST_CASE("[[zone_layer]] turns every feature of the demo's GeoPackage into a zone", "[zone_layer]") {
  const Site s = load(R"([site]
crs = "EPSG:32633"
[[source]]
mean = [512300.5, 5403739.0]
spread = { sigma_major = 6.0, sigma_minor = 3.0, angle_deg = 90 }
[[zone_layer]]
geometry = "sites/park_plan.gpkg"
layer = "plan"
role_field = "role"
limit_field = "limit"
)");
  REQUIRE(s.zones.size() == 12);
  CHECK(s.zones[0].name == "throwing field");
  CHECK(s.zones[0].role == Role::target);
  CHECK_FALSE(s.zones[0].limit);
  CHECK(s.zones[3].name == "bench 1");
  CHECK(s.zones[3].role == Role::keep_out);
  CHECK(*s.zones[3].limit == 1e-5);
  CHECK(s.zones[9].name == "pond");
  CHECK(s.zones[9].role == Role::report_only);
  CHECK(s.zones[9].region.loops.size() == 2);  // the island is a hole
  CHECK(s.input_files.back() == kShapes + "sites/park_plan.gpkg");
  // Each zone equals the same feature read by strewn's own GeoJSON reader from the file the
  // GeoPackage was made from (ogr2ogr, shapes/town_park.toml): the same probability to 1e-12.
  const std::string geojson = read_input_file(kShapes + "sites/park_plan.geojson");
  for (const Zone& z : s.zones) {
    INFO(z.name);
    GeoJsonOptions o;
    o.site_crs = "EPSG:32633";
    o.feature = z.name;
    const double expected = integrate(s.sources[0].model, region_from_geojson(geojson, o), s.options).p;
    CHECK(std::abs(integrate(s.sources[0].model, z.region, s.options).p - expected) <= 1e-12 * expected);
  }
}

TEST_CASE("A zone takes one feature, or every feature passing a filter, from a layer", "[zone_layer]") {
  const Site s = load(R"([site]
crs = "EPSG:32633"
[[source]]
mean = [512300.5, 5403739.0]
spread = { sigma = 5.0 }
[[zone]]
name = "benches"
role = "keep_out"
geometry = "sites/park_plan.gpkg"
where = "kind = 'bench'"
[[zone]]
name = "the kiosk"
role = "keep_out"
geometry = "sites/park_plan.gpkg"
layer = "plan"
feature = "kiosk"
)");
  CHECK(s.zones[0].region.loops.size() == 3);
  CHECK(std::abs(area(s.zones[0].region) - 3 * 2.0 * 0.6) < 1e-8);  // UTM coordinates: 1e-9 m apart
  CHECK(std::abs(area(s.zones[1].region) - 16.0) < 1e-8);
}

TEST_CASE("A zone's feature is a name, an id (a number) or a value of the attribute name_field", "[zone_layer]") {
  // The kiosk is fid 9 of the plan (ogrinfo shapes/sites/park_plan.gpkg plan), a 4 m x 4 m square.
  const std::string head = "[site]\ncrs = \"EPSG:32633\"\n[[source]]\nmean = [512300.5, 5403739.0]\nspread = { sigma = 5.0 }\n"
                           "[[zone]]\nname = \"k\"\nrole = \"keep_out\"\ngeometry = \"sites/park_plan.gpkg\"\n";
  const Site by_id = load(head + "feature = 9\n");
  CHECK(std::abs(area(by_id.zones[0].region) - 16.0) < 1e-8);
  const Site by_kind = load(head + "name_field = \"kind\"\nfeature = \"building\"\n");
  CHECK(std::abs(area(by_kind.zones[0].region) - 16.0) < 1e-8);
  const Site by_id_and_filter = load(head + "where = \"kind = 'building'\"\nfeature = 9\n");
  CHECK(std::abs(area(by_id_and_filter.zones[0].region) - 16.0) < 1e-8);
  CHECK_THAT(load_error(head + "where = \"kind = 'bench'\"\nfeature = 9\n"),
             Catch::Contains("no feature with id 9 passing the where filter"));
  CHECK_THAT(load_error(head + "name_field = \"kind\"\nfeature = \"bench 1\"\n"),
             Catch::Contains("no feature named 'bench 1'"));
}

TEST_CASE("Bad CRSs, layers, features and attributes are one line with file, line and key", "[crs][zone_layer][errors]") {
  const std::string source = "[[source]]\nspread = { sigma = 1.0 }\n";
  CHECK_THROWS(load("[site]\ncrs = \"EPSG:99999\"\n" + source));
  CHECK_THAT(load_error("[site]\ncrs = \"EPSG:99999\"\n" + source + "[[zone]]\nname = \"a\"\nrole = \"watch\"\nshape = \"disk\"\nparams = { radius = 1 }\n"), Catch::Contains("site_plans_test.toml:2:7: site.crs: unknown CRS 'EPSG:99999' (PROJ: "));
  CHECK_THAT(load_error("[site]\ncrs = \"EPSG:4326\"\n" + source), Catch::Contains("site.crs: 'EPSG:4326' (WGS 84) is not a projected CRS"));
  CHECK_THAT(load_error("[site]\ncrs = \"EPSG:32633\"\norigin = [15, 48]\n" + source), Catch::Contains("site.origin: give crs"));
  const std::string site = "[site]\ncrs = \"EPSG:32633\"\n" + source;
  const std::string layer = site + "[[zone_layer]]\ngeometry = \"sites/park_plan.gpkg\"\n";
  CHECK_THAT(load_error(site + "[[zone]]\nname = \"a\"\nrole = \"watch\"\ngeometry = \"sites/park_plan.gpkg\"\nlayer = \"plna\"\n"), Catch::Contains(":8:12: zone[1] 'a'.geometry: " + kShapes + "sites/park_plan.gpkg: no layer named 'plna' (did you mean 'plan'?)"));
  CHECK_THAT(load_error(site + "[[zone]]\nname = \"a\"\nrole = \"watch\"\ngeometry = \"sites/park_plan.gpkg\"\nfeature = \"bench 4\"\n"), Catch::Contains("no feature named 'bench 4' (did you mean 'bench 1'"));
  CHECK_THAT(load_error(layer + "role_field = \"rle\"\n"), Catch::Contains("zone_layer[1].role_field: the layer has no attribute 'rle' (did you mean 'role'?)"));
  CHECK_THAT(load_error(layer + "role_field = \"kind\"\n"), Catch::Contains("zone_layer[1] feature 'throwing field' (fid 1).kind: 'field' must be target, keep_out or report_only"));
  CHECK_THAT(load_error(layer + "role = \"watch\"\nname_field = \"kind\"\n"), Catch::Contains("duplicate zone name 'path'"));
  CHECK_THAT(load_error(layer + "role = \"watch\"\nrole_field = \"role\"\n"), Catch::Contains("give role (the same for every feature) or role_field"));
  CHECK_THAT(load_error(layer + "role = \"watch\"\nlayers = \"plan\"\n"), Catch::Contains("zone_layer[1].layers: unknown key (did you mean 'layer'?)"));
  // A layer in a CRS for a site tied to nothing.
  CHECK_THAT(load_error(source + "[[zone_layer]]\ngeometry = \"sites/park_plan.gpkg\"\nrole = \"watch\"\n"), Catch::Contains("layer 'plan' is in WGS 84 / UTM zone 33N; set site.crs (or site.origin)"));
}

TEST_CASE("A GeoJSON file that declares its CRS is transformed into the site's", "[crs]") {
  // The demo's plan declares EPSG:32633; a site in the same CRS reads it unchanged, and a site
  // with a local origin reads it through PROJ (UTM -> geographic -> local transverse Mercator).
  const Site utm = load("[site]\ncrs = \"EPSG:32633\"\n[[source]]\nmean = [512300, 5403740]\nspread = { sigma = 5.0 }\n"
                        "[[zone]]\nname = \"k\"\nrole = \"watch\"\ngeometry = \"sites/park_plan.geojson\"\nfeature = \"kiosk\"\n");
  const BoundingBox b = bounds(utm.zones[0].region);
  CHECK(b.min.x() == 512340.0);
  CHECK(b.max.y() == 5403714.0);
  const Site local = load("[site]\norigin = [15.1663, 48.7865]\n[[source]]\nspread = { sigma = 5.0 }\n"
                          "[[zone]]\nname = \"k\"\nrole = \"watch\"\ngeometry = \"sites/park_plan.geojson\"\nfeature = \"kiosk\"\n");
  // A 4 m square stays a 4 m square to the local frame's scale error (UTM's scale factor there
  // is 0.9996 + ...: the area changes by its square, about 8e-4).
  CHECK(std::abs(area(local.zones[0].region) - 16.0) < 16.0 * 2e-3);
}
