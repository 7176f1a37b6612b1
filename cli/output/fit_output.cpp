#include "output/fit_output.hpp"

#include <Eigen/LU>
#include <algorithm>
#include <cmath>
#include <fmt/format.h>
#include <fmt/ostream.h>
#include <nlohmann/json.hpp>
#include <ostream>

#include "output/palette.hpp"
#include "output/svg_canvas.hpp"
#include "strewn/version.hpp"

namespace strewn::cli {
namespace {

// Lengths printed in the data's unit with its symbol ("[0.41, 0.62] ft").
std::string interval(const Lengths& L, const Interval& i) {
  if (std::isinf(i.high)) return fmt::format("[{:.4g} {}, no upper bound]", L(i.low), L.symbol());
  return fmt::format("[{:.4g}, {:.4g}] {}", L(i.low), L(i.high), L.symbol());
}

std::string fraction_interval(const Interval& i) { return fmt::format("[{:.4g}, {:.4g}] (Clopper-Pearson)", i.low, i.high); }

// A position to the millimetre (Lengths::point); an offset such as a bias to 4 significant figures.
std::string point(const Lengths& L, const Vec2& p) { return L.point(p); }
std::string offset(const Lengths& L, const Vec2& p) { return fmt::format("({:.4g}, {:.4g})", L(p).x(), L(p).y()); }

// A covariance (length squared) in the data's unit squared.
Mat2 covariance_in(const Lengths& L, const Mat2& m) { return m / (metres_per(L.unit) * metres_per(L.unit)); }

// What the goodness-of-fit checks say, in one line (NormalFit::normal_rejected: 1% each).
std::string normal_verdict(const NormalFit& f) {
  if (!f.normal_rejected()) return "no evidence against a normal spread (KS and the axes' tests, 1% each)";
  return fmt::format("the impacts do not look like one normal spread (p {:.2g} < 0.01): look for two groups, a "
                     "pattern such as a ring, or heavier tails (--student-t); the fitted spread may not describe them",
                     std::min(f.ks_p_value, f.axes_p_value));
}

std::string toml_point(const Vec2& p) { return fmt::format("[{:.17g}, {:.17g}]", p.x(), p.y()); }

std::string toml_matrix(const Mat2& m) {
  return fmt::format("[[{:.17g}, {:.17g}], [{:.17g}, {:.17g}]]", m(0, 0), m(0, 1), m(1, 0), m(1, 1));
}

std::string toml_text(const std::string& s) {
  std::string out = "\"";
  for (char c : s) out += (c == '"' || c == '\\') ? std::string("\\") + c : std::string(1, c);
  return out + "\"";
}

std::string dof_note(const NormalFit& f) {
  if (f.sigma_dof >= 2.0 * static_cast<double>(f.n - 1) * (1 - 1e-12))
    return fmt::format("chi-square, {} d.o.f.", 2 * (f.n - 1));
  return fmt::format("chi-square, Satterthwaite's {:.4g} d.o.f. for the fitted axes; exact only for a circular spread",
                     f.sigma_dof);
}

void t_summary_of(std::ostream& out, const FitRun& run, const GroupFit& g);

void summary_of(std::ostream& out, const FitRun& run, const GroupFit& g) {
  const NormalFit& f = g.normal;
  const Lengths& L = run.lengths;
  const char* u = L.symbol();
  const double pct = 100 * run.confidence;
  fmt::print(out, "group '{}': {} impacts; aim {} {} (bias, distances and bearings are measured from it)\n", g.name,
             f.n, point(L, f.aim), u);
  fmt::print(out, "mean impact point {} {}; bias {} {}\n", point(L, f.mean), u, offset(L, f.mean - f.aim), u);
  fmt::print(out, "  no-bias test: Hotelling T^2 = {:.3g}, p = {:.3g} ({})\n", f.t2, f.no_bias_p_value,
             f.no_bias_p_value < 1 - run.confidence ? "the bias is real at this confidence" : "no clear evidence of bias");
  fmt::print(out, "  {:g}% region for the mean: ellipse with semi-axes {:.4g} {} and {:.4g} {}, major axis at {:.1f} deg\n",
             pct, L(f.mean_region_axes.sigma_major), u, L(f.mean_region_axes.sigma_minor), u, f.mean_region_axes.angle_deg);
  fmt::print(out, "spread: sigma_major {:.4g} {} {}, sigma_minor {:.4g} {} {}, angle {:.1f} deg\n", L(f.axes.sigma_major), u,
             interval(L, f.sigma_major_ci), L(f.axes.sigma_minor), u, interval(L, f.sigma_minor_ci), f.axes.angle_deg);
  const Mat2 c = covariance_in(L, f.covariance);
  fmt::print(out, "  covariance [[{:.4g}, {:.4g}], [{:.4g}, {:.4g}]] {}^2\n", c(0, 0), c(0, 1), c(1, 0), c(1, 1), u);
  fmt::print(out, "  circular-equivalent sigma {:.4g} {} {} ({})\n", L(f.sigma), u, interval(L, f.sigma_ci), dof_note(f));
  fmt::print(out, "  CEP {:.4g} {} {}, R95 {:.4g} {} {} (about the mean impact point)\n", L(f.cep), u,
             interval(L, f.cep_ci), L(f.r95), u, interval(L, f.r95_ci));
  fmt::print(out, "goodness of fit: KS D = {:.3g} against chi-square (2 d.o.f.), p = {:.3g}\n", f.ks_statistic,
             f.ks_p_value);
  fmt::print(out, "  along the axes: Anderson-Darling A^2 {:.3g} (major), {:.3g} (minor), p = {:.3g} for both\n",
             f.ad_major, f.ad_minor, f.axes_p_value);
  fmt::print(out, "  {}\n", normal_verdict(f));
  const std::string rule = fmt::format("d^2 > {:.4g}: Beta(1, (n - 3) / 2) reference, 0.8% over all {} impacts; "
                                       "then up to {} more removed one by one and tested again, 1% in all",
                                       f.outlier_d2, f.n, outlier_steps(f.n) - 1);
  if (!std::isfinite(f.outlier_d2)) {
    fmt::print(out, "  outliers: cannot be told with 3 impacts (every d^2 is 4/3)\n");
  } else if (f.outliers.empty()) {
    fmt::print(out, "  outliers: none ({})\n", rule);
  } else {
    std::vector<std::string> rows;
    for (std::size_t i : f.outliers) rows.push_back(g.group ? std::to_string(g.group->rows[i]) : std::to_string(i + 1));
    fmt::print(out, "  outliers (rows): {} ({})\n", fmt::join(rows, ", "), rule);
  }
  if (g.mixture.preferred)
    fmt::print(out,
               "heavier tails than one normal: a two-component mixture fits better (BIC {:.1f} vs {:.1f}):\n"
               "  core sigma {:.3g} {}, wide sigma {:.3g} {} with weight {:.3g} (write it with --mixture)\n",
               g.mixture.bic, g.mixture.single_bic, L(std::sqrt(g.mixture.core_covariance.trace() / 2)), u,
               L(std::sqrt(g.mixture.wide_covariance.trace() / 2)), u, g.mixture.wide_weight);
  t_summary_of(out, run, g);
  fmt::print(out, "design spread (one-sided {:g}% upper bound on sigma): factor {:.4g}, sigma_major {:.4g} {}, sigma_minor {:.4g} {}\n\n",
             pct, f.design_factor, L(f.axes.sigma_major * f.design_factor), u, L(f.axes.sigma_minor * f.design_factor), u);
}

const char* model_name(FitCandidate::Model m) {
  switch (m) {
    case FitCandidate::Model::normal: return "normal";
    case FitCandidate::Model::mixture: return "two-component mixture";
    case FitCandidate::Model::student_t: return "Student-t";
  }
  return "";
}

const char* model_key(FitCandidate::Model m) {
  switch (m) {
    case FitCandidate::Model::normal: return "normal";
    case FitCandidate::Model::mixture: return "mixture";
    case FitCandidate::Model::student_t: return "student_t";
  }
  return "";
}

std::string nu_end_note(const StudentTFit& t) {
  if (t.nu_at == NuAt::upper_end)
    return fmt::format("nu at the upper end of the range searched ({:g}): no tails heavier than the normal's; the normal is as good", t.nu_max);
  if (t.nu_at == NuAt::lower_end)
    return fmt::format("nu at the lower end of the range searched ({:g}, the Cauchy): tails at least that heavy; look for a second population or gross errors", t.nu_min);
  return fmt::format("nu by profile likelihood over {:g} to {:g}", t.nu_min, t.nu_max);
}

void t_summary_of(std::ostream& out, const FitRun& run, const GroupFit& g) {
  if (!g.student_t) {
    fmt::print(out, "Student-t: {}\n", g.student_t_skipped);
    return;
  }
  const StudentTFit& t = *g.student_t;
  const Lengths& L = run.lengths;
  const char* u = L.symbol();
  fmt::print(out, "Student-t fit (maximum likelihood; {:g}% intervals: likelihood-ratio tests inverted, nu left free for "
                  "the scale figures, cut-offs from a seeded parametric bootstrap of {} refits):\n",
             100 * run.confidence, t.draws.size());
  if (!t.nu_ci_open_above || t.draws.empty())
    fmt::print(out, "  nu {:.3g} [{:.3g}, {:.3g}] ({})\n", t.nu, t.nu_ci.low, t.nu_ci.high, nu_end_note(t));
  else if (t.nu_ci.low <= t.nu_min)  // the whole range: nothing rejected
    fmt::print(out, "  nu {:.3g}, not identified from {} impacts: no nu from {:g} to {:g} is ruled out "
                    "(heavy tails not detected) ({})\n", t.nu, t.n, t.nu_min, t.nu_max, nu_end_note(t));
  else  // one-sided: the interval runs up to the cap of the range searched
    fmt::print(out, "  nu {:.3g}, nu above {:.3g} (one-sided: no nu up to {:g}, the cap of the range searched, is ruled out) "
                    "({})\n", t.nu, t.nu_ci.low, t.nu_max, nu_end_note(t));
  fmt::print(out, "  location {} {}; scale sigma_major {:.4g} {} {}, sigma_minor {:.4g} {} {}, angle {:.1f} deg\n",
             point(L, t.mean), u, L(t.axes.sigma_major), u, interval(L, t.sigma_major_ci), L(t.axes.sigma_minor), u,
             interval(L, t.sigma_minor_ci), t.axes.angle_deg);
  fmt::print(out, "  CEP {:.4g} {} {}, R95 {:.4g} {} {} (about the location)\n", L(t.cep), u, interval(L, t.cep_ci),
             L(t.r95), u, interval(L, t.r95_ci));
  if (!g.comparison) return;
  const FitComparison& c = *g.comparison;
  fmt::print(out, "model comparison (lower AIC and BIC are better):\n  {:<24} {:>12} {:>5} {:>10} {:>10}\n", "model",
             "log L", "k", "AIC", "BIC");
  for (const FitCandidate& m : c.candidates) {
    if (!m.offered) {
      fmt::print(out, "  {:<24} (not offered: no genuine core and wider part that beats the normal's BIC)\n",
                 model_name(m.model));
      continue;
    }
    fmt::print(out, "  {:<24} {:>12.2f} {:>5} {:>10.2f} {:>10.2f}\n",
               m.model == FitCandidate::Model::student_t ? fmt::format("Student-t (nu = {:.3g})", t.nu)
                                                         : std::string(model_name(m.model)),
               m.log_likelihood, m.parameters, m.aic, m.bic);
  }
  const FitCandidate::Model best = c.candidates[c.recommended].model;
  fmt::print(out, "  recommended: {} (lowest BIC, which asks ln n per parameter and picks the true model as n grows; "
                  "AIC {})\n",
             model_name(best),
             c.by_aic == c.by_bic ? std::string("agrees") : fmt::format("prefers the {}", model_name(c.candidates[c.by_aic].model)));
  if (best == FitCandidate::Model::student_t && !run.student_t)
    fmt::print(out, "  write the Student-t with --student-t\n");
}

}  // namespace

FitCandidate::Model GroupFit::written(bool with_mixture, bool with_t) const {
  // The flags name the models that may be written; among them (and the normal) BIC decides.
  FitCandidate::Model best = FitCandidate::Model::normal;
  double best_bic = 0.0;
  if (!comparison) return with_mixture && mixture.preferred ? FitCandidate::Model::mixture : best;
  for (const FitCandidate& m : comparison->candidates) {
    const bool allowed = m.model == FitCandidate::Model::normal || (m.model == FitCandidate::Model::mixture && with_mixture) ||
                         (m.model == FitCandidate::Model::student_t && with_t);
    if (!allowed || !m.offered) continue;
    if (m.model == FitCandidate::Model::normal || m.bic < best_bic) best = m.model, best_bic = m.bic;
  }
  return best;
}

void write_fit_summary(std::ostream& out, const FitRun& run) {
  const Lengths& L = run.lengths;
  const char* u = L.symbol();
  fmt::print(out, "strewn {} fit: {}\nconfidence {:g}%; lengths in {}\n\n", STREWN_VERSION_STRING, run.data_file,
             100 * run.confidence, u);
  for (const GroupFit& g : run.groups) summary_of(out, run, g);
  if (run.counts) {
    const CountFit& c = *run.counts;
    fmt::print(out, "{} of {} impacts within {:g} {} of the aim: fraction {:.4g} {}\n", c.k, c.n, L(c.radius), u,
               c.fraction, fraction_interval(c.fraction_ci));
    if (c.k == c.n) {
      fmt::print(out,
                 "centred circular sigma: no point estimate (every impact was inside; the maximum-likelihood sigma is 0)\n"
                 "one-sided {:g}% upper bound: sigma <= {:.4g} {} (from the lower Clopper-Pearson bound {:.4g} on the fraction);\n"
                 "this bound is the spread written\n\n",
                 100 * run.confidence, L(c.sigma_upper), u, std::pow(1 - run.confidence, 1.0 / static_cast<double>(c.n)));
    } else {
      fmt::print(out, "centred circular sigma {:.4g} {} {}\n", L(c.sigma), u, interval(L, c.sigma_ci));
      fmt::print(out, "design spread (one-sided {:g}% upper bound on sigma): sigma {:.4g} {}\n\n", 100 * run.confidence,
                 L(c.sigma_upper), u);
    }
  }
  if (run.censored) {
    const CensoredFit& c = *run.censored;
    fmt::print(out, "{} impacts measured, {} known only to be beyond {:g} {} (centred circular model)\n", c.measured,
               c.outside, L(c.radius), u);
    fmt::print(out,
               "maximum-likelihood sigma {:.4g} {} {} (exact for any number measured: the test on the\n"
               "  estimate inverted by simulation; see docs/intervals.md)\n",
               L(c.sigma), u, interval(L, c.sigma_ci));
    if (std::isinf(c.sigma_upper))
      fmt::print(out, "design spread: none (one measured impact rules out no sigma above at {:g}%: measure more impacts)\n\n",
                 100 * run.confidence);
    else
      fmt::print(out, "design spread (one-sided {:g}% upper bound on sigma, exact): sigma {:.4g} {}\n\n",
                 100 * run.confidence, L(c.sigma_upper), u);
  }
  fmt::print(out, "The fit assumes independent impacts from one bivariate normal (or the mixture or t offered);\n"
                  "intervals describe sampling uncertainty only, not changes in the throwers or the wind.\n");
}

void write_fit_json(std::ostream& out, const FitRun& run) {
  nlohmann::json j = {{"strewn_version", STREWN_VERSION_STRING}, {"data", run.data_file},
                      {"confidence", run.confidence}, {"units", {{"length", run.lengths.symbol()}}}};
  // Lengths in the data's unit (units.length), covariances in its square; ratios and tests as they are.
  const Lengths& L = run.lengths;
  const auto iv = [](const Interval& i) { return nlohmann::json::array({i.low, i.high}); };
  const auto liv = [&](const Interval& i) { return nlohmann::json::array({L(i.low), L(i.high)}); };
  const auto pt = [&](const Vec2& p) { return nlohmann::json::array({L(p).x(), L(p).y()}); };
  const auto mat = [&](const Mat2& m0) {
    const Mat2 m = covariance_in(L, m0);
    return nlohmann::json::array({{m(0, 0), m(0, 1)}, {m(1, 0), m(1, 1)}});
  };
  for (const GroupFit& g : run.groups) {
    const NormalFit& f = g.normal;
    nlohmann::json gj = {{"group", g.name}, {"n", f.n}, {"aim", pt(f.aim)},
                         {"mean", pt(f.mean)}, {"bias", pt(f.mean - f.aim)},
                         {"hotelling_t2", f.t2}, {"no_bias_p_value", f.no_bias_p_value},
                         {"covariance", mat(f.covariance)},
                         {"sigma_major", L(f.axes.sigma_major)}, {"sigma_major_ci", liv(f.sigma_major_ci)},
                         {"sigma_minor", L(f.axes.sigma_minor)}, {"sigma_minor_ci", liv(f.sigma_minor_ci)},
                         {"angle_deg", f.axes.angle_deg}, {"sigma", L(f.sigma)}, {"sigma_ci", liv(f.sigma_ci)},
                         {"sigma_dof", f.sigma_dof}, {"sigma_upper_one_sided", L(f.sigma_upper)},
                         {"mean_region", {{"semi_axes", {L(f.mean_region_axes.sigma_major), L(f.mean_region_axes.sigma_minor)}},
                                          {"angle_deg", f.mean_region_axes.angle_deg},
                                          {"confidence", run.confidence}}},
                         {"cep", L(f.cep)}, {"cep_ci", liv(f.cep_ci)}, {"r95", L(f.r95)}, {"r95_ci", liv(f.r95_ci)},
                         {"ks_statistic", f.ks_statistic}, {"ks_p_value", f.ks_p_value},
                         {"anderson_darling_major", f.ad_major}, {"anderson_darling_minor", f.ad_minor},
                         {"axes_p_value", f.axes_p_value}, {"normal_rejected", f.normal_rejected()},
                         {"design_factor", f.design_factor}, {"mahalanobis2", f.mahalanobis2}};
    nlohmann::json rows = nlohmann::json::array();
    for (std::size_t i : f.outliers) rows.push_back(g.group ? g.group->rows[i] : i + 1);
    gj["outlier_rows"] = rows;
    gj["outlier_d2_cutoff"] = std::isfinite(f.outlier_d2) ? nlohmann::json(f.outlier_d2) : nlohmann::json(nullptr);
    gj["mixture"] = {{"preferred", g.mixture.preferred}, {"wide_weight", g.mixture.wide_weight},
                     {"bic", g.mixture.bic}, {"single_bic", g.mixture.single_bic}};
    if (g.student_t) {
      const StudentTFit& t = *g.student_t;
      // An interval reaching the range's cap is "nu >= low": its upper end is written as null.
      const nlohmann::json nu_ci = t.nu_ci_open_above ? nlohmann::json::array({t.nu_ci.low, nullptr}) : iv(t.nu_ci);
      gj["student_t"] = {{"nu", t.nu}, {"nu_ci", nu_ci}, {"nu_ci_open_above", t.nu_ci_open_above},
                         {"nu_at", t.nu_at == NuAt::interior ? "interior" : t.nu_at == NuAt::lower_end ? "lower_end" : "upper_end"},
                         {"nu_range", {t.nu_min, t.nu_max}}, {"location", pt(t.mean)},
                         {"scale", mat(t.scale)},
                         {"sigma_major", L(t.axes.sigma_major)}, {"sigma_major_ci", liv(t.sigma_major_ci)},
                         {"sigma_minor", L(t.axes.sigma_minor)}, {"sigma_minor_ci", liv(t.sigma_minor_ci)},
                         {"angle_deg", t.axes.angle_deg}, {"sigma", L(t.sigma)}, {"sigma_ci", liv(t.sigma_ci)},
                         {"cep", L(t.cep)}, {"cep_ci", liv(t.cep_ci)}, {"r95", L(t.r95)}, {"r95_ci", liv(t.r95_ci)},
                         {"log_likelihood", t.log_likelihood}, {"bootstrap_replicates", t.draws.size()},
                         {"interval_method", kStudentTIntervalMethod}};
      // Each scale figure's interval is {psi : 2 (l_max - l_p(psi)) <= cut-off}; with them a
      // script can check the ends against its own optimiser.
      if (!t.draws.empty())
        gj["student_t"]["profile_lr_cutoffs"] = {{"sigma", t.figure_lr_cutoff[0]}, {"sigma_major", t.figure_lr_cutoff[1]},
                                                 {"sigma_minor", t.figure_lr_cutoff[2]}, {"cep", t.figure_lr_cutoff[3]},
                                                 {"r95", t.figure_lr_cutoff[4]}};
    } else {
      gj["student_t"] = nullptr;
      gj["student_t_skipped"] = g.student_t_skipped;
    }
    if (g.comparison) {
      nlohmann::json models = nlohmann::json::array();
      for (const FitCandidate& m : g.comparison->candidates)
        models.push_back({{"model", model_key(m.model)}, {"offered", m.offered}, {"log_likelihood", m.log_likelihood},
                          {"parameters", m.parameters}, {"aic", m.aic}, {"bic", m.bic}});
      gj["comparison"] = {{"models", models},
                          {"by_aic", model_key(g.comparison->candidates[g.comparison->by_aic].model)},
                          {"by_bic", model_key(g.comparison->candidates[g.comparison->by_bic].model)},
                          {"recommended", model_key(g.comparison->candidates[g.comparison->recommended].model)},
                          {"recommended_by", "BIC"}};
    }
    gj["written"] = model_key(g.written(run.mixture, run.student_t));
    j["groups"].push_back(gj);
  }
  if (run.counts) {
    const CountFit& c = *run.counts;
    j["counts"] = {{"k", c.k}, {"n", c.n}, {"radius", L(c.radius)}, {"fraction", c.fraction},
                   {"fraction_ci", iv(c.fraction_ci)}, {"sigma_ci", liv(c.sigma_ci)},
                   {"sigma_upper_one_sided", L(c.sigma_upper)}};
    if (c.k == c.n) {  // no point estimate (the interval starts at 0): the bound is what is written
      j["counts"]["sigma"] = nullptr;
      j["counts"]["written_sigma"] = L(c.sigma_upper);
      j["counts"]["written_as"] = "one-sided upper bound";
    } else {
      j["counts"]["sigma"] = L(c.sigma);
    }
  }
  if (run.censored) {
    const CensoredFit& c = *run.censored;
    j["censored"] = {{"measured", c.measured}, {"outside", c.outside}, {"radius", L(c.radius)}, {"sigma", L(c.sigma)},
                     {"sigma_ci", liv(c.sigma_ci)}, {"sigma_ci_method", CensoredFit::method},
                     {"sigma_upper_one_sided", L(c.sigma_upper)},
                     {"likelihood_ratio_ci", liv(c.lr_ci)}};
  }
  out << j.dump(2) << "\n";
}

std::string fit_toml(const FitRun& run) {
  // Written in the data's unit: points and lengths divided by metres per unit, covariances by its
  // square, so that a scenario with the same [site] units reads back the metres fitted.
  const Lengths& L = run.lengths;
  const auto P = [&](const Vec2& p) { return toml_point(L(p)); };
  const auto M = [&](const Mat2& m) { return toml_matrix(covariance_in(L, m)); };
  std::string t = fmt::format("# Written by strewn {} fit from {} at {:g}% confidence.\n"
                              "# units = \"{}\": every length below is in {}; the scenario that takes these blocks\n"
                              "# must say [site] units = \"{}\"{}.\n"
                              "# These [[source]] blocks have no zones: copy them into a scenario file with your\n"
                              "# [[zone]] tables (docs/scenario-format.md), set events_per_session and\n"
                              "# sessions_per_year, then run strewn assess on that file.\n",
                              STREWN_VERSION_STRING, run.data_file, 100 * run.confidence, L.symbol(),
                              L.unit == LengthUnit::foot ? "feet" : "metres", L.symbol(),
                              L.unit == LengthUnit::foot ? "" : " (or leave units out: metres are the default)");
  for (const GroupFit& g : run.groups) {
    const NormalFit& f = g.normal;
    const FitCandidate::Model written = g.written(run.mixture, run.student_t);
    const bool mix = written == FitCandidate::Model::mixture;
    t += fmt::format("\n[[source]]\nname = {}\naim = {}\n", toml_text(g.name), P(f.aim));
    if (f.normal_rejected()) t += "# CAUTION: " + normal_verdict(f) + "\n";
    if (written == FitCandidate::Model::student_t) {
      const StudentTFit& st = *g.student_t;
      t += fmt::format("mean = {}\nspread = {{ covariance = {}, family = \"student_t\", nu = {:.6g} }}  # Student-t fit: "
                       "scale matrix, nu by profile likelihood (BIC {:.1f} against the normal's {:.1f})\n",
                       P(st.mean), M(st.scale), st.nu, st.bic, g.comparison->candidates[0].bic);
    } else if (mix) {
      t += fmt::format("mean = {}\nspread = {{ covariance = {} }}  # core of the mixture\n", P(g.mixture.core_mean),
                       M(g.mixture.core_covariance));
    } else {
      const Mat2 cov = run.design ? f.covariance * f.design_factor * f.design_factor : f.covariance;
      const bool t_passed = run.student_t && g.student_t;  // asked for, and BIC kept the normal
      t += fmt::format("mean = {}\nspread = {{ covariance = {} }}  # {}{}\n", P(f.mean), M(cov),
                       run.design ? fmt::format("design spread: fitted x {:.6g} (one-sided {:g}% upper bound on sigma)",
                                                f.design_factor, 100 * run.confidence)
                                  : "as fitted",
                       t_passed ? "; BIC prefers the normal to the Student-t" : "");
    }
    t += fmt::format("events_per_session = 1\nsessions_per_year = 1\n"
                     "fit = {{ kind = \"impacts\", n = {}, mean = {}, covariance = {}, confidence = {:g} }}\n",
                     f.n, P(f.mean), M(f.covariance), run.confidence);
    if (mix)
      t += fmt::format("\n  [[source.component]]\n  label = \"wide\"\n  weight = {:.17g}\n  bias = {}\n  spread = {{ covariance = {} }}\n",
                       g.mixture.wide_weight, P(g.mixture.wide_mean - f.aim), M(g.mixture.wide_covariance));
  }
  const std::string bound = fmt::format("design spread (one-sided {:g}% upper bound on sigma)", 100 * run.confidence);
  const auto circular = [&](const char* name, double sigma, double design, const std::string& fit,
                            const std::string& why = "") {
    const bool use_bound = run.design || !why.empty();
    if (use_bound && !std::isfinite(design))
      throw input_error(fmt::format("--conservative-spread: the data put no upper bound on sigma at {:g}% (one measured impact); "
                                    "measure more impacts, or write the fitted sigma without --conservative-spread",
                                    100 * run.confidence));
    t += fmt::format("\n[[source]]\nname = {}\naim = {}\nspread = {{ sigma = {:.17g} }}  # {}\n"
                     "events_per_session = 1\nsessions_per_year = 1\nfit = {}\n",
                     toml_text(name), P(run.aim), L(use_bound ? design : sigma),
                     why.empty() ? (run.design ? bound : std::string("as fitted")) : why, fit);
  };
  if (run.counts)
    circular("fitted from counts", run.counts->sigma, run.counts->sigma_upper,
             fmt::format("{{ kind = \"counts\", k = {}, n = {}, radius = {:.17g}, confidence = {:g} }}", run.counts->k,
                         run.counts->n, L(run.counts->radius), run.confidence),
             run.counts->k == run.counts->n
                 ? fmt::format("one-sided {:g}% upper bound on sigma: all {} impacts were inside, no point estimate",
                               100 * run.confidence, run.counts->n)
                 : "");
  if (run.censored)
    circular("fitted from censored data", run.censored->sigma, run.censored->sigma_upper,
             fmt::format("{{ kind = \"censored\", measured = {}, outside = {}, radius = {:.17g}, confidence = {:g} }}",
                         run.censored->measured, run.censored->outside, L(run.censored->radius), run.confidence));
  return t;
}

std::string qq_plot_svg(const FitRun& run) {
  // Sorted d^2 against the chi^2_2 quantiles -2 ln(1 - (i - 0.5) / n); points on the diagonal
  // mean the normal model fits; points above it at the right end mean heavier tails.
  const double size = 360, m = 50;
  const int panels = static_cast<int>(run.groups.size());
  std::string out = fmt::format(
      "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{0:.0f}\" "
      "height=\"{1:.0f}\" viewBox=\"0 0 {0:.0f} {1:.0f}\" font-family=\"sans-serif\" font-size=\"11\">\n"
      "<title>Q-Q plot of squared Mahalanobis distances</title>\n<rect width=\"100%\" height=\"100%\" fill=\"white\"/>\n",
      panels * (size + 2 * m), size + 2 * m + 62);  // 62: the legend below the panels
  for (int k = 0; k < panels; ++k) {
    const GroupFit& g = run.groups[k];
    // Sorted with their impacts, so that the flagged ones (by successive deletion, not a
    // cut-off on these d^2) are marked.
    std::vector<std::size_t> order(g.normal.mahalanobis2.size());
    for (std::size_t i = 0; i < order.size(); ++i) order[i] = i;
    std::sort(order.begin(), order.end(),
              [&](std::size_t a, std::size_t b) { return g.normal.mahalanobis2[a] < g.normal.mahalanobis2[b]; });
    std::vector<double> d2;
    for (std::size_t i : order) d2.push_back(g.normal.mahalanobis2[i]);
    const double n = static_cast<double>(d2.size());
    const double top = std::max(d2.back(), -2.0 * std::log(0.5 / n)) * 1.05;
    const double x0 = k * (size + 2 * m) + m, y0 = m + size;
    const auto X = [&](double v) { return x0 + v / top * size; };
    const auto Y = [&](double v) { return y0 - v / top * size; };
    out += fmt::format("<g id=\"panel-{}\">\n<rect x=\"{:.1f}\" y=\"{:.1f}\" width=\"{:.0f}\" height=\"{:.0f}\" fill=\"none\" stroke=\"{}\"/>\n",
                       k + 1, x0, m, size, size, palette::frame());
    out += fmt::format("<path d=\"M{:.1f},{:.1f} L{:.1f},{:.1f}\" stroke=\"{}\" stroke-dasharray=\"4 3\"/>\n", X(0), Y(0), X(top), Y(top),
                       palette::grey());
    for (std::size_t i = 0; i < d2.size(); ++i) {
      const double q = -2.0 * std::log1p(-(i + 0.5) / n);
      const bool outlier = std::find(g.normal.outliers.begin(), g.normal.outliers.end(), order[i]) != g.normal.outliers.end();
      out += fmt::format("<circle cx=\"{:.1f}\" cy=\"{:.1f}\" r=\"{}\" fill=\"{}\"/>\n", X(q), Y(d2[i]), outlier ? 4 : 2.5,
                         outlier ? palette::alarm() : palette::ramp(0.85));  // colours: docs/pictures.md
    }
    out += fmt::format("<text x=\"{:.1f}\" y=\"{:.1f}\">{} ({} impacts)</text>\n", x0, m - 10,
                       g.name.empty() ? std::string("impacts") : g.name, g.normal.n);
    out += fmt::format("<text x=\"{:.1f}\" y=\"{:.1f}\">chi-square (2 d.o.f.) quantile</text>\n", x0 + size / 3, y0 + 30);
    // The axis title sits left of the tick labels, which end just short of the axis.
    out += fmt::format("<text x=\"{0:.1f}\" y=\"{1:.1f}\" text-anchor=\"middle\" transform=\"rotate(-90 {0:.1f} {1:.1f})\">"
                       "squared Mahalanobis distance</text>\n",
                       x0 - 34, y0 - size / 2);
    // Ticks at round values (1, 2 or 5 times a power of ten), three to six of them, not at
    // quarters of the axis (which gave 3.5, 7.1, 11).
    const double tick = SvgCanvas::round_step(top, 5);
    for (double v = 0.0; v <= top * (1 + 1e-12); v += tick) {
      out += fmt::format("<text x=\"{:.1f}\" y=\"{:.1f}\" font-size=\"9\" text-anchor=\"middle\">{:g}</text>\n", X(v),
                         y0 + 14, v);
      out += fmt::format("<text x=\"{:.1f}\" y=\"{:.1f}\" font-size=\"9\" text-anchor=\"end\">{:g}</text>\n", x0 - 4,
                         Y(v) + 3, v);
    }
    out += "</g>\n";
  }
  // The legend: what the marks mean, in the palette's colours (docs/pictures.md).
  const double ly = size + 2 * m + 6;
  out += fmt::format("<g id=\"legend\" font-size=\"10.5\">\n"
                     "<circle cx=\"{0:.1f}\" cy=\"{1:.1f}\" r=\"2.5\" fill=\"{2}\"/><text x=\"{3:.1f}\" y=\"{4:.1f}\">an impact: its "
                     "squared distance against the expected quantile</text>\n"
                     "<circle cx=\"{0:.1f}\" cy=\"{5:.1f}\" r=\"4\" fill=\"{6}\"/><text x=\"{3:.1f}\" y=\"{7:.1f}\">an outlier by "
                     "the fit's rule (1% over the whole data set)</text>\n"
                     "<path d=\"M{8:.1f},{9:.1f} h22\" stroke=\"{10}\" stroke-dasharray=\"4 3\"/><text x=\"{3:.1f}\" y=\"{11:.1f}\">"
                     "where the points lie when one normal spread fits</text>\n</g>\n",
                     // from x = 20, so that one panel's 460 px hold the longest line (61 characters at 10.5 px)
                     31.0, ly, palette::ramp(0.85), 50.0, ly + 4, ly + 16, palette::alarm(), ly + 20, 20.0, ly + 32,
                     palette::grey(), ly + 36);
  out += "</svg>\n";
  return out;
}

}  // namespace strewn::cli
