// GeoJSON (RFC 7946) polygons. Only the polygonal geometry types make zones; everything else is
// named in the error so that a user who exported the wrong layer sees what they got.
#include <cmath>
#include <nlohmann/json.hpp>
#include <optional>

#include "geometry/nesting_scan.hpp"
#include "geometry/polygon_rings.hpp"
#include "strewn/closest_names.hpp"
#include "strewn/error.hpp"
#include "strewn/region_io.hpp"
#include "strewn/shape_registry.hpp"

namespace strewn {
namespace {

using nlohmann::json;

struct Reader {
  const GeoJsonOptions& options;
  const CrsTransform* transform = nullptr;  // none: positions are site metres
  bool lon_lat = false;                     // positions must be longitude/latitude
  bool local_frame = false;                 // the site frame is the local one about the origin

  Vec2 position(const json& p) const {
    // RFC 7946 section 3.1.1: two or more numbers; an altitude, if any, is ignored.
    if (!p.is_array() || p.size() < 2 || !p[0].is_number() || !p[1].is_number())
      throw input_error("GeoJSON: a position must be [x, y] numbers, found " + p.dump().substr(0, 40));
    const double a = p[0].get<double>(), b = p[1].get<double>();
    if (transform == nullptr) return Vec2(a, b);
    if (lon_lat && !(std::isfinite(a) && std::isfinite(b) && std::abs(a) <= 180.0 && std::abs(b) < 90.0))
      throw input_error("position [" + std::to_string(a) + ", " + std::to_string(b) +
                        "] is not a longitude/latitude in degrees");
    const Vec2 xy = transform->forward(Vec2(a, b));
    if (local_frame && xy.norm() > options.max_distance)
      throw input_error("GeoJSON: position [" + p[0].dump() + ", " + p[1].dump() + "] lies " +
                        std::to_string(static_cast<long>(xy.norm() / 1000)) +
                        " km from the site origin; check the origin and the axis order (longitude first)");
    return xy;
  }

  void polygon(const json& coordinates, std::vector<PolygonRings>& polygons) const {
    if (!coordinates.is_array() || coordinates.empty())
      throw input_error("GeoJSON: Polygon coordinates must be a non-empty array of rings");
    // RFC 7946 section 3.1.6: the first ring is the exterior, any others are holes in it.
    PolygonRings& rings = polygons.emplace_back();
    for (const json& r : coordinates) {
      // RFC 7946 section 3.1.6: a linear ring is closed and has at least four positions.
      if (!r.is_array() || r.size() < 4)
        throw input_error("GeoJSON: a linear ring needs at least four positions (RFC 7946, 3.1.6)");
      Ring ring;
      for (const json& p : r) ring.push_back(position(p));
      if (ring.front() != ring.back())
        throw input_error("GeoJSON: a linear ring must end where it starts (RFC 7946, 3.1.6)");
      rings.push_back(std::move(ring));
    }
  }

  void geometry(const json& g, std::vector<PolygonRings>& rings) const {
    if (!g.is_object() || !g.contains("type") || !g["type"].is_string())
      throw input_error("GeoJSON: a geometry object needs a \"type\"");
    const std::string type = g["type"].get<std::string>();
    if (type == "Polygon") {
      polygon(g.value("coordinates", json()), rings);
    } else if (type == "MultiPolygon") {
      const json& c = g.value("coordinates", json());
      if (!c.is_array()) throw input_error("GeoJSON: MultiPolygon coordinates must be an array of polygons");
      for (const json& poly : c) polygon(poly, rings);
    } else if (type == "GeometryCollection" && g.contains("geometries") && g["geometries"].is_array()) {
      for (const json& part : g["geometries"]) geometry(part, rings);
    } else {
      throw input_error("GeoJSON: zone geometry must be a Polygon or MultiPolygon, found " + type +
                        did_you_mean(type, {"Polygon", "MultiPolygon", "GeometryCollection"}));
    }
  }
};

// nlohmann's message without its "[json.exception.parse_error.101] " tag, which names the
// library's class, not the file's fault.
std::string json_message(const json::exception& e) {
  const std::string m = e.what();
  const std::size_t tag = m.rfind("[json.exception.", 0) == 0 ? m.find("] ") : std::string::npos;
  return tag == std::string::npos ? m : m.substr(tag + 2);
}

std::string feature_name(const json& f) {
  if (f.contains("properties") && f["properties"].is_object() && f["properties"].contains("name") &&
      f["properties"]["name"].is_string())
    return f["properties"]["name"].get<std::string>();
  if (f.contains("id")) return f["id"].is_string() ? f["id"].get<std::string>() : f["id"].dump();
  return "";
}

// The older GeoJSON (2008) named CRS: {"crs": {"type": "name", "properties": {"name": "..."}}}.
std::string declared_crs(const json& doc) {
  if (!doc.contains("crs") || !doc["crs"].is_object()) return "";
  const json& c = doc["crs"];
  if (!c.contains("properties") || !c["properties"].is_object() || !c["properties"].contains("name") ||
      !c["properties"]["name"].is_string())
    throw input_error("GeoJSON: the \"crs\" member must be {\"type\": \"name\", \"properties\": {\"name\": ...}}");
  return c["properties"]["name"].get<std::string>();
}

std::string feature_id(const json& f) {
  if (!f.contains("id")) return "";
  return f["id"].is_string() ? f["id"].get<std::string>() : f["id"].dump();
}

// The feature named (or, by_id, whose id is) `wanted`; several sharing it are refused rather than
// the first taken, since which one the scenario meant cannot be told.
const json& choose_feature(const json& collection, const std::string& wanted, bool by_id) {
  if (!collection.contains("features") || !collection["features"].is_array())
    throw input_error("GeoJSON: a FeatureCollection needs a \"features\" array");
  const json& features = collection["features"];
  std::vector<std::string> names;
  for (const json& f : features) names.push_back(by_id ? feature_id(f) : feature_name(f));
  if (wanted.empty()) {
    if (features.size() == 1) return features[0];
    std::string list;
    for (const auto& n : names) list += (list.empty() ? "" : ", ") + (n.empty() ? "(unnamed)" : n);
    throw input_error("GeoJSON: the file holds " + std::to_string(features.size()) +
                      " features; name one with 'feature' (" + list + ")");
  }
  std::vector<std::size_t> hits;
  for (std::size_t i = 0; i < features.size(); ++i)
    if (names[i] == wanted) hits.push_back(i);
  if (hits.size() == 1) return features[hits[0]];
  if (hits.size() > 1) {
    std::string list;
    for (std::size_t i : hits) {
      list += (list.empty() ? "" : ", ") + std::to_string(i + 1);
      if (!by_id && !feature_id(features[i]).empty()) list += " (id " + feature_id(features[i]) + ")";
    }
    throw input_error("GeoJSON: " + std::to_string(hits.size()) + " features " + (by_id ? "have the id '" : "are named '") +
                      wanted + "' (features " + list + " of the collection): give each its own " +
                      (by_id ? "id" : "name, or feature = its id"));
  }
  std::string why = std::string("GeoJSON: no feature ") + (by_id ? "has the id '" : "named '") + wanted + "'";
  why += did_you_mean(wanted, names);
  throw input_error(why);
}

}  // namespace

namespace {

Region read_geojson(const std::string& text, const GeoJsonOptions& options) {
  if (options.positions == GeoJsonPositions::lon_lat && !options.origin && options.site_crs.empty())
    throw input_error("GeoJSON positions are longitude/latitude (RFC 7946): the site needs a crs or an origin");
  json doc;
  try {
    doc = json::parse(text);
  } catch (const json::parse_error& e) {
    throw input_error("GeoJSON: not valid JSON: " + json_message(e));
  }
  if (!doc.is_object() || !doc.contains("type") || !doc["type"].is_string())
    throw input_error("GeoJSON: the top level must be an object with a \"type\"");
  const json* geometry = &doc;
  std::string what = "GeoJSON";
  const std::string type = doc["type"].get<std::string>();
  if (type == "FeatureCollection") {
    geometry = &choose_feature(doc, options.feature, options.feature_is_id);
    what += " feature '" + feature_name(*geometry) + "'";
  } else if (!options.feature.empty()) {
    throw input_error("GeoJSON: 'feature' was given but the file holds a single " + type);
  }
  if (geometry->is_object() && geometry->value("type", "") == "Feature") {
    if (!geometry->contains("geometry") || (*geometry)["geometry"].is_null())
      throw input_error(what + ": the feature has no geometry");
    geometry = &(*geometry)["geometry"];
  }
  Reader reader{options};
  std::optional<CrsTransform> transform;
  if (options.positions == GeoJsonPositions::lon_lat) {
    const std::string declared = declared_crs(doc);
    reader.lon_lat = declared.empty();
    reader.local_frame = options.site_crs.empty();
    const std::string target = reader.local_frame ? local_frame_definition(*options.origin) : options.site_crs;
    if (declared.empty() && reader.local_frame) transform = CrsTransform::lon_lat_to_local(*options.origin);
    else transform = CrsTransform(declared.empty() ? lon_lat_crs() : declared, target);
    reader.transform = &*transform;
  }
  std::vector<PolygonRings> polygons;
  reader.geometry(*geometry, polygons);
  return region_from_polygons(polygons, what);
}

}  // namespace

Region region_from_geojson(const std::string& text, const GeoJsonOptions& options) {
  detail::check_json_nesting(text, "GeoJSON");  // before nlohmann::json recurses into it
  try {
    return read_geojson(text, options);
  } catch (const json::exception& e) {
    // A member of the wrong JSON type somewhere the checks above do not look.
    throw input_error("GeoJSON: " + json_message(e));
  }
}

}  // namespace strewn
