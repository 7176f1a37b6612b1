// GIS outputs (cli/output/gis_output.cpp) read back by GDAL's own tools (Debian's gdal-bin):
// `map --geotiff` by gdalinfo -json (CRS, geotransform, bands) and gdallocationinfo (cells equal
// to the CSV map), `map --gpkg` and `assess --gpkg` by ogrinfo; bad site plans exit 2 with one
// line and nothing written.
#include <catch2/catch.hpp>
#include <fmt/format.h>
#include <cmath>
#include <filesystem>
#include <functional>
#include <nlohmann/json.hpp>
#include <sstream>

#include "cli_support.hpp"
#include "gis_tools.hpp"

using namespace strewn::test;

namespace {

const std::string park = STREWN_SOURCE_DIR "/shapes/town_park.toml";

struct Cell {
  double x, y, risk, bound;
};

std::vector<Cell> read_csv(const std::string& path) {
  std::istringstream in(read_file(path));
  std::string line;
  std::getline(in, line);  // header
  std::vector<Cell> cells;
  while (std::getline(in, line)) {
    Cell c{};
    REQUIRE(std::sscanf(line.c_str(), "%lf,%lf,%lf,%lf", &c.x, &c.y, &c.risk, &c.bound) == 4);
    cells.push_back(c);
  }
  return cells;
}

}  // namespace

TEST_CASE("map --geotiff: gdalinfo reads the site's CRS, the grid and two Float64 bands", "[gis][map]") {
  const std::string dir = scratch_dir("geotiff");
  const std::string tif = dir + "/park.tif", csv = dir + "/park.csv";
  const Result r = run({"map", park, "--cells", "40", "--geotiff", tif, "--csv", csv});
  REQUIRE(r.status == 0);
  const ToolRun info = run_tool("gdalinfo -json " + tif);
  REQUIRE(info.status == 0);
  const auto j = nlohmann::json::parse(info.out);
  CHECK(j["driverShortName"] == "GTiff");
  CHECK(j["coordinateSystem"]["wkt"].get<std::string>().find("\"WGS 84 / UTM zone 33N\"") != std::string::npos);
  CHECK(j["coordinateSystem"]["wkt"].get<std::string>().find("ID[\"EPSG\",32633]") != std::string::npos);
  REQUIRE(j["bands"].size() == 2);
  for (const auto& band : j["bands"]) {
    CHECK(band["type"] == "Float64");
    CHECK(band["noDataValue"] == -1.0);
  }
  CHECK(j["metadata"]["IMAGE_STRUCTURE"]["COMPRESSION"] == "DEFLATE");
  // The geotransform from the CSV's cell centres: x0 - h/2, h, 0, y_top + h/2, 0, -h.
  const std::vector<Cell> cells = read_csv(csv);
  const int columns = j["size"][0], rows = j["size"][1];
  REQUIRE(static_cast<int>(cells.size()) == columns * rows);
  const double h = cells[1].x - cells[0].x;
  const auto& gt = j["geoTransform"];
  CHECK(std::abs(gt[0].get<double>() - (cells[0].x - h / 2)) < 1e-6);
  CHECK(std::abs(gt[1].get<double>() - h) < 1e-9);
  CHECK(std::abs(gt[3].get<double>() - (cells.back().y + h / 2)) < 1e-6);
  CHECK(std::abs(gt[5].get<double>() + h) < 1e-9);
  // Cells read by gdallocationinfo at the CSV's centres: both bands equal the CSV's values
  // (gdallocationinfo prints 15 significant digits, the CSV the risk to 17 and the bound to 3).
  for (const std::size_t k : {std::size_t{0}, cells.size() / 3, cells.size() / 2 + 7, cells.size() - 1}) {
    const Cell& c = cells[k];
    std::ostringstream cmd;
    cmd.precision(17);
    cmd << "gdallocationinfo -valonly -geoloc " << tif << " " << c.x << " " << c.y;
    const ToolRun at = run_tool(cmd.str());
    REQUIRE(at.status == 0);
    double risk = NAN, bound = NAN;
    std::istringstream(at.out) >> risk >> bound;
    CHECK(std::abs(risk - c.risk) <= 1e-14 * c.risk);
    CHECK(std::abs(bound - c.bound) <= 5e-3 * c.bound);
  }
}

TEST_CASE("map --gpkg writes zones, contours, unsafe areas and sources in the site's CRS", "[gis][map]") {
  const std::string dir = scratch_dir("gpkg");
  const std::string gpkg = dir + "/park.gpkg";
  REQUIRE(run({"map", park, "--cells", "40", "--gpkg", gpkg}).status == 0);
  const ToolRun layers = run_tool("ogrinfo -ro -q " + gpkg);
  REQUIRE(layers.status == 0);
  for (const char* name : {"zones (Multi Polygon)", "contours (Multi Line String)", "unsafe_areas (Multi Polygon)",
                           "source_means (Point)", "source_ellipses (Polygon)"})
    CHECK(layers.out.find(name) != std::string::npos);
  const ToolRun zones = run_tool("ogrinfo -ro -so " + gpkg + " zones");
  CHECK(zones.out.find("Feature Count: 12") != std::string::npos);
  CHECK(zones.out.find("WGS 84 / UTM zone 33N") != std::string::npos);
  // The probability in the layer is the one assess prints in its JSON.
  const Result a = run({"assess", park, "--format", "json"});
  const auto j = nlohmann::json::parse(a.out);
  double expected = -1;
  for (const auto& z : j["zones"])
    if (z["name"] == "bench 1") expected = z["all_sources"]["p_session"];
  const ToolRun bench = run_tool("ogrinfo -ro -q " + gpkg +
                                 " -sql \"SELECT p_session, verdict FROM zones WHERE name = 'bench 1'\"");
  const auto at = bench.out.find("p_session (Real) = ");
  REQUIRE(at != std::string::npos);
  CHECK(std::abs(std::stod(bench.out.substr(at + 19)) - expected) <= 1e-13 * expected);
  CHECK(bench.out.find("verdict (String) = exceeded") != std::string::npos);
  // Two ellipses (1 and 2 sigma) per component: the thrower has a core and a wild component.
  CHECK(run_tool("ogrinfo -ro -so " + gpkg + " source_ellipses").out.find("Feature Count: 4") != std::string::npos);
  // The unsafe areas are the contour polygons the map's JSON reports (not unions of grid
  // cells): their area as GDAL's SQLite dialect measures it (ST_Area) is the JSON's area_m2.
  const Result mj = run({"map", park, "--cells", "40", "--format", "json"});
  REQUIRE(mj.status == 0);
  const auto mjson = nlohmann::json::parse(mj.out);
  std::size_t measured = 0;
  for (const auto& u : mjson["unsafe_areas"]) {
    if (u["loops"].get<int>() == 0) continue;
    const ToolRun area = run_tool("ogrinfo -ro -q -dialect SQLite " + gpkg + " -sql \"SELECT ST_Area(geom) AS a FROM unsafe_areas"
                                  " WHERE level = " + fmt::format("{:.17g}", u["level"].get<double>()) + "\"");
    const auto a_at = area.out.find("a (Real) = ");
    REQUIRE(a_at != std::string::npos);
    const double square_metres = u["area_m2"].get<double>();
    CHECK(std::abs(std::stod(area.out.substr(a_at + 11)) - square_metres) <= 1e-9 * square_metres);
    ++measured;
  }
  CHECK(measured > 0);
}

TEST_CASE("map --geojson of a site in UTM writes longitude/latitude, as cs2cs gives them", "[gis][map]") {
  // RFC 7946 positions are WGS 84 [lon, lat]; the park lies in UTM zone 33N. The contours lie
  // within the plan's box, whose corners cs2cs (PROJ's tool) converts: lon/lat bounds.
  const std::string dir = scratch_dir("geojson_crs");
  REQUIRE(run({"map", park, "--cells", "40", "--geojson", dir + "/c.geojson"}).status == 0);
  const auto j = nlohmann::json::parse(read_file(dir + "/c.geojson"));
  CHECK_FALSE(j.contains("strewn_coordinates"));
  const ToolRun corners = run_tool("printf '512200 5403600\\n512420 5403840\\n' | cs2cs -f %.9f EPSG:32633 +to "
                                   "+proj=longlat +datum=WGS84 +type=crs");
  REQUIRE(corners.status == 0);
  double lon0 = 0, lat0 = 0, z = 0, lon1 = 0, lat1 = 0;
  std::istringstream(corners.out) >> lon0 >> lat0 >> z >> lon1 >> lat1;
  REQUIRE(lon1 > lon0);
  // Every position, of the contours (MultiLineString) and of the unsafe areas (MultiPolygon,
  // which were once left in UTM metres).
  std::size_t points = 0, unsafe = 0;
  std::function<void(const nlohmann::json&)> walk = [&](const nlohmann::json& c) {
    if (c.is_array() && c.size() == 2 && c[0].is_number()) {
      ++points;
      CHECK((c[0].get<double>() > lon0 && c[0].get<double>() < lon1));
      CHECK((c[1].get<double>() > lat0 && c[1].get<double>() < lat1));
      return;
    }
    for (const auto& e : c) walk(e);
  };
  for (const auto& f : j["features"]) {
    if (f["properties"]["kind"] == "unsafe_area") ++unsafe;
    walk(f["geometry"]["coordinates"]);
  }
  CHECK(points > 10);
  CHECK(unsafe > 0);
}

TEST_CASE("assess --gpkg writes the zones layer alone, and the same table as without it", "[gis][assess]") {
  const std::string dir = scratch_dir("assess_gpkg");
  const std::string gpkg = dir + "/zones.gpkg";
  const Result with = run({"assess", park, "--gpkg", gpkg});
  const Result without = run({"assess", park});
  CHECK(with.status == 3);  // limits exceeded in the demo
  CHECK(with.out == without.out);
  const ToolRun layers = run_tool("ogrinfo -ro -q " + gpkg);
  CHECK(layers.out.find("1: zones (Multi Polygon)") != std::string::npos);
  CHECK(layers.out.find("2:") == std::string::npos);
}

TEST_CASE("A bad site plan exits 2 with one line and writes nothing", "[gis][errors]") {
  const std::string dir = scratch_dir("bad_plans");
  const std::string tif = dir + "/out.tif";
  const std::string plan = STREWN_SOURCE_DIR "/shapes/sites/park_plan.gpkg";
  const std::string head = "[[source]]\nmean = [512300, 5403740]\nspread = { sigma = 5 }\n";
  struct Case {
    const char* name;
    std::string text, message;
  };
  for (const Case& c : {Case{"unknown_crs", "[site]\ncrs = \"EPSG:99999\"\n" + head, "site.crs: unknown CRS 'EPSG:99999'"},
                        Case{"missing_layer",
                             "[site]\ncrs = \"EPSG:32633\"\n" + head + "[[zone_layer]]\ngeometry = \"" + plan +
                                 "\"\nlayer = \"plna\"\nrole = \"watch\"\n",
                             "no layer named 'plna' (did you mean 'plan'?)"},
                        Case{"missing_feature",
                             "[site]\ncrs = \"EPSG:32633\"\n" + head + "[[zone]]\nname = \"b\"\nrole = \"watch\"\ngeometry = \"" +
                                 plan + "\"\nfeature = \"benhc 2\"\n",
                             "no feature named 'benhc 2' (did you mean 'bench 2'?)"},
                        // Issue 16's trial: an empty name and a folder (GDAL opened "." as a
                        // folder of Shapefiles), a where on a missing attribute (GDAL's raw SQL
                        // error before), a swapped origin (p = 0 and exit 0 before: 4,944 km).
                        Case{"empty_geometry",
                             "[site]\ncrs = \"EPSG:32633\"\n" + head + "[[zone_layer]]\ngeometry = \"\"\nrole = \"report_only\"\n",
                             "zone_layer[1].geometry: empty: name the file that holds the zone"},
                        Case{"folder_geometry",
                             "[site]\ncrs = \"EPSG:32633\"\n" + head + "[[zone_layer]]\ngeometry = \".\"\nrole = \"report_only\"\n",
                             "zone_layer[1].geometry: '.' is a folder; name a file (for a Shapefile, its .shp)"},
                        Case{"where_missing_attribute",
                             "[site]\ncrs = \"EPSG:32633\"\n" + head + "[[zone_layer]]\ngeometry = \"" + plan +
                                 "\"\nwhere = \"knid = 'bench'\"\nrole = \"report_only\"\n",
                             "where \"knid = 'bench'\": the layer has no attribute 'knid' (did you mean 'kind'?)"},
                        Case{"swapped_origin",
                             "[site]\norigin = [48.79, 15.17]\n" + head + "[[zone_layer]]\ngeometry = \"" + plan +
                                 "\"\nrole = \"report_only\"\n",
                             " km from the site origin; check the origin and the axis order (longitude first)"}}) {
    INFO(c.name);
    const std::string file = dir + "/" + c.name + ".toml";
    write_text(file, c.text);
    const Result r = run({"map", file, "--geotiff", tif});
    CHECK(r.status == 2);
    CHECK(r.out.empty());
    CHECK(r.err.find(c.message) != std::string::npos);
    CHECK(r.err.find("strewn: error: " + file + ":") == 0);
    CHECK(std::count(r.err.begin(), r.err.end(), '\n') == 1);
    CHECK_FALSE(std::filesystem::exists(tif));
  }
}

// Issue 15 item 8 meets the GIS outputs: a site in feet with an origin writes its GeoTIFF and
// GeoPackage in feet, in the local frame with +units=ft, so the file's coordinates are the
// scenario's own numbers (the CSV's).
TEST_CASE("map --geotiff and --gpkg of a site in feet are in feet, in a local frame in feet", "[gis][map][units]") {
  const std::string dir = scratch_dir("geotiff_feet");
  std::string text = read_file(STREWN_SOURCE_DIR "/tests/data/cli/throwing_lane_feet.toml");
  const std::string units = "units = \"ft\"\n";
  REQUIRE(text.find(units) != std::string::npos);
  text.replace(text.find(units), units.size(), units + "origin = [13.4, 52.5]\n");
  write_text(dir + "/lane_ft.toml", text);
  const std::string tif = dir + "/lane.tif", csv = dir + "/lane.csv", gpkg = dir + "/lane.gpkg";
  const Result r = run({"map", dir + "/lane_ft.toml", "--cells", "20", "--geotiff", tif, "--csv", csv, "--gpkg", gpkg});
  REQUIRE(r.status == 0);
  const ToolRun info = run_tool("gdalinfo -json " + tif);
  REQUIRE(info.status == 0);
  const auto j = nlohmann::json::parse(info.out);
  const std::string wkt = j["coordinateSystem"]["wkt"];
  CHECK(wkt.find("LENGTHUNIT[\"foot\",0.3048") != std::string::npos);
  const std::vector<Cell> cells = read_csv(csv);
  const double h = cells[1].x - cells[0].x;
  const auto& gt = j["geoTransform"];
  CHECK(std::abs(gt[0].get<double>() - (cells[0].x - h / 2)) < 1e-6);
  CHECK(std::abs(gt[1].get<double>() - h) < 1e-6);  // the CSV's centres carry 9 digits
  const ToolRun layer = run_tool("ogrinfo -so " + gpkg + " unsafe_areas");
  REQUIRE(layer.status == 0);
  CHECK(layer.out.find("cell_ft: Real") != std::string::npos);
  CHECK(layer.out.find("foot") != std::string::npos);
}

namespace {

// A thrower at the origin throwing north at (0, 6) behind a wall from (-1, 3) to (1, 3): the wall's
// shadow seen from the origin is the wedge |x| <= y / 3 beyond y = 3.
std::string walled_thrower(double catch_share) {
  return fmt::format(R"([site]
name = "Invented walled lane"
units = "metres"

[[source]]
name = "thrower"
position = [0.0, 0.0]
toward = [0.0, 6.0]
spread_angle_deg = 8
range_fraction = 0.1
events_per_session = 10

[[barrier]]
name = "wall"
points = [[-1.0, 3.0], [1.0, 3.0]]
catch = {}

[[zone]]
name = "bench"
role = "keep_out"
shape = "rectangle"
params = {{ centre = [0.0, 6.0], width = 1.0, depth = 1.0 }}
limit = 0.5
)", catch_share);
}

}  // namespace

TEST_CASE("map --geotiff honours barriers: its cells equal the CSV's, which differ from the unwalled map's", "[gis][map][barrier]") {
  const std::string dir = scratch_dir("barrier_geotiff");
  write_text(dir + "/wall.toml", walled_thrower(1.0));
  write_text(dir + "/open.toml", walled_thrower(0.0));
  const std::vector<std::string> grid{"--cells", "12", "--extent", "-6", "-1", "6", "11"};
  std::vector<std::string> walled{"map", dir + "/wall.toml", "--geotiff", dir + "/wall.tif", "--csv", dir + "/wall.csv"};
  std::vector<std::string> open{"map", dir + "/open.toml", "--csv", dir + "/open.csv"};
  walled.insert(walled.end(), grid.begin(), grid.end());
  open.insert(open.end(), grid.begin(), grid.end());
  REQUIRE(run(walled).status != 2);
  REQUIRE(run(open).status != 2);
  const std::vector<Cell> cells = read_csv(dir + "/wall.csv"), unwalled = read_csv(dir + "/open.csv");
  REQUIRE(cells.size() == unwalled.size());
  std::size_t shadowed = 0;
  for (std::size_t k = 0; k < cells.size(); ++k) {
    const Cell& c = cells[k];
    // Deep in the shadow (footprint and all): the wall with catch 1 leaves far less than no wall.
    if (!(c.y > 5.0 && std::fabs(c.x) < c.y / 3.0 - 1.0 && unwalled[k].risk > 1e-6)) continue;
    ++shadowed;
    CHECK(c.risk < 0.5 * unwalled[k].risk);
    std::ostringstream cmd;
    cmd.precision(17);
    cmd << "gdallocationinfo -valonly -geoloc " << dir << "/wall.tif " << c.x << " " << c.y;
    const ToolRun at = run_tool(cmd.str());
    REQUIRE(at.status == 0);
    double risk = NAN, bound = NAN;
    std::istringstream(at.out) >> risk >> bound;
    CHECK(std::abs(risk - c.risk) <= 1e-14 * std::max(c.risk, 1e-300));
  }
  CHECK(shadowed > 0);
}

TEST_CASE("map --gpkg and --geojson carry the barrier lines and their shadows; ST_Area of the shadow is the wedge's", "[gis][map][barrier]") {
  const std::string dir = scratch_dir("barrier_layers");
  write_text(dir + "/wall.toml", walled_thrower(0.9));
  const Result r = run({"map", dir + "/wall.toml", "--cells", "12", "--extent", "-6", "-1", "6", "11", "--gpkg",
                        dir + "/wall.gpkg", "--geojson", dir + "/wall.geojson", "--csv", dir + "/wall.csv"});
  REQUIRE(r.status != 2);
  const ToolRun layers = run_tool("ogrinfo -ro -q " + dir + "/wall.gpkg");
  CHECK(layers.out.find("barriers (Line String)") != std::string::npos);
  CHECK(layers.out.find("barrier_shadows (Multi Polygon)") != std::string::npos);
  const ToolRun wall = run_tool("ogrinfo -ro -q " + dir + "/wall.gpkg -sql \"SELECT catch FROM barriers WHERE name = 'wall'\"");
  CHECK(wall.out.find("catch (Real) = 0.9") != std::string::npos);
  // The map's extent from its CSV (cell centres +- half a cell); the wedge |x| <= y/3 for
  // 3 <= y <= top has the area (top^2 - 9) / 3 while it stays inside the extent's sides.
  const std::vector<Cell> cells = read_csv(dir + "/wall.csv");
  const double h = cells[1].x - cells[0].x, top = cells.back().y + h / 2;
  REQUIRE(top / 3 < -(cells.front().x - h / 2));
  const ToolRun area = run_tool("ogrinfo -ro -q -dialect SQLite " + dir + "/wall.gpkg -sql \"SELECT ST_Area(geom) AS a FROM barrier_shadows\"");
  const auto at = area.out.find("a (Real) = ");
  REQUIRE(at != std::string::npos);
  // To 1e-6: the shadow is cut to the extent by the polygon booleans, whose tolerance is 1e-6 of
  // the shadow's reach (a drawing, not a probability).
  CHECK(std::stod(area.out.substr(at + 11)) == Approx((top * top - 9) / 3).epsilon(1e-6));
  const auto j = nlohmann::json::parse(read_file(dir + "/wall.geojson"));
  int barriers = 0, shadows = 0;
  for (const auto& f : j["features"]) {
    if (f["properties"]["kind"] == "barrier") {
      ++barriers;
      CHECK(f["geometry"]["type"] == "LineString");
      CHECK(f["geometry"]["coordinates"] == nlohmann::json::parse("[[-1.0, 3.0], [1.0, 3.0]]"));
    }
    if (f["properties"]["kind"] == "barrier_shadow") {
      ++shadows;
      CHECK(f["properties"]["barrier"] == "wall");
      CHECK(f["properties"]["source"] == "thrower");
    }
  }
  CHECK(barriers == 1);
  CHECK(shadows == 1);
}

TEST_CASE("map of a drop draws the release point and the flight track, labelled, in SVG, GeoJSON and GPKG", "[gis][map][drop]") {
  const std::string dir = scratch_dir("drop_layers");
  const std::string drone = STREWN_SOURCE_DIR "/shapes/drone_drop_flight.toml";
  const Result r = run({"map", drone, "--cells", "12", "--svg", dir + "/drop.svg", "--geojson", dir + "/drop.geojson",
                        "--gpkg", dir + "/drop.gpkg"});
  REQUIRE(r.status != 2);
  const std::string svg = read_file(dir + "/drop.svg");
  CHECK(svg.find("class=\"flight-track\"") != std::string::npos);
  CHECK(svg.find("class=\"release-point\"") != std::string::npos);
  CHECK(svg.find("parcel on a parachute: release at 25 m") != std::string::npos);
  CHECK(svg.find("flight track, bearing 0 deg at 6 m/s") != std::string::npos);
  // The release point is the scenario's (-1.5, 4.7); the track runs north (bearing 0) through it.
  const auto j = nlohmann::json::parse(read_file(dir + "/drop.geojson"));
  bool release = false, track = false;
  for (const auto& f : j["features"]) {
    if (f["properties"]["kind"] == "release_point") {
      release = true;
      CHECK(f["geometry"]["coordinates"][0].get<double>() == Approx(-1.5));
      CHECK(f["geometry"]["coordinates"][1].get<double>() == Approx(4.7));
    }
    if (f["properties"]["kind"] == "flight_track") {
      track = true;
      const auto& c = f["geometry"]["coordinates"];
      CHECK(c[0][0].get<double>() == Approx(-1.5));
      CHECK(c[1][0].get<double>() == Approx(-1.5));
      CHECK(c[1][1].get<double>() > c[0][1].get<double>());
    }
  }
  CHECK(release);
  CHECK(track);
  const ToolRun layers = run_tool("ogrinfo -ro -q " + dir + "/drop.gpkg");
  CHECK(layers.out.find("flight_tracks (Line String)") != std::string::npos);
  CHECK(layers.out.find("drop_points (Point)") != std::string::npos);
  const ToolRun kinds = run_tool("ogrinfo -ro -q " + dir + "/drop.gpkg -sql \"SELECT kind FROM drop_points WHERE kind = 'release_point'\"");
  CHECK(kinds.out.find("kind (String) = release_point") != std::string::npos);
}

// Issue 16's trial: `assess plan.toml --gpkg utm_plan.dbf` replaced the Shapefile's attribute
// table, a file of the input dataset that is not the one the scenario names. Every file GDAL
// lists for an input dataset (GDALDataset::GetFileList) is an input of the run.
TEST_CASE("an output naming a companion file of an input Shapefile is refused and nothing is written", "[gis][errors]") {
  const std::string dir = scratch_dir("companion_output");
  const std::string plan = STREWN_SOURCE_DIR "/shapes/sites/park_plan.gpkg";
  REQUIRE(run_tool("ogr2ogr -f \"ESRI Shapefile\" " + dir + "/plan.shp " + plan).status == 0);
  const std::string scenario = dir + "/site.toml";
  write_text(scenario, "[site]\ncrs = \"EPSG:32633\"\n[[source]]\nmean = [512300, 5403740]\nspread = { sigma = 5 }\n"
                       "[[zone_layer]]\ngeometry = \"plan.shp\"\nrole = \"report_only\"\n");
  REQUIRE(run({"assess", scenario}).status == 0);
  for (const char* companion : {"plan.dbf", "plan.shx", "plan.prj"}) {
    INFO(companion);
    const std::string file = dir + "/" + companion;
    const std::string before = read_file(file);
    const Result r = run({"assess", scenario, "--gpkg", file});
    CHECK(r.status == 2);
    CHECK(r.out.empty());
    CHECK(r.err.find("strewn: error: output '" + file + "' is the input '") == 0);
    CHECK(r.err.find("writing it would destroy that input") != std::string::npos);
    CHECK(std::count(r.err.begin(), r.err.end(), '\n') == 1);
    CHECK(read_file(file) == before);
  }
}

// GeoPackage 1.3 (OGC 12-128r18), table gpkg_spatial_ref_sys: srs_id -1 is the "Undefined
// Cartesian SRS", 0 the "Undefined geographic SRS"; a site tied to no CRS is a plane in metres.
TEST_CASE("assess --gpkg of a site tied to no CRS writes srs_id -1, the undefined Cartesian SRS", "[gis][assess]") {
  const std::string dir = scratch_dir("gpkg_no_crs");
  const std::string gpkg = dir + "/zones.gpkg";
  const Result r = run({"assess", STREWN_SOURCE_DIR "/shapes/lawn_sprinkler.toml", "--gpkg", gpkg});
  REQUIRE((r.status == 0 || r.status == 3));
  const ToolRun srs = run_tool("ogrinfo -ro -q " + gpkg + " -sql \"SELECT srs_id FROM gpkg_geometry_columns WHERE table_name = 'zones'\"");
  REQUIRE(srs.status == 0);
  CHECK(srs.out.find("srs_id (Integer64) = -1") != std::string::npos);
  const ToolRun contents = run_tool("ogrinfo -ro -q " + gpkg + " -sql \"SELECT srs_id FROM gpkg_contents WHERE table_name = 'zones'\"");
  CHECK(contents.out.find("srs_id (Integer64) = -1") != std::string::npos);
}
