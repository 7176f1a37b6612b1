// Reading a study file (docs/sweeps.md): the [study] table and its [[axis]] tables, every key
// checked as a scenario's are (file, line, column, key, "did you mean").
#include <algorithm>
#include <cmath>
#include <filesystem>
#include <sstream>
#include <toml++/toml.h>

#include "strewn/closest_names.hpp"
#include "strewn/error.hpp"
#include "strewn/input_file.hpp"
#include "strewn/site_io.hpp"
#include "strewn/sweep.hpp"

namespace strewn {
namespace {

const std::vector<std::string> kZoneParameters = {"offset_x", "offset_y", "rotation_deg"};
const std::vector<std::string> kSourceParameters = {"aim_x",         "aim_y",           "bias_x",           "bias_y",
                                                    "spread_factor", "events_per_session", "sessions_per_year",
                                                    "drop_height",   "drop_ground_speed",  "drop_wind_speed"};
const std::vector<std::string> kLayoutParameters = {"layout_spacing"};
constexpr std::size_t kMaxAxisValues = 10000;

// One study file being read: every message "FILE:LINE:COLUMN: key: why".
struct StudyReader {
  std::string file;

  [[noreturn]] void fail(const toml::source_region& where, const std::string& key, const std::string& why) const {
    std::ostringstream m;
    m << file;
    if (where.begin.line > 0) m << ":" << where.begin.line << ":" << where.begin.column;
    m << ": " << key << ": " << why;
    throw input_error(m.str());
  }

  void only_keys(const toml::table& t, const std::string& path, const std::vector<std::string>& allowed) const {
    for (auto&& [k, v] : t) {
      const std::string key(k.str());
      if (std::find(allowed.begin(), allowed.end(), key) != allowed.end()) continue;
      fail(k.source(), quoted_excerpt(path.empty() ? key : path + "." + key),
           "unknown key" + (key.size() <= 64 ? did_you_mean(key, allowed) : std::string()));
    }
  }

  std::optional<std::string> text(const toml::table& t, const std::string& path, const std::string& key) const {
    const toml::node* n = t.get(key);
    if (n == nullptr) return std::nullopt;
    const auto v = n->value<std::string>();
    if (!v) fail(n->source(), path + "." + key, "must be a string");
    return *v;
  }

  std::optional<double> number(const toml::table& t, const std::string& path, const std::string& key) const {
    const toml::node* n = t.get(key);
    if (n == nullptr) return std::nullopt;
    const auto v = n->value<double>();
    if (!v || !std::isfinite(*v)) fail(n->source(), path + "." + key, "must be a finite number");
    return *v;
  }

  std::uint64_t count(const toml::table& t, const std::string& path, const std::string& key, std::uint64_t least,
                      std::uint64_t most, std::uint64_t fallback) const {
    const toml::node* n = t.get(key);
    if (n == nullptr) return fallback;
    const auto v = n->value<double>();
    const std::string why = "must be a whole number from " + std::to_string(least) + " to " + std::to_string(most);
    if (!v) fail(n->source(), path + "." + key, why);
    try {
      return checked_count(*v, least, most, path + "." + key);
    } catch (const input_error&) {
      fail(n->source(), path + "." + key, why);
    }
  }
};

// What values a parameter accepts (lengths in the scenario's unit, like the scenario's own).
void check_value(const StudyReader& r, const toml::source_region& where, const std::string& key,
                 const std::string& parameter, double v) {
  std::string why;
  // At least 1e-6, as solve spread's factors: 1e-300 made every probability NaN (an internal error).
  if (parameter == "spread_factor" && !(v >= 1e-6 && v <= 1e6)) why = "a spread factor must be from 1e-6 to 1e6";
  else if ((parameter == "events_per_session" || parameter == "sessions_per_year") && !(v >= 0.0 && v <= 1e12))
    why = "an exposure count must be from 0 to 1e12";
  else if (parameter == "rotation_deg" && !(std::fabs(v) <= 3600.0)) why = "a rotation must be within +-3600 degrees";
  // A drop's inputs over the ranges its scenario keys take (docs/scenario-format.md, "Drops").
  else if (parameter == "drop_height" && !(v > 0.0 && v <= 1e5)) why = "a release height must be above 0 and at most 1e5";
  else if (parameter == "drop_ground_speed" && !(v >= 0.0 && v <= 1e3)) why = "a ground speed must be from 0 to 1e3";
  else if (parameter == "drop_wind_speed" && !(v >= 0.0 && v <= 200.0)) why = "a wind speed must be from 0 to 200";
  else if (parameter == "layout_spacing" && !(v > 0.0 && v <= 1e12)) why = "a layout's spacing must be above 0 and at most 1e12";
  else if (!(std::fabs(v) <= 1e12)) why = "a length must be within +-1e12";
  if (!why.empty()) {
    std::ostringstream m;
    m.precision(6);
    m << why << " (got " << v << ")";
    r.fail(where, key, m.str());
  }
}

SweepAxis read_axis(const StudyReader& r, const toml::table& t, const std::string& path, const Site& base) {
  r.only_keys(t, path, {"zone", "source", "layout", "parameter", "values", "from", "to", "steps", "label"});
  SweepAxis a;
  const auto zone = r.text(t, path, "zone"), source = r.text(t, path, "source"), layout = r.text(t, path, "layout");
  if (int(zone.has_value()) + int(source.has_value()) + int(layout.has_value()) != 1)
    r.fail(t.source(), path, "name exactly one of zone = \"...\", source = \"...\" or layout = \"...\" to vary");
  std::vector<std::string> names;
  if (zone) {
    for (const Zone& z : base.zones) names.push_back(z.name);
    if (std::find(names.begin(), names.end(), *zone) == names.end())
      r.fail(t.get("zone")->source(), path + ".zone",
             "the scenario has no zone named '" + quoted_excerpt(*zone) + "'" + did_you_mean(*zone, names));
    a.zone = *zone;
  } else if (source) {
    for (const Source& s : base.sources) names.push_back(s.name);
    if (std::find(names.begin(), names.end(), *source) == names.end())
      r.fail(t.get("source")->source(), path + ".source",
             "the scenario has no source named '" + quoted_excerpt(*source) + "'" + did_you_mean(*source, names));
    a.source = *source;
  } else {
    for (const Layout& l : base.layouts) names.push_back(l.name);
    if (std::find(names.begin(), names.end(), *layout) == names.end())
      r.fail(t.get("layout")->source(), path + ".layout",
             "the scenario has no layout named '" + quoted_excerpt(*layout) + "'" + did_you_mean(*layout, names));
    a.layout = *layout;
  }
  const auto parameter = r.text(t, path, "parameter");
  if (!parameter) r.fail(t.source(), path + ".parameter", "missing (what to vary, e.g. \"offset_x\")");
  const std::vector<std::string>& allowed = zone ? kZoneParameters : source ? kSourceParameters : kLayoutParameters;
  if (std::find(allowed.begin(), allowed.end(), *parameter) == allowed.end()) {
    std::string list;
    for (const std::string& p : allowed) list += (list.empty() ? "" : ", ") + p;
    r.fail(t.get("parameter")->source(), path + ".parameter",
           "a " + std::string(zone ? "zone" : source ? "source" : "layout") + " cannot vary '" + quoted_excerpt(*parameter) + "'" +
               did_you_mean(*parameter, allowed) + " (one of " + list + ")");
  }
  a.parameter = *parameter;
  if (a.is_drop()) {
    const auto s = std::find_if(base.sources.begin(), base.sources.end(), [&](const Source& x) { return x.name == *source; });
    if (!s->drop)
      r.fail(t.get("parameter")->source(), path + ".parameter",
             "source '" + quoted_excerpt(*source) + "' is not a drop from flight (drop = {...}); " + *parameter +
                 " varies a drop's input");
  }
  a.label = r.text(t, path, "label").value_or((zone ? *zone : source ? *source : *layout) + " " + *parameter);
  const bool has_range = t.contains("from") || t.contains("to") || t.contains("steps");
  if (t.contains("values") == has_range)
    r.fail(t.source(), path, "give either values = [...] or from, to and steps");
  if (const toml::node* n = t.get("values")) {
    const toml::array* list = n->as_array();
    if (list == nullptr || list->empty() || list->size() > kMaxAxisValues)
      r.fail(n->source(), path + ".values", "must be a list of 1 to " + std::to_string(kMaxAxisValues) + " numbers");
    for (const toml::node& v : *list) {
      const auto x = v.value<double>();
      if (!x || !std::isfinite(*x)) r.fail(v.source(), path + ".values", "must be a list of finite numbers");
      check_value(r, v.source(), path + ".values", a.parameter, *x);
      a.values.push_back(*x);
    }
  } else {
    for (const char* k : {"from", "to", "steps"})
      if (!t.contains(k)) r.fail(t.source(), path + "." + k, "missing (a range needs from, to and steps)");
    const double from = *r.number(t, path, "from"), to = *r.number(t, path, "to");
    check_value(r, t.get("from")->source(), path + ".from", a.parameter, from);
    check_value(r, t.get("to")->source(), path + ".to", a.parameter, to);
    const std::uint64_t steps = r.count(t, path, "steps", 2, kMaxAxisValues, 2);
    if (!(to > from)) r.fail(t.get("to")->source(), path + ".to", "must be greater than from");
    a.is_range = true;
    for (std::uint64_t i = 0; i < steps; ++i)
      a.values.push_back(i + 1 == steps ? to : from + (to - from) * static_cast<double>(i) / static_cast<double>(steps - 1));
  }
  return a;
}

}  // namespace

Study load_study(const std::string& path, const ShapeRegistry& shapes) {
  const std::string text = read_input_file(path);
  check_toml_nesting(text, path);
  const StudyReader r{path};
  toml::table doc;
  try {
    doc = toml::parse(text, path);
  } catch (const toml::parse_error& e) {
    r.fail(e.source(), "syntax", std::string(e.description()));
  }
  r.only_keys(doc, "", {"study", "axis"});
  const toml::table* study = doc["study"].as_table();
  if (study == nullptr) r.fail(doc.source(), "study", "missing (a [study] table naming the base scenario)");
  r.only_keys(*study, "study", {"name", "scenario", "design", "samples", "seed"});
  Study s;
  s.file = path;
  const auto scenario = r.text(*study, "study", "scenario");
  if (!scenario) r.fail(study->source(), "study.scenario", "missing (the base scenario file, relative to the study)");
  s.name = r.text(*study, "study", "name").value_or(std::filesystem::path(path).stem().string());
  // Normalised (shapes/studies/../lane.toml is shapes/lane.toml), as printed and as named in errors.
  const std::filesystem::path base_path = (std::filesystem::path(path).parent_path() / *scenario).lexically_normal();
  s.base = load_site(base_path.string(), shapes);
  const std::string design = r.text(*study, "study", "design").value_or("grid");
  if (design == "grid") s.design = Study::Design::grid;
  else if (design == "latin_hypercube") s.design = Study::Design::latin_hypercube;
  else
    r.fail(study->get("design")->source(), "study.design",
           "unknown design '" + quoted_excerpt(design) + "'" + did_you_mean(design, {"grid", "latin_hypercube"}) +
               " (grid or latin_hypercube)");
  if (s.design == Study::Design::latin_hypercube) {
    if (!study->contains("samples")) r.fail(study->source(), "study.samples", "missing (a Latin hypercube needs a number of samples)");
    s.samples = r.count(*study, "study", "samples", 1, kMaxSweepCombinations, 1);
  } else if (study->contains("samples")) {
    r.fail(study->get("samples")->source(), "study.samples", "only a latin_hypercube design takes samples");
  }
  s.seed = r.count(*study, "study", "seed", 0, 9007199254740992ull, 1);
  const toml::array* axes = doc["axis"].as_array();
  if (axes == nullptr || axes->empty()) r.fail(doc.source(), "axis", "missing (at least one [[axis]] to vary)");
  double combinations = 1.0;
  for (std::size_t i = 0; i < axes->size(); ++i) {
    const std::string p = "axis[" + std::to_string(i + 1) + "]";  // counted from 1, as zone[1] and source[1]
    const toml::table* t = axes->get(i)->as_table();
    if (t == nullptr) r.fail(axes->get(i)->source(), p, "must be a table");
    s.axes.push_back(read_axis(r, *t, p, s.base));
    // Two axes on one parameter: the grid's later value overwrote the earlier (aim_x 0 and 3 gave
    // the results of 3 under both columns) or added to it (offsets); two labels alike made two
    // columns of one name.
    const SweepAxis& a = s.axes.back();
    for (std::size_t k = 0; k + 1 < s.axes.size(); ++k) {
      const SweepAxis& b = s.axes[k];
      if (a.zone == b.zone && a.source == b.source && a.layout == b.layout && a.parameter == b.parameter)
        r.fail(t->get("parameter")->source(), p + ".parameter",
               "axis[" + std::to_string(k + 1) + "] already varies " +
                   (!a.zone.empty() ? "zone '" + a.zone : !a.source.empty() ? "source '" + a.source : "layout '" + a.layout) +
                   "' " + a.parameter + ": give all its values in one axis");
      if (a.label == b.label || a.heading(s.base.units) == b.heading(s.base.units))
        r.fail(t->contains("label") ? t->get("label")->source() : t->source(), p + ".label",
               "axis[" + std::to_string(k + 1) + "] has the column '" + quoted_excerpt(b.heading(s.base.units)) +
                   "' too (labels name the output's columns): give one of them another label");
    }
    // Nor an empty column, nor one of the table's own (a label "verdict" made two columns of
    // that name, and the GeoPackage failed after the whole sweep had run).
    const std::vector<std::string>& fixed = sweep_result_columns();
    if (a.label.empty() || std::find(fixed.begin(), fixed.end(), a.heading(s.base.units)) != fixed.end())
      r.fail(t->contains("label") ? t->get("label")->source() : t->source(), p + ".label",
             a.label.empty() ? std::string("must not be empty (it names the output's column)")
                             : "'" + quoted_excerpt(a.label) + "' is a column of the sweep's own table: give another label");
    combinations *= static_cast<double>(s.axes.back().values.size());
  }
  if (s.design == Study::Design::grid && combinations > static_cast<double>(kMaxSweepCombinations)) {
    std::ostringstream m;
    m << "the grid has " << combinations << " combinations, above the ceiling of " << kMaxSweepCombinations
      << "; use fewer values, or design = \"latin_hypercube\" with a number of samples";
    r.fail(doc.source(), "axis", m.str());
  }
  return s;
}

}  // namespace strewn
