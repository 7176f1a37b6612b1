#include "output/drop_output.hpp"

#include <cmath>
#include <fmt/format.h>
#include <fmt/ostream.h>
#include <ostream>

#include "output/assess_output.hpp"
#include "output/safe_rounding.hpp"
#include "strewn/version.hpp"

namespace strewn::cli {
namespace {

std::string point(const Vec2& p, const Lengths& L) { return L.point(p) + " " + L.symbol(); }
// The release point of an answer at its limit, to 0.1 mm: at the mm of point() the limit it sits
// on failed (1.00009 x) when the printed point was put back in the scenario.
std::string precise_point(const Vec2& p, const Lengths& L) {
  return fmt::format("({:.4f}, {:.4f}) {}", L(p.x()), L(p.y()), L.symbol());
}

std::string axes_text(const SpreadAxes& a, const Lengths& L) {
  return fmt::format("sigma_major {:.3f} {u}, sigma_minor {:.3f} {u}, major axis at {:.1f} deg from +x", L(a.sigma_major),
                     L(a.sigma_minor), a.angle_deg, fmt::arg("u", L.symbol()));
}

const char* vary_word(ReleaseQuery::Vary v) {
  return v == ReleaseQuery::Vary::height ? "height" : v == ReleaseQuery::Vary::wind ? "wind speed" : "";
}

}  // namespace

std::string drop_summary(const Source& src, const Lengths& L) {
  const DropSource& d = *src.drop;
  const DropParameters& p = d.parameters;
  const DropSpread& s = d.spread;
  const std::string wind = p.wind.speed == 0.0
                               ? std::string("still air")
                               : fmt::format("wind {:.3g} {u}/s from {:.0f} deg at {:.3g} {u}", L(p.wind.speed), p.wind.from_deg,
                                             L(p.wind.reference_height), fmt::arg("u", L.symbol()));
  std::string text = fmt::format(
      "{}: a drop from {:.3g} {u} at {:.3g} {u}/s on a track of {:.0f} deg, {}{}, released over {}; it lands {:.2f} s "
      "later, on average at {}. Spread: ",
      src.name, L(p.height), L(p.ground_speed), p.heading_deg, wind, p.parachute ? ", on a parachute" : "",
      point(p.release, L), s.nominal.time, point(s.normal ? s.ut_mean : s.mc_mean, L), fmt::arg("u", L.symbol()));
  if (s.normal) {
    text += fmt::format("normal from the unscented transform ({} sigma points), {}; checked by {} seeded falls of the same "
                        "model: close to normal (KS on the squared Mahalanobis distances, p = {:.2g}).",
                        s.sigma_points, axes_text(s.model.components().front().gaussian.axes(), L), s.falls, s.ks_p_value);
  } else {
    text += fmt::format("the {} seeded falls of the check are NOT close to normal (KS on the squared Mahalanobis distances, "
                        "p = {:.2g}), so the source became a mixture of {} with their own means, fitted to half of them "
                        "(BIC {:.1f} against {:.1f} for one normal); the mixture's own check on the other half {} (KS after "
                        "the Rosenblatt transform, p = {:.2g}):",
                        s.falls, s.ks_p_value, s.mixture_components, s.mixture_bic, s.normal_bic,
                        s.mixture_check_passed ? "passed" : "did NOT pass", s.mixture_ks_p_value);
    for (const WeightedGaussian& c : s.model.components())
      text += fmt::format(" weight {:.3f} about {}, {};", c.weight, point(c.gaussian.mean(), L), axes_text(c.gaussian.axes(), L));
    text.back() = '.';
  }
  return text;
}

void write_release(std::ostream& out, const Site& s, const ReleaseQuery& q, const ReleaseAnswer& a, bool json) {
  const Lengths L(s);
  const char* u = L.symbol();
  const auto pt = [&](const Vec2& v) { return nlohmann::json::array({L(v.x()), L(v.y())}); };
  const bool varied = a.vary != ReleaseQuery::Vary::none;
  const std::string value_unit = a.vary == ReleaseQuery::Vary::height ? u : std::string(u) + "/s";
  if (json) {
    nlohmann::json j = {{"strewn_version", STREWN_VERSION_STRING}, {"site", s.site_name}, {"file", s.file},
                        {"problem", "release"}, {"units", {{"length", u}}}, {"caution", kCaution},
                        {"source", a.source}, {L.key("target"), pt(a.target)},
                        {L.key("scenario_release"), pt(a.scenario_release)}, {L.key("release"), pt(a.release)},
                        {L.key("drift"), pt(a.drift)}, {"spread", a.spread.shape},
                        {"limits_hold_at_release", a.limits_hold}, {"status", to_string(a.status)}};
    if (!a.worst_zone.empty()) j["worst_ratio"] = a.worst_ratio, j["worst_zone"] = a.worst_zone;
    if (varied) {
      j["vary"] = vary_word(a.vary);
      j["considered"] = {L(a.least), L(a.most)};
      j["value_unit"] = value_unit;
      j["found"] = a.crossing.found;
      if (a.crossing.found) {
        j["largest"] = L(a.crossing.x);
        j["fails_at"] = L(a.crossing.x_fails);
        j["holds_over_whole_window"] = a.crossing.holds_to_end;
        j[L.key("release_at_largest")] = pt(a.release_at_answer);
        j["limiting_zone"] = a.limiting_zone;
      } else {
        j["why"] = a.crossing.why;
      }
      j["evaluations"] = a.crossing.evaluations;
    }
    if (!a.failing_limit.empty()) j["failing_limit"] = a.failing_limit, j["failing_ratio"] = a.failing_ratio;
    out << j.dump(2) << "\n";
    return;
  }
  fmt::print(out, "strewn {} solve release: {}\nscenario: {}\n\n", STREWN_VERSION_STRING, s.site_name, s.file);
  // What is solved for, before the answer.
  out << wrapped(fmt::format("Source '{}': the release point that puts the mean landing on the target {}{}.", a.source,
                             point(a.target, L),
                             varied ? fmt::format(", and the largest {} at which every limit holds with the release "
                                                  "re-centred at each value",
                                                  vary_word(a.vary))
                                    : ""),
                 "", 78);
  fmt::print(out, "\nRelease over {} (the scenario has {}):\n", point(a.release, L), point(a.scenario_release, L));
  out << wrapped(fmt::format("the parcel drifts {:.3f} {u} east and {:.3f} {u} north of its release on average, so the "
                             "release lies that far upwind and back along the track from the target.",
                             L(a.drift.x()), L(a.drift.y()), fmt::arg("u", u)),
                 "  ", 78);
  out << wrapped("Spread there: " + a.spread.shape + ".", "  ", 78);
  if (!a.worst_zone.empty())
    out << wrapped(fmt::format("Limits from there: {} (worst: zone '{}', upper bound {:.3g} x its limit).",
                               a.limits_hold ? "all hold" : "NOT all hold", a.worst_zone, a.worst_ratio),
                   "  ", 78);
  if (varied) {
    out << "\n";
    if (!a.crossing.found)
      out << wrapped("No answer: " + a.crossing.why + ".", "", 78);
    else if (a.crossing.holds_to_end)
      out << wrapped(fmt::format("Every limit holds up to the largest {} considered: {} {} (or more).",
                                 vary_word(a.vary), significant_towards(L(a.crossing.x), 5, Towards::down), value_unit),
                     "", 78);
    else
      // Rounded towards the side where the limits hold (output/safe_rounding.hpp).
      out << wrapped(fmt::format("Largest {}: {} {} (at {} the limit of zone '{}' fails), released over "
                                 "{}.",
                                 vary_word(a.vary), fixed_towards(L(a.crossing.x), 4, Towards::down), value_unit,
                                 fixed_towards(L(a.crossing.x_fails), 4, Towards::up), a.limiting_zone,
                                 precise_point(a.release_at_answer, L)),
                     "", 78);
  } else if (!a.limits_hold) {
    out << "\n" << wrapped("No answer: " + a.failing_limit + " fails even with the drop centred on the target.", "", 78);
  }
  out << "\n"
      << wrapped("Probabilities are compared with their upper bounds (p + error bound). The fall assumes flat "
                 "ground, no bounce or roll, a point mass and one wind profile over the site "
                 "(docs/scenario-format.md, \"Drops from flight\").",
                 "", 78);
  fmt::print(out, "\n{}\n", kCaution);
  (void)q;
}

}  // namespace strewn::cli
