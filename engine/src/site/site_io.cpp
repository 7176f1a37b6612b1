#include "strewn/site_io.hpp"

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <iterator>
#include <optional>
#include <iomanip>
#include <set>
#include <sstream>
#include <string_view>
#include <toml++/toml.h>

#include <fmt/format.h>

#include "strewn/barrier_effect.hpp"
#include "strewn/closest_names.hpp"
#include "strewn/constants.hpp"
#include "strewn/error.hpp"
#include "strewn/head.hpp"
#include "strewn/input_file.hpp"
#include "strewn/layout.hpp"
#include "strewn/profile_spread.hpp"
#include "strewn/vector_source.hpp"
#include "strewn/work.hpp"

namespace strewn {
namespace {

// The observers of LoadProgressScope (strewn/site_io.hpp), per thread.
thread_local EstimateFn load_estimate;
thread_local ProgressFn load_progress;

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

// Every error names the file, the line and column toml++ knows, and the key.
std::string located(const std::string& file, const toml::source_region& where, const std::string& key,
                    const std::string& why);
[[noreturn]] void fail(const std::string& file, const toml::source_region& where,
                       const std::string& key, const std::string& why) {
  throw located_error(located(file, where, key, why));
}

// "FILE:LINE:COLUMN: key: why", the form of every message about a place in the file.
std::string located(const std::string& file, const toml::source_region& where, const std::string& key,
                    const std::string& why) {
  std::ostringstream m;
  m << file;
  if (where.begin.line > 0) m << ":" << where.begin.line << ":" << where.begin.column;
  m << ": " << key << ": " << why;
  return m.str();
}

// An angle in degrees whose value is a common angle in radians: a multiple of pi/12 (15 degrees)
// from pi/12 to 2 pi, to the three decimals people type (1.571, 3.14), and not a whole number of
// degrees (1, 2 and 3 degrees are plain angles). 0.5 or 0.75 degrees are not taken for radians.
bool looks_like_radians(double v) {
  const double a = std::fabs(v);
  if (a == std::floor(a) || a > 2.0 * kPi + 0.002) return false;
  const double steps = a / (kPi / 12.0);
  const double k = std::round(steps);
  return k >= 1.0 && std::fabs(a - k * kPi / 12.0) <= 0.002;
}

std::string radians_warning(double v) {
  return fmt::format("{:g} looks like an angle in radians ({:g} rad = {:.4g} degrees); this key is in degrees, "
                     "so it is read as {:g} degrees",
                     v, v, v * 180.0 / kPi, v);
}

struct Reader {
  std::string file;
  std::vector<Warning>* warnings = nullptr;  // Site::warnings: likely mistakes and former spellings; the value is kept
  // Metres per unit of the file's lengths ([site] units): 1, or 0.3048 for feet. Applied to every
  // length where it is read (points, spreads, regions, offsets, grids); never to angles, weights,
  // probabilities or to longitude/latitude.
  double scale = 1.0;
  std::filesystem::path base_dir;             // relative file names (a profile's CSV) start here
  std::vector<std::string>* files = nullptr;  // every file read, for Site::input_files

  void warn(const toml::source_region& where, const std::string& key, const std::string& why,
            WarningKind kind = WarningKind::likely_mistake) const {
    if (warnings) warnings->push_back({kind, located(file, where, key, why)});
  }

  // An angle key: in range, and a warning when its value looks like radians.
  double angle(const toml::table& t, const std::string& path, const std::string& key, double fallback) const {
    const double v = number_in(t, path, key, -kMaxAngle, kMaxAngle, fallback, " degrees");
    if (t.contains(key) && looks_like_radians(v)) warn(t.get(key)->source(), path + "." + key, radians_warning(v));
    return v;
  }

  Vec2 length_point(const toml::table& t, const std::string& path, const std::string& key,
                    std::optional<Vec2> fallback = std::nullopt) const {
    return scale * point(t, path, key, fallback);
  }

  // A former spelling, still read for one release (docs/scenario-format.md, "Former names"); the
  // same path as the warnings on likely mistakes.
  void former(const toml::source_region& where, const std::string& key, const std::string& old_spelling,
              const std::string& new_spelling) const {
    warn(where, key, old_spelling + " is the former name of " + new_spelling +
                         "; it is read in this release and will be refused in the next",
         WarningKind::former_name);
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
    if (!v && n->is_string()) {
      // A number in quotes: say to drop them; other text: show it.
      const std::string text = n->value<std::string>().value_or("");
      char* end = nullptr;
      const double parsed = std::strtod(text.c_str(), &end);
      const bool numeric = !text.empty() && end == text.c_str() + text.size() && std::isfinite(parsed);
      fail(file, n->source(), path + "." + key,
           numeric ? "must be a finite number, not text (write " + key + " = " + text + " without quotes)"
                   : "must be a finite number, not text ('" + quoted_excerpt(text) + "')");
    }
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
  // With `family` (normal, student_t with nu, uniform; strewn/scatter_family.hpp) the spread is
  // that family's scale, and cep, r95 and fraction/radius are read through its radial CDF.
  Gaussian spread(const toml::table& s, const std::string& path, const Vec2& mean) const {
    if (s.contains("family") && s.get("family")->value<std::string>() == std::string("profile"))
      return profile_spread_of(s, path, mean);
    only_keys(s, path, {"sigma_major", "sigma_minor", "angle_deg", "sigma", "covariance", "cep",
                        "r95", "fraction", "radius", "family", "nu", "profile", "profile_unit", "arc_from_deg",
                        "arc_to_deg", "wind_stretch", "wind_shift", "downwind_deg"});
    for (const char* key : {"profile", "profile_unit", "arc_from_deg", "arc_to_deg", "wind_stretch", "wind_shift", "downwind_deg"})
      if (s.contains(key)) fail(file, s.get(key)->source(), path + "." + key, "only the profile family takes " + std::string(key));
    const ScatterFamily family = spread_family(s, path);
    const Gaussian g = spread_normal(s, path, mean, family);
    return family.is_normal() ? g : g.with_family(family);
  }

  // A measured profile (strewn/profile_spread.hpp): its distances are site lengths, so the spread
  // takes no sigma; an arc and an affine wind distortion are optional.
  Gaussian profile_spread_of(const toml::table& s, const std::string& path, const Vec2& mean) const {
    for (const char* key : {"sigma_major", "sigma_minor", "angle_deg", "sigma", "covariance", "cep", "r95", "fraction", "radius", "nu"})
      if (s.contains(key))
        fail(file, s.get(key)->source(), path + "." + key,
             "the profile family takes its size from the profile's distances (site lengths): leave out " + std::string(key));
    only_keys(s, path, {"family", "profile", "profile_unit", "arc_from_deg", "arc_to_deg", "wind_stretch", "wind_shift",
                        "downwind_deg"});
    if (!s.contains("profile")) fail(file, s.source(), path + ".profile", "missing: the profile family needs a CSV file (distance_m, rate)");
    const std::string name = text(s, path, "profile");
    std::optional<LengthUnit> declared;
    if (s.contains("profile_unit")) {
      const std::string u = text(s, path, "profile_unit");
      declared = length_unit_from(u);
      if (!declared)
        fail(file, s.get("profile_unit")->source(), path + ".profile_unit",
             "unknown unit '" + u + "'" + did_you_mean(u, length_unit_spellings()) + " (use m or ft)");
    }
    if (s.contains("arc_from_deg") != s.contains("arc_to_deg")) {
      const char* given = s.contains("arc_from_deg") ? "arc_from_deg" : "arc_to_deg";
      fail(file, s.get(given)->source(), path + "." + given, "give both arc_from_deg and arc_to_deg (or neither, for a whole circle)");
    }
    const LengthUnit site_unit = scale == 1.0 ? LengthUnit::metre : LengthUnit::foot;
    std::optional<RadialProfile> profile;
    const std::filesystem::path csv = base_dir / name;
    if (files != nullptr) files->push_back(csv.string());
    try {
      profile = read_radial_profile_csv(csv.string(), declared, site_unit);
    } catch (const input_error& e) {
      fail(file, s.get("profile")->source(), path + ".profile", e.what());
    }
    ProfileWind wind;
    wind.stretch = number_in(s, path, "wind_stretch", 0.0, 10.0, 1.0);
    if (!(wind.stretch > 0.0)) fail(file, s.get("wind_stretch")->source(), path + ".wind_stretch", "must be above 0 (1 is calm)");
    wind.shift_m = scale * number_in(s, path, "wind_shift", 0.0, kMaxCoordinate, 0.0);
    wind.downwind_deg = angle(s, path, "downwind_deg", 0.0);
    std::optional<ProfileArc> arc;
    if (s.contains("arc_from_deg")) arc = ProfileArc{angle(s, path, "arc_from_deg", 0.0), angle(s, path, "arc_to_deg", 0.0)};
    try {
      return profile_spread(mean, *profile, wind, arc);
    } catch (const input_error& e) {
      fail(file, s.get(arc ? "arc_to_deg" : "profile")->source(), path + (arc ? ".arc_to_deg" : ".profile"), e.what());
    }
  }

  ScatterFamily spread_family(const toml::table& s, const std::string& path) const {
    const std::string name = text(s, path, "family", std::string("normal"));
    static const std::vector<std::string> names = {"normal", "student_t", "uniform", "profile"};
    if (std::find(names.begin(), names.end(), name) == names.end())
      fail(file, s.get("family")->source(), path + ".family",
           "unknown family '" + name + "'" +
               (did_you_mean(name, names).empty() ? " (use normal, student_t, uniform or profile)" : did_you_mean(name, names)));
    if (name != "student_t") {
      if (s.contains("nu")) fail(file, s.get("nu")->source(), path + ".nu", "only the student_t family takes nu");
      return ScatterFamily::from_name(name);
    }
    if (!s.contains("nu")) fail(file, s.source(), path + ".nu", "missing: student_t needs its degrees of freedom nu > 0");
    const double nu = number(s, path, "nu");
    if (!(nu > 0.0 && nu <= 1e6))
      fail(file, s.get("nu")->source(), path + ".nu",
           "must be a number above 0 and at most 1e6 (got " + shown(nu) + "; beyond 1e6 use the normal)");
    return ScatterFamily::student_t(nu);
  }

  // The spread's scale (a normal's covariance), from exactly one form.
  Gaussian spread_normal(const toml::table& s, const std::string& path, const Vec2& mean,
                         const ScatterFamily& family) const {
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
                                   angle(s, path, "angle_deg", 0.0));
      if (s.contains("sigma")) {
        const double sigma = length("sigma");
        return Gaussian::from_axes(mean, sigma, sigma, 0.0);
      }
      // Radii read through the family's radial CDF: sigma = radius / G^{-1}(fraction); lengths in
      // the file's unit.
      const auto circular = [&](double radius, double fraction, const char* what) {
        if (!(radius > 0.0 && std::isfinite(radius))) throw input_error(std::string(what) + " must be a positive finite number");
        const double sigma = radius / family.radius_quantile(fraction);
        return Gaussian::from_axes(mean, sigma, sigma, 0.0);
      };
      if (s.contains("cep"))
        return family.is_normal() ? Gaussian::from_cep(mean, length("cep")) : circular(length("cep"), 0.5, "cep");
      if (s.contains("r95"))
        return family.is_normal() ? Gaussian::from_r95(mean, length("r95")) : circular(length("r95"), 0.95, "r95");
      if (s.contains("fraction")) {
        if (family.is_normal())
          return Gaussian::from_fraction_within(mean, number(s, path, "fraction"), length("radius"));
        const double fraction = number(s, path, "fraction");
        if (!(fraction > 0.0 && fraction < 1.0))
          throw input_error("fraction within radius must be strictly between 0 and 1");
        return circular(length("radius"), fraction, "radius");
      }
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
  fail(r.file, t.get(key)->source(), path + "." + key,
       "must be " + options + did_you_mean(v, std::vector<std::string>(std::begin(names), std::end(names))));
}


// Regular files under the size cap only (input_file.hpp); the name is kept for the output checks.
std::string read_text_file(const std::filesystem::path& p, std::vector<std::string>* files) {
  if (files != nullptr) files->push_back(p.string());
  return read_input_file(p.string());
}

constexpr const char* kPositionNames[] = {"lon_lat", "site_metres"};
constexpr const char* kAmountUnits[] = {"litre", "count"};

// The keys a zone or a template may use to say where it is; exactly one form per table.
const std::vector<std::string> kGeometryKeys = {"shape", "params", "geometry", "feature", "positions", "layer", "where",
                                                "name_field"};

struct GeometryContext {
  const Reader& r;
  const ShapeRegistry& shapes;
  std::filesystem::path base_dir;  // relative paths start here
  std::string crs;  // site.crs as given
  std::optional<GeoOrigin> origin;
  std::vector<std::string>* files = nullptr;  // every file read, for Site::input_files

  // The site frame's CRS for GDAL: site.crs, else the local frame about the origin, else none.
  std::string frame_crs() const { return !crs.empty() ? crs : origin ? local_frame_definition(*origin) : ""; }
  // In the local frame about the origin, the GeoJSON reader's refusal of far positions (a swapped
  // longitude and latitude) applies to layers GDAL reads too.
  std::optional<double> origin_limit() const {
    return crs.empty() && origin ? std::optional<double>(GeoJsonOptions{}.max_distance) : std::nullopt;
  }
};

// The file a `geometry` key names, refused when it names none: an empty name, or a folder (the
// scenario's own with "."), which GDAL would open as a folder of Shapefiles.
std::filesystem::path geometry_path(const GeometryContext& c, const toml::table& t, const std::string& p) {
  const std::string name = c.r.text(t, p, "geometry");
  const toml::node& where = *t.get("geometry");
  if (name.empty()) fail(c.r.file, where.source(), p + ".geometry", "empty: name the file that holds the zone");
  const std::filesystem::path file = c.base_dir / name;
  std::error_code ec;
  if (std::filesystem::is_directory(file, ec))
    fail(c.r.file, where.source(), p + ".geometry",
         "'" + quoted_excerpt(name) + "' is a folder; name a file (for a Shapefile, its .shp)");
  return file;
}

// The input files of a vector source: every file GDAL lists for it (a Shapefile's companions),
// so that the output checks refuse to overwrite any of them.
void note_vector_files(const GeometryContext& c, const std::filesystem::path& file) {
  if (c.files == nullptr) return;
  c.files->push_back(file.string());
  for (std::string& f : vector_source_files(file.string())) c.files->push_back(std::move(f));
}

// Shape parameters are the plugin's, checked by its own description; only the naming rule is
// shared: a key ending in "_deg" is an angle in degrees, however deep in the table it sits
// (a composite's parts), and a value that looks like radians is worth a warning.
void warn_radians_in(const Reader& r, const toml::node& n, const std::string& path) {
  if (const toml::table* t = n.as_table()) {
    for (auto&& [k, v] : *t) {
      const std::string key(k.str()), kp = path + "." + key;
      const auto value = v.value<double>();
      if (key.size() > 4 && key.compare(key.size() - 4, 4, "_deg") == 0 && value && looks_like_radians(*value))
        r.warn(v.source(), kp, radians_warning(*value));
      warn_radians_in(r, v, kp);
    }
  } else if (const toml::array* a = n.as_array()) {
    for (std::size_t i = 0; i < a->size(); ++i) warn_radians_in(r, *a->get(i), path + "[" + std::to_string(i + 1) + "]");
  }
}

// Files GDAL/OGR reads: any extension but the two strewn reads itself, and GeoJSON when a layer
// or a filter is asked for.
bool read_by_gdal(const std::string& ext, const toml::table& t) {
  if (ext == ".wkt") return false;
  if (ext == ".geojson" || ext == ".json") return t.contains("layer") || t.contains("where");
  return true;
}

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
    for (const char* k : {"feature", "positions", "layer", "where", "name_field"})
      if (t.contains(k)) fail(r.file, t.get(k)->source(), p + "." + k, "only goes with geometry");
    shape = r.text(t, p, "shape");
    // A former kind name (a plugin's "former_kind") reads as the kind's name, warned at the key.
    if (const auto renamed = c.shapes.renamed_kind(shape)) {
      r.warn(t.get("shape")->source(), p + ".shape", renamed->warning.message, renamed->warning.kind);
      shape = renamed->now;
    }
    const toml::table& params = r.table(t, p, "params");
    warn_radians_in(r, params, p + ".params");
    std::ostringstream json;
    json << toml::json_formatter{params};
    try {
      // A parameter under its former name (the plugin's alias table) is read with a warning
      // located at the params table, as a former key of the file is.
      std::vector<Warning> renamed;
      BuildOptions options;
      options.warnings = &renamed;
      Region region = c.shapes.build(shape, c.shapes.params_in_metres(shape, json.str(), r.scale), options);
      for (const Warning& w : renamed) r.warn(t.get("params")->source(), p + ".params", w.message, w.kind);
      return region;
    } catch (const input_error& e) {
      fail(r.file, t.get("shape")->source(), p, e.what());
    }
  }
  if (t.contains("params")) fail(r.file, t.get("params")->source(), p + ".params", "only goes with shape");
  const toml::node& where = *t.get("geometry");
  const std::filesystem::path file = geometry_path(c, t, p);
  geometry_file = file.string();
  const std::string ext = file.extension().string();
  if (read_by_gdal(ext, t)) {
    if (t.contains("positions"))
      fail(r.file, t.get("positions")->source(), p + ".positions", "only goes with a GeoJSON file read by strewn (no layer or where)");
    VectorQuery q;
    q.layer = r.text(t, p, "layer", std::string());
    q.where = r.text(t, p, "where", std::string());
    // feature = "north bench" (a name, or an id written as text) or feature = 3 (an id only).
    if (const toml::node* f = t.get("feature"); f != nullptr && f->is_integer())
      q.fid = f->value<std::int64_t>();
    else
      q.feature = r.text(t, p, "feature", std::string());
    q.name_field = r.text(t, p, "name_field", std::string("name"));
    q.site_crs = c.frame_crs();
    q.max_distance_from_origin = c.origin_limit();
    q.unframed_metres_per_unit = r.scale;
    shape = "vector source";
    try {
      Region region = region_from_vector_source(file.string(), q);
      note_vector_files(c, file);
      return region;
    } catch (const input_error& e) {
      fail(r.file, where.source(), p + ".geometry", e.what());
    }
  }
  for (const char* k : {"layer", "where", "name_field"})
    if (t.contains(k)) fail(r.file, t.get(k)->source(), p + "." + k, "only goes with a file GDAL reads (not WKT)");
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
    shape = "geojson";
    GeoJsonOptions o;
    o.positions = static_cast<GeoJsonPositions>(choice(r, t, p, "positions", kPositionNames, std::string("lon_lat")));
    // feature = "a name" or feature = 3 (an id only), as for the files GDAL reads
    if (const toml::node* f = t.get("feature"); f != nullptr && f->is_integer()) {
      o.feature = std::to_string(f->value<std::int64_t>().value_or(0));
      o.feature_is_id = true;
    } else {
      o.feature = r.text(t, p, "feature", std::string());
    }
    o.site_crs = c.crs;
    o.origin = c.origin;
    if (o.positions == GeoJsonPositions::lon_lat && !o.origin && o.site_crs.empty())
      fail(r.file, where.source(), p + ".geometry",
           "GeoJSON positions are longitude/latitude (RFC 7946): set site.crs or site.origin = [lon, lat], "
           "or positions = \"site_metres\" for a file drawn in site coordinates");
    // Longitude/latitude are projected to metres; positions in the site's frame are in its unit.
    const Region region = region_from_geojson(content, o);
    return o.positions == GeoJsonPositions::lon_lat ? region : scaled_region(r, region);
  } catch (const located_error&) {
    throw;
  } catch (const input_error& e) {
    fail(r.file, where.source(), p + ".geometry", geometry_file + ": " + e.what());
  }
}

// offset and rotation_deg place any zone: rotate counter-clockwise about the zone's own origin,
// then shift.
Region placed(const Reader& r, const toml::table& t, const std::string& p, const Region& region) {
  if (!t.contains("offset") && !t.contains("rotation_deg")) return region;
  const Vec2 offset = r.length_point(t, p, "offset", Vec2::Zero());
  const double a = r.angle(t, p, "rotation_deg", 0.0) * kPi / 180.0;
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
  const Reader tr{file.string(), c.r.warnings, c.r.scale, file.parent_path(), c.r.files};
  tr.only_keys(doc, "", {"template"});
  const toml::table& t = tr.table(doc, "", "template");
  std::vector<std::string> keys = kGeometryKeys;
  keys.insert(keys.end(), {"name", "description"});
  tr.only_keys(t, "template", keys);
  std::string inner_file;
  const GeometryContext inner{tr, c.shapes, file.parent_path(), c.crs, c.origin, c.files};
  Region region = geometry_of(inner, t, "template", shape, inner_file);
  shape = "template " + tr.text(t, "template", "name", file.filename().string()) + " (" + shape + ")";
  return region;
}

// One reader per table of the scenario file, in the order the file's tables are read.

void read_site_table(const Reader& r, const toml::table& doc, Site& s) {
  const toml::table& site = r.table(doc, "", "site");
  r.only_keys(site, "site", {"name", "units", "notes", "origin", "crs"});
  if (site.contains("crs")) {
    if (site.contains("origin"))
      fail(r.file, site.get("origin")->source(), "site.origin",
           "give crs (site coordinates in that CRS) or origin (a local frame about a WGS 84 point), not both");
    s.crs = r.text(site, "site", "crs");
    try {
      site_frame_crs_name(s.crs);
    } catch (const input_error& e) {
      fail(r.file, site.get("crs")->source(), "site.crs", e.what());
    }
  }
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
  // The site's coordinates are the CRS's own, in its unit: a second unit beside it could only
  // disagree (a CRS in feet is not supported yet; its coordinates would need the CRS's unit).
  if (!s.crs.empty() && s.units != LengthUnit::metre)
    fail(r.file, site.get("units")->source(), "site.units",
         "a site with a crs is in metres, the CRS's coordinates (give units = \"m\" with a projected CRS in metres)");
}

IntegrateOptions read_settings(const Reader& r, const toml::table& doc, IntegrateOptions options) {
  const toml::table& set = r.table(doc, "", "settings");
  r.only_keys(set, "settings", {"method", "tolerance", "samples", "seed"});
  try {
    options.method = method_from_string(r.text(set, "settings", "method", std::string("exact")));
  } catch (const input_error& e) {
    fail(r.file, set.get("method")->source(), "settings.method", e.what());
  }
  // The range the command's --tolerance takes (cli/commands/assess.cpp), named at the key
  // ("settings: rel_tolerance must be in (0, 1)" named the table and an internal name).
  options.rel_tolerance = r.number_in(set, "settings", "tolerance", 1e-15, 0.5, options.rel_tolerance);
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

// A source's exposure (events per session, sessions per year) and deposition amounts.
void read_exposure(const Reader& r, const toml::table& t, const std::string& p, Source& src) {
  src.events_per_session = r.number_in(t, p, "events_per_session", 0.0, kMaxExposure, 1.0);
  src.sessions_per_year = r.number_in(t, p, "sessions_per_year", 0.0, kMaxExposure, 1.0);
  for (const char* k : {"amount_per_event", "events_per_hour"})
    if (t.contains(k)) {
      const double v = r.number_in(t, p, k, 0.0, kMaxExposure);
      (std::string(k) == "amount_per_event" ? src.amount_per_event : src.events_per_hour) = v;
    }
}

// A source's `drop = {...}` (docs/scenario-format.md, "Drops from flight"): the flight, the wind,
// the parcel and each input's standard deviation; its spread is computed here, once, so that
// every tool sees the same scatter. Lengths (and speeds, per second) in the file's unit; mass in
// kg, air density in kg/m^3, angles in degrees as compass bearings.
DropSource read_drop(const Reader& r, const toml::table& t, const std::string& p) {
  r.only_keys(t, p, {"release", "height", "ground_speed", "heading_deg", "track", "wind", "mass", "drag_area",
                     "parachute", "air_density", "uncertainty", "falls", "seed"});
  DropSource ds;
  DropParameters& d = ds.parameters;
  const auto length = [&](const toml::table& tt, const std::string& pp, const char* key, double least, double most,
                          std::optional<double> fallback = std::nullopt) {
    return r.scale * r.number_in(tt, pp, key, least, most, fallback);
  };
  d.release = r.length_point(t, p, "release");
  d.height = length(t, p, "height", 0.0, 1e5);
  if (!(d.height > 0.0)) fail(r.file, t.get("height")->source(), p + ".height", "must be above 0");
  d.ground_speed = length(t, p, "ground_speed", 0.0, 1e3);
  if (t.contains("heading_deg") == t.contains("track"))
    fail(r.file, t.source(), p, "give heading_deg (the track's compass bearing) or track = [[x1, y1], [x2, y2]], not both");
  if (t.contains("track")) {
    const toml::array* a = t.get("track")->as_array();
    if (a == nullptr || a->size() != 2 || !a->get(0)->is_array() || !a->get(1)->is_array())
      fail(r.file, t.get("track")->source(), p + ".track", "must be two points [[x1, y1], [x2, y2]] along the flight");
    toml::table ends;
    ends.insert("from", *a->get(0));
    ends.insert("to", *a->get(1));
    const Vec2 along = r.point(ends, p + ".track", "to") - r.point(ends, p + ".track", "from");
    if (!(along.norm() > 0.0)) fail(r.file, t.get("track")->source(), p + ".track", "its two points must differ");
    d.heading_deg = std::atan2(along.x(), along.y()) * 180.0 / kPi;  // compass bearing of the direction
  } else {
    d.heading_deg = r.angle(t, p, "heading_deg", 0.0);
  }
  if (t.contains("wind")) {
    const std::string wp = p + ".wind";
    const toml::table& w = r.table(t, p, "wind");
    r.only_keys(w, wp, {"speed", "from_deg", "reference_height", "profile_exponent"});
    d.wind.speed = length(w, wp, "speed", 0.0, 200.0);
    d.wind.from_deg = r.angle(w, wp, "from_deg", 0.0);
    d.wind.reference_height = length(w, wp, "reference_height", 0.01, 1e4, 10.0 / r.scale);
    d.wind.profile_exponent = r.number_in(w, wp, "profile_exponent", 0.0, 1.0, 1.0 / 7.0);
  }
  d.mass = r.number_in(t, p, "mass", 1e-6, 1e5, std::nullopt, " kg");
  d.drag_area = r.scale * r.scale * r.number_in(t, p, "drag_area", 0.0, 1e4);
  if (t.contains("parachute")) {
    const std::string cp = p + ".parachute";
    const toml::table& c = r.table(t, p, "parachute");
    r.only_keys(c, cp, {"drag_area", "deploy_delay"});
    Parachute chute;
    chute.drag_area = r.scale * r.scale * r.number_in(c, cp, "drag_area", 0.0, 1e4);
    if (!(chute.drag_area > 0.0)) fail(r.file, c.get("drag_area")->source(), cp + ".drag_area", "must be above 0");
    chute.deploy_delay = r.number_in(c, cp, "deploy_delay", 0.0, 1e4, 0.0, " s");
    d.parachute = chute;
  }
  d.air_density = r.number_in(t, p, "air_density", 0.01, 100.0, 1.225, " kg/m^3");
  if (t.contains("uncertainty")) {
    const std::string up = p + ".uncertainty";
    const toml::table& u = r.table(t, p, "uncertainty");
    r.only_keys(u, up, {"position", "timing", "height", "ground_speed", "heading_deg", "wind_speed", "wind_from_deg", "drag"});
    DropUncertainty& sd = ds.uncertainty;
    sd.position = length(u, up, "position", 0.0, 1e5, 0.0);
    sd.timing = r.number_in(u, up, "timing", 0.0, 100.0, 0.0, " s");
    sd.height = length(u, up, "height", 0.0, 0.25 * d.height / r.scale, 0.0);
    sd.ground_speed = length(u, up, "ground_speed", 0.0, 1e3, 0.0);
    sd.heading_deg = r.number_in(u, up, "heading_deg", 0.0, 30.0, 0.0, " degrees");
    sd.wind_speed = length(u, up, "wind_speed", 0.0, 200.0, 0.0);
    sd.wind_from_deg = r.number_in(u, up, "wind_from_deg", 0.0, 30.0, 0.0, " degrees");
    sd.drag = r.number_in(u, up, "drag", 0.0, 0.25, 0.0);
  }
  ds.options.falls = r.count(t, p, "falls", 100, 20000, 4000.0);  // seconds, or minutes from a great height (estimated, with progress)
  ds.options.seed = r.count(t, p, "seed", 0, kMaxSeed, 20261203.0);
  try {
    // The observers for this call only: ds.options stays in the site (sweeps and solve release
    // compute the falls again), and must not keep callbacks of a scope that has ended.
    DropSpreadOptions observed = ds.options;
    observed.estimate = load_estimate;
    observed.progress = load_progress;
    ds.spread = drop_spread(d, ds.uncertainty, observed);
  } catch (const input_error& e) {
    fail(r.file, t.source(), p, e.what());
  }
  return ds;
}

// A source's `position`: a point [x, y], or a throwing line [[x1, y1], [x2, y2]] (strewn/thrower.hpp).
std::pair<Vec2, std::optional<Vec2>> read_position(const Reader& r, const toml::table& t, const std::string& p) {
  const toml::node* n = t.get("position");
  const toml::array* a = n->as_array();
  if (a && a->size() == 2 && a->get(0)->is_array()) {
    toml::table ends;
    ends.insert("a", *a->get(0));
    ends.insert("b", *a->get(1));
    try {
      return {r.length_point(ends, p + ".position", "a"), r.length_point(ends, p + ".position", "b")};
    } catch (const input_error&) {
      fail(r.file, n->source(), p + ".position", "must be a point [x, y] or a throwing line [[x1, y1], [x2, y2]] in metres");
    }
  }
  return {r.length_point(t, p, "position"), std::nullopt};
}

// The thrower keys of a [[source]] (docs/scenario-format.md, "Throwers and barriers"): the spread
// derived from position, toward, spread_angle_deg and range_fraction or range_sigma.
void read_thrower(const Reader& r, const toml::table& t, const std::string& p, Source& src) {
  const char* thrower_keys[] = {"spread_angle_deg", "range_fraction", "range_sigma", "line_components"};
  if (!t.contains("toward")) {
    for (const char* k : thrower_keys)
      if (t.contains(k)) fail(r.file, t.get(k)->source(), p + "." + k, "only goes with toward (a thrower's aim point)");
    if (t.contains("position")) {
      const auto [at, end] = read_position(r, t, p);
      if (end) fail(r.file, t.get("position")->source(), p + ".position", "a throwing line needs toward (the aim point)");
      src.positions.assign(src.model.components().size(), at);
    }
    return;
  }
  for (const char* k : {"aim", "mean", "spread"})
    if (t.contains(k))
      fail(r.file, t.get(k)->source(), p + "." + k,
           std::string("does not go with toward: a thrower's ") +
               (std::string(k) == "spread" ? "spread follows from spread_angle_deg and range_fraction or range_sigma"
                                           : "aim is toward (give bias for the offset of the mean impact point)"));
  if (!t.contains("position")) fail(r.file, t.source(), p + ".position", "missing: a thrower (toward) needs its position");
  Thrower th;
  std::tie(th.position, th.line_end) = read_position(r, t, p);
  th.toward = r.length_point(t, p, "toward");
  th.bias = r.length_point(t, p, "bias", Vec2::Zero());
  if (!t.contains("spread_angle_deg"))
    fail(r.file, t.source(), p + ".spread_angle_deg", "missing: a thrower's angular spread across the throw, degrees");
  th.spread_angle_deg = r.angle(t, p, "spread_angle_deg", 0.0);
  if (t.contains("range_fraction")) th.range_fraction = r.number(t, p, "range_fraction");
  if (t.contains("range_sigma")) th.range_sigma = r.scale * r.number(t, p, "range_sigma");
  if (t.contains("line_components")) {
    if (!th.line_end) fail(r.file, t.get("line_components")->source(), p + ".line_components", "only goes with a throwing line position = [[x1, y1], [x2, y2]]");
    th.line_components = static_cast<int>(r.count(t, p, "line_components", 2, 256));
  }
  if (th.line_end && t.contains("component"))
    fail(r.file, t.get("component")->source(), p + ".component", "a throwing line takes no [[source.component]] tables");
  th.release_height = src.release_height;
  try {
    check_thrower(th);
    // The spreads themselves, here where the file's place is known: an angle of 1e-300 degrees
    // passed the checks and failed later as a bare "sigma_minor must be ..." (a hostile trial).
    for (const Vec2& at : standing_points(th)) thrower_spread(th, at);
  } catch (const input_error& e) {
    fail(r.file, t.source(), p, e.what());
  }
  src.aim = th.toward;
  src.thrower = th;
}

// One [[source]]: aim, bias or mean, spread and wild components, exposure, deposition amounts, fit;
// or a thrower (read_thrower), and a position for barriers; or aim and a drop from flight, whose
// physics gives the spread.
Source read_source(const Reader& r, const toml::table& t, const std::string& p, std::size_t i) {
  r.only_keys(t, p, {"name", "aim", "bias", "mean", "spread", "component", "wild", "events_per_session",
                     "sessions_per_year", "amount_per_event", "events_per_hour", "fit", "drop", "position", "toward",
                     "spread_angle_deg", "range_fraction", "range_sigma", "line_components", "release_height"});
  Source src;
  src.name = r.text(t, p, "name", "source " + std::to_string(i + 1));
  if (t.contains("drop")) {
    for (const char* k : {"bias", "mean", "spread", "component", "wild", "fit", "position", "toward", "spread_angle_deg",
                          "range_fraction", "range_sigma", "line_components", "release_height"})
      if (t.contains(k))
        fail(r.file, t.get(k)->source(), p + "." + k, "a source with drop takes its spread from the drop's physics");
    src.drop = read_drop(r, r.table(t, p, "drop"), p + ".drop");
    src.model = src.drop->spread.model;
    Vec2 mean = Vec2::Zero();  // of the landings: the aim unless the file names the intended point
    for (const WeightedGaussian& c : src.model.components()) mean += c.weight * c.gaussian.mean();
    src.aim = t.contains("aim") ? r.length_point(t, p, "aim") : mean;
    src.drop->aim_given = t.contains("aim");
    src.component_labels = {src.drop->spread.normal ? "drop" : "drop core"};
    if (!src.drop->spread.normal) src.component_labels.push_back("drop wide");
    read_exposure(r, t, p, src);
    return src;
  }
  if (t.contains("release_height")) src.release_height = r.scale * r.number_in(t, p, "release_height", 0.0, kMaxCoordinate);
  if (t.contains("toward")) read_thrower(r, t, p, src);
  if (src.thrower && src.thrower->line_end) {
    src.model = thrower_model(*src.thrower);
    src.positions = standing_points(*src.thrower);
    src.component_labels.clear();
    for (std::size_t k = 0; k < src.positions.size(); ++k) src.component_labels.push_back("standing point " + std::to_string(k + 1));
    read_exposure(r, t, p, src);
    if (t.contains("fit")) fail(r.file, t.get("fit")->source(), p + ".fit", "a thrower's spread is derived, not fitted");
    return src;
  }
  if (t.contains("mean") && t.contains("bias")) fail(r.file, t.source(), p, "give bias or mean, not both");
  // A source given only its mean impact point is aimed there (bias 0): an aim of the origin
  // would put a bias of the whole coordinate offset on a projected (UTM) site, 5e6 m.
  const bool mean_only = t.contains("mean") && !t.contains("aim") && !src.thrower;
  if (!src.thrower) src.aim = mean_only ? r.length_point(t, p, "mean") : r.length_point(t, p, "aim", Vec2::Zero());
  const Vec2 mean = t.contains("mean") ? r.length_point(t, p, "mean") : src.aim + r.length_point(t, p, "bias", Vec2::Zero());
  const Gaussian core = src.thrower ? thrower_spread(*src.thrower, src.thrower->position).gaussian
                                    : r.spread(r.table(t, p, "spread"), p + ".spread", mean);
  double extra_weight = 0.0;
  src.component_labels = {"core"};
  std::vector<WeightedGaussian> parts = read_components(r, t, p, src.aim, mean, extra_weight, src.component_labels);
  if (extra_weight >= 1.0)
    fail(r.file, t.source(), p + ".component", "weights of the extra components must sum to less than 1 (the core has the rest)");
  parts.insert(parts.begin(), WeightedGaussian{1.0 - extra_weight, core});
  src.model = ScatterModel::mixture(parts);
  read_exposure(r, t, p, src);
  if (t.contains("fit")) src.fit = r.fit_record(r.table(t, p, "fit"), p + ".fit");
  if (src.thrower) {
    src.positions.assign(src.model.components().size(), src.thrower->position);
    if (t.contains("fit")) fail(r.file, t.get("fit")->source(), p + ".fit", "a thrower's spread is derived, not fitted");
  } else {
    read_thrower(r, t, p, src);  // a plain source's position, or a thrower key without toward
  }
  return src;
}

std::vector<Source> read_sources(const Reader& r, const toml::table& doc) {
  const toml::array* sources = doc["source"].as_array();
  if ((sources == nullptr || sources->empty()) && (doc.contains("head") || doc.contains("layout")) && !doc.contains("source"))
    return {};  // sprinklers only: [[head]] and [[layout]] are the sources
  if (const toml::node* single = doc.get("source"); single != nullptr && sources == nullptr)
    fail(r.file, single->source(), "source", "sources are [[source]] tables (two brackets, one per source), not [source]");
  if (sources == nullptr || sources->empty())
    fail(r.file, doc.source(), "source", "at least one [[source]] (or [[head]] or [[layout]]) is needed");
  std::vector<Source> out;
  std::set<std::string> names;
  for (std::size_t i = 0; i < sources->size(); ++i) {
    const std::string p = "source[" + std::to_string(i + 1) + "]";
    const toml::table* t = sources->get(i)->as_table();
    if (t == nullptr) fail(r.file, sources->get(i)->source(), p, "must be a table");
    out.push_back(read_source(r, *t, p, i));
    // Names pick sources (--source, solve's answers, the JSON's records): two of one name were
    // two rows no one could tell apart, and --source took one of them without a word.
    if (!names.insert(out.back().name).second)
      fail(r.file, t->contains("name") ? t->get("name")->source() : t->source(), p + ".name",
           "duplicate source name '" + out.back().name + "' (each source needs a name of its own)");
  }
  return out;
}

// The [[barrier]] tables (strewn/barrier.hpp): name, points, catch, height. Every source must then
// have a position, for the barriers' shadows start there.
std::vector<Barrier> read_barriers(const Reader& r, const toml::table& doc, std::vector<Source>& sources) {
  std::vector<Barrier> out;
  const toml::node* n = doc.get("barrier");
  if (n == nullptr) return out;
  const toml::array* list = n->as_array();
  if (list == nullptr) fail(r.file, n->source(), "barrier", "must be a list of [[barrier]] tables");
  std::set<std::string> names;
  std::size_t active = 0;  // with a catch above 0
  for (std::size_t i = 0; i < list->size(); ++i) {
    const std::string p = "barrier[" + std::to_string(i + 1) + "]";
    const toml::table* t = list->get(i)->as_table();
    if (t == nullptr) fail(r.file, list->get(i)->source(), p, "must be a table");
    r.only_keys(*t, p, {"name", "points", "catch", "height"});
    Barrier b;
    b.name = r.text(*t, p, "name", "barrier " + std::to_string(i + 1));
    if (!names.insert(b.name).second) fail(r.file, t->get("name")->source(), p + ".name", "duplicate barrier name '" + b.name + "'");
    const toml::node* pts = t->get("points");
    if (pts == nullptr) fail(r.file, t->source(), p + ".points", "missing: the barrier's line [[x1, y1], [x2, y2], ...]");
    const toml::array* a = pts->as_array();
    if (a == nullptr || a->size() < 2)
      fail(r.file, pts->source(), p + ".points", "must be a line of two or more points [[x1, y1], [x2, y2], ...]");
    for (std::size_t k = 0; k < a->size(); ++k) {
      toml::table one;
      one.insert("point", *a->get(k));
      try {
        b.points.push_back(r.length_point(one, p + ".points", "point"));
      } catch (const input_error&) {
        fail(r.file, a->get(k)->source(), p + ".points[" + std::to_string(k + 1) + "]", "must be a point [x, y] in metres");
      }
    }
    if (!t->contains("catch"))
      fail(r.file, t->source(), p + ".catch", "missing: the share of crossing impacts it stops (1 for a wall, e.g. 0.95 for a net)");
    b.catch_share = r.number_in(*t, p, "catch", 0.0, 1.0);
    // Each source combines the shadows' subsets (strewn/barrier_effect.hpp): said here, where
    // the file's place is known (it came later as a bare "source '...': at most 12 barriers").
    if (b.catch_share > 0.0 && ++active > kMaxActiveBarriers)
      fail(r.file, t->get("catch")->source(), p + ".catch",
           fmt::format("at most {} barriers with a catch above 0 (their shadows' subsets are combined, 2^N of them)",
                       kMaxActiveBarriers));
    if (t->contains("height")) b.height = r.scale * r.number_in(*t, p, "height", 0.0, kMaxCoordinate, std::nullopt, " m");
    try {
      check_barrier(b);
    } catch (const input_error& e) {
      fail(r.file, t->source(), p, e.what());
    }
    out.push_back(std::move(b));
  }
  const toml::array* source_tables = doc["source"].as_array();
  for (std::size_t i = 0; i < sources.size(); ++i) {
    if (sources[i].positions.empty())
      fail(r.file, source_tables->get(i)->source(), "source[" + std::to_string(i + 1) + "].position",
           "missing: the site has barriers, whose shadows start at each source's position; give position = [x, y] "
           "(where the thrower stands)");
    sources[i].barriers = out;
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
  std::vector<Zone> out;
  if (!doc.contains("zone") && doc.contains("zone_layer")) return out;
  const toml::array* zones = doc["zone"].as_array();
  // [zone] for [[zone]]: a single table where a list of tables belongs, named where it is.
  if (const toml::node* single = doc.get("zone"); single != nullptr && zones == nullptr)
    fail(r.file, single->source(), "zone", "zones are [[zone]] tables (two brackets, one per zone), not [zone]");
  if (zones == nullptr || zones->empty())
    fail(r.file, doc.source(), "zone", "at least one [[zone]] (or [[zone_layer]]) is needed");
  for (std::size_t i = 0; i < zones->size(); ++i) {
    const std::string p = "zone[" + std::to_string(i + 1) + "]";
    const toml::table* t = zones->get(i)->as_table();
    if (t == nullptr) fail(r.file, zones->get(i)->source(), p, "must be a table");
    out.push_back(read_zone(r, geometry, *t, p, names));
  }
  return out;
}

// One [[zone_layer]]: every feature of a vector layer (after `where`) becomes a zone, named
// and given its role by attributes, with a default limit that an attribute may override.
void read_zone_layer(const Reader& r, const GeometryContext& c, const toml::table& t, const std::string& p,
                     std::set<std::string>& names, std::vector<Zone>& out) {
  r.only_keys(t, p, {"geometry", "layer", "where", "name_field", "role", "role_field", "limit", "limit_field",
                     "limit_per", "occupancy"});
  const toml::node& where = *t.get("geometry");
  const std::filesystem::path file = geometry_path(c, t, p);
  VectorQuery q;
  q.layer = r.text(t, p, "layer", std::string());
  q.where = r.text(t, p, "where", std::string());
  q.name_field = r.text(t, p, "name_field", std::string("name"));
  q.site_crs = c.frame_crs();
  q.max_distance_from_origin = c.origin_limit();
  q.unframed_metres_per_unit = r.scale;
  if (t.contains("role") == t.contains("role_field"))
    fail(r.file, t.source(), p, "give role (the same for every feature) or role_field (an attribute holding it)");
  const std::string role_field = r.text(t, p, "role_field", std::string());
  const std::string limit_field = r.text(t, p, "limit_field", std::string());
  std::optional<Role> role;
  if (t.contains("role") && r.text(t, p, "role") == "watch") {
    r.former(t.get("role")->source(), p + ".role", "\"watch\"", "\"report_only\"");
    role = Role::report_only;
  } else if (t.contains("role")) {
    role = static_cast<Role>(choice(r, t, p, "role", kRoleNames));
  }
  std::optional<double> limit;
  if (t.contains("limit")) {
    limit = r.number(t, p, "limit");
    if (!(*limit > 0.0 && *limit <= 1.0)) fail(r.file, t.get("limit")->source(), p + ".limit", "must be a probability in (0, 1]");
  }
  const Period per = static_cast<Period>(choice(r, t, p, "limit_per", kLimitPerNames, std::string("session")));
  std::optional<double> occupancy;
  if (t.contains("occupancy")) {
    occupancy = r.number(t, p, "occupancy");
    if (!(*occupancy > 0.0 && *occupancy <= 1.0))
      fail(r.file, t.get("occupancy")->source(), p + ".occupancy", "must be a fraction of time in (0, 1]");
  }
  std::vector<VectorFeature> features;
  try {
    features = read_vector_features(file.string(), q);
    note_vector_files(c, file);
  } catch (const input_error& e) {
    fail(r.file, where.source(), p + ".geometry", e.what());
  }
  // An attribute the layer lacks is named with the layer's fields, before any feature is read.
  const auto check_field = [&](const std::string& key, const std::string& field) {
    if (field.empty() || features.front().attribute(field) != nullptr) return;
    std::vector<std::string> fields;
    for (const auto& a : features.front().attributes) fields.push_back(a.first);
    fail(r.file, t.get(key)->source(), p + "." + key, "the layer has no attribute '" + field + "'" + did_you_mean(field, fields));
  };
  if (t.contains("name_field")) check_field("name_field", q.name_field);
  check_field("role_field", role_field);
  check_field("limit_field", limit_field);
  for (VectorFeature& f : features) {
    const std::string fp = p + " feature '" + f.name + "' (fid " + std::to_string(f.fid) + ")";
    Zone z;
    z.name = f.name;
    if (!names.insert(z.name).second)
      fail(r.file, where.source(), fp, "duplicate zone name '" + z.name + "' (name features uniquely, or pick another name_field)");
    if (role) {
      z.role = *role;
    } else {
      const std::string v = *f.attribute(role_field);
      std::size_t i = 0;
      while (i < 3 && v != kRoleNames[i]) ++i;
      if (v == "watch") {
        r.former(t.get("role_field")->source(), fp + "." + role_field, "\"watch\"", "\"report_only\"");
        i = static_cast<std::size_t>(Role::report_only);
      }
      if (i == 3)
        fail(r.file, t.get("role_field")->source(), fp + "." + role_field,
             "'" + quoted_excerpt(v) + "' must be target, keep_out or report_only" +
                 did_you_mean(v, {kRoleNames[0], kRoleNames[1], kRoleNames[2]}));
      z.role = static_cast<Role>(i);
    }
    z.limit = limit;
    if (!limit_field.empty() && !f.attribute(limit_field)->empty()) {
      const std::string& v = *f.attribute(limit_field);
      char* end = nullptr;
      const double x = std::strtod(v.c_str(), &end);
      if (end == v.c_str() || *end != '\0' || !(x > 0.0 && x <= 1.0))
        fail(r.file, t.get("limit_field")->source(), fp + "." + limit_field,
             "'" + quoted_excerpt(v) + "' must be a probability in (0, 1]");
      z.limit = x;
    }
    z.limit_per = per;
    z.occupancy = occupancy;
    z.shape = "vector layer";
    z.geometry_file = file.string();
    z.region = std::move(f.region);
    out.push_back(std::move(z));
  }
}

void read_zone_layers(const Reader& r, const toml::table& doc, const GeometryContext& geometry,
                      std::set<std::string>& names, std::vector<Zone>& out) {
  const toml::node* n = doc.get("zone_layer");
  if (n == nullptr) return;
  const toml::array* layers = n->as_array();
  if (layers == nullptr) fail(r.file, n->source(), "zone_layer", "must be a list of [[zone_layer]] tables");
  for (std::size_t i = 0; i < layers->size(); ++i) {
    const std::string p = "zone_layer[" + std::to_string(i + 1) + "]";
    const toml::table* t = layers->get(i)->as_table();
    if (t == nullptr) fail(r.file, layers->get(i)->source(), p, "must be a table");
    read_zone_layer(r, geometry, *t, p, names, out);
  }
}

// Sprinkler heads (strewn/head.hpp, docs/irrigation.md): the keys one [[head]] and a [[layout]]'s
// head template share. Lengths in the site's unit; the flow in flow_unit (L/min in a metric
// site and gpm in a US one unless given); the profile a built-in shape or a leg-test CSV.
const std::vector<std::string> kHeadKeys = {"radius", "flow", "flow_unit", "profile", "profile_unit",
                                            "wind_stretch", "wind_shift", "downwind_deg"};

void read_head_pattern(const Reader& r, const toml::table& t, const std::string& p, Head& h) {
  h.radius_m = r.scale * r.number_in(t, p, "radius", 0.0, kMaxCoordinate);
  if (!(h.radius_m > 0.0)) fail(r.file, t.get("radius")->source(), p + ".radius", "must be above 0 (the wetted radius)");
  const std::string unit = r.text(t, p, "flow_unit", std::string(r.scale == 1.0 ? "L/min" : "gpm"));
  const std::optional<double> per = litres_per_minute_in(unit);
  if (!per)
    fail(r.file, t.get("flow_unit")->source(), p + ".flow_unit",
         "unknown flow unit '" + quoted_excerpt(unit) + "'" + (unit.size() <= 64 ? did_you_mean(unit, flow_unit_spellings()) : "") +
             " (use L/min, m3/h or gpm)");
  h.flow_l_per_min = *per * r.number_in(t, p, "flow", 0.0, kMaxExposure, std::nullopt, " " + unit);
  if (!(h.flow_l_per_min > 0.0)) fail(r.file, t.get("flow")->source(), p + ".flow", "must be above 0");
  const std::string name = r.text(t, p, "profile", std::string("triangular"));
  const bool builtin = name.find('.') == std::string::npos && name.find('/') == std::string::npos;
  if (builtin && t.contains("profile_unit"))
    fail(r.file, t.get("profile_unit")->source(), p + ".profile_unit", "only a profile from a CSV file takes profile_unit");
  try {
    if (builtin) {
      h.profile = generic_profile(name, h.radius_m);
    } else {
      std::optional<LengthUnit> declared;
      if (t.contains("profile_unit")) {
        const std::string u = r.text(t, p, "profile_unit");
        declared = length_unit_from(u);
        if (!declared)
          fail(r.file, t.get("profile_unit")->source(), p + ".profile_unit",
               "unknown unit '" + quoted_excerpt(u) + "'" + did_you_mean(u, length_unit_spellings()) + " (use m or ft)");
      }
      const std::filesystem::path csv = r.base_dir / name;
      if (r.files != nullptr) r.files->push_back(csv.string());
      h.profile = profile_to_radius(read_radial_profile_csv(csv.string(), declared, r.scale == 1.0 ? LengthUnit::metre : LengthUnit::foot),
                                    h.radius_m);
    }
  } catch (const input_error& e) {
    fail(r.file, t.contains("profile") ? t.get("profile")->source() : t.source(), p + ".profile", e.what());
  }
  h.wind.stretch = r.number_in(t, p, "wind_stretch", 0.0, 10.0, 1.0);
  if (!(h.wind.stretch > 0.0)) fail(r.file, t.get("wind_stretch")->source(), p + ".wind_stretch", "must be above 0 (1 is calm)");
  h.wind.shift_m = r.scale * r.number_in(t, p, "wind_shift", 0.0, kMaxCoordinate, 0.0);
  h.wind.downwind_deg = r.angle(t, p, "downwind_deg", 0.0);
}

// One [[head]]: a position, an optional arc (counter-clockwise from +x, or clockwise bearings
// from north: the sweep from bearing_from_deg clockwise to bearing_to_deg is the same wedge as
// the one from 90 - bearing_to_deg counter-clockwise to 90 - bearing_from_deg) and the pattern.
Head read_head(const Reader& r, const toml::table& t, const std::string& p, std::size_t i) {
  std::vector<std::string> keys = {"name", "position", "arc_from_deg", "arc_to_deg", "bearing_from_deg", "bearing_to_deg"};
  keys.insert(keys.end(), kHeadKeys.begin(), kHeadKeys.end());
  r.only_keys(t, p, keys);
  Head h;
  h.name = r.text(t, p, "name", "head " + std::to_string(i + 1));
  h.position = r.length_point(t, p, "position");
  read_head_pattern(r, t, p, h);
  const bool ccw = t.contains("arc_from_deg") || t.contains("arc_to_deg");
  const bool bearing = t.contains("bearing_from_deg") || t.contains("bearing_to_deg");
  if (ccw && bearing)
    fail(r.file, t.get(t.contains("bearing_from_deg") ? "bearing_from_deg" : "bearing_to_deg")->source(), p,
         "give the arc as arc_from_deg/arc_to_deg or as bearing_from_deg/bearing_to_deg, not both");
  const char* from = ccw ? "arc_from_deg" : "bearing_from_deg";
  const char* to = ccw ? "arc_to_deg" : "bearing_to_deg";
  if (ccw || bearing) {
    if (t.contains(from) != t.contains(to))
      fail(r.file, t.get(t.contains(from) ? from : to)->source(), p + "." + (t.contains(from) ? to : from),
           std::string("missing: give both ") + from + " and " + to + " (or neither, for a full circle)");
    const double a = r.angle(t, p, from, 0.0), b = r.angle(t, p, to, 0.0);
    h.arc = ccw ? ProfileArc{a, b} : ProfileArc{90.0 - b, 90.0 - a};
    if (!(std::fmod(std::fmod(h.arc->to_deg - h.arc->from_deg, 360.0) + 360.0, 360.0) > 0.0))
      fail(r.file, t.get(to)->source(), p + "." + to, "the arc's sweep is 0 degrees (leave the arc out for a full circle)");
  }
  return h;
}

// One [[layout]] over a zone already read (strewn/layout.hpp).
Layout read_layout(const Reader& r, const toml::table& t, const std::string& p, std::size_t i, const std::vector<Zone>& zones,
                   std::vector<Head>& heads) {
  std::vector<std::string> keys = {"name", "zone", "pattern", "spacing", "spacing_of_radius", "row_spacing",
                                   "row_spacing_of_radius", "boundary_arcs"};
  keys.insert(keys.end(), kHeadKeys.begin(), kHeadKeys.end());
  r.only_keys(t, p, keys);
  Layout l;
  l.name = r.text(t, p, "name", "layout " + std::to_string(i + 1));
  l.zone = r.text(t, p, "zone");
  const Zone* zone = nullptr;
  std::vector<std::string> names;
  for (const Zone& z : zones) {
    names.push_back(z.name);
    if (z.name == l.zone) zone = &z;
  }
  if (zone == nullptr) fail(r.file, t.get("zone")->source(), p + ".zone", "no zone named '" + quoted_excerpt(l.zone) + "'" + did_you_mean(l.zone, names));
  static const char* const kPatterns[] = {"square", "triangular", "rectangular", "perimeter"};
  l.pattern = static_cast<LayoutPattern>(choice(r, t, p, "pattern", kPatterns));
  read_head_pattern(r, t, p, l.head);
  // A spacing is a length, a share of the radius, or "head-to-head" (a share of 1).
  const auto spacing = [&](const std::string& key, bool needed) -> double {
    const std::string share = key + "_of_radius";
    if (t.contains(key) && t.contains(share))
      fail(r.file, t.get(share)->source(), p + "." + share, "give " + key + " or " + share + ", not both");
    if (t.contains(share)) return l.head.radius_m * r.number_in(t, p, share, 1e-3, 100.0);
    if (const toml::node* n = t.get(key); n && n->is_string()) {
      if (r.text(t, p, key) != "head-to-head")
        fail(r.file, n->source(), p + "." + key, "must be a length, or \"head-to-head\" (the radius)");
      return l.head.radius_m;
    }
    if (t.contains(key)) {
      const double v = r.scale * r.number_in(t, p, key, 0.0, kMaxCoordinate);
      if (!(v > 0.0)) fail(r.file, t.get(key)->source(), p + "." + key, "must be above 0");
      return v;
    }
    if (needed) fail(r.file, t.source(), p + "." + key, "missing: give " + key + " (a length or \"head-to-head\") or " + share);
    return 0.0;
  };
  l.spacing_m = spacing("spacing", true);
  const bool rect = l.pattern == LayoutPattern::rectangular;
  if (!rect)
    for (const char* k : {"row_spacing", "row_spacing_of_radius"})
      if (t.contains(k)) fail(r.file, t.get(k)->source(), p + "." + k, "only the rectangular pattern takes a row spacing");
  if (rect) l.row_spacing_m = spacing("row_spacing", true);
  if (const toml::node* n = t.get("boundary_arcs")) {
    if (!n->is_boolean()) fail(r.file, n->source(), p + ".boundary_arcs", "must be true or false");
    l.boundary_arcs = n->value_or(true);
  }
  try {
    const std::vector<Head> placed = layout_heads(l, zone->region);
    heads.insert(heads.end(), placed.begin(), placed.end());
  } catch (const input_error& e) {
    fail(r.file, t.source(), p, e.what());
  }
  return l;
}

// Every [[head]], then every [[layout]]'s heads, each also a source (after the [[source]]s).
void read_heads(const Reader& r, const toml::table& doc, Site& s) {
  std::set<std::string> names;
  for (const Source& src : s.sources) names.insert(src.name);
  for (const char* kind : {"head", "layout"}) {
    const toml::node* n = doc.get(kind);
    if (n == nullptr) continue;
    const toml::array* list = n->as_array();
    if (list == nullptr) fail(r.file, n->source(), kind, std::string("must be a list of [[") + kind + "]] tables");
    for (std::size_t i = 0; i < list->size(); ++i) {
      const std::string p = std::string(kind) + "[" + std::to_string(i + 1) + "]";
      const toml::table* t = list->get(i)->as_table();
      if (t == nullptr) fail(r.file, list->get(i)->source(), p, "must be a table");
      const std::size_t before = s.heads.size();
      if (std::string(kind) == "head") s.heads.push_back(read_head(r, *t, p, i));
      else s.layouts.push_back(read_layout(r, *t, p, i, s.zones, s.heads));
      for (std::size_t k = before; k < s.heads.size(); ++k) {
        if (!names.insert(s.heads[k].name).second)
          fail(r.file, t->contains("name") ? t->get("name")->source() : t->source(), p + ".name",
               "duplicate source or head name '" + s.heads[k].name + "'");
        try {
          s.sources.push_back(head_source(s.heads[k]));
        } catch (const input_error& e) {
          fail(r.file, t->source(), p, e.what());
        }
        s.sources.back().barriers = s.barriers;
      }
    }
  }
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
  r.only_keys(d, "deposition", {"amount_unit", "hours", "catch_grid", "site_boundary", "site_zone", "target_depth"});
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
  // In mm, or inches in a site in feet (the US system).
  if (d.contains("target_depth")) {
    dep.target_depth_mm = depth_to_mm(r.number_in(d, "deposition", "target_depth", 0.0, 1e9), r.scale == 1.0 ? LengthUnit::metre : LengthUnit::foot);
    if (!(*dep.target_depth_mm > 0.0)) fail(r.file, d.get("target_depth")->source(), "deposition.target_depth", "must be above 0");
  }
  return dep;
}

// A zone or an aim far away from everything else on the plan: swapped x and y, a digit too many,
// a point in local metres among grid coordinates. Such a zone gets p = 0 by distance alone and
// its limit "holds" (a trial: a bench typed as [5712407, 431200] in a UTM site, and a thrower's
// toward swapped, which threw 7,470 km: "All limits hold"). Far means farther from the nearest
// other thing than 10 times the extent of all the others, 1 km, and 100 times the widest spread.
void warn_far_apart(const Reader& r, const toml::table& doc, const Site& s) {
  struct Place {
    BoundingBox box;
    const toml::node* at;  // where the warning points
    std::string key, what;
  };
  std::vector<Place> places;
  const toml::array* zone_tables = doc["zone"].as_array();
  for (std::size_t k = 0; k < s.zones.size(); ++k) {
    const toml::node* at = zone_tables && k < zone_tables->size() ? zone_tables->get(k) : doc.get("zone_layer");
    places.push_back({bounds(s.zones[k].region), at, k < (zone_tables ? zone_tables->size() : 0) ? "zone[" + std::to_string(k + 1) + "]" : "zone_layer",
                      "zone '" + s.zones[k].name + "'"});
  }
  const toml::array* source_tables = doc["source"].as_array();
  double widest = 0.0;
  for (std::size_t i = 0; i < s.sources.size(); ++i) {
    const Source& src = s.sources[i];
    if (source_tables == nullptr || i >= source_tables->size()) continue;  // heads and layouts: their own checks
    const toml::table& t = *source_tables->get(i)->as_table();
    // A thrower's spread grows with its throw, so a swapped toward would excuse itself.
    if (!t.contains("toward"))
      for (const WeightedGaussian& c : src.model.components()) widest = std::max(widest, c.gaussian.axes().sigma_major);
    const std::string p = "source[" + std::to_string(i + 1) + "]";
    for (const char* k : {"toward", "aim", "mean"})
      if (const toml::node* n = t.get(k)) {
        places.push_back({{src.aim, src.aim}, n, p + "." + k, "the aim of source '" + src.name + "'"});
        break;
      }
    // One place per standing point (positions holds one per component, a thrower's copies would
    // keep each other company).
    if (const toml::node* n = t.get("position"))
      for (std::size_t k = 0; k < src.positions.size(); ++k) {
        const Vec2& q = src.positions[k];
        if (std::find(src.positions.begin(), src.positions.begin() + k, q) == src.positions.begin() + k)
          places.push_back({{q, q}, n, p + ".position", "where source '" + src.name + "' stands"});
      }
  }
  if (places.size() < 3) return;
  // The extent of all places but one, from running boxes before and after it.
  const std::size_t n = places.size();
  const BoundingBox empty{Vec2(1e300, 1e300), Vec2(-1e300, -1e300)};
  std::vector<BoundingBox> before(n + 1, empty), after(n + 1, empty);
  auto join = [](const BoundingBox& a, const BoundingBox& b) {
    return BoundingBox{a.min.cwiseMin(b.min), a.max.cwiseMax(b.max)};
  };
  for (std::size_t k = 0; k < n; ++k) before[k + 1] = join(before[k], places[k].box);
  for (std::size_t k = n; k-- > 0;) after[k] = join(after[k + 1], places[k].box);
  const char* unit = symbol(s.units);
  for (std::size_t k = 0; k < n; ++k) {
    const BoundingBox rest = join(before[k], after[k + 1]);
    const double span = (rest.max - rest.min).norm();
    // Gap between this place's box and the rest's box (0 where they overlap).
    const Vec2 gap = (places[k].box.min - rest.max).cwiseMax(rest.min - places[k].box.max).cwiseMax(0.0);
    const double far = gap.norm();
    if (!(far > std::max({1000.0, 10.0 * span, 100.0 * widest}))) continue;
    r.warn(places[k].at->source(), places[k].key,
           fmt::format("{} lies {:.3g} {} from everything else on the plan, which spans {:.3g} {}: check its "
                       "coordinates (x then y, in the site's frame and units); it is taken as written",
                       places[k].what, from_metres(far, s.units), unit, from_metres(span, s.units), unit));
  }
}

// Likely mistakes that need the whole site read: a warning each, the values kept as written.
//  - a core spread whose sigma_major is more than twice the plan's diagonal (every zone and aim):
//    most impacts would land off the plan, as with a 35 m sigma typed for a 6 m lane;
//  - a bias longer than 5 sigma_major: `bias` is the offset from the aim, and a mean impact
//    point typed there instead (bias = aim) lands far from the aim;
//  - an exposure of zero events or sessions, which makes every per-session and per-year figure 0.
void warn_implausible(const Reader& r, const toml::table& doc, const Site& s) {
  const BoundingBox plan = site_extent(s);
  const double across = (plan.max - plan.min).norm();
  const toml::array* sources = doc["source"].as_array();
  // The [[source]] tables only; a head's pattern comes from its radius, never from a sigma.
  const std::size_t tables = sources == nullptr ? 0 : sources->size();
  for (std::size_t i = 0; i < std::min(s.sources.size(), tables); ++i) {
    const Source& src = s.sources[i];
    const toml::table& t = *sources->get(i)->as_table();
    const std::string p = "source[" + std::to_string(i + 1) + "]";
    const Gaussian& core = src.model.components().front().gaussian;
    const double sigma = core.axes().sigma_major;
    // Lengths in the file's unit, as the user wrote them.
    const char* unit = symbol(s.units);
    // A thrower has no spread key: its spread follows from its own keys, which the warning
    // names (it dereferenced a missing `spread` and crashed: range_sigma = 56 typed for cm).
    auto too_wide = [&](const toml::table& table, const std::string& where, double sigma_major, const char* what) {
      if (!(across > 0.0 && sigma_major > 2.0 * across)) return;
      std::string key = "spread";
      const toml::node* at = table.get("spread");
      for (const char* k : {"range_sigma", "range_fraction", "spread_angle_deg"})
        if (at == nullptr && table.contains(k)) at = table.get(key = k);
      r.warn(at ? at->source() : table.source(), where + "." + key,
             fmt::format("{}sigma_major {:.3g} {} is {:.3g} times the size of the whole plan ({:.3g} {} across its "
                         "zones and aims): most impacts would land off it; check the value and that it is in {}",
                         what, from_metres(sigma_major, s.units), unit, sigma_major / across,
                         from_metres(across, s.units), unit, s.units == LengthUnit::foot ? "feet" : "metres"));
    };
    too_wide(t, p, sigma, t.contains("toward") ? "the thrower's spread at its aim: " : "");
    // Each [[source.component]] too (a wild throw's 2000 typed for mm passed silently).
    const auto& parts = src.model.components();
    if (const toml::array* list = t.contains("component") ? t["component"].as_array() : t["wild"].as_array();
        list != nullptr && parts.size() == 1 + list->size())
      for (std::size_t k = 0; k < list->size(); ++k)
        if (const toml::table* c = list->get(k)->as_table())
          too_wide(*c, p + (t.contains("component") ? ".component[" : ".wild[") + std::to_string(k + 1) + "]",
                   parts[k + 1].gaussian.axes().sigma_major, "");
    if (const toml::node* bias = t.get("bias")) {
      const double length = (core.mean() - src.aim).norm();
      if (length > 5.0 * sigma)
        r.warn(bias->source(), p + ".bias",
               fmt::format("the bias is {:.3g} {}, {:.3g} times the spread's sigma_major: bias is the offset of the "
                           "mean impact point from the aim{}",
                           from_metres(length, s.units), unit, length / sigma,
                           // A thrower takes no mean: its aim is toward.
                           t.contains("toward") ? " (toward), not a point" : " (give the point itself as mean = [x, y])"));
    }
    // A mean beside an aim: the same mistake the other way round, or the two in different
    // coordinates (an aim near the origin, a mean in UTM metres).
    if (const toml::node* mean = t.get("mean"); mean != nullptr && t.contains("aim")) {
      const double length = (core.mean() - src.aim).norm();
      if (length > 5.0 * sigma)
        r.warn(mean->source(), p + ".mean",
               fmt::format("the mean impact point is {:.3g} {} from the aim, {:.3g} times the spread's sigma_major: "
                           "check that aim and mean are the same site's coordinates (without an aim, the source "
                           "is aimed at its mean)",
                           from_metres(length, s.units), unit, length / sigma));
    }
    for (const char* k : {"events_per_session", "sessions_per_year"})
      if (const toml::node* n = t.get(k); n && n->value<double>() == 0.0)
        r.warn(n->source(), p + "." + k, "0: this source adds nothing per session or per year");
  }
  warn_far_apart(r, doc, s);
  // Grid coordinates under an origin: the local frame about `origin` holds within 100 km
  // (docs/site-plans.md), and the GIS outputs' longitudes and latitudes are made through it (a
  // new-user trial: UTM metres with origin = [lon, lat] put a fence at lon 159, lat 76.7).
  if (s.origin && s.crs.empty() && across > 0.0) {
    const double reach = std::max(plan.min.cwiseAbs().maxCoeff(), plan.max.cwiseAbs().maxCoeff());
    if (reach > 1e5)
      if (const toml::node* o = doc["site"]["origin"].node())
        r.warn(o->source(), "site.origin",
               fmt::format("the plan reaches {:.3g} km from the origin, where the local frame about it is good "
                           "within 100 km: if the coordinates are a grid's (UTM, a national grid), give site.crs "
                           "instead; longitudes and latitudes written from this frame would be wrong",
                           reach / 1000.0));
  }
}

}  // namespace

Site load_site(const std::string& path, const ShapeRegistry& shapes) {
  return load_site_text(read_input_file(path), path, shapes);
}

Site load_site(const std::string& path) { return load_site(path, ShapeRegistry::with_default_search_path({})); }

LoadProgressScope::LoadProgressScope(EstimateFn estimate, ProgressFn progress)
    : estimate_(std::move(estimate)), outer_estimate_(load_estimate), progress_(std::move(progress)), outer_progress_(load_progress) {
  load_estimate = estimate_;
  load_progress = progress_;
}

LoadProgressScope::~LoadProgressScope() {
  load_estimate = outer_estimate_;
  load_progress = outer_progress_;
}

Site load_site_text(const std::string& text, const std::string& path, const ShapeRegistry& shapes) {
  Site s;
  Reader r{path, &s.warnings, 1.0, {}, nullptr};
  toml::table doc;
  check_toml_nesting(text, path);
  try {
    doc = toml::parse(text, path);
  } catch (const toml::parse_error& e) {
    fail(path, e.source(), "syntax", std::string(e.description()));
  }
  s.file = path;
  s.input_files.push_back(path);
  r.only_keys(doc, "", {"site", "settings", "source", "zone", "zone_layer", "deposition", "barrier", "head", "layout"});
  if (doc.contains("site")) read_site_table(r, doc, s);
  r.scale = metres_per(s.units);
  r.base_dir = std::filesystem::path(path).parent_path();
  r.files = &s.input_files;
  if (doc.contains("settings")) s.options = read_settings(r, doc, s.options);
  s.sources = read_sources(r, doc);
  s.barriers = read_barriers(r, doc, s.sources);
  std::set<std::string> names;
  const GeometryContext geometry{r, shapes, std::filesystem::path(path).parent_path(), s.crs, s.origin, &s.input_files};
  s.zones = read_zones(r, doc, geometry, names);
  read_zone_layers(r, doc, geometry, names, s.zones);
  read_heads(r, doc, s);
  if (doc.contains("deposition")) s.deposition = read_deposition(r, doc, names);
  warn_implausible(r, doc, s);
  return s;
}

}  // namespace strewn
