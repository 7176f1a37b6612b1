// solve_release: the release point that centres a drop on its target, and the largest height or
// wind at which every limit holds (the method in strewn/release.hpp).
#include "strewn/release.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>

#include "strewn/assess.hpp"
#include "strewn/closest_names.hpp"
#include "strewn/error.hpp"

namespace strewn {
namespace {

Vec2 mean_of(const ScatterModel& m) {
  Vec2 sum = Vec2::Zero();
  for (const WeightedGaussian& c : m.components()) sum += c.weight * c.gaussian.mean();
  return sum;
}

ScatterModel shifted(const ScatterModel& m, const Vec2& d) {
  std::vector<WeightedGaussian> parts;
  for (const WeightedGaussian& c : m.components()) parts.push_back({c.weight, c.gaussian.moved_to(c.gaussian.mean() + d)});
  return ScatterModel::mixture(parts);
}

std::size_t drop_source_index(const Site& s, const std::string& name) {
  std::vector<std::string> drops;
  for (std::size_t i = 0; i < s.sources.size(); ++i)
    if (s.sources[i].drop) {
      if (s.sources[i].name == name) return i;
      drops.push_back(s.sources[i].name);
    }
  if (drops.empty()) throw request_error("source", s.file + ": no source is a drop from flight (drop = {...})");
  if (name.empty()) {
    if (drops.size() > 1) throw request_error("source", "release: the site has several drop sources; name one");
    for (std::size_t i = 0; i < s.sources.size(); ++i)
      if (s.sources[i].drop) return i;
  }
  for (const Source& src : s.sources)
    if (src.name == name) throw request_error("source", "release: source '" + name + "' is not a drop from flight");
  throw request_error("source", "release: no drop source named '" + name + "'" + did_you_mean(name, drops));
}

// The worst (upper bound - limit) / limit over the limited zones, and its zone.
std::pair<double, std::string> worst_margin(const Site& s, const std::vector<Source>& sources) {
  std::pair<double, std::string> worst{-1e300, ""};
  for (const Zone& z : s.zones)
    if (z.limit) {
      const double m = limit_margin(assess_zone(z, sources, s.options));
      if (m > worst.first) worst = {m, z.name};
    }
  return worst;
}

std::string limit_text(const Site& s, const std::string& zone) {
  for (const Zone& z : s.zones)
    if (z.name == zone && z.limit)
      return "the limit of zone '" + z.name + "' (" + fmt::format("{:g}", *z.limit) + " per " + to_string(z.limit_per) + ")";
  return "the limit of zone '" + zone + "'";
}

}  // namespace

ReleaseAnswer solve_release(const Site& s, const ReleaseQuery& q, const ProgressFn& progress) {
  const std::size_t index = drop_source_index(s, q.source);
  const Source& src = s.sources[index];
  const DropSource& drop = *src.drop;
  ReleaseAnswer a;
  a.source = src.name;
  a.target = q.target.value_or(src.aim);
  if (!(a.target.allFinite() && a.target.cwiseAbs().maxCoeff() <= 1e12))
    throw request_error("target", "release: the target must be a finite point within +-1e12 m");
  a.scenario_release = drop.parameters.release;
  a.vary = q.vary;
  bool any_limit = false;
  for (const Zone& z : s.zones) any_limit = any_limit || z.limit.has_value();

  // The site's sources with this one's spread at the given parameters, released at the point
  // that centres its mean landing on the target; `release` and `spread` receive what was used.
  const auto centred = [&](const DropParameters& d, Vec2& release, DropSpread& spread) {
    spread = drop_spread(d, drop.uncertainty, drop.options);
    const Vec2 landing = mean_of(spread.model);
    const Vec2 shift = a.target - landing;
    release = d.release + shift;
    std::vector<Source> sources = s.sources;
    sources[index].model = shifted(spread.model, shift);
    return sources;
  };

  const int expected = 1 + (q.vary == ReleaseQuery::Vary::none ? 0 : q.steps + 1 + 30);
  int done = 0;
  const auto tick = [&]() {
    if (progress) progress(std::min(0.99, ++done / static_cast<double>(expected)));
  };

  const std::vector<Source> at_scenario = centred(drop.parameters, a.release, a.spread);
  tick();
  a.drift = mean_of(a.spread.model) - drop.parameters.release;
  if (any_limit) {
    const auto [m, zone] = worst_margin(s, at_scenario);
    a.worst_ratio = m + 1.0;
    a.worst_zone = zone;
    a.limits_hold = m <= 0.0;
  } else {
    a.limits_hold = true;
  }
  if (q.vary == ReleaseQuery::Vary::none) {
    if (!a.limits_hold) {
      a.status = Status::no_answer;
      a.failing_limit = limit_text(s, a.worst_zone);
      a.failing_ratio = a.worst_ratio;
    }
    if (progress) progress(1.0);
    return a;
  }
  if (!any_limit) throw input_error(s.file + ": no zone has a limit, so there is nothing to solve for");

  const bool height = q.vary == ReleaseQuery::Vary::height;
  const double current = height ? drop.parameters.height : drop.parameters.wind.speed;
  // The scenario's own caps (site_io.cpp: height to 1e5 m, wind to 200 m/s): beyond them the drop
  // model is not the one a scenario may state, and a scan there said "every limit holds up to
  // 1000 m/s" of a wind whose limit is 4.3 m/s (or ran for minutes at 1e6 m).
  const double cap = height ? 1e5 : 200.0;
  a.least = q.least.value_or(height ? std::min(1.0, current) : 0.0);
  a.most = q.most.value_or(std::min(cap, height ? 4.0 * current : std::max(20.0, 4.0 * current)));
  if (!(std::isfinite(a.least) && std::isfinite(a.most) && a.least < a.most && a.least >= 0.0 &&
        (!height || a.least > 0.0) && a.most <= cap))
    throw request_error("range", height ? "release: the heights considered must satisfy 0 < least < most <= 1e5 m"
                                        : "release: the wind speeds considered must satisfy 0 <= least < most <= 200 m/s");
  if (!(q.steps >= 1 && q.tolerance > 0.0)) throw request_error("range", "release: steps must be 1 or more and the tolerance above 0");
  // The uncertainty of the height is the scenario's: a quarter of the height at most (drop.hpp).
  const double height_sd_floor = 4.0 * drop.uncertainty.height;
  const auto parameters_at = [&](double v) {
    DropParameters d = drop.parameters;
    (height ? d.height : d.wind.speed) = height ? std::max(v, height_sd_floor) : v;
    return d;
  };
  const Margin margin = [&](double v) {
    tick();
    Vec2 release;
    DropSpread spread;
    return worst_margin(s, centred(parameters_at(v), release, spread)).first;
  };
  a.crossing = last_holding(margin, a.least, a.most, q.steps, q.tolerance);
  if (!a.crossing.found) {
    a.status = Status::no_answer;
    Vec2 release;
    DropSpread spread;
    const auto [m, zone] = worst_margin(s, centred(parameters_at(a.least), release, spread));
    a.failing_limit = limit_text(s, zone);
    a.failing_ratio = m + 1.0;
    a.crossing.why = fmt::format("no {} from {:g} to {:g} {} meets {}: even at {:g} its upper bound is {:.3g} x the limit",
                                 height ? "height" : "wind speed", a.least, a.most, height ? "m" : "m/s",
                                 a.failing_limit, a.least, a.failing_ratio);
  } else {
    DropSpread spread;
    centred(parameters_at(a.crossing.x), a.release_at_answer, spread);
    if (!a.crossing.holds_to_end) {
      Vec2 release;
      a.limiting_zone = worst_margin(s, centred(parameters_at(a.crossing.x_fails), release, spread)).second;
    }
  }
  if (progress) progress(1.0);
  return a;
}

}  // namespace strewn
