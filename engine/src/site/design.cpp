#include "strewn/design.hpp"

#include <fmt/format.h>

#include <chrono>
#include <cmath>
#include <sstream>

#include "strewn/assess.hpp"
#include "strewn/barrier_effect.hpp"
#include "strewn/closest_names.hpp"
#include "strewn/error.hpp"
#include "strewn/fit.hpp"
#include "strewn/position_text.hpp"

namespace strewn {
namespace {

ScatterModel shifted(const ScatterModel& m, const Vec2& d) {
  std::vector<WeightedGaussian> parts;
  for (const WeightedGaussian& c : m.components()) parts.push_back({c.weight, c.gaussian.moved_to(c.gaussian.mean() + d)});
  return ScatterModel::mixture(parts);
}

ScatterModel scaled(const ScatterModel& m, double k) {
  std::vector<WeightedGaussian> parts;
  for (const WeightedGaussian& c : m.components()) parts.push_back({c.weight, c.gaussian.scaled(k)});
  return ScatterModel::mixture(parts);
}

Vec2 centre_of(const Region& r) {
  const BoundingBox b = bounds(r);
  return (b.min + b.max) / 2.0;
}

// Where impacts land on average over the year: component means weighted by weight and events.
Vec2 mean_impact_point(const std::vector<Source>& sources) {
  Vec2 sum = Vec2::Zero();
  double total = 0.0;
  for (const Source& s : sources) {
    const double n = std::max(s.events_per_session * s.sessions_per_year, 1e-300);
    for (const WeightedGaussian& c : s.model.components()) {
      sum += c.weight * n * c.gaussian.mean();
      total += c.weight * n;
    }
  }
  return sum / total;
}

template <class T, class Name>
const T& find_named(const std::vector<T>& items, const std::string& name, const char* what, Name name_of) {
  std::vector<std::string> names;
  for (const T& item : items) {
    if (name_of(item) == name) return item;
    names.push_back(name_of(item));
  }
  std::string why = std::string("no ") + what + " named '" + name + "'";
  why += did_you_mean(name, names);
  throw input_error(why);
}

const Zone& find_zone(const Site& s, const std::string& name) {
  return find_named(s.zones, name, "zone", [](const Zone& z) { return z.name; });
}

const Source& find_source(const Site& s, const std::string& name) {
  return find_named(s.sources, name, "source", [](const Source& x) { return x.name; });
}

std::vector<const Zone*> limited_zones(const Site& s) {
  std::vector<const Zone*> zones;
  for (const Zone& z : s.zones)
    if (z.limit) zones.push_back(&z);
  if (zones.empty()) throw input_error(s.file + ": no zone has a limit, so there is nothing to solve for");
  return zones;
}

// The worst limit margin over the zones, and which zone it is.
std::pair<double, std::string> worst_margin(const std::vector<const Zone*>& zones, const std::vector<Source>& sources,
                                            const IntegrateOptions& options) {
  std::pair<double, std::string> worst{-1e300, ""};
  for (const Zone* z : zones) {
    const double m = limit_margin(assess_zone(*z, sources, options));
    if (m > worst.first) worst = {m, z->name};
  }
  return worst;
}

// The request's direction (or the default one, `what`), made a unit vector.
Vec2 unit(const Vec2& d, const std::string& what) {
  // Scaled by its larger component first: (1e308, 1e308) has no finite norm, and its
  // normalized() was (0, 0), a "move" that went nowhere.
  const double big = d.cwiseAbs().maxCoeff();
  if (!(d.allFinite() && big > 0.0)) throw request_error("direction", what + " must be a non-zero vector");
  return (d / big).normalized();
}

// The share of a search done, from the evaluations of its limits counted against the number it
// usually takes; held below 1 until the search ends (it may take more). The first
// kTimedEvaluations evaluations are timed and, multiplied by that number, make the estimate
// (issue 15: work that may be long is estimated first).
class SearchProgress {
 public:
  SearchProgress(const ProgressFn& fn, double expected, const EstimateFn& estimate = {}, std::string what = {})
      : fn_(fn), expected_(std::max(expected, 1.0)), estimate_(estimate), what_(std::move(what)),
        start_(std::chrono::steady_clock::now()) {}
  void tick() {
    ++done_;
    if (estimate_ && done_ == kTimedEvaluations) {
      const double seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start_).count();
      estimate_(WorkEstimate{what_ + fmt::format(": about {:.0f} evaluations of the limits", expected_), expected_,
                             seconds / kTimedEvaluations});
    }
    if (fn_) fn_(std::min(0.99, done_ / expected_));
  }
  void finish() {
    if (fn_) fn_(1.0);
  }

 private:
  const ProgressFn& fn_;
  double expected_;
  const EstimateFn& estimate_;
  std::string what_;
  std::chrono::steady_clock::time_point start_;
  double done_ = 0.0;
};

// "the limit of zone 'x' (1e-06 per year)"
std::string limit_text(const Zone& z) {
  return "the limit of zone '" + z.name + "' (" + fmt::format("{:g}", *z.limit) + " per " + to_string(z.limit_per) + ")";
}

// In the scenario's unit, as the user wrote it, to the millimetre (strewn/position_text.hpp).
std::string point_text(const Vec2& p, LengthUnit unit) { return position_text(p, unit) + " " + symbol(unit); }

}  // namespace

ClearanceAnswer solve_clearance(const Site& s, const ShapeRegistry& shapes, const ClearanceQuery& q,
                                const ProgressFn& progress, const EstimateFn& estimate) {
  const int forms = !q.zone.empty() + q.person.has_value() + !q.source.empty();
  if (forms != 1) throw request_error("subject", "clearance: give exactly one of a zone, a person and a source to move");
  // Moves stay well inside the +-1e12 m of any coordinate (a move of 1e300 m was refused as "invalid region").
  if (!(q.max_move > 0.0 && q.max_move <= 1e9))
    throw request_error("max_move", "clearance: the largest move must be above 0 and at most 1e9 m");
  if (!(q.tolerance > 0.0 && q.tolerance <= q.max_move))
    throw request_error("tolerance", "clearance: the tolerance must be above 0 and at most the largest move");
  if (q.person && !(q.person->allFinite() && q.person->cwiseAbs().maxCoeff() <= 1e12))
    throw request_error("subject", "clearance: the person must stand at a finite point within +-1e12 m");
  ClearanceAnswer a;
  Margin margin;
  std::function<std::pair<double, std::string>(double)> worst_at;  // (margin, zone) at a move
  std::vector<Source> sources = s.sources;
  Zone subject_zone;
  if (!q.source.empty()) {
    const Source& src = find_source(s, q.source);
    const std::size_t index = static_cast<std::size_t>(&src - s.sources.data());
    const std::vector<const Zone*> zones = limited_zones(s);
    for (const Zone* z : zones) a.limited_zones.push_back(z->name);
    a.subject = "source '" + src.name + "'";
    a.start = src.aim;
    if (q.direction) {
      a.direction = unit(*q.direction, "the direction");
      a.direction_reason = "as given";
    } else {
      const std::string worst = worst_margin(zones, s.sources, s.options).second;
      const Vec2 from = centre_of(find_zone(s, worst).region);
      a.direction = unit(src.model.components().front().gaussian.mean() - from,
                         "the direction away from the worst zone (give a direction)");
      a.direction_reason = "away from zone '" + worst + "', the furthest over its limit now";
    }
    // The whole source moves: its spread, its aim and where its thrower stands (barriers stay).
    const auto moved_by = [&s, index](const Vec2& shift) {
      std::vector<Source> moved = s.sources;
      Source& m = moved[index];
      m.model = shifted(m.model, shift);
      m.aim += shift;
      for (Vec2& p : m.positions) p += shift;
      if (m.thrower) {
        m.thrower->position += shift;
        m.thrower->toward += shift;
        if (m.thrower->line_end) *m.thrower->line_end += shift;
      }
      return moved;
    };
    margin = [&, zones, moved_by](double d) {
      return worst_margin(zones, moved_by(d * a.direction), s.options).first;
    };
    worst_at = [&, zones, moved_by](double d) {
      return worst_margin(zones, moved_by(d * a.direction), s.options);
    };
  } else {
    if (q.person) {
      std::ostringstream params;
      params.precision(17);
      params << R"({"centre": [)" << q.person->x() << ", " << q.person->y() << "]}";
      subject_zone.region = shapes.build("person", params.str());
      subject_zone.name = "person at " + point_text(*q.person, s.units);
      a.start = *q.person;
      subject_zone.limit = q.person_limit;
      subject_zone.limit_per = q.person_per;
      a.subject = subject_zone.name;
    } else {
      subject_zone = find_zone(s, q.zone);
      if (!subject_zone.limit) throw input_error("zone '" + q.zone + "' has no limit to meet; give it one in the file");
      a.subject = "zone '" + subject_zone.name + "'";
      a.start = centre_of(subject_zone.region);
    }
    a.limited_zones.push_back(subject_zone.name);
    if (q.direction) {
      a.direction = unit(*q.direction, "the direction");
      a.direction_reason = "as given";
    } else {
      a.direction = unit(centre_of(subject_zone.region) - mean_impact_point(s.sources),
                         "the direction away from the mean impact point (give a direction)");
      a.direction_reason = "away from the mean impact point " + point_text(mean_impact_point(s.sources), s.units);
    }
    margin = [&](double d) {
      Zone moved = subject_zone;
      moved.region = transformed(subject_zone.region, Mat2::Identity(), d * a.direction);
      return limit_margin(assess_zone(moved, s.sources, s.options));
    };
    worst_at = [&](double d) { return std::pair<double, std::string>{margin(d), subject_zone.name}; };
  }
  SearchProgress done(progress, q.steps + 1.0 + 40.0, estimate, "solve clearance");  // the scan, then TOMS 748's few dozen steps
  const Margin counted = [&](double d) {
    done.tick();
    return margin(d);
  };
  a.crossing = first_holding(counted, 0.0, q.max_move, q.steps, q.tolerance);
  if (!a.crossing.found) {
    a.status = Status::no_answer;
    if (std::isfinite(q.max_move) && q.max_move > 0.0) {
      // Name the limit that still fails where the move helps most, at the largest move.
      const auto [m, zone] = worst_at(q.max_move);
      const Zone* z = zone == subject_zone.name && q.zone.empty() ? &subject_zone : &find_zone(s, zone);
      a.failing_limit = q.person ? "the limit for the " + z->name + " (" + fmt::format("{:g}", *z->limit) + " per " +
                                       to_string(z->limit_per) + ")"
                                 : limit_text(*z);
      a.failing_ratio = m + 1.0;
      a.crossing.why = "no move considered meets " + a.failing_limit +
                       fmt::format(": at the largest move, {:g} {}, its upper bound is still {:.3g} x the limit",
                                   from_metres(q.max_move, s.units), symbol(s.units), a.failing_ratio);
    }
  }
  if (a.crossing.found) {
    a.risk_at_answer = margin(a.crossing.x) + 1.0;
    a.risk_at_fail = margin(a.crossing.x_fails) + 1.0;
    a.moved_to = a.start + a.crossing.x * a.direction;
  }
  done.finish();
  return a;
}

SpreadAnswer solve_spread(const Site& s, const SpreadQuery& q, const ProgressFn& progress, const EstimateFn& estimate) {
  // A scenario's spread factor is at most 1e6 (study_io.cpp); below 1e-6 a spread of a metre is
  // a micron, and 1e-300 made every probability NaN (an internal error).
  if (!(q.min_factor >= 1e-6 && q.max_factor > q.min_factor && q.max_factor <= 1e6))
    throw request_error("factor_range", "spread: the factors considered must satisfy 1e-6 <= smallest < largest <= 1e6");
  const std::vector<const Zone*> zones = limited_zones(s);
  std::vector<std::size_t> which;
  if (q.source.empty()) {
    for (std::size_t i = 0; i < s.sources.size(); ++i) which.push_back(i);
  } else {
    which.push_back(static_cast<std::size_t>(&find_source(s, q.source) - s.sources.data()));
  }
  const auto sources_at = [&](double k) {
    std::vector<Source> out = s.sources;
    for (std::size_t i : which) out[i].model = scaled(s.sources[i].model, k);
    return out;
  };
  SpreadAnswer a;
  SearchProgress done(progress, q.steps + 1.0 + 40.0, estimate, "solve spread");
  const Margin margin = [&](double t) {
    done.tick();
    return worst_margin(zones, sources_at(std::exp(t)), s.options).first;
  };
  a.crossing = last_holding(margin, std::log(q.min_factor), std::log(q.max_factor), q.steps, q.tolerance);
  if (!a.crossing.found) {
    a.status = Status::no_answer;
    if (q.min_factor > 0.0 && std::isfinite(q.min_factor)) {
      // The limit that fails already at the smallest factor: a smaller spread cannot help it
      // (the bias alone, or the aim, puts impacts there).
      const auto [m, zone] = worst_margin(zones, sources_at(q.min_factor), s.options);
      a.failing_limit = limit_text(find_zone(s, zone));
      a.failing_ratio = m + 1.0;
      a.crossing.why = "no factor in the range meets " + a.failing_limit +
                       fmt::format(": even at the smallest factor, {:g}, its upper bound is {:.3g} x the limit",
                                   q.min_factor, a.failing_ratio);
    }
    done.finish();
    return a;
  }
  a.factor = std::exp(a.crossing.x);
  a.factor_fails = std::exp(a.crossing.x_fails);
  if (!a.crossing.holds_to_end) a.worst_zone = worst_margin(zones, sources_at(a.factor_fails), s.options).second;
  const std::vector<Source> at = sources_at(a.factor);
  for (std::size_t i : which) {
    ScaledSpread sp;
    sp.source = at[i].name;
    for (const WeightedGaussian& c : at[i].model.components()) sp.components.push_back(c.gaussian.axes());
    sp.cep = containment_radius(at[i].model, at[i].model.components().front().gaussian.mean(), 0.5);
    a.spreads.push_back(sp);
  }
  done.finish();
  return a;
}

AimAnswer solve_aim(const Site& s, const AimQuery& q, const ProgressFn& progress, const EstimateFn& estimate) {
  if (q.source.empty() && s.sources.size() > 1) throw request_error("source", "aim: the site has several sources; name the one to re-aim");
  const Source& src = q.source.empty() ? s.sources.front() : find_source(s, q.source);
  const std::size_t index = static_cast<std::size_t>(&src - s.sources.data());
  const Zone* target = nullptr;
  if (!q.target.empty()) {
    target = &find_zone(s, q.target);
    // A keep-out zone as the target would be aimed at (its hits maximised).
    if (target->role == Role::keep_out)
      throw request_error("target", "aim: zone '" + q.target + "' is a keep-out zone; the target must be a zone of role target or report_only");
  } else {
    for (const Zone& z : s.zones)
      if (!target && z.role == Role::target) target = &z;
    if (!target) throw request_error("target", s.file + ": no zone has role = \"target\"; name the target zone");
  }
  std::vector<const Zone*> limited, keep_out;
  for (const Zone& z : s.zones) {
    if (z.limit) limited.push_back(&z);
    if (z.role == Role::keep_out) keep_out.push_back(&z);
  }
  if (q.min_target && !(*q.min_target > 0.0 && *q.min_target < 1.0))
    throw request_error("min_target", "aim: the least target probability must be in (0, 1)");
  // The source aimed at its aim + v: a thrower's spread derived again from the new throw
  // (aimed_at), its barriers counted (integrate_source) as assess counts them: the keep-out sum
  // and the target's p were of the bare spread, a fence left out (a new-user trial: 2.0e-3 "now"
  // where assess said 3.2e-4).
  const auto moved = [&](const Vec2& v) {
    std::vector<Source> out = s.sources;
    out[index] = aimed_at(src, src.aim + v);
    return out;
  };
  const auto source_p = [&](const Zone& z, const Vec2& v) {
    return integrate_source(aimed_at(src, src.aim + v), z.region, s.options);
  };
  const auto keep_out_total = [&](const Vec2& v) {
    double total = 0.0;
    for (const Zone* z : keep_out) {
      const Estimate e = source_p(*z, v);
      total += e.p + e.abs_err;
    }
    return total;
  };
  // Every zone's limit, on upper bounds, in both modes; with min_target also the target floor
  // on the lower bound of P(target). The margin is the worst of them, so an answer holds them all.
  const auto limits_margin = [&](const Vec2& v) {
    return limited.empty() ? std::pair<double, std::string>{-1.0, ""} : worst_margin(limited, moved(v), s.options);
  };
  const auto floor_margin = [&](const Vec2& v) {
    const Estimate e = source_p(*target, v);
    return (*q.min_target - (e.p - e.abs_err)) / *q.min_target;
  };
  std::function<double(const Vec2&)> objective, margin;
  AimAnswer a;
  if (q.min_target) {
    a.objective = "least keep-out risk with P(target) >= " + fmt::format("{:g}", *q.min_target) +
                  (limited.empty() ? "" : " within every limit");
    objective = [&](const Vec2& v) { return -keep_out_total(v); };
    margin = [&](const Vec2& v) {
      const double floor = floor_margin(v);
      return floor > 0.0 ? floor : std::max(floor, limits_margin(v).first);
    };
  } else {
    a.objective = "most target hits within every limit";
    objective = [&](const Vec2& v) { return source_p(*target, v).p; };
    margin = [&](const Vec2& v) { return limits_margin(v).first; };
  }
  double half_width = q.search_half_width;
  if (!(half_width <= 1e9)) throw request_error("search_half_width", "aim: the search's half-width must be at most 1e9 m");
  if (half_width <= 0.0)
    for (const WeightedGaussian& c : src.model.components()) half_width = std::max(half_width, 3.0 * c.gaussian.axes().sigma_major);
  a.current_aim = src.aim;
  // The grid, then the compass search: 16 directions per halving of its step, from the grid
  // spacing down to the tolerance, about twice each.
  const double halvings = std::max(0.0, std::log2(2.0 * half_width / std::max(q.grid - 1, 1) / q.tolerance));
  SearchProgress done(progress, static_cast<double>(q.grid) * q.grid + 32.0 * (halvings + 1.0), estimate, "solve aim");
  // An aim on a thrower's standing point is no throw at all: outside the search.
  const std::function<double(const Vec2&)> counted = [&](const Vec2& v) {
    done.tick();
    try {
      return margin(v);
    } catch (const input_error&) {
      if (!src.thrower) throw;
      return 1e300;
    }
  };
  const std::function<double(const Vec2&)> safe_objective = [&](const Vec2& v) {
    try {
      return objective(v);
    } catch (const input_error&) {
      if (!src.thrower) throw;
      return -1e300;
    }
  };
  a.best = best_point(safe_objective, counted, Vec2::Zero(), half_width, q.grid, q.tolerance);
  if (!a.best.found) a.status = Status::no_answer;
  if (!a.best.found && std::isfinite(a.best.least_margin)) {
    // Name the constraint that fails where the constraints come closest to holding together.
    const Vec2 v = a.best.least_margin_x;
    const auto [limit_m, zone] = limits_margin(v);
    const double floor = q.min_target ? floor_margin(v) : -1e300;
    if (!zone.empty() && limit_m >= floor) {
      const Zone& z = find_zone(s, zone);
      a.failing_limit = limit_text(z);
      a.failing_ratio = limit_m + 1.0;
    } else {
      a.failing_limit = "the target floor P('" + target->name + "') >= " + fmt::format("{:g}", *q.min_target);
      a.failing_ratio = 1.0 - floor;  // lower bound of P(target) over the floor
    }
    a.failing_at = v + src.aim;
    a.best.why = "no aim in the search square meets " + a.failing_limit + fmt::format(
        ": where the constraints come closest, at {}, ", point_text(a.failing_at, s.units)) +
        (zone.empty() || limit_m < floor ? fmt::format("P(target) is at least {:.4g} of the floor", a.failing_ratio)
                                          : fmt::format("its upper bound is {:.4g} x the limit", a.failing_ratio));
  }
  a.current_target_p = source_p(*target, Vec2::Zero()).p;
  a.current_keep_out_total = keep_out_total(Vec2::Zero());
  if (a.best.found) {
    const Estimate e = source_p(*target, a.best.x);
    a.target_p = e.p;
    a.target_abs_err = e.abs_err;
    a.keep_out_total = keep_out_total(a.best.x);
    a.best.x += src.aim;  // report the aim point itself, not the shift
  }
  done.finish();
  return a;
}

}  // namespace strewn
