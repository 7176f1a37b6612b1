// WKT polygons through Boost.Geometry's reader.
#include <boost/geometry.hpp>
#include <boost/geometry/geometries/multi_polygon.hpp>
#include <boost/geometry/geometries/point_xy.hpp>
#include <boost/geometry/geometries/polygon.hpp>
#include <boost/algorithm/string/predicate.hpp>
#include <boost/lexical_cast.hpp>
#include <boost/tokenizer.hpp>
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

// The structure of a POLYGON or MULTIPOLYGON as Boost.Geometry's reader walks it (the same
// tokens: spaces dropped, ',', '(' and ')' kept; the same leniency: a coordinate left out before
// ',' or ')' is zero), checked before Boost reads it, so that a refusal is worded here and never
// taken from Boost's message. Returns an empty string for text Boost reads, else the message.
class WktSyntax {
 public:
  explicit WktSyntax(const std::string& text)
      : text_(text), tokens_(text, boost::char_separator<char>(" ", ",()")), it_(tokens_.begin()), end_(tokens_.end()) {}

  std::string error(const std::string& keyword) {
    if (it_ == end_ || !boost::iequals(*it_++, keyword)) return whole("Should start with '" + keyword + "'");
    bool empty = false;
    while (it_ != end_) {
      const std::string& t = *it_;
      if (boost::iequals(t, "Z") || boost::iequals(t, "MZ") || boost::iequals(t, "ZM")) return whole("Z only allowed for 3 or more dimensions");
      if (boost::iequals(t, "EMPTY")) empty = true;
      else if (!boost::iequals(t, "M")) break;
      ++it_;
    }
    std::string why;
    if (!empty) {
      if (keyword == "POLYGON") why = polygon();
      else {
        why = open();
        while (why.empty() && it_ != end_ && *it_ != ")") {
          why = polygon();
          if (why.empty() && it_ != end_ && *it_ == ",") ++it_;
        }
        if (why.empty()) why = close();
      }
    }
    if (why.empty() && it_ != end_) why = at("Too many tokens", false);
    return why;
  }

 private:
  using Tokens = boost::tokenizer<boost::char_separator<char>>;

  // The user's terms, quoting at most 60 characters of the place: the token and the text after
  // " at '", or what is missing and the text after ": ".
  static std::string message(std::string where, bool at_token, bool number) {
    // Control characters as ' ', a NUL as "\0": a NUL in the file cut the message there, which
    // then said nothing of what was found (a hostile trial).
    std::string shown;
    for (char c : where) {
      if (c == '\0') shown += "\\0";
      else if (static_cast<unsigned char>(c) < 0x20) shown += ' ';
      else shown += c;
    }
    where = shown;
    if (where.size() > 60) where = where.substr(0, 57) + "...";
    return std::string("WKT: ") + (number ? "expected a number" : "not well-formed") +
           (at_token ? " at '" + where + "'" : ": " + where) + " (POLYGON((x y, x y, ...)) or MULTIPOLYGON)";
  }
  std::string at(const std::string& what, bool number) const {
    if (it_ == end_) return message(what + " in '" + text_.substr(0, 100) + "'", false, number);
    return message(*it_ + "' in '" + text_.substr(0, 100), true, number);
  }
  std::string whole(const std::string& what) const {
    return message(what + "' in (" + text_.substr(0, 100) + ")", false, false);
  }
  std::string open() {
    if (it_ == end_ || *it_ != "(") return at("Expected '('", false);
    ++it_;
    return {};
  }
  std::string close() {
    if (it_ == end_ || *it_ != ")") return at("Expected ')'", false);
    ++it_;
    return {};
  }
  // x y: each coordinate up to ',' or ')' a number.
  std::string point() {
    for (int d = 0; d < 2; ++d) {
      if (it_ == end_ || *it_ == "," || *it_ == ")") continue;
      double value = 0.0;
      if (!boost::conversion::try_lexical_convert(*it_, value)) return at("", true);
      ++it_;
    }
    return {};
  }
  // ((x y, ...), (x y, ...), ...)
  std::string polygon() {
    std::string why = open();
    while (why.empty() && it_ != end_ && *it_ != ")") {
      why = open();
      while (why.empty() && it_ != end_ && *it_ != ")") {
        why = point();
        if (why.empty() && it_ != end_ && *it_ == ",") ++it_;
      }
      if (why.empty()) why = close();
      if (why.empty() && it_ != end_ && *it_ == ",") ++it_;
    }
    return why.empty() ? close() : why;
  }

  const std::string& text_;
  Tokens tokens_;
  Tokens::iterator it_, end_;
};

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
  if (keyword != "POLYGON" && keyword != "MULTIPOLYGON")
    throw input_error("WKT: zone geometry must be a POLYGON or MULTIPOLYGON, found '" +
                      (keyword.empty() ? text.substr(start, 20) : keyword) + "'");
  // Boost's message quotes the input at length and speaks of casts: the structure is checked
  // first and a refusal worded in the user's terms.
  if (const std::string why = WktSyntax(text).error(keyword); !why.empty()) throw input_error(why);
  std::vector<PolygonRings> rings;
  std::size_t number = 0;
  try {
    if (keyword == "POLYGON") {
      BgPolygon poly;
      bg::read_wkt(text, poly);
      append(poly, rings, number);
    } else {
      BgMulti multi;
      bg::read_wkt(text, multi);
      for (const BgPolygon& poly : multi) append(poly, rings, number);
    }
  } catch (const bg::read_wkt_exception&) {
    // Not reached while WktSyntax walks the text as Boost does; kept so that a future Boost
    // never turns a malformed zone into an internal error.
    throw input_error("WKT: not well-formed (POLYGON((x y, x y, ...)) or MULTIPOLYGON)");
  }
  return region_from_polygons(rings, "WKT " + keyword);
}

}  // namespace strewn
