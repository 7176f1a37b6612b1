// drop_json on its own (output/drop_output.hpp): the CLI's JSON and the Python module's
// site.assess() share it, so both give the same keys.
#include <nlohmann/json.hpp>

#include "output/drop_output.hpp"

namespace strewn::cli {

nlohmann::json drop_json(const Source& src, const Lengths& L) {
  const DropSource& d = *src.drop;
  const DropParameters& p = d.parameters;
  const DropSpread& s = d.spread;
  const auto pt = [&](const Vec2& v) { return nlohmann::json::array({L(v.x()), L(v.y())}); };
  const auto cov = [&](const Mat2& m) {
    return nlohmann::json::array({{L(L(m(0, 0))), L(L(m(0, 1)))}, {L(L(m(1, 0))), L(L(m(1, 1)))}});
  };
  nlohmann::json j = {{"source", src.name},
                      {L.key("release"), pt(p.release)},
                      {L.key("height"), L(p.height)},
                      {"heading_deg", p.heading_deg},
                      {"fall_time_s", s.nominal.time},
                      {"shape", s.normal ? "normal" : "mixture"},
                      {"description", s.shape},
                      {"unscented", {{"sigma_points", s.sigma_points}, {L.key("mean"), pt(s.ut_mean)},
                                     {L.area_key("covariance"), cov(s.ut_covariance)}}},
                      {"monte_carlo_check", {{"falls", s.falls}, {"seed", d.options.seed}, {L.key("mean"), pt(s.mc_mean)},
                                             {L.area_key("covariance"), cov(s.mc_covariance)},
                                             {"ks_statistic", s.ks_statistic}, {"ks_p_value", s.ks_p_value},
                                             {"normality_level", d.options.normality_level}, {"normal", s.normal}}}};
  for (const WeightedGaussian& c : s.model.components()) {
    const SpreadAxes a = c.gaussian.axes();
    j["components"].push_back({{"weight", c.weight}, {L.key("mean"), pt(c.gaussian.mean())},
                               {L.key("sigma_major"), L(a.sigma_major)}, {L.key("sigma_minor"), L(a.sigma_minor)},
                               {"angle_deg", a.angle_deg}});
  }
  if (!s.normal) {
    j["mixture_bic"] = s.mixture_bic, j["normal_bic"] = s.normal_bic;
    j["mixture_check"] = {{"components", s.mixture_components}, {"method", "Rosenblatt transform, KS on held-out falls"},
                          {"ks_statistic", s.mixture_ks_statistic}, {"ks_p_value", s.mixture_ks_p_value},
                          {"passed", s.mixture_check_passed}};
  }
  return j;
}

}  // namespace strewn::cli
