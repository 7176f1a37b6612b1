#include "output/thrower_output.hpp"

#include <algorithm>

#include <fmt/format.h>

#include "output/lengths.hpp"

namespace strewn::cli {
namespace {

// A position to the millimetre (Lengths::point); an offset such as a bias to 4 significant figures.
std::string point(const Lengths& L, const Vec2& p) { return L.point(p); }
std::string offset(const Lengths& L, const Vec2& p) { return fmt::format("({:.4g}, {:.4g})", L(p.x()), L(p.y())); }

struct Span {
  double lo = 1e300, hi = -1e300;
  void add(double v) { lo = std::min(lo, v), hi = std::max(hi, v); }
  std::string text(const Lengths& L) const {
    return lo == hi ? fmt::format("{:.3g} {}", L(lo), L.symbol())
                    : fmt::format("{:.3g} to {:.3g} {}", L(lo), L(hi), L.symbol());
  }
};

struct Became {
  Span distance, across, along;
};

Became became(const Thrower& t) {
  Became b;
  for (const Vec2& p : standing_points(t)) {
    const ThrowerSpread s = thrower_spread(t, p);
    b.distance.add(s.distance);
    b.across.add(s.sigma_across);
    b.along.add(s.sigma_along);
  }
  return b;
}

std::string along_words(const Thrower& t, const Lengths& L) {
  return t.range_sigma ? fmt::format("range spread {:.3g} {}", L(*t.range_sigma), L.symbol())
                       : fmt::format("range spread {:g} of the distance", *t.range_fraction);
}

std::string height_words(const Barrier& b, const Lengths& L) {
  return b.height ? fmt::format("height {:.3g} {}", L(*b.height), L.symbol()) : std::string("no height given: all crossing paths");
}

}  // namespace

std::vector<std::string> thrower_sentences(const Site& s) {
  const Lengths L(s);
  std::vector<std::string> out;
  for (const Source& src : s.sources) {
    if (!src.thrower) continue;
    const Thrower& t = *src.thrower;
    const Became b = became(t);
    const std::string where =
        t.line_end ? fmt::format("stands anywhere on the line {} to {} ({} standing points to start, an equally weighted "
                                 "mixture by the midpoint rule, halved where needed; a proven bound on its error is in "
                                 "every bound)",
                                 point(L, t.position), point(L, *t.line_end), t.line_components)
                   : fmt::format("stands at {}", point(L, t.position));
    out.push_back(fmt::format("'{}' {} and throws toward {} {}, distance {}: angular spread {:g} deg became "
                              "sigma_across {} (D tan angle), {} became sigma_along {}{}.",
                              src.name, where, point(L, t.toward), L.symbol(), b.distance.text(L), t.spread_angle_deg,
                              b.across.text(L), along_words(t, L), b.along.text(L),
                              t.bias.norm() > 0 ? fmt::format("; bias {} {}", offset(L, t.bias), L.symbol()) : ""));
  }
  return out;
}

std::vector<std::string> barrier_sentences(const Site& s, const Assessment& a) {
  const Lengths L(s);
  std::vector<std::string> out;
  for (const BarrierStop& row : a.barriers) {
    const Barrier* b = nullptr;
    for (const Barrier& x : s.barriers) b = x.name == row.barrier ? &x : b;
    out.push_back(fmt::format("'{}' (catch {:g}, {}) stops {:.3g} +- {:.1g} of the events from '{}'{}.", row.barrier,
                              b ? b->catch_share : 0.0, b ? height_words(*b, L) : "", row.stopped.p, row.stopped.abs_err,
                              row.source, row.stopped.converged ? "" : " (requested accuracy NOT MET)"));
  }
  return out;
}

nlohmann::json throwers_json(const Site& s) {
  const Lengths L(s);
  nlohmann::json out = nlohmann::json::array();
  for (const Source& src : s.sources) {
    if (!src.thrower) continue;
    const Thrower& t = *src.thrower;
    nlohmann::json points = nlohmann::json::array();
    for (const Vec2& p : standing_points(t)) {
      const ThrowerSpread sp = thrower_spread(t, p);
      points.push_back({{L.key("position"), {L(p.x()), L(p.y())}},
                        {L.key("distance"), L(sp.distance)},
                        {"direction_deg", sp.direction_deg},
                        {L.key("sigma_across"), L(sp.sigma_across)},
                        {L.key("sigma_along"), L(sp.sigma_along)}});
    }
    nlohmann::json j = {{"source", src.name},
                        {L.key("toward"), {L(t.toward.x()), L(t.toward.y())}},
                        {L.key("bias"), {L(t.bias.x()), L(t.bias.y())}},
                        {"spread_angle_deg", t.spread_angle_deg},
                        {"standing_points", points}};
    if (t.range_fraction) j["range_fraction"] = *t.range_fraction;
    if (t.range_sigma) j[L.key("range_sigma")] = L(*t.range_sigma);
    if (t.line_end) {
      j[L.key("line")] = {{L(t.position.x()), L(t.position.y())}, {L(t.line_end->x()), L(t.line_end->y())}};
      j["line_mixture"] =
          "midpoint rule on pieces, refined where the bound is largest (at most 256); a proven bound on its error "
          "(second derivative along the line; barrier shadows swept by a piece) is added to abs_err";
    }
    out.push_back(j);
  }
  return out;
}

nlohmann::json barriers_json(const Site& s, const Assessment& a) {
  const Lengths L(s);
  nlohmann::json out = nlohmann::json::array();
  for (const Barrier& b : s.barriers) {
    nlohmann::json pts = nlohmann::json::array();
    for (const Vec2& p : b.points) pts.push_back({L(p.x()), L(p.y())});
    nlohmann::json j = {{"name", b.name}, {L.key("points"), pts}, {"catch", b.catch_share}};
    if (b.height) j[L.key("height")] = L(*b.height);
    j["stops"] = nlohmann::json::array();
    for (const BarrierStop& row : a.barriers)
      if (row.barrier == b.name)
        j["stops"].push_back({{"source", row.source},
                              {"p_event", row.stopped.p},
                              {"abs_err", row.stopped.abs_err},
                              {"converged", row.stopped.converged},
                              {"counted", "as if the barrier stood alone"}});
    out.push_back(j);
  }
  return out;
}

}  // namespace strewn::cli
