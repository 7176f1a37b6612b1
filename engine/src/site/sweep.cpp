// Design sweeps (strewn/sweep.hpp): combinations of the axes, the base site varied by one of
// them, and every combination assessed, on this process's threads or shared among processes
// (strewn/distribute.hpp).
#include "strewn/sweep.hpp"

#include <algorithm>
#include <cmath>
#include <nlohmann/json.hpp>
#include <random>

#include "strewn/assess.hpp"
#include "strewn/constants.hpp"
#include "strewn/deposition.hpp"
#include "strewn/error.hpp"
#include "strewn/spacing.hpp"

namespace strewn {
namespace {

ScatterModel moved(const ScatterModel& m, const Vec2& d) {
  std::vector<WeightedGaussian> parts;
  for (const WeightedGaussian& c : m.components()) parts.push_back({c.weight, c.gaussian.moved_to(c.gaussian.mean() + d)});
  return parts.size() == 1 ? ScatterModel(parts.front().gaussian) : ScatterModel::mixture(parts);
}

ScatterModel scaled(const ScatterModel& m, double k) {
  std::vector<WeightedGaussian> parts;
  for (const WeightedGaussian& c : m.components()) parts.push_back({c.weight, c.gaussian.scaled(k)});
  return parts.size() == 1 ? ScatterModel(parts.front().gaussian) : ScatterModel::mixture(parts);
}

// A uniform number in [0, 1) from 53 bits of the generator (std::uniform_real_distribution is
// not the same on every standard library; this is).
double unit_uniform(std::mt19937_64& g) { return static_cast<double>(g() >> 11) * 0x1.0p-53; }

// JSON for an optional value: null when absent.
template <class T>
nlohmann::json maybe(const std::optional<T>& v) {
  return v ? nlohmann::json(*v) : nlohmann::json(nullptr);
}

// One combination as bytes (JSON; nlohmann writes a double so that it reads back the same bits),
// so that it can travel between processes and is gathered the same way on one process.
std::string to_bytes(const SweepCombination& c) {
  nlohmann::json j;
  j["values"] = c.values;
  j["meets"] = c.meets_every_limit;
  j["cu"] = maybe(c.cu);
  j["du"] = maybe(c.du);
  for (const SweepZoneRow& z : c.zones)
    j["zones"].push_back({z.zone, static_cast<int>(z.role), z.per_event, z.per_event_err, z.per_session,
                          z.per_session_err, z.per_year, z.per_year_err, maybe(z.limit), static_cast<int>(z.limit_per),
                          maybe(z.limit_holds), z.limit_undecided, static_cast<int>(z.status)});
  return j.dump();
}

SweepCombination from_bytes(const std::string& bytes) {
  const nlohmann::json j = nlohmann::json::parse(bytes);
  SweepCombination c;
  c.values = j.at("values").get<std::vector<double>>();
  c.meets_every_limit = j.at("meets").get<bool>();
  if (!j.at("cu").is_null()) c.cu = j.at("cu").get<double>();
  if (!j.at("du").is_null()) c.du = j.at("du").get<double>();
  if (j.contains("zones"))
    for (const nlohmann::json& z : j.at("zones")) {
      SweepZoneRow r;
      r.zone = z.at(0).get<std::string>();
      r.role = static_cast<Role>(z.at(1).get<int>());
      r.per_event = z.at(2).get<double>(), r.per_event_err = z.at(3).get<double>();
      r.per_session = z.at(4).get<double>(), r.per_session_err = z.at(5).get<double>();
      r.per_year = z.at(6).get<double>(), r.per_year_err = z.at(7).get<double>();
      if (!z.at(8).is_null()) r.limit = z.at(8).get<double>();
      r.limit_per = static_cast<Period>(z.at(9).get<int>());
      if (!z.at(10).is_null()) r.limit_holds = z.at(10).get<bool>();
      r.limit_undecided = z.at(11).get<bool>();
      r.status = static_cast<Status>(z.at(12).get<int>());
      c.zones.push_back(std::move(r));
    }
  return c;
}

SweepCombination assessed(const Study& study, const std::vector<double>& values) {
  const Site site = varied_site(study, values);
  const Assessment a = assess(site);
  SweepCombination c;
  c.values = values;
  for (const ZoneResult& z : a.zones) {
    SweepZoneRow r;
    r.zone = z.zone->name;
    r.role = z.zone->role;
    // Per event, the largest single source (as per-event limits and maps judge it).
    for (const SourceResult& s : z.sources)
      if (s.event.p >= r.per_event) r.per_event = s.event.p, r.per_event_err = s.event.abs_err;
    r.per_session = z.total_per_session, r.per_session_err = z.total_per_session_err;
    r.per_year = z.total_per_year, r.per_year_err = z.total_per_year_err;
    r.limit = z.zone->limit;
    r.limit_per = z.zone->limit_per;
    r.limit_holds = z.limit_holds;
    r.limit_undecided = z.limit_undecided;
    r.status = z.status;
    if (r.limit_holds.has_value() && !*r.limit_holds) c.meets_every_limit = false;
    if (r.limit_holds.has_value() && r.limit_undecided) c.meets_every_limit = false;
    // A tolerance missed is not a limit broken: the verdict is on the upper bound (p + its
    // honest error bound), as assess and solve judge it. Counting it as "no" made a sweep at a
    // UTM site say no combination met every limit where assess said all hold and solve spread
    // answered inside the swept range; the accuracy column still says "not met".
    if (r.limit_holds.has_value() && r.status == Status::no_answer) c.meets_every_limit = false;
    c.zones.push_back(std::move(r));
  }
  if (sweep_has_uniformity(study)) {
    const Deposition d = compute_deposition(site);
    c.cu = d.cu;
    c.du = d.du;
  }
  return c;
}

}  // namespace

std::vector<std::vector<double>> study_combinations(const Study& study) {
  std::vector<std::vector<double>> out;
  const std::size_t n_axes = study.axes.size();
  if (study.design == Study::Design::grid) {
    std::size_t total = 1;
    for (const SweepAxis& a : study.axes) total *= a.values.size();
    if (total > kMaxSweepCombinations) throw input_error("a sweep of more than 100000 combinations");
    std::vector<std::size_t> index(n_axes, 0);
    for (std::size_t k = 0; k < total; ++k) {
      std::vector<double> v(n_axes);
      for (std::size_t a = 0; a < n_axes; ++a) v[a] = study.axes[a].values[index[a]];
      out.push_back(std::move(v));
      for (std::size_t a = n_axes; a-- > 0;) {  // the last axis varies fastest
        if (++index[a] < study.axes[a].values.size()) break;
        index[a] = 0;
      }
    }
    return out;
  }
  // Latin hypercube (McKay, Beckman & Conover 1979): axis a's n strata in a shuffled order, one
  // point drawn uniformly within each stratum.
  const std::size_t n = study.samples;
  std::mt19937_64 g(study.seed);
  out.assign(n, std::vector<double>(n_axes));
  for (std::size_t a = 0; a < n_axes; ++a) {
    std::vector<std::size_t> order(n);
    for (std::size_t i = 0; i < n; ++i) order[i] = i;
    for (std::size_t i = n; i-- > 1;) std::swap(order[i], order[g() % (i + 1)]);  // Fisher-Yates
    const SweepAxis& axis = study.axes[a];
    for (std::size_t i = 0; i < n; ++i) {
      const double t = (static_cast<double>(order[i]) + unit_uniform(g)) / static_cast<double>(n);
      if (axis.is_range) {
        out[i][a] = axis.values.front() + t * (axis.values.back() - axis.values.front());
      } else {
        const std::size_t k = std::min(axis.values.size() - 1, static_cast<std::size_t>(t * axis.values.size()));
        out[i][a] = axis.values[k];
      }
    }
  }
  return out;
}

Site varied_site(const Study& study, const std::vector<double>& values) {
  if (values.size() != study.axes.size()) throw input_error("a sweep combination needs one value per axis");
  Site s = study.base;
  const double unit = metres_per(s.units);
  // A layout's spacing first: its heads (and their sources) are placed again.
  for (std::size_t a = 0; a < values.size(); ++a)
    if (!study.axes[a].layout.empty()) s = with_layout_spacing(s, study.axes[a].layout, values[a] * unit);
  // A drop's inputs first: its spread is computed again from them, as the scenario reader does
  // (site_io.cpp), before any move of the aim or the bias on top of it.
  for (Source& src : s.sources) {
    if (!src.drop) continue;
    DropParameters d = src.drop->parameters;
    bool varied = false;
    for (std::size_t a = 0; a < values.size(); ++a) {
      const SweepAxis& axis = study.axes[a];
      if (!axis.is_drop() || axis.source != src.name) continue;
      varied = true;
      const double v = values[a] * unit;  // a length, or a length per second
      if (axis.parameter == "drop_height") d.height = v;
      else if (axis.parameter == "drop_ground_speed") d.ground_speed = v;
      else d.wind.speed = v;
    }
    if (!varied) continue;
    src.drop->parameters = d;
    src.drop->spread = drop_spread(d, src.drop->uncertainty, src.drop->options);
    src.model = src.drop->spread.model;
    if (!src.drop->aim_given) {
      Vec2 mean = Vec2::Zero();
      for (const WeightedGaussian& c : src.model.components()) mean += c.weight * c.gaussian.mean();
      src.aim = mean;
    }
    src.component_labels = {src.drop->spread.normal ? "drop" : "drop core"};
    if (!src.drop->spread.normal) src.component_labels.push_back("drop wide");
  }
  for (std::size_t a = 0; a < values.size(); ++a) {
    const SweepAxis& axis = study.axes[a];
    const double v = values[a];
    const double length = v * unit;
    if (axis.is_drop() || !axis.layout.empty()) continue;  // applied above
    if (!axis.zone.empty()) {
      auto z = std::find_if(s.zones.begin(), s.zones.end(), [&](const Zone& x) { return x.name == axis.zone; });
      if (z == s.zones.end()) throw input_error("the sweep varies an unknown zone '" + axis.zone + "'");
      if (axis.parameter == "offset_x") z->region = transformed(z->region, Mat2::Identity(), Vec2(length, 0.0));
      else if (axis.parameter == "offset_y") z->region = transformed(z->region, Mat2::Identity(), Vec2(0.0, length));
      else {  // rotation_deg about the centre of the zone's bounding box: x -> R (x - c) + c
        const BoundingBox box = bounds(z->region);
        const Vec2 c = 0.5 * (box.min + box.max);
        const double t = v * kPi / 180.0;
        Mat2 R;
        R << std::cos(t), -std::sin(t), std::sin(t), std::cos(t);
        z->region = transformed(z->region, R, c - R * c);
      }
      continue;
    }
    auto src = std::find_if(s.sources.begin(), s.sources.end(), [&](const Source& x) { return x.name == axis.source; });
    if (src == s.sources.end()) throw input_error("the sweep varies an unknown source '" + axis.source + "'");
    const Vec2 bias = src->model.components().front().gaussian.mean() - src->aim;
    if (axis.parameter == "aim_x" || axis.parameter == "aim_y") {
      Vec2 aim = src->aim;
      (axis.parameter == "aim_x" ? aim.x() : aim.y()) = length;
      *src = aimed_at(*src, aim);  // a thrower's spread derived again for the new throw
    } else if (axis.parameter == "bias_x" || axis.parameter == "bias_y") {
      Vec2 b = bias;
      (axis.parameter == "bias_x" ? b.x() : b.y()) = length;
      src->model = moved(src->model, b - bias);
    } else if (axis.parameter == "spread_factor") {
      src->model = scaled(src->model, v);
    } else if (axis.parameter == "events_per_session") {
      src->events_per_session = v;
    } else {
      src->sessions_per_year = v;
    }
  }
  return s;
}

WorkEstimate sweep_work(const Study& study) {
  double combinations = 1.0;
  if (study.design == Study::Design::grid)
    for (const SweepAxis& a : study.axes) combinations *= static_cast<double>(a.values.size());
  else
    combinations = static_cast<double>(study.samples);
  double components = 0.0;
  for (const Source& s : study.base.sources) components += static_cast<double>(s.model.components().size());
  // Every combination computes again the spread of each drop an axis varies (varied_site): its
  // unscented sigma points and its Monte Carlo check, one fall each.
  double falls = 0.0, drops = 0.0;
  for (const Source& s : study.base.sources) {
    if (!s.drop) continue;
    const bool varied = std::any_of(study.axes.begin(), study.axes.end(),
                                    [&](const SweepAxis& a) { return a.is_drop() && a.source == s.name; });
    if (!varied) continue;
    drops += 1.0;
    falls += static_cast<double>(s.drop->options.falls) + static_cast<double>(s.drop->spread.sigma_points);
  }
  WorkEstimate w;
  w.what = "sweep of " + std::to_string(static_cast<long long>(combinations)) + " combination(s) x " +
           std::to_string(study.base.zones.size()) + " zone(s)";
  if (drops > 0.0)
    w.what += ", " + std::to_string(static_cast<long long>(combinations * drops)) + " drop spread(s) of " +
              std::to_string(static_cast<long long>(falls / drops)) + " falls computed again";
  w.units = combinations * (static_cast<double>(study.base.zones.size()) * components + kFallUnits * falls);
  w.seconds_per_unit = 5e-5;
  return w;
}

SweepResult run_sweep(const Study& study, const SweepOptions& options) {
  const std::vector<std::vector<double>> combinations = study_combinations(study);
  SweepResult r;
  const bool gathers = gathers_results(options.distributor);
  if (gathers) r.combinations.resize(combinations.size());
  run_items(
      options.distributor, combinations.size(), options.threads,
      [&](std::size_t i) {
        try {
          return to_bytes(assessed(study, combinations[i]));
        } catch (const input_error& e) {
          throw input_error(study.file + ": combination " + std::to_string(i + 1) + ": " + e.what());
        }
      },
      [&](std::size_t i, const std::string& bytes) { r.combinations[i] = from_bytes(bytes); }, options.progress);
  return r;
}

}  // namespace strewn
