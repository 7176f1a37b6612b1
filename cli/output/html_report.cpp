#include "output/drop_output.hpp"
#include "output/lengths.hpp"
#include "output/html_report.hpp"

#include "strewn/crs.hpp"

#include <algorithm>
#include <cmath>
#include <fmt/format.h>
#include <fmt/ostream.h>
#include <ostream>

#include "output/assess_output.hpp"
#include "output/map_output.hpp"
#include "output/plan_features.hpp"
#include "output/thrower_output.hpp"
#include "output/svg_canvas.hpp"
#include "strewn/site_map.hpp"
#include "strewn/version.hpp"

namespace strewn::cli {
namespace {

std::string esc(const std::string& s) { return SvgCanvas::escape(s); }
std::string prob(double p) { return p == 0.0 ? "0" : fmt::format("{:.3g}", p); }

const char* const kStyle = R"css(
  body { font-family: "DejaVu Sans", Arial, sans-serif; font-size: 10.5pt; color: #111; max-width: 190mm; margin: 12mm auto; }
  h1 { font-size: 17pt; margin-bottom: 2mm; } h2 { font-size: 13pt; margin-top: 7mm; border-bottom: 1px solid #999; }
  table { border-collapse: collapse; width: 100%; margin: 2mm 0; page-break-inside: avoid; }
  th, td { border: 1px solid #bbb; padding: 1.2mm 2mm; text-align: left; vertical-align: top; }
  td.num { text-align: right; font-variant-numeric: tabular-nums; }
  .exceeded { font-weight: bold; text-decoration: underline; } .holds { }
  figure { margin: 0; page-break-inside: avoid; } figure svg { width: 100%; height: auto; }
  @media screen { figure svg { width: auto; max-width: 96vw; } }
  .caution { border: 2px solid #111; padding: 3mm; margin-top: 5mm; }
  @page { size: A4; margin: 12mm; } @media print { body { margin: 0; max-width: none; } }
)css";

// A self-check for automated viewers: after layout, the page records in data-check whether the
// map and the tables have a visible size. It reads nothing from outside the page.
const char* const kSelfCheck = R"js(
  window.addEventListener('load', function () {
    function visible(e) { var r = e.getBoundingClientRect(); return r.width > 50 && r.height > 20 &&
      getComputedStyle(e).visibility !== 'hidden' && getComputedStyle(e).display !== 'none'; }
    var map = document.querySelector('#map svg');
    var tables = Array.prototype.filter.call(document.querySelectorAll('table'), visible).length;
    document.body.setAttribute('data-check', 'map:' + (map && visible(map) ? 'visible' : 'missing') + ';tables:' + tables);
  });
)js";

void scenario_tables(std::ostream& h, const Site& s) {
  fmt::print(h, "<h2>Scenario</h2>\n<p>Site: <b>{}</b>. {}</p>\n", esc(s.site_name), esc(s.notes));
  const Lengths L(s);
  const char* u = L.symbol();
  fmt::print(h, "<table id=\"sources\"><tr><th>source</th><th>aim ({0})</th><th>component</th><th>weight</th>"
                "<th>mean impact point ({0})</th><th>sigma major / minor ({0})</th><th>angle (deg)</th>"
                "<th>events per session</th><th>sessions per year</th></tr>\n", u);
  for (const Source& src : s.sources) {
    const auto& parts = src.model.components();
    for (std::size_t k = 0; k < parts.size(); ++k) {
      const SpreadAxes a = parts[k].gaussian.axes();
      const Vec2 m = parts[k].gaussian.mean();
      fmt::print(h, "<tr><td>{}</td><td>{}</td><td>{}</td><td class=\"num\">{:.3g}</td><td>{}</td>"
                    "<td class=\"num\">{:.3g} / {:.3g}</td><td class=\"num\">{:.0f}</td><td class=\"num\">{}</td><td class=\"num\">{}</td></tr>\n",
                 k == 0 ? esc(src.name) : "", k == 0 ? L.point(src.aim) : "",
                 esc((k < src.component_labels.size() ? src.component_labels[k] : k == 0 ? "core" : "component " + std::to_string(k + 1)) +
                     (parts[k].gaussian.family().is_normal() ? "" : ", " + parts[k].gaussian.family().describe())),
                 parts[k].weight, L.point(m), L(a.sigma_major), L(a.sigma_minor), a.angle_deg,
                 k == 0 ? fmt::format("{:g}", src.events_per_session) : "", k == 0 ? fmt::format("{:g}", src.sessions_per_year) : "");
    }
  }
  fmt::print(h, "</table>\n");
  // A spread derived from physics: the spread it became and how it was checked.
  for (const Source& src : s.sources)
    if (src.drop) fmt::print(h, "<p class=\"drop\">{}</p>\n", esc(drop_summary(src, L)));
  fmt::print(h, "<table id=\"zones\"><tr><th>zone</th><th>role</th><th>geometry</th><th>area ({}&sup2;)</th><th>limit</th></tr>\n", u);
  for (const Zone& z : s.zones)
    fmt::print(h, "<tr><td>{}</td><td>{}</td><td>{}</td><td class=\"num\">{:.3g}</td><td>{}</td></tr>\n", esc(z.name),
               to_string(z.role), esc(z.shape), L(L(area(z.region))),
               z.limit ? fmt::format("{} per {}", prob(*z.limit), to_string(z.limit_per)) : "-");
  fmt::print(h, "</table>\n");
}

void assessment_table(std::ostream& h, const Assessment& a, const Uncertainty* u) {
  fmt::print(h, "<h2>Assessment</h2>\n<table id=\"assessment\"><tr><th>zone</th><th>source</th><th>p per event</th>"
                "<th>error bound</th><th>p per session</th><th>p per year</th><th>limit</th><th>verdict</th></tr>\n");
  for (std::size_t zi = 0; zi < a.zones.size(); ++zi) {
    const ZoneResult& z = a.zones[zi];
    for (const SourceResult& r : z.sources)
      fmt::print(h, "<tr><td>{}</td><td>{}</td><td class=\"num\">{}</td><td class=\"num\">{:.1g}</td><td class=\"num\">{}</td>"
                    "<td class=\"num\">{}</td><td></td><td></td></tr>\n",
                 esc(z.zone->name), esc(r.source), prob(r.event.p), r.event.abs_err, prob(r.per_session), prob(r.per_year));
    std::string verdict = "-", limit = "-";
    if (z.limit_holds) {
      verdict = z.limit_undecided ? "<span class=\"exceeded\">not shown to hold (its error bound reaches past the limit)</span>"
                : *z.limit_holds    ? "holds"
                                    : "<span class=\"exceeded\">EXCEEDED</span>";
      limit = fmt::format("{} per {} (is {})", prob(*z.zone->limit), to_string(z.zone->limit_per), prob(z.limited_value));
    }
    std::string interval;
    if (u) {
      const ZoneUncertainty& zu = u->zones[zi];
      interval = fmt::format("<br><small>{:g}% from the fit: {} to {}</small>", 100 * u->confidence, prob(zu.p_session.low),
                             prob(zu.p_session.high));
      // "holds" on the fitted spread, while the fit's one-sided upper bound breaks the limit.
      if (z.limit_holds && *z.limit_holds && zu.limited_upper > *z.zone->limit)
        verdict += fmt::format("<br><span class=\"exceeded\">but the fit's {:g}% upper bound {} is above the limit: "
                               "the data do not show that it holds</span>",
                               100 * u->confidence, prob(zu.limited_upper));
      else if (z.limit_holds && *z.limit_holds && zu.limited_upper_at_least)
        verdict += fmt::format("<br><span class=\"exceeded\">but the fit's {:g}% upper bound lies beyond the {} "
                               "replicates (at least {}): the data do not show that it holds</span>",
                               100 * u->confidence, u->replicates, prob(zu.limited_upper));
    }
    fmt::print(h, "<tr><td>{}</td><td><i>all sources</i></td><td></td><td class=\"num\">{:.1g}</td><td class=\"num\">{}{}</td>"
                  "<td class=\"num\">{}</td><td>{}</td><td>{}</td></tr>\n",
               esc(z.zone->name), z.total_abs_err_per_event, prob(z.total_per_session), interval, prob(z.total_per_year), limit, verdict);
  }
  fmt::print(h, "</table>\n<p>{}</p>\n", a.all_limits_hold ? "Every limit holds." : "<b>At least one limit is exceeded.</b>");
  // Individual risk: for zones where people are present part of the time (occupancy).
  bool any = false;
  for (const ZoneResult& z : a.zones) any = any || z.individual_risk_per_year.has_value();
  if (!any) return;
  fmt::print(h, "<h3>Individual risk</h3>\n<p>For a person in a zone for the stated share of the events: the chance per year "
                "that they are hit, -expm1(f &sum; N log1p(-p)).</p>\n<table id=\"individual-risk\"><tr><th>zone</th>"
                "<th>occupancy</th><th>individual risk per year</th></tr>\n");
  for (const ZoneResult& z : a.zones)
    if (z.individual_risk_per_year)
      fmt::print(h, "<tr><td>{}</td><td class=\"num\">{:g}</td><td class=\"num\">{}</td></tr>\n", esc(z.zone->name),
                 z.zone->occupancy.value_or(0.0), prob(*z.individual_risk_per_year));
  fmt::print(h, "</table>\n");
}

// The spread each thrower became, and the share of events each barrier stops (strewn/thrower.hpp,
// strewn/barrier.hpp), with the assumptions they rest on.
void throwers_and_barriers(std::ostream& h, const Site& s, const Assessment& a) {
  const auto throwers = thrower_sentences(s);
  const auto barriers = barrier_sentences(s, a);
  if (throwers.empty() && barriers.empty()) return;
  fmt::print(h, "<h2>Throwers and barriers</h2>\n");
  if (!throwers.empty()) {
    fmt::print(h, "<p>Each thrower's dispersion, as the spread it became at its distance D (sigma_across = D tan angle, "
                  "sigma_along = D times the range share, or the range spread given):</p>\n<ul id=\"throwers\">\n");
    for (const std::string& t : throwers) fmt::print(h, "<li>{}</li>\n", esc(t));
    fmt::print(h, "</ul>\n");
  }
  if (!barriers.empty()) {
    fmt::print(h, "<p>Barriers stop impacts whose straight ground path from the source's position crosses them, each "
                  "with its stated catch (the user's assumption); the probabilities above are past them. Each row is "
                  "the share of the source's events whose path crosses the barrier, times its catch, counted as if "
                  "it stood alone. Assumed: flat ground, no bounce or roll after impact, straight ground paths; "
                  "a barrier with a height stops only flights whose straight line from the release height passes "
                  "below its top, and objects lobbed over it are not modelled.</p>\n<ul id=\"barriers\">\n");
    for (const std::string& b : barriers) fmt::print(h, "<li>{}</li>\n", esc(b));
    fmt::print(h, "</ul>\n");
  }
}

void fit_section(std::ostream& h, const Site& s, const Uncertainty* u) {
  if (!u) return;
  fmt::print(h, "<h2>Fitted sources</h2>\n<table id=\"fits\"><tr><th>source</th><th>fitted from</th><th>summary</th></tr>\n");
  for (const Source& src : s.sources) {
    if (!src.fit) continue;
    const FitRecord& f = *src.fit;
    const Lengths L(s);
    const char* u = L.symbol();
    std::string what, summary;
    switch (f.kind) {
      case FitRecord::Kind::impacts:
        what = fmt::format("{} measured impacts", f.n);
        // The impacts' own moments, and what the scenario uses: a mixture's or a t's moments
        // are not the spread it integrates (a reader took them for it).
        summary = fmt::format("the impacts' mean {} {}, covariance [[{:.3g}, {:.3g}], [{:.3g}, {:.3g}]] {}&sup2;; used as ",
                              L.point(f.mean), u, L(L(f.covariance(0, 0))), L(L(f.covariance(0, 1))),
                              L(L(f.covariance(1, 0))), L(L(f.covariance(1, 1))), u);
        if (fitted_as_student_t(src)) {
          summary += fmt::format("a Student-t spread with {:.3g} degrees of freedom", src.model.components().front().gaussian.family().nu());
        } else if (fitted_as_mixture(src)) {
          const auto& parts = src.model.components();
          summary += fmt::format("a core and a wide component of weight {:.3g} (sigma {:.3g} {})", parts.back().weight,
                                 L(std::sqrt(parts.back().gaussian.axes().sigma_major * parts.back().gaussian.axes().sigma_minor)), u);
        } else {
          summary += "one normal spread";
        }
        break;
      case FitRecord::Kind::counts:
        what = "counts";
        summary = fmt::format("{} of {} within {:.3g} {} of the aim", f.k, f.n, L(f.radius), u);
        break;
      case FitRecord::Kind::censored:
        what = "censored data";
        summary = fmt::format("{} measured, {} beyond {:.3g} {}", f.measured, f.outside, L(f.radius), u);
        break;
    }
    fmt::print(h, "<tr><td>{}</td><td>{}</td><td>{}</td></tr>\n", esc(src.name), what, summary);
  }
  fmt::print(h, "</table>\n<p>The intervals in the assessment come from seeded draws of these fits' parameters "
                "({}): they describe the sampling uncertainty of the data, not changes in the sources.</p>\n",
             esc(u->method));
}

// What the picture draws for each drop (output/plan_features.hpp, as every map output draws it):
// its flight track, its release point dotted to the nominal landing; said in words, so that a
// reader who cannot find the marks (a release off the mapped area) knows where they are.
std::string drops_caption(const Site& s, const SiteMap& map) {
  const GridSpec& g = map.map.grid;
  const Vec2 half(g.spacing / 2, g.spacing / 2);
  const Vec2 low = g.origin - half, high = g.centre(g.columns - 1, g.rows - 1) + half;
  const Lengths L(s);
  std::string out;
  for (const DropFeature& d : plan_drops(s)) {
    const auto src = std::find_if(s.sources.begin(), s.sources.end(), [&](const Source& x) { return x.name == d.source; });
    if (src == s.sources.end() || !src->drop) continue;
    const DropParameters& p = src->drop->parameters;
    const bool on_map = (d.release.array() >= low.array()).all() && (d.release.array() <= high.array()).all();
    out += fmt::format(" For {}: the dashed line is the flight track (bearing {:g} deg at {:.3g} {}/s, from one fall time "
                       "before release to one after); {} at {:.3g} {} over {} {}{}, dotted to the nominal "
                       "landing at {} {} after {:.3g} s.",
                       esc(d.source), p.heading_deg, L(p.ground_speed), L.symbol(),
                       on_map ? "the red circle marks the release" : "the release", L(p.height), L.symbol(), L.point(d.release),
                       L.symbol(), on_map ? "" : " (off the mapped area)", L.point(d.landing), L.symbol(), src->drop->spread.nominal.time);
  }
  return out;
}

}  // namespace

std::string html_report(const Site& s, const Assessment& a, const SiteMap& map, const Uncertainty* u) {
  std::ostringstream h;
  fmt::print(h, "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">\n<title>strewn report: {}</title>\n"
                "<style>{}</style>\n<script>{}</script>\n</head><body>\n",
             esc(s.site_name), kStyle, kSelfCheck);
  // The frame the coordinates are in: a report of a site on a national grid said nothing of it.
  std::string frame = "site coordinates in " + std::string(symbol(s.units)) + ", tied to no geographic frame";
  if (!s.crs.empty()) {
    frame = "coordinates in " + s.crs;
    try {
      frame += " (" + crs_name(s.crs) + ")";
    } catch (const input_error&) {
    }
  } else if (s.origin) {
    frame = fmt::format("site coordinates in metres about the origin {:.6f}, {:.6f} (longitude, latitude)", s.origin->lon_deg,
                        s.origin->lat_deg);
  }
  fmt::print(h, "<h1>Impact risk assessment: {}</h1>\n<p><small>strewn {}; scenario {}; <span id=\"frame\">{}</span></small></p>\n",
             esc(s.site_name), STREWN_VERSION_STRING, esc(s.file), esc(frame));
  fmt::print(h, "<p>This report estimates how likely scattered impacts (thrown objects, spray, dropped loads) are to "
                "land in each zone of the site: per event, per session and per year, each with an error bound, "
                "and whether each zone's limit holds. The scatter of every source is a statistical model; "
                "the numbers are estimates from it.</p>\n");
  scenario_tables(h, s);
  assessment_table(h, a, u);
  throwers_and_barriers(h, s, a);
  fmt::print(h, "<h2>Risk map</h2>\n<figure id=\"map\">\n");
  const std::string svg = risk_map_svg(s, map, &a);
  h << svg.substr(svg.find("<svg"));  // inline: the page needs no other file
  double accuracy = 0.0;
  for (const auto& c : map.contours) accuracy = std::max(accuracy, c.set.log10_error);
  std::string unsafe;
  const Lengths L(s);
  for (const UnsafeArea& ua : map.unsafe_areas) {
    std::string names;
    for (const std::string& n : ua.zones) names += (names.empty() ? "" : ", ") + n;
    unsafe += fmt::format(" At or above the limit of {} ({} per {}): {}.", esc(names), prob(ua.level), esc(to_string(map.per)),
                          ua.area.empty() ? std::string("nowhere on the map")
                                          : fmt::format("{:.3g} {}&sup2;, filled", L(L(ua.square_metres)), L.symbol()));
  }
  fmt::print(h, "<figcaption>Where it is unsafe to stand: the chance per {} that {} lands on {} standing at each point. "
                "Filled areas are where that chance reaches a keep-out limit; zones are coloured by their verdict; lines "
                "mark the limits and whole decades, and {}.{}{}"
                "</figcaption>\n</figure>\n",
             esc(to_string(map.per)), map.per == Period::event ? "an impact from the riskiest single source" : "at least one impact from any source",
             esc(footprint_words(map)),
             accuracy <= 2.0 ? fmt::format("along a line the chance is within a factor {:.3f} of its level", std::pow(10.0, accuracy))
                             : std::string("the chance jumps between cells (e.g. at a barrier's shadow edge), so a line may be far from its level there"),
             unsafe, drops_caption(s, map));
  fit_section(h, s, u);
  // Components of other families (Student t, uniform) are named in the scenario table; the
  // methods and assumptions say so only when there are some, so that normal reports stay as they were.
  bool other_family = false;
  for (const Source& src : s.sources)
    for (const WeightedGaussian& c : src.model.components()) other_family = other_family || !c.gaussian.family().is_normal();
  const std::string model_words = other_family ? "elliptical mixtures (bivariate normal unless the scenario table names "
                                                 "another family)"
                                               : "bivariate normal mixtures";
  fmt::print(h, "<h2>Methods and accuracy</h2>\n<p>Each probability is an integral of the sources' {} "
                "over the zone, computed by the <b>{}</b> method. {} "
                "The exact method uses the boundary form with Owen's T function for straight edges and adaptive "
                "Gauss-Kronrod quadrature for arcs, and reports an error bound that covers quadrature and rounding. "
                "Probabilities per session and per year are 1 - (1 - p)<sup>N</sup>, computed without cancellation. "
                "Map cells are computed the same way, one integration per source and cell.{}</p>\n",
             model_words, to_string(s.options.method), esc(accuracy_sentence(accuracy_reached(s, a))),
             other_family ? " Components of the Student t and uniform families are integrated with their own radial "
                            "distribution G(r), every edge of the boundary form by adaptive Gauss-Kronrod quadrature."
                          : "");
  fmt::print(h, "<h2>Assumptions</h2>\n<ul><li>Impacts from each source scatter as the stated {} "
                "mixture around the aim plus bias; wild components describe rare wide events.</li>"
                "<li>Events are independent of each other; sources are independent of each other.</li>"
                "<li>A zone is hit when the impact point lands inside it; the size of the object is not added "
                "unless the zone was drawn larger for it.</li>"
                "<li>Events per session and sessions per year are as entered.</li></ul>\n",
             other_family ? "elliptical (normal, Student t or uniform, per component)" : "bivariate normal");
  // kCaution opens with its own "Caution:" heading word.
  fmt::print(h, "<div class=\"caution\" id=\"caution\">{}</div>\n</body></html>\n", esc(kCaution));
  return h.str();
}

}  // namespace strewn::cli
