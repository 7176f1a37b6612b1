// WKT polygons through Boost.Geometry's reader.
#include <boost/geometry.hpp>
#include <boost/geometry/geometries/multi_polygon.hpp>
#include <boost/geometry/geometries/point_xy.hpp>
#include <boost/geometry/geometries/polygon.hpp>
#include <cctype>

#include "geometry/polygon_rings.hpp"
#include "strewn/error.hpp"
#include "strewn/region_io.hpp"

namespace strewn {
namespace bg = boost::geometry;
namespace {

using BgPoint = bg::model::d2::point_xy<double>;
// Closed rings as WKT writes them; region_from_polygons drops the repeated point and fixes orientation.
using BgPolygon = bg::model::polygon<BgPoint, false, true>;
using BgMulti = bg::model::multi_polygon<BgPolygon>;

template <class R>
Ring to_ring(const R& r, std::size_t number) {
  Ring ring;
  for (const BgPoint& p : r) {
    if (!std::isfinite(p.x()) || !std::isfinite(p.y())) throw input_error("WKT: coordinates must be finite numbers");
    ring.emplace_back(p.x(), p.y());
  }
  // OGC Simple Features (and GeoJSON, RFC 7946 3.1.6): a ring ends where it starts. Boost's
  // reader takes an open ring as it is; refused here as the GeoJSON reader refuses it.
  if (ring.size() >= 2 && ring.front() != ring.back())
    throw input_error("WKT: ring " + std::to_string(number) +
                      " must end where it starts (a linear ring is closed, OGC Simple Features)");
  return ring;
}

void append(const BgPolygon& poly, std::vector<PolygonRings>& polygons, std::size_t& number) {
  PolygonRings& rings = polygons.emplace_back();
  rings.push_back(to_ring(poly.outer(), ++number));
  for (const auto& inner : poly.inners()) rings.push_back(to_ring(inner, ++number));
}

}  // namespace

Region region_from_wkt(const std::string& raw) {
  // Boost's reader takes one geometry and nothing after it, not even a final newline.
  std::size_t start = 0, end = raw.size();
  while (start < end && std::isspace(static_cast<unsigned char>(raw[start]))) ++start;
  while (end > start && std::isspace(static_cast<unsigned char>(raw[end - 1]))) --end;
  const std::string text = raw.substr(start, end - start);
  start = 0;
  std::string keyword;
  for (std::size_t i = start; i < text.size() && std::isalpha(static_cast<unsigned char>(text[i])); ++i)
    keyword += static_cast<char>(std::toupper(static_cast<unsigned char>(text[i])));
  std::vector<PolygonRings> rings;
  std::size_t number = 0;
  try {
    if (keyword == "POLYGON") {
      BgPolygon poly;
      bg::read_wkt(text, poly);
      append(poly, rings, number);
    } else if (keyword == "MULTIPOLYGON") {
      BgMulti multi;
      bg::read_wkt(text, multi);
      for (const BgPolygon& poly : multi) append(poly, rings, number);
    } else {
      throw input_error("WKT: zone geometry must be a POLYGON or MULTIPOLYGON, found '" +
                        (keyword.empty() ? text.substr(start, 20) : keyword) + "'");
    }
  } catch (const bg::read_wkt_exception& e) {
    // Boost's message quotes the input at length and speaks of casts; say what is wrong in the
    // user's terms and quote at most 60 characters of where.
    std::string why = e.what();
    for (char& c : why)
      if (c == '\n' || c == '\r') c = ' ';
    const auto at = why.find(" at '");
    std::string where = at == std::string::npos ? "" : why.substr(at + 5);
    if (!where.empty() && where.back() == '\'') where.pop_back();
    if (where.size() > 60) where = where.substr(0, 57) + "...";
    const bool cast = why.find("lexical cast") != std::string::npos;
    if (where.empty() && !cast) where = why.size() > 60 ? why.substr(0, 57) + "..." : why;
    throw input_error(std::string("WKT: ") + (cast ? "expected a number" : "not well-formed") +
                      (where.empty() ? "" : (at == std::string::npos ? ": " + where : " at '" + where + "'")) +
                      " (POLYGON((x y, x y, ...)) or MULTIPOLYGON)");
  }
  return region_from_polygons(rings, "WKT " + keyword);
}

}  // namespace strewn
