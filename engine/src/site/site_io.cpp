#include "strewn/site_io.hpp"

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <iomanip>
#include <set>
#include <sstream>
#include <string_view>
#include <toml++/toml.h>

#include "strewn/closest_names.hpp"
#include "strewn/constants.hpp"
#include "strewn/error.hpp"
#include "strewn/input_file.hpp"
#include "strewn/work.hpp"

namespace strewn {
namespace {

// Ranges of the values a scenario gives (docs/scenario-format.md, "Ranges"): coordinates and
// lengths within 1e12 m (the earth is 4e7 m round), angles within ten turns, exposure counts up
// to 1e12 per session and per year (so that their product, 1e24 at most, stays finite), counts
// (samples, fit sizes) whole numbers up to 1e12, seeds up to 2^53.
constexpr double kMaxCoordinate = 1e12;
constexpr double kMaxAngle = 3600.0;
constexpr double kMaxExposure = 1e12;
constexpr std::uint64_t kMaxCount = 1000000000000ull;
constexpr std::uint64_t kMaxSeed = 9007199254740992ull;  // 2^53: every seed exact in a TOML float

std::string shown(double v) {
  std::ostringstream s;
  s.precision(6);
  s << v;
  return s.str();
}

// An error already located (file, line, column, key): passed on as it is, never wrapped again.
class located_error : public input_error {
 public:
  using input_error::input_error;
};

// Where a message points: file, then line and column when toml++ knows them.
std::string located(const std::string& file, const toml::source_region& where) {
  std::ostringstream m;
  m << file;
  if (where.begin.line > 0) m << ":" << where.begin.line << ":" << where.begin.column;
  return m.str();
}

// Every error names the file, the line and column toml++ knows, and the key.
[[noreturn]] void fail(const std::string& file, const toml::source_region& where,
                       const std::string& key, const std::string& why) {
  throw located_error(located(file, where) + ": " + key + ": " + why);
}

struct Reader {
  std::string file;
  std::vector<std::string>* warnings = nullptr;  // Site::warnings
  // Metres per unit of the file's lengths ([site] units): 1, or 0.3048 for feet. Applied to every
  // length where it is read (points, spreads, regions, offsets, grids); never to angles, weights,
  // probabilities or to longitude/latitude.
  double scale = 1.0;

  Vec2 length_point(const toml::table& t, const std::string& path, const std::string& key,
                    std::optional<Vec2> fallback = std::nullopt) const {
    return scale * point(t, path, key, fallback);
  }

  // A former spelling, still read for one release (docs/scenario-format.md, "Former names").
  void former(const toml::source_region& where, const std::string& key, const std::string& old_spelling,
              const std::string& new_spelling) const {
    if (warnings != nullptr)
      warnings->push_back(located(file, where) + ": " + key + ": " + old_spelling + " is the former name of " +
                          new_spelling + "; it is read in this release and will be refused in the next");
  }

  void only_keys(const toml::table& t, const std::string& path, const std::vector<std::string>& allowed) const {
    for (auto&& [k, v] : t) {
      const std::string key(k.str());
      bool known = false;
      for (const auto& a : allowed) known = known || a == key;
      if (known) continue;
      std::string why = "unknown key";
      if (key.size() <= 64) why += did_you_mean(key, allowed);
      fail(file, k.source(), quoted_excerpt(path.empty() ? key : path + "." + key), why);
    }
  }

  double number(const toml::table& t, const std::string& path, const std::string& key,
                std::optional<double> fallback = std::nullopt) const {
    const toml::node* n = t.get(key);
    if (n == nullptr) {
      if (fallback) return *fallback;
      fail(file, t.source(), path + "." + key, "missing");
    }
    const auto v = n->value<double>();
    if (!v || !std::isfinite(*v)) fail(file, n->source(), path + "." + key, "must be a finite number");
    return *v;
  }

  Vec2 point(const toml::table& t, const std::string& path, const std::string& key,
             std::optional<Vec2> fallback = std::nullopt) const {
    const toml::node* n = t.get(key);
    if (n == nullptr) {
      if (fallback) return *fallback;
      fail(file, t.source(), path + "." + key, "missing");
    }
    const toml::array* a = n->as_array();
    if (a == nullptr || a->size() != 2 || !a->get(0)->value<double>() || !a->get(1)->value<double>())
      fail(file, n->source(), path + "." + key, "must be a point [x, y] in metres");
    const Vec2 v(*a->get(0)->value<double>(), *a->get(1)->value<double>());
    if (!(std::fabs(v.x()) <= kMaxCoordinate && std::fabs(v.y()) <= kMaxCoordinate))
      fail(file, n->source(), path + "." + key,
           "must be a point [x, y] of finite numbers within +-1e12 m (got [" + shown(v.x()) + ", " + shown(v.y()) + "])");
    return v;
  }

  // A number in [least, most] (both finite), else one line naming the range.
  double number_in(const toml::table& t, const std::string& path, const std::string& key, double least, double most,
                   std::optional<double> fallback = std::nullopt, const std::string& unit = "") const {
    const double v = number(t, path, key, fallback);
    if (!(v >= least && v <= most))
      fail(file, t.get(key) ? t.get(key)->source() : t.source(), path + "." + key,
           "must be a number from " + shown(least) + " to " + shown(most) + unit + " (got " + shown(v) + ")");
    return v;
  }

  std::string text(const toml::table& t, const std::string& path, const std::string& key,
                   std::optional<std::string> fallback = std::nullopt) const {
    const toml::node* n = t.get(key);
    if (n == nullptr) {
      if (fallback) return *fallback;
      fail(file, t.source(), path + "." + key, "missing");
    }
    const auto v = n->value<std::string>();
    if (!v) fail(file, n->source(), path + "." + key, "must be a string");
    return *v;
  }

  const toml::table& table(const toml::table& t, const std::string& path, const std::string& key) const {
    const toml::node* n = t.get(key);
    if (n == nullptr) fail(file, t.source(), path + "." + key, "missing");
    if (!n->is_table()) fail(file, n->source(), path + "." + key, "must be a table");
    return *n->as_table();
  }

  // A count: a whole number in [least, most] (most <= 2^53), never wrapped or truncated.
  std::uint64_t count(const toml::table& t, const std::string& path, const std::string& key, std::uint64_t least,
                      std::uint64_t most = kMaxCount, std::optional<double> fallback = std::nullopt) const {
    const toml::node* n = t.get(key);
    if (n == nullptr && fallback) return static_cast<std::uint64_t>(*fallback);
    if (n == nullptr) fail(file, t.source(), path + "." + key, "missing");
    const auto v = n->value<double>();
    const std::string range = "must be a whole number from " + std::to_string(least) + " to " + std::to_string(most);
    if (!v) fail(file, n->source(), path + "." + key, range);
    try {
      return checked_count(*v, least, most, path + "." + key);
    } catch (const input_error&) {
      fail(file, n->source(), path + "." + key, range + ", found " + shown(*v));
    }
  }

  // The record `strewn fit` writes beside a fitted spread.
  FitRecord fit_record(const toml::table& t, const std::string& path) const {
    FitRecord f;
    const std::string kind = text(t, path, "kind");
    f.confidence = number(t, path, "confidence", 0.95);
    if (!(f.confidence > 0.0 && f.confidence < 1.0)) fail(file, t.source(), path + ".confidence", "must be in (0, 1)");
    if (kind == "impacts") {
      only_keys(t, path, {"kind", "n", "mean", "covariance", "confidence"});
      f.kind = FitRecord::Kind::impacts;
      f.n = count(t, path, "n", 3);
      f.mean = length_point(t, path, "mean");
      const toml::node* c = t.get("covariance");
      if (c == nullptr) fail(file, t.source(), path + ".covariance", "missing");
      toml::table only_covariance;
      only_covariance.insert("covariance", *c);
      f.covariance = spread(only_covariance, path, f.mean).covariance();  // checks the matrix
    } else if (kind == "counts") {
      only_keys(t, path, {"kind", "k", "n", "radius", "confidence"});
      f.kind = FitRecord::Kind::counts;
      f.n = count(t, path, "n", 1);
      f.k = count(t, path, "k", 0);
      if (f.k > f.n) fail(file, t.get("k")->source(), path + ".k", "cannot exceed n");
      f.radius = scale * number_in(t, path, "radius", 0.0, kMaxCoordinate);
    } else if (kind == "censored") {
      only_keys(t, path, {"kind", "measured", "outside", "radius", "confidence"});
      f.kind = FitRecord::Kind::censored;
      f.measured = count(t, path, "measured", 1);
      f.outside = count(t, path, "outside", 0);
      f.radius = scale * number_in(t, path, "radius", 0.0, kMaxCoordinate);
    } else {
      fail(file, t.get("kind")->source(), path + ".kind", "must be impacts, counts or censored");
    }
    if (f.kind != FitRecord::Kind::impacts && !(f.radius > 0.0))
      fail(file, t.get("radius")->source(), path + ".radius", "must be positive");
    return f;
  }

  // The spread forms of DESIGN.md, exactly one per table.
  Gaussian spread(const toml::table& s, const std::string& path, const Vec2& mean) const {
    only_keys(s, path, {"sigma_major", "sigma_minor", "angle_deg", "sigma", "covariance", "cep",
                        "r95", "fraction", "radius"});
    // Exactly one form: two forms in one table contradict each other (or repeat each other to
    // the last digit, which nobody writes on purpose), and picking one by an order of
    // precedence would hide the other from the user.
    static const std::vector<std::vector<const char*>> forms = {
        {"sigma_major", "sigma_minor", "angle_deg"}, {"sigma"}, {"covariance"}, {"cep"}, {"r95"},
        {"fraction", "radius"}};
    const char* first = nullptr;
    for (const auto& form : forms)
      for (const char* key : form)
        if (s.contains(key)) {
          if (first != nullptr && std::find(form.begin(), form.end(), std::string_view(first)) == form.end())
            fail(file, s.get(key)->source(), path + "." + key,
                 std::string("a second spread form beside '") + first +
                     "': give exactly one of sigma_major/sigma_minor/angle_deg, sigma, covariance, cep, r95 "
                     "or fraction/radius");
          if (first == nullptr) first = key;
          break;
        }
    // Lengths in the file's unit (scale), the covariance in its square.
    const auto length = [&](const char* key) { return scale * number(s, path, key); };
    try {
      if (s.contains("sigma_major"))
        return Gaussian::from_axes(mean, length("sigma_major"), length("sigma_minor"),
                                   number_in(s, path, "angle_deg", -kMaxAngle, kMaxAngle, 0.0, " degrees"));
      if (s.contains("sigma")) {
        const double sigma = length("sigma");
        return Gaussian::from_axes(mean, sigma, sigma, 0.0);
      }
      if (s.contains("cep")) return Gaussian::from_cep(mean, length("cep"));
      if (s.contains("r95")) return Gaussian::from_r95(mean, length("r95"));
      if (s.contains("fraction"))
        return Gaussian::from_fraction_within(mean, number(s, path, "fraction"), length("radius"));
      if (const toml::node* c = s.get("covariance")) {
        const toml::array* rows = c->as_array();
        Mat2 m;
        bool ok = rows && rows->size() == 2;
        for (int i = 0; ok && i < 2; ++i) {
          const toml::array* row = rows->get(i)->as_array();
          ok = row && row->size() == 2;
          for (int j = 0; ok && j < 2; ++j) {
            const auto v = row->get(j)->value<double>();
            ok = v.has_value();
            if (ok) m(i, j) = *v;
          }
        }
        if (!ok) fail(file, c->source(), path + ".covariance", "must be [[sxx, sxy], [sxy, syy]] in the square of the site's unit");
        return Gaussian::from_covariance(mean, scale * scale * m);
      }
    } catch (const located_error&) {
      throw;
    } catch (const input_error& e) {
      fail(file, s.source(), path, e.what());
    }
    fail(file, s.source(), path,
         "give sigma_major/sigma_minor/angle_deg, sigma, covariance, cep, r95 or fraction/radius");
  }
};

// One table of names per enumeration serves both parsing and printing; the index is the value.
constexpr const char* kRoleNames[] = {"target", "keep_out", "report_only"};
constexpr const char* kLimitPerNames[] = {"event", "session", "year"};

template <std::size_t N>
std::size_t choice(const Reader& r, const toml::table& t, const std::string& path,
                   const std::string& key, const char* const (&names)[N],
                   std::optional<std::string> fallback = std::nullopt) {
  const std::string v = r.text(t, path, key, fallback);
  for (std::size_t i = 0; i < N; ++i)
    if (v == names[i]) return i;
  std::string options;
  for (std::size_t i = 0; i < N; ++i) options += (i ? (i + 1 == N ? " or " : ", ") : "") + std::string(names[i]);
  fail(r.file, t.get(key)->source(), path + "." + key, "must be " + options);
}


// Regular files under the size cap only (input_file.hpp); the name is kept for the output checks.
std::string read_text_file(const std::filesystem::path& p, std::vector<std::string>* files) {
  if (files != nullptr) files->push_back(p.string());
  return read_input_file(p.string());
}

constexpr const char* kPositionNames[] = {"lon_lat", "site_metres"};
constexpr const char* kAmountUnits[] = {"litre", "count"};

// The keys a zone or a template may use to say where it is; exactly one form per table.
const std::vector<std::string> kGeometryKeys = {"shape", "params", "geometry", "feature", "positions"};

struct GeometryContext {
  const Reader& r;
  const ShapeRegistry& shapes;
  std::filesystem::path base_dir;  // relative paths start here
  std::optional<GeoOrigin> origin;
  std::vector<std::string>* files = nullptr;  // every file read, for Site::input_files
};

// A region drawn in the file's length unit (WKT, GeoJSON in the site's frame), in metres. Shape
// parameters are converted instead (ShapeRegistry::params_in_metres): a plugin's defaults are metres.
Region scaled_region(const Reader& r, const Region& region) {
  return r.scale == 1.0 ? region : transformed(region, r.scale * Mat2::Identity(), Vec2::Zero());
}

// A region from `shape` + `params` (a plugin kind) or from `geometry` (a GeoJSON or WKT file).
Region geometry_of(const GeometryContext& c, const toml::table& t, const std::string& p, std::string& shape,
                   std::string& geometry_file) {
  const Reader& r = c.r;
  const bool has_shape = t.contains("shape"), has_file = t.contains("geometry");
  if (has_shape == has_file) fail(r.file, t.source(), p, "give either shape (with params) or geometry (a GeoJSON or WKT file)");
  if (has_shape) {
    for (const char* k : {"feature", "positions"})
      if (t.contains(k)) fail(r.file, t.get(k)->source(), p + "." + k, "only goes with geometry");
    shape = r.text(t, p, "shape");
    const toml::table& params = r.table(t, p, "params");
    std::ostringstream json;
    json << toml::json_formatter{params};
    try {
      return c.shapes.build(shape, c.shapes.params_in_metres(shape, json.str(), r.scale));
    } catch (const input_error& e) {
      fail(r.file, t.get("shape")->source(), p, e.what());
    }
  }
  if (t.contains("params")) fail(r.file, t.get("params")->source(), p + ".params", "only goes with shape");
  const std::string name = r.text(t, p, "geometry");
  const toml::node& where = *t.get("geometry");
  const std::filesystem::path file = c.base_dir / name;
  geometry_file = file.string();
  const std::string ext = file.extension().string();
  if (ext != ".wkt" && ext != ".geojson" && ext != ".json")
    fail(r.file, where.source(), p + ".geometry", "'" + name + "' must end in .geojson, .json or .wkt");
  std::string content;
  try {
    content = read_text_file(file, c.files);
  } catch (const input_error& e) {
    fail(r.file, where.source(), p + ".geometry", e.what());
  }
  try {
    if (ext == ".wkt") {
      for (const char* k : {"feature", "positions"})
        if (t.contains(k)) fail(r.file, t.get(k)->source(), p + "." + k, "only goes with a GeoJSON file");
      shape = "wkt";
      return scaled_region(r, region_from_wkt(content));
    }
    if (ext == ".geojson" || ext == ".json") {
      shape = "geojson";
      GeoJsonOptions o;
      o.positions = static_cast<GeoJsonPositions>(choice(r, t, p, "positions", kPositionNames, std::string("lon_lat")));
      o.feature = r.text(t, p, "feature", std::string());
      o.origin = c.origin;
      if (o.positions == GeoJsonPositions::lon_lat && !o.origin)
        fail(r.file, where.source(), p + ".geometry",
             "GeoJSON positions are longitude/latitude (RFC 7946): set site.origin = [lon, lat], "
             "or positions = \"site_metres\" for a file drawn in site metres");
      // Longitude/latitude are projected to metres; positions in the site's frame are in its unit.
      const Region region = region_from_geojson(content, o);
      return o.positions == GeoJsonPositions::lon_lat ? region : scaled_region(r, region);
    }
  } catch (const located_error&) {
    throw;
  } catch (const input_error& e) {
    fail(r.file, where.source(), p + ".geometry", geometry_file + ": " + e.what());
  }
  fail(r.file, where.source(), p + ".geometry", "'" + name + "' must end in .geojson, .json or .wkt");
}

// offset and rotation_deg place any zone: rotate counter-clockwise about the zone's own origin,
// then shift.
Region placed(const Reader& r, const toml::table& t, const std::string& p, const Region& region) {
  if (!t.contains("offset") && !t.contains("rotation_deg")) return region;
  const Vec2 offset = r.length_point(t, p, "offset", Vec2::Zero());
  const double a = r.number_in(t, p, "rotation_deg", -kMaxAngle, kMaxAngle, 0.0, " degrees") * kPi / 180.0;
  Mat2 rot;
  rot << std::cos(a), -std::sin(a), std::sin(a), std::cos(a);
  return transformed(region, rot, offset);
}

// A template file in its own [template] table: a reusable footprint (a bench, a door) described
// in its own frame by shape + params or a geometry file, which zones then place.
Region template_geometry(const GeometryContext& c, const std::string& relative, const toml::node& where,
                         const std::string& p, std::string& shape, std::string& file_out) {
  const std::filesystem::path file = c.base_dir / relative;
  file_out = file.string();
  toml::table doc;
  try {
    const std::string text = read_text_file(file, c.files);
    check_toml_nesting(text, file.string());
    doc = toml::parse(text, file.string());
  } catch (const toml::parse_error& e) {
    fail(file.string(), e.source(), "syntax", std::string(e.description()));
  } catch (const input_error& e) {
    fail(c.r.file, where.source(), p + ".template", e.what());
  }
  const Reader tr{file.string(), c.r.warnings, c.r.scale};
  tr.only_keys(doc, "", {"template"});
  const toml::table& t = tr.table(doc, "", "template");
  std::vector<std::string> keys = kGeometryKeys;
  keys.insert(keys.end(), {"name", "description"});
  tr.only_keys(t, "template", keys);
  std::string inner_file;
  const GeometryContext inner{tr, c.shapes, file.parent_path(), c.origin, c.files};
  Region region = geometry_of(inner, t, "template", shape, inner_file);
  shape = "template " + tr.text(t, "template", "name", file.filename().string()) + " (" + shape + ")";
  return region;
}

// One reader per table of the scenario file, in the order the file's tables are read.

void read_site_table(const Reader& r, const toml::table& doc, Site& s) {
  const toml::table& site = r.table(doc, "", "site");
  r.only_keys(site, "site", {"name", "units", "notes", "origin"});
  if (site.contains("origin")) {
    const Vec2 o = r.point(site, "site", "origin");
    if (!(std::abs(o.x()) <= 180.0 && std::abs(o.y()) < 90.0))
      fail(r.file, site.get("origin")->source(), "site.origin", "must be [longitude, latitude] in degrees (WGS 84)");
    s.origin = GeoOrigin{o.x(), o.y()};
  }
  s.site_name = r.text(site, "site", "name", std::string("unnamed site"));
  s.notes = r.text(site, "site", "notes", std::string());
  // Metres or international feet under their usual spellings (strewn/units.hpp).
  const std::string units = r.text(site, "site", "units", std::string("metres"));
  const std::optional<LengthUnit> unit = length_unit_from(units);
  if (!unit) {
    std::string accepted;
    for (const std::string& a : length_unit_spellings()) accepted += (accepted.empty() ? "\"" : ", \"") + a + "\"";
    fail(r.file, site.get("units")->source(), "site.units",
         "'" + quoted_excerpt(units) + "' is not a length unit" +
             (units.size() <= 64 ? did_you_mean(units, length_unit_spellings()) : std::string()) + " (accepted: " +
             accepted + ")");
  }
  s.units = *unit;
}

IntegrateOptions read_settings(const Reader& r, const toml::table& doc, IntegrateOptions options) {
  const toml::table& set = r.table(doc, "", "settings");
  r.only_keys(set, "settings", {"method", "tolerance", "samples", "seed"});
  try {
    options.method = method_from_string(r.text(set, "settings", "method", std::string("exact")));
  } catch (const input_error& e) {
    fail(r.file, set.get("method")->source(), "settings.method", e.what());
  }
  options.rel_tolerance = r.number(set, "settings", "tolerance", options.rel_tolerance);
  options.samples = r.count(set, "settings", "samples", 1, kMaxCount, 1e6);
  options.seed = r.count(set, "settings", "seed", 0, kMaxSeed, 20261201);
  if (const std::string why = options.invalid_reason(); !why.empty()) fail(r.file, set.source(), "settings", why);
  return options;
}

// The extra [[source.component]] tables of a source (a wider "wild" part, a rotor's ring parts):
// weights, spreads about the aim and labels. `wild` is the former name of `component`.
std::vector<WeightedGaussian> read_components(const Reader& r, const toml::table& t, const std::string& p,
                                              const Vec2& aim, const Vec2& mean, double& extra_weight,
                                              std::vector<std::string>& labels) {
  std::vector<WeightedGaussian> parts;
  if (t.contains("wild") && t.contains("component"))
    fail(r.file, t.get("wild")->source(), p + ".wild", "give [[source.component]] only (wild is its former name)");
  const std::string key = t.contains("wild") ? "wild" : "component";
  const toml::node* w = t.get(key);
  if (w == nullptr) return parts;
  if (key == "wild") r.former(w->source(), p + ".wild", "[[source.wild]]", "[[source.component]] (with an optional label)");
  const toml::array* list = w->as_array();
  if (list == nullptr) fail(r.file, w->source(), p + "." + key, "must be a list of [[source.component]] tables");
  for (std::size_t k = 0; k < list->size(); ++k) {
    const std::string wp = p + "." + key + "[" + std::to_string(k + 1) + "]";
    const toml::table* wt = list->get(k)->as_table();
    if (wt == nullptr) fail(r.file, list->get(k)->source(), wp, "must be a table");
    r.only_keys(*wt, wp, {"weight", "bias", "spread", "label"});
    const double weight = r.number(*wt, wp, "weight");
    if (!(weight > 0.0 && weight < 1.0)) fail(r.file, wt->get("weight")->source(), wp + ".weight", "must be in (0, 1)");
    extra_weight += weight;
    labels.push_back(r.text(*wt, wp, "label", "component " + std::to_string(k + 2)));
    parts.push_back({weight, r.spread(r.table(*wt, wp, "spread"), wp + ".spread", aim + r.length_point(*wt, wp, "bias", (mean - aim) / r.scale))});
  }
  return parts;
}

// One [[source]]: aim, bias or mean, spread and wild components, exposure, deposition amounts, fit.
Source read_source(const Reader& r, const toml::table& t, const std::string& p, std::size_t i) {
  r.only_keys(t, p, {"name", "aim", "bias", "mean", "spread", "component", "wild", "events_per_session",
                     "sessions_per_year", "amount_per_event", "events_per_hour", "fit"});
  Source src;
  src.name = r.text(t, p, "name", "source " + std::to_string(i + 1));
  src.aim = r.length_point(t, p, "aim", Vec2::Zero());
  if (t.contains("mean") && t.contains("bias")) fail(r.file, t.source(), p, "give bias or mean, not both");
  const Vec2 mean = t.contains("mean") ? r.length_point(t, p, "mean") : src.aim + r.length_point(t, p, "bias", Vec2::Zero());
  const Gaussian core = r.spread(r.table(t, p, "spread"), p + ".spread", mean);
  double extra_weight = 0.0;
  src.component_labels = {"core"};
  std::vector<WeightedGaussian> parts = read_components(r, t, p, src.aim, mean, extra_weight, src.component_labels);
  if (extra_weight >= 1.0)
    fail(r.file, t.source(), p + ".component", "weights of the extra components must sum to less than 1 (the core has the rest)");
  parts.insert(parts.begin(), WeightedGaussian{1.0 - extra_weight, core});
  src.model = ScatterModel::mixture(parts);
  src.events_per_session = r.number_in(t, p, "events_per_session", 0.0, kMaxExposure, 1.0);
  src.sessions_per_year = r.number_in(t, p, "sessions_per_year", 0.0, kMaxExposure, 1.0);
  if (t.contains("fit")) src.fit = r.fit_record(r.table(t, p, "fit"), p + ".fit");
  for (const char* k : {"amount_per_event", "events_per_hour"})
    if (t.contains(k)) {
      const double v = r.number_in(t, p, k, 0.0, kMaxExposure);
      (std::string(k) == "amount_per_event" ? src.amount_per_event : src.events_per_hour) = v;
    }
  return src;
}

std::vector<Source> read_sources(const Reader& r, const toml::table& doc) {
  const toml::array* sources = doc["source"].as_array();
  if (sources == nullptr || sources->empty()) fail(r.file, doc.source(), "source", "at least one [[source]] is needed");
  std::vector<Source> out;
  for (std::size_t i = 0; i < sources->size(); ++i) {
    const std::string p = "source[" + std::to_string(i + 1) + "]";
    const toml::table* t = sources->get(i)->as_table();
    if (t == nullptr) fail(r.file, sources->get(i)->source(), p, "must be a table");
    out.push_back(read_source(r, *t, p, i));
  }
  return out;
}

// One [[zone]]: name, role, geometry (shape, file or template, then placed), occupancy, limit.
Zone read_zone(const Reader& r, const GeometryContext& geometry, const toml::table& t, const std::string& p,
               std::set<std::string>& names) {
  std::vector<std::string> keys = kGeometryKeys;
  keys.insert(keys.end(), {"name", "role", "template", "offset", "rotation_deg", "limit", "limit_per", "occupancy"});
  r.only_keys(t, p, keys);
  Zone z;
  z.name = r.text(t, p, "name");
  if (!names.insert(z.name).second) fail(r.file, t.get("name")->source(), p + ".name", "duplicate zone name '" + z.name + "'");
  if (r.text(t, p, "role") == "watch") {
    r.former(t.get("role")->source(), p + ".role", "\"watch\"", "\"report_only\"");
    z.role = Role::report_only;
  } else {
    z.role = static_cast<Role>(choice(r, t, p, "role", kRoleNames));
  }
  const std::string zp = p + " '" + z.name + "'";
  if (const toml::node* tpl = t.get("template")) {
    for (const std::string& k : kGeometryKeys)
      if (t.contains(k)) fail(r.file, t.get(k)->source(), zp + "." + k, "a zone with a template takes its geometry from it");
    z.region = template_geometry(geometry, r.text(t, p, "template"), *tpl, zp, z.shape, z.geometry_file);
  } else {
    z.region = geometry_of(geometry, t, zp, z.shape, z.geometry_file);
  }
  z.region = placed(r, t, p, z.region);
  if (t.contains("occupancy")) {
    const double f = r.number(t, p, "occupancy");
    if (!(f > 0.0 && f <= 1.0)) fail(r.file, t.get("occupancy")->source(), p + ".occupancy", "must be a fraction of time in (0, 1]");
    z.occupancy = f;
  }
  if (t.contains("limit")) {
    const double limit = r.number(t, p, "limit");
    if (!(limit > 0.0 && limit <= 1.0)) fail(r.file, t.get("limit")->source(), p + ".limit", "must be a probability in (0, 1]");
    z.limit = limit;
  }
  z.limit_per = static_cast<Period>(choice(r, t, p, "limit_per", kLimitPerNames, std::string("session")));
  return z;
}

std::vector<Zone> read_zones(const Reader& r, const toml::table& doc, const GeometryContext& geometry,
                             std::set<std::string>& names) {
  const toml::array* zones = doc["zone"].as_array();
  if (zones == nullptr || zones->empty()) fail(r.file, doc.source(), "zone", "at least one [[zone]] is needed");
  std::vector<Zone> out;
  for (std::size_t i = 0; i < zones->size(); ++i) {
    const std::string p = "zone[" + std::to_string(i + 1) + "]";
    const toml::table* t = zones->get(i)->as_table();
    if (t == nullptr) fail(r.file, zones->get(i)->source(), p, "must be a table");
    out.push_back(read_zone(r, geometry, *t, p, names));
  }
  return out;
}

CatchGrid read_catch_grid(const Reader& r, const toml::table& d) {
  const std::string gp = "deposition.catch_grid";
  const toml::table& g = r.table(d, "deposition", "catch_grid");
  r.only_keys(g, gp, {"origin", "spacing", "columns", "rows", "can_diameter"});
  CatchGrid grid;
  grid.origin = r.length_point(g, gp, "origin");
  grid.spacing = r.scale * r.number_in(g, gp, "spacing", 0.0, kMaxCoordinate);
  grid.can_diameter = r.scale * r.number_in(g, gp, "can_diameter", 0.0, kMaxCoordinate, 0.1 / r.scale);
  const double columns = r.number(g, gp, "columns"), rows = r.number(g, gp, "rows");
  if (!(grid.spacing > 0 && grid.can_diameter > 0 && grid.can_diameter <= grid.spacing))
    fail(r.file, g.source(), gp, "spacing and can_diameter must be positive, the cans no wider than the spacing");
  if (!(columns >= 1 && rows >= 1 && columns * rows <= 250000 && columns == std::floor(columns) && rows == std::floor(rows)))
    fail(r.file, g.source(), gp, "columns and rows must be whole numbers >= 1, at most 250000 cans in all");
  grid.columns = static_cast<int>(columns);
  grid.rows = static_cast<int>(rows);
  return grid;
}

DepositionSettings read_deposition(const Reader& r, const toml::table& doc, const std::set<std::string>& names) {
  const toml::table& d = r.table(doc, "", "deposition");
  r.only_keys(d, "deposition", {"amount_unit", "hours", "catch_grid", "site_boundary", "site_zone"});
  DepositionSettings dep;
  dep.amount_unit = kAmountUnits[choice(r, d, "deposition", "amount_unit", kAmountUnits, std::string("litre"))];
  dep.hours = r.number_in(d, "deposition", "hours", 0.0, 1e9, 1.0);
  if (!(dep.hours > 0)) fail(r.file, d.get("hours")->source(), "deposition.hours", "must be positive");
  // site_zone is the former name of site_boundary.
  if (d.contains("site_zone") && d.contains("site_boundary"))
    fail(r.file, d.get("site_zone")->source(), "deposition.site_zone", "give site_boundary only (site_zone is its former name)");
  const std::string key = d.contains("site_zone") ? "site_zone" : "site_boundary";
  if (key == "site_zone") r.former(d.get(key)->source(), "deposition.site_zone", "site_zone", "site_boundary");
  dep.site_boundary = r.text(d, "deposition", key, std::string());
  if (!dep.site_boundary.empty() && names.count(dep.site_boundary) == 0) {
    std::vector<std::string> all(names.begin(), names.end());
    fail(r.file, d.get(key)->source(), "deposition." + key,
         "no zone named '" + dep.site_boundary + "'" + did_you_mean(dep.site_boundary, all));
  }
  if (d.contains("catch_grid")) dep.grid = read_catch_grid(r, d);
  return dep;
}

}  // namespace

Site load_site(const std::string& path, const ShapeRegistry& shapes) {
  return load_site_text(read_input_file(path), path, shapes);
}

Site load_site(const std::string& path) { return load_site(path, ShapeRegistry::with_default_search_path({})); }

Site load_site_text(const std::string& text, const std::string& path, const ShapeRegistry& shapes) {
  Site s;
  Reader r{path, &s.warnings};
  toml::table doc;
  check_toml_nesting(text, path);
  try {
    doc = toml::parse(text, path);
  } catch (const toml::parse_error& e) {
    fail(path, e.source(), "syntax", std::string(e.description()));
  }
  s.file = path;
  s.input_files.push_back(path);
  r.only_keys(doc, "", {"site", "settings", "source", "zone", "deposition"});
  if (doc.contains("site")) read_site_table(r, doc, s);
  r.scale = metres_per(s.units);
  if (doc.contains("settings")) s.options = read_settings(r, doc, s.options);
  s.sources = read_sources(r, doc);
  std::set<std::string> names;
  const GeometryContext geometry{r, shapes, std::filesystem::path(path).parent_path(), s.origin, &s.input_files};
  s.zones = read_zones(r, doc, geometry, names);
  if (doc.contains("deposition")) s.deposition = read_deposition(r, doc, names);
  return s;
}

}  // namespace strewn
