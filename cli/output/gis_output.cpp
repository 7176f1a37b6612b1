#include "output/gis_output.hpp"

#include <cpl_conv.h>
#include <cpl_error.h>
#include <cpl_vsi.h>
#include <gdal_priv.h>
#include <ogr_geometry.h>
#include <ogr_spatialref.h>
#include <ogrsf_frmts.h>

#include <algorithm>
#include <atomic>
#include <cmath>
#include <memory>

#include "output/lengths.hpp"
#include "output/plan_features.hpp"
#include "strewn/constants.hpp"
#include "strewn/error.hpp"
#include "strewn/gdal_scope.hpp"
#include "strewn/region.hpp"
#include "strewn/version.hpp"

namespace strewn::cli {
namespace {

[[noreturn]] void fail(const std::string& what) {
  const std::string why = GdalScope::reason("");
  throw input_error(what + (why.empty() ? std::string() : " (GDAL: " + why + ")"));
}

struct DatasetCloser {
  void operator()(GDALDataset* d) const { GDALClose(d); }
};
using Dataset = std::unique_ptr<GDALDataset, DatasetCloser>;

// A file in GDAL's memory file system, removed (with its side files) when done.
class MemoryFile {
 public:
  explicit MemoryFile(const char* extension) {
    static std::atomic<unsigned long> counter{0};
    path_ = "/vsimem/strewn_" + std::to_string(reinterpret_cast<std::uintptr_t>(this)) + "_" +
            std::to_string(counter++) + extension;
  }
  ~MemoryFile() {
    VSIUnlink(path_.c_str());
    for (const char* side : {"-journal", "-wal", "-shm", ".aux.xml"}) VSIUnlink((path_ + side).c_str());
  }
  MemoryFile(const MemoryFile&) = delete;
  MemoryFile& operator=(const MemoryFile&) = delete;
  const std::string& path() const { return path_; }
  std::string bytes() const {
    vsi_l_offset size = 0;
    GByte* data = VSIGetMemFileBuffer(path_.c_str(), &size, FALSE);
    if (data == nullptr) fail("GDAL wrote no data to " + path_);
    return std::string(reinterpret_cast<const char*>(data), static_cast<std::size_t>(size));
  }

 private:
  std::string path_;
};

// The site frame's CRS for GDAL, traditional GIS order; none for a frame tied to nothing. A
// site in feet has its local frame (about its origin) in feet, so that the file's coordinates
// are the scenario's own numbers (a site with a crs is in metres: site_io.cpp).
std::unique_ptr<OGRSpatialReference> site_srs(const Site& s) {
  std::string definition = site_frame_crs(s);
  if (definition.empty()) return nullptr;
  if (s.crs.empty() && s.units == LengthUnit::foot) {
    const std::string metres = "+units=m ";
    const std::size_t at = definition.find(metres);
    if (at == std::string::npos) fail("the local frame's definition names no unit: " + definition);
    definition.replace(at, metres.size(), "+units=ft ");
  }
  auto srs = std::make_unique<OGRSpatialReference>();
  if (srs->SetFromUserInput(definition.c_str()) != OGRERR_NONE) fail("unknown CRS '" + definition + "'");
  srs->SetAxisMappingStrategy(OAMS_TRADITIONAL_GIS_ORDER);
  return srs;
}

std::string per_text(Period p) { return to_string(p); }

// ---- vector layers ----

OGRLinearRing ring_of(const Loop& loop) {
  OGRLinearRing ring;
  for (const Edge& e : loop) ring.addPoint(e.from.x(), e.from.y());
  ring.closeRings();
  return ring;
}

// A region as a multipolygon in the scenario's unit: arcs polygonised to 1 mm, holes given to
// the polygon around them.
std::unique_ptr<OGRGeometry> geometry_of(const Region& region, const Lengths& L) {
  const Region flat = transformed(polygonised(region, 1e-3), Mat2::Identity() * L(1.0), Vec2::Zero());
  std::vector<OGRGeometry*> parts;
  for (const Loop& loop : flat.loops) {
    auto* p = new OGRPolygon();
    OGRLinearRing r = ring_of(loop);
    p->addRing(&r);
    parts.push_back(p);
  }
  int valid = 0;
  std::unique_ptr<OGRGeometry> g(
      OGRGeometryFactory::organizePolygons(parts.data(), static_cast<int>(parts.size()), &valid, nullptr));
  return std::unique_ptr<OGRGeometry>(OGRGeometryFactory::forceToMultiPolygon(g.release()));
}

OGRLayer* new_layer(GDALDataset& d, const char* name, OGRwkbGeometryType type, const OGRSpatialReference* srs,
                    const std::vector<std::pair<const char*, OGRFieldType>>& fields) {
  OGRLayer* layer = d.CreateLayer(name, const_cast<OGRSpatialReference*>(srs), type, nullptr);  // GDAL 3.6 takes it non-const
  if (layer == nullptr) fail(std::string("cannot create the GeoPackage layer '") + name + "'");
  for (const auto& [field, kind] : fields) {
    OGRFieldDefn def(field, kind);
    if (layer->CreateField(&def) != OGRERR_NONE) fail(std::string("cannot create the field '") + field + "'");
  }
  return layer;
}

void add(OGRLayer& layer, OGRFeature& f) {
  if (layer.CreateFeature(&f) != OGRERR_NONE)
    fail(std::string("cannot write a feature to the GeoPackage layer '") + layer.GetName() + "'");
}

void zones_layer(GDALDataset& d, const OGRSpatialReference* srs, const Assessment& a, const Lengths& L) {
  OGRLayer* layer = new_layer(d, "zones", wkbMultiPolygon, srs,
                              {{"name", OFTString}, {"role", OFTString}, {"limit", OFTReal}, {"limit_per", OFTString},
                               {"verdict", OFTString}, {"p_event_max", OFTReal}, {"p_event_max_err", OFTReal},
                               {"p_session", OFTReal}, {"p_session_err", OFTReal}, {"p_year", OFTReal},
                               {"p_year_err", OFTReal}, {"status", OFTString}});
  for (const ZoneResult& z : a.zones) {
    OGRFeature f(layer->GetLayerDefn());
    f.SetField("name", z.zone->name.c_str());
    f.SetField("role", to_string(z.zone->role));
    if (z.zone->limit) {
      f.SetField("limit", *z.zone->limit);
      f.SetField("limit_per", to_string(z.zone->limit_per));
    }
    const char* verdict = !z.limit_holds ? "no limit"
                          : *z.limit_holds ? "holds"
                          : z.limit_undecided ? "not shown to hold"
                                              : "exceeded";
    f.SetField("verdict", verdict);
    double p_event = 0.0, p_event_err = 0.0;
    for (const SourceResult& r : z.sources)
      if (r.event.p >= p_event) {
        p_event = r.event.p;
        p_event_err = r.event.abs_err;
      }
    f.SetField("p_event_max", p_event);
    f.SetField("p_event_max_err", p_event_err);
    f.SetField("p_session", z.total_per_session);
    f.SetField("p_session_err", z.total_per_session_err);
    f.SetField("p_year", z.total_per_year);
    f.SetField("p_year_err", z.total_per_year_err);
    f.SetField("status", to_string(z.status));
    f.SetGeometryDirectly(geometry_of(z.zone->region, L).release());
    add(*layer, f);
  }
}

void contours_layer(GDALDataset& d, const OGRSpatialReference* srs, const SiteMap& m, const Lengths& L) {
  OGRLayer* layer = new_layer(d, "contours", wkbMultiLineString, srs,
                              {{"level", OFTReal}, {"per", OFTString}, {"label", OFTString}, {"log10_accuracy", OFTReal}});
  for (const LabelledContours& c : m.contours) {
    auto lines = std::make_unique<OGRMultiLineString>();
    for (const ContourLine& line : c.set.lines) {
      OGRLineString ls;
      for (const Vec2& p : line.points) ls.addPoint(L(p.x()), L(p.y()));
      if (line.closed && !line.points.empty()) ls.addPoint(L(line.points.front().x()), L(line.points.front().y()));
      lines->addGeometry(&ls);
    }
    OGRFeature f(layer->GetLayerDefn());
    f.SetField("level", c.set.level);
    f.SetField("per", per_text(m.per).c_str());
    f.SetField("label", c.label.c_str());
    f.SetField("log10_accuracy", c.set.log10_error);
    f.SetGeometryDirectly(lines.release());
    add(*layer, f);
  }
}

// The unsafe area at each keep-out limit: the engine's polygons (strewn/risk_area.hpp), whose
// boundary inside the map is the contour line itself, the same areas the SVG and GeoJSON show.
// (Formerly the union of the grid cells above the level, whose edges were cell edges.)
void unsafe_layer(GDALDataset& d, const OGRSpatialReference* srs, const SiteMap& m, const Lengths& L) {
  const std::string cell = L.key("cell");  // cell_m or cell_ft: the map's spacing, which sets the line's accuracy
  const std::string area_key = L.area_key("area");  // area_m2 or area_ft2
  OGRLayer* layer = new_layer(d, "unsafe_areas", wkbMultiPolygon, srs,
                              {{"level", OFTReal}, {"per", OFTString}, {"label", OFTString}, {"zones", OFTString},
                               {area_key.c_str(), OFTReal}, {cell.c_str(), OFTReal}});
  for (const UnsafeArea& u : m.unsafe_areas) {
    if (u.area.empty()) continue;
    std::string zones;
    for (const std::string& z : u.zones) zones += (zones.empty() ? "" : ", ") + z;
    OGRFeature f(layer->GetLayerDefn());
    f.SetField("level", u.level);
    f.SetField("per", per_text(m.per).c_str());
    f.SetField("label", ("limit of '" + zones + "'").c_str());
    f.SetField("zones", zones.c_str());
    f.SetField(area_key.c_str(), L(L(u.square_metres)));
    f.SetField(cell.c_str(), L(m.map.grid.spacing));
    f.SetGeometryDirectly(geometry_of(u.area, L).release());
    add(*layer, f);
  }
}

void source_layers(GDALDataset& d, const OGRSpatialReference* srs, const Site& s) {
  const Lengths L(s);
  OGRLayer* means = new_layer(d, "source_means", wkbPoint, srs,
                              {{"source", OFTString}, {"component", OFTInteger}, {"weight", OFTReal}});
  OGRLayer* ellipses = new_layer(d, "source_ellipses", wkbPolygon, srs,
                                 {{"source", OFTString}, {"component", OFTInteger}, {"sigmas", OFTInteger}});
  for (const Source& src : s.sources) {
    int k = 0;
    for (const WeightedGaussian& c : src.model.components()) {
      ++k;
      const Vec2 mean = c.gaussian.mean();
      OGRFeature f(means->GetLayerDefn());
      f.SetField("source", src.name.c_str());
      f.SetField("component", k);
      f.SetField("weight", c.weight);
      f.SetGeometryDirectly(new OGRPoint(L(mean.x()), L(mean.y())));
      add(*means, f);
      for (int sigmas = 1; sigmas <= 2; ++sigmas) {
        // The ellipse {mean + sigmas L u : |u| = 1}: the Mahalanobis contour at that many sigmas.
        OGRLinearRing r;
        constexpr int kVertices = 128;
        for (int v = 0; v < kVertices; ++v) {
          const double t = 2 * kPi * v / kVertices;
          const Vec2 p = mean + sigmas * (c.gaussian.cholesky() * Vec2(std::cos(t), std::sin(t)));
          r.addPoint(L(p.x()), L(p.y()));
        }
        r.closeRings();
        auto poly = std::make_unique<OGRPolygon>();
        poly->addRing(&r);
        OGRFeature e(ellipses->GetLayerDefn());
        e.SetField("source", src.name.c_str());
        e.SetField("component", k);
        e.SetField("sigmas", sigmas);
        e.SetGeometryDirectly(poly.release());
        add(*ellipses, e);
      }
    }
  }
}

// Barriers (lines) and, with a map, their shadows over its extent; each drop's flight track
// and its release and nominal landing points (output/plan_features.hpp, as the SVG draws them).
void barrier_and_drop_layers(GDALDataset& d, const OGRSpatialReference* srs, const Site& s, const SiteMap* map,
                             const Lengths& L) {
  if (!s.barriers.empty()) {
    const std::string height = L.key("height");
    OGRLayer* lines = new_layer(d, "barriers", wkbLineString, srs,
                                {{"name", OFTString}, {"catch", OFTReal}, {height.c_str(), OFTReal}});
    for (const Barrier& b : s.barriers) {
      OGRFeature f(lines->GetLayerDefn());
      f.SetField("name", b.name.c_str());
      f.SetField("catch", b.catch_share);
      if (b.height) f.SetField(height.c_str(), L(*b.height));
      auto ls = std::make_unique<OGRLineString>();
      for (const Vec2& p : b.points) ls->addPoint(L(p.x()), L(p.y()));
      f.SetGeometryDirectly(ls.release());
      add(*lines, f);
    }
    if (map != nullptr) {
      OGRLayer* shadows = new_layer(d, "barrier_shadows", wkbMultiPolygon, srs, {{"barrier", OFTString}, {"source", OFTString}});
      const GridSpec& g = map->map.grid;
      const Vec2 half(g.spacing / 2, g.spacing / 2);
      for (const ShadowFeature& sh : plan_shadows(s, {g.origin - half, g.centre(g.columns - 1, g.rows - 1) + half})) {
        OGRFeature f(shadows->GetLayerDefn());
        f.SetField("barrier", sh.barrier.c_str());
        f.SetField("source", sh.source.c_str());
        f.SetGeometryDirectly(geometry_of(sh.area, L).release());
        add(*shadows, f);
      }
    }
  }
  const std::vector<DropFeature> drops = plan_drops(s);
  if (drops.empty()) return;
  OGRLayer* tracks = new_layer(d, "flight_tracks", wkbLineString, srs, {{"source", OFTString}, {"label", OFTString}});
  OGRLayer* points = new_layer(d, "drop_points", wkbPoint, srs, {{"source", OFTString}, {"kind", OFTString}, {"label", OFTString}});
  for (const DropFeature& x : drops) {
    OGRFeature t(tracks->GetLayerDefn());
    t.SetField("source", x.source.c_str());
    t.SetField("label", x.track_label.c_str());
    auto ls = std::make_unique<OGRLineString>();
    ls->addPoint(L(x.track_start.x()), L(x.track_start.y()));
    ls->addPoint(L(x.track_end.x()), L(x.track_end.y()));
    t.SetGeometryDirectly(ls.release());
    add(*tracks, t);
    const std::pair<const char*, std::pair<Vec2, std::string>> marks[2] = {{"release_point", {x.release, x.release_label}},
                                                                            {"nominal_landing", {x.landing, x.landing_label}}};
    for (const auto& [kind, where] : marks) {
      OGRFeature f(points->GetLayerDefn());
      f.SetField("source", x.source.c_str());
      f.SetField("kind", kind);
      f.SetField("label", where.second.c_str());
      f.SetGeometryDirectly(new OGRPoint(L(where.first.x()), L(where.first.y())));
      add(*points, f);
    }
  }
}

}  // namespace

std::string risk_map_geotiff(const Site& s, const SiteMap& m) {
  GdalScope gdal;
  const GridSpec& g = m.map.grid;
  GDALDriver* mem = GetGDALDriverManager()->GetDriverByName("MEM");
  if (mem == nullptr) fail("GDAL has no MEM driver");
  Dataset d(mem->Create("", g.columns, g.rows, 2, GDT_Float64, nullptr));
  if (!d) fail("cannot create the raster in memory");
  // North up: the raster's first row is the grid's last (northernmost); pixel corners, not
  // centres, so the cell (i, j) centred at g.centre(i, j) covers +-spacing/2 around it.
  // In the scenario's unit, as the site's CRS (site_srs) is.
  const Lengths L(s);
  const double h = L(g.spacing);
  double transform[6] = {L(g.origin.x()) - h / 2, h, 0.0, L(g.origin.y()) + h * (g.rows - 0.5), 0.0, -h};
  d->SetGeoTransform(transform);
  if (auto srs = site_srs(s)) d->SetSpatialRef(srs.get());
  const std::vector<double>* data[2] = {&m.map.value, &m.map.abs_err};
  const std::string names[2] = {"risk per " + per_text(m.per), "error bound of the risk"};
  std::vector<double> row(static_cast<std::size_t>(g.columns));
  for (int b = 0; b < 2; ++b) {
    GDALRasterBand* band = d->GetRasterBand(b + 1);
    band->SetNoDataValue(-1.0);
    band->SetDescription(names[b].c_str());
    for (int r = 0; r < g.rows; ++r) {
      const int j = g.rows - 1 - r;
      std::copy_n(data[b]->begin() + static_cast<std::ptrdiff_t>(j) * g.columns, g.columns, row.begin());
      if (band->RasterIO(GF_Write, 0, r, g.columns, 1, row.data(), g.columns, 1, GDT_Float64, 0, 0) != CE_None)
        fail("cannot fill the raster");
    }
  }
  d->SetMetadataItem("STREWN_FOOTPRINT", m.footprint.c_str());
  d->SetMetadataItem("STREWN_PER", per_text(m.per).c_str());
  d->SetMetadataItem("STREWN_SITE", s.site_name.c_str());
  d->SetMetadataItem("STREWN_VERSION", STREWN_VERSION_STRING);
  MemoryFile file(".tif");
  GDALDriver* cog = GetGDALDriverManager()->GetDriverByName("COG");
  GDALDriver* driver = cog != nullptr ? cog : GetGDALDriverManager()->GetDriverByName("GTiff");
  if (driver == nullptr) fail("GDAL has neither the COG nor the GTiff driver");
  const char* cog_options[] = {"COMPRESS=DEFLATE", "PREDICTOR=YES", "BLOCKSIZE=256", "OVERVIEWS=NONE", nullptr};
  const char* tiff_options[] = {"COMPRESS=DEFLATE", "PREDICTOR=3", "TILED=YES", "BLOCKXSIZE=256", "BLOCKYSIZE=256", nullptr};
  Dataset out(driver->CreateCopy(file.path().c_str(), d.get(), FALSE,
                                 const_cast<char**>(cog != nullptr ? cog_options : tiff_options), nullptr, nullptr));
  if (!out) fail("cannot write the GeoTIFF");
  out.reset();  // flushed and closed before the bytes are read
  return file.bytes();
}

namespace {

// A new, empty GeoPackage in the memory file.
Dataset new_geopackage(const MemoryFile& file) {
  GDALDriver* gpkg = GetGDALDriverManager()->GetDriverByName("GPKG");
  if (gpkg == nullptr) fail("GDAL has no GeoPackage driver");
  Dataset d(gpkg->Create(file.path().c_str(), 0, 0, 0, GDT_Unknown, nullptr));
  if (!d) fail("cannot create the GeoPackage");
  return d;
}

}  // namespace

namespace {

// The layers' CRS: the site's, or for a site tied to none the GeoPackage's "Undefined Cartesian
// SRS" (srs_id -1, OGC 12-128r18, table gpkg_spatial_ref_sys): a plane in the site's unit. A
// layer without a CRS would get GDAL's default, srs_id 0, "Undefined geographic SRS" (degrees).
// GDAL 3.6 maps this LOCAL_CS by its name to -1 (checked with sqlite3 in gis_output_test).
std::unique_ptr<OGRSpatialReference> geopackage_srs(const Site& s) {
  if (auto srs = site_srs(s)) return srs;
  auto undefined = std::make_unique<OGRSpatialReference>();
  if (undefined->SetFromUserInput("LOCAL_CS[\"Undefined Cartesian SRS\"]") != OGRERR_NONE)
    fail("GDAL cannot build the undefined Cartesian SRS");
  return undefined;
}

}  // namespace

std::string site_geopackage(const Site& s, const Assessment& a, const SiteMap* map) {
  GdalScope gdal;
  MemoryFile file(".gpkg");
  {
    Dataset d = new_geopackage(file);
    const auto srs = geopackage_srs(s);
    const Lengths L(s);
    zones_layer(*d, srs.get(), a, L);
    if (map != nullptr) {
      contours_layer(*d, srs.get(), *map, L);
      unsafe_layer(*d, srs.get(), *map, L);
      source_layers(*d, srs.get(), s);
    }
    barrier_and_drop_layers(*d, srs.get(), s, map, L);
  }
  return file.bytes();
}

namespace {

// A table without geometry whose fields take the table's columns, in order.
OGRLayer* table_layer(GDALDataset& d, const char* name, const std::vector<std::string>& header,
                      const std::vector<OGRFieldType>& kinds) {
  std::vector<std::pair<const char*, OGRFieldType>> fields;
  for (std::size_t k = 0; k < header.size(); ++k) fields.emplace_back(header[k].c_str(), kinds[k]);
  return new_layer(d, name, wkbNone, nullptr, fields);
}

void set_cell(OGRFeature& f, int field, const SweepCell& c, OGRFieldType kind) {
  if (c.text.empty()) f.SetFieldNull(field);
  else if (kind == OFTInteger64) f.SetField(field, static_cast<GIntBig>(std::stoll(c.text)));
  else if (kind == OFTReal) f.SetField(field, std::stod(c.text));  // the CSV's printed value
  else f.SetField(field, c.text.c_str());
}

}  // namespace

std::string sweep_geopackage(const SweepTable& table, std::size_t axes,
                             const std::vector<std::pair<std::string, std::string>>& facts) {
  GdalScope gdal;
  MemoryFile file(".gpkg");
  {
    Dataset d = new_geopackage(file);
    std::vector<OGRFieldType> kinds;
    for (std::size_t k = 0; k < table.header.size(); ++k)
      kinds.push_back(k == 0 ? OFTInteger64 : table.numeric[k] ? OFTReal : OFTString);
    OGRLayer* rows = table_layer(*d, "rows", table.header, kinds);
    // One combination per distinct first cell, with its axis values and the last column.
    std::vector<std::string> combination_header(table.header.begin(), table.header.begin() + 1 + axes);
    combination_header.push_back(table.header.back());
    std::vector<OGRFieldType> combination_kinds(kinds.begin(), kinds.begin() + 1 + axes);
    combination_kinds.push_back(OFTString);
    OGRLayer* combinations = table_layer(*d, "combinations", combination_header, combination_kinds);
    std::string last;
    for (const std::vector<SweepCell>& row : table.rows) {
      OGRFeature f(rows->GetLayerDefn());
      for (std::size_t k = 0; k < row.size(); ++k) set_cell(f, static_cast<int>(k), row[k], kinds[k]);
      add(*rows, f);
      if (row.front().text == last) continue;
      last = row.front().text;
      OGRFeature c(combinations->GetLayerDefn());
      for (std::size_t k = 0; k <= axes; ++k) set_cell(c, static_cast<int>(k), row[k], kinds[k]);
      set_cell(c, static_cast<int>(axes + 1), row.back(), OFTString);
      add(*combinations, c);
    }
    OGRLayer* study = table_layer(*d, "study", {"item", "value"}, {OFTString, OFTString});
    for (const auto& [item, value] : facts) {
      OGRFeature f(study->GetLayerDefn());
      f.SetField(0, item.c_str());
      f.SetField(1, value.c_str());
      add(*study, f);
    }
  }
  return file.bytes();
}

}  // namespace strewn::cli
