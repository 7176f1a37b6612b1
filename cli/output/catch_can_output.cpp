#include "output/catch_can_output.hpp"

#include <algorithm>
#include <cmath>
#include <fmt/format.h>
#include <fmt/ostream.h>
#include <nlohmann/json.hpp>
#include <ostream>

#include "output/assess_output.hpp"
#include "output/deposition_output.hpp"
#include "output/lengths.hpp"
#include "output/palette.hpp"
#include "output/svg_canvas.hpp"
#include "strewn/version.hpp"

namespace strewn::cli {
namespace {

// In the site's depth unit (mm, or inches in a US site).
std::string how(const Site& s) {
  return fmt::format(
      "The model is scaled to the test: run length = the test's duration, cans with the test's\n"
      "opening. difference = model - measured ({}); bias = mean difference, RMS = root mean\n"
      "square difference. CU, DU and SC of the model are taken over the measured cans only.",
      depth_symbol(s.units));
}

// Depths (mm from the engine) and can openings (m) as printed: mm, or inches in a US site.
struct CanUnits {
  explicit CanUnits(const Site& s) : u(s.units), depth(depth_symbol(u)), dp(u == LengthUnit::foot ? 4 : 3) {}
  double operator()(double mm) const { return depth_from_mm(mm, u); }
  double opening(double m) const { return depth_from_mm(1000.0 * m, u); }
  LengthUnit u;
  std::string depth;
  int dp;  // decimals printed: three of a mm, four of an inch
};

std::string duration_text(double hours) {
  return hours < 1.0 ? fmt::format("{:g} min", hours * 60.0) : fmt::format("{:g} h", hours);
}

}  // namespace

void write_catch_can_table(std::ostream& out, const Site& s, const CatchCanComparison& c) {
  const Lengths L(s);
  const CanUnits D(s);
  const CatchGrid& g = *s.deposition->grid;
  fmt::print(out, "strewn {} deposition against measured cans: {}\nscenario: {}\nmeasured: {}\n", STREWN_VERSION_STRING,
             s.site_name, s.file, c.test.file);
  fmt::print(out, "test of {}; cans {:g} {} across; {} of the {} x {} grid's cans measured ({} missing)\n\n",
             duration_text(c.test.duration_h), D.opening(c.opening_diameter_m), D.depth, c.cans.size(), g.columns, g.rows,
             c.missing);
  fmt::print(out, "{:<24} {:>12} {:>12}\n", "", "model", "measured");
  fmt::print(out, "{:<24} {:>9.{}f} {:<2} {:>9.{}f} {}\n", "mean depth", D(c.model_mean_mm), D.dp, D.depth, D(c.measured_mean_mm), D.dp,
             D.depth);
  fmt::print(out, "{:<24} {:>11.1f}% {:>11.1f}%\n", "CU", c.model_cu, c.measured_cu);
  fmt::print(out, "{:<24} {:>11.1f}% {:>11.1f}%\n", "DU (low quarter)", c.model_du, c.measured_du);
  const auto sc = [](const std::optional<SchedulingCoefficient>& x) { return x ? fmt::format("{:.2f}", x->sc) : std::string("none"); };
  fmt::print(out, "{:<24} {:>12} {:>12}\n", fmt::format("SC ({:g}%)", 100 * c.sc_share), sc(c.model_sc), sc(c.measured_sc));
  fmt::print(out, "model: {}\nmeasured: {}\n\n", scheduling_text(c.model_sc, c.sc_share), scheduling_text(c.measured_sc, c.sc_share));
  const int dp = D.dp;
  fmt::print(out, "bias (model - measured) {:+.{}f} {}   RMS {:.{}f} {}   largest |difference| {:.{}f} {}\n\n", D(c.bias_mm), dp,
             D.depth, D(c.rms_mm), dp, D.depth, D(c.largest_mm), dp, D.depth);
  fmt::print(out, "{:>4} {:>4} {:>10} {:>10} {:>16} {:>10} {:>11}\n", "row", "col", L.key("x"), L.key("y"), "model " + D.depth,
             "measured", "difference");
  fmt::print(out, "{}\n", std::string(78, '-'));
  for (const CanDifference& d : c.cans)
    fmt::print(out, "{:>4} {:>4} {:>10.2f} {:>10.2f} {:>9.{}f} +-{:<5.1g} {:>10.{}f} {:>+11.{}f}\n", d.row + 1, d.column + 1,
               L(d.centre.x()), L(d.centre.y()), D(d.model_mm), dp, D(d.model_err_mm), D(d.measured_mm), dp, D(d.difference_mm), dp);
  fmt::print(out, "{}\n{}\n\n{}\n", std::string(78, '-'), how(s), kCaution);
}

void write_catch_can_csv(std::ostream& out, const Site& s, const CatchCanComparison& c) {
  const Lengths L(s);
  const CanUnits D(s);
  fmt::print(out, "row,col,{},{},model_depth_{u},model_depth_err_{u},measured_depth_{u},difference_{u}\n", L.key("x"), L.key("y"),
             fmt::arg("u", D.depth));
  for (const CanDifference& d : c.cans)
    fmt::print(out, "{},{},{:.17g},{:.17g},{:.17g},{:.3g},{:.17g},{:.17g}\n", d.row + 1, d.column + 1, L(d.centre.x()),
               L(d.centre.y()), D(d.model_mm), D(d.model_err_mm), D(d.measured_mm), D(d.difference_mm));
}

void write_catch_can_json(std::ostream& out, const Site& s, const CatchCanComparison& c) {
  const Lengths L(s);
  const CanUnits D(s);
  // Keys carry the depth unit: _mm, or _in in a US site.
  const auto k = [&D](const char* key) { return std::string(key) + "_" + D.depth; };
  nlohmann::json j = {{"strewn_version", STREWN_VERSION_STRING},
                      {"site", s.site_name},
                      {"file", s.file},
                      {"measured_file", c.test.file},
                      {"units", {{"length", symbol(s.units)}, {"depth", D.depth}}},
                      {"duration_h", c.test.duration_h},
                      {k("opening_diameter"), D.opening(c.opening_diameter_m)},
                      {"measured_cans", c.cans.size()},
                      {"missing_cans", c.missing},
                      {k("bias"), D(c.bias_mm)},
                      {k("rms"), D(c.rms_mm)},
                      {k("largest_difference"), D(c.largest_mm)},
                      {"model", {{k("mean_depth"), D(c.model_mean_mm)}, {"cu_percent", c.model_cu}, {"du_low_quarter_percent", c.model_du},
                                 {"scheduling_coefficient", scheduling_json(c.model_sc, c.sc_share)}}},
                      {"measured", {{k("mean_depth"), D(c.measured_mean_mm)}, {"cu_percent", c.measured_cu},
                                    {"du_low_quarter_percent", c.measured_du},
                                    {"scheduling_coefficient", scheduling_json(c.measured_sc, c.sc_share)}}},
                      {"conventions", how(s)},
                      {"caution", kCaution}};
  j["cans"] = nlohmann::json::array();
  for (const CanDifference& d : c.cans)
    j["cans"].push_back({{"row", d.row + 1}, {"col", d.column + 1}, {"x", L(d.centre.x())}, {"y", L(d.centre.y())},
                         {k("model_depth"), D(d.model_mm)}, {k("model_depth_err"), D(d.model_err_mm)},
                         {k("measured_depth"), D(d.measured_mm)}, {k("difference"), D(d.difference_mm)}});
  out << j.dump(2) << "\n";
}

std::string catch_can_difference_svg(const Site& s, const CatchCanComparison& c) {
  const CatchGrid& g = *s.deposition->grid;
  const double half = g.spacing / 2;
  BoundingBox box = site_extent(s);
  for (const Can& can : c.model.cans) {
    box.min = box.min.cwiseMin(can.centre - Vec2(half, half));
    box.max = box.max.cwiseMax(can.centre + Vec2(half, half));
  }
  const Vec2 pad = 0.04 * (box.max - box.min);
  box = {box.min - pad, box.max + pad};
  const CanUnits D(s);
  SvgCanvas canvas(box, s.site_name + ": model against measured cans",
                   fmt::format("Model minus measured depth per catch can over the test's {}, in {} (blue: the model is wetter)",
                               duration_text(c.test.duration_h), D.depth),
                   s.units);
  // A symmetric scale from -top to +top, top a round value at or above the largest |difference|.
  const double largest = std::max(D(c.largest_mm), 1e-12);
  const double unit_step = std::pow(10.0, std::floor(std::log10(largest)));
  double top = 10 * unit_step;
  for (double m : {1.0, 2.0, 2.5, 5.0, 10.0})
    if (m * unit_step >= largest) {
      top = m * unit_step;
      break;
    }
  const int bands = 10;  // five each side
  const auto colour_of = [&](double diff) {
    const int b = std::clamp(static_cast<int>(std::floor((diff / top + 1.0) / 2.0 * bands)), 0, bands - 1);
    return palette::diverging((b + 0.5) / bands * 2.0 - 1.0);
  };
  canvas.raw("<g id=\"differences\" shape-rendering=\"crispEdges\">\n");
  for (const CanDifference& d : c.cans)
    canvas.cell(d.centre - Vec2(half, half), d.centre + Vec2(half, half), colour_of(D(d.difference_mm)));
  canvas.raw("</g>\n");
  canvas.zones(s, {});
  canvas.sources(s, false);
  canvas.raw(fmt::format("<g id=\"cans\" fill=\"none\" stroke=\"{}\" stroke-width=\"0.9\">\n", palette::ink()));
  for (const CanDifference& d : c.cans)
    canvas.raw(fmt::format("<circle cx=\"{:.2f}\" cy=\"{:.2f}\" r=\"2.5\"/>\n", canvas.x(d.centre.x()), canvas.y(d.centre.y())));
  canvas.raw("</g>\n<g id=\"can-values\">\n");
  const int decimals = std::max(0, 1 - static_cast<int>(std::floor(std::log10(top))));
  int shown = 0;
  for (const CanDifference& d : c.cans)
    shown += canvas.plan_label(d.centre - Vec2(0, 9.0 / canvas.scale()), fmt::format("{:+.{}f}", D(d.difference_mm), decimals), 9,
                               fmt::format("fill=\"{}\" class=\"can-value\"", palette::ink()), true, false)
                 ? 1
                 : 0;
  canvas.raw("</g>\n");
  canvas.zone_labels(s, {});
  canvas.source_labels(s);
  canvas.axes(s.origin.has_value(), !s.crs.empty());
  std::vector<std::pair<double, std::string>> ticks;
  for (int k = 0; k <= 4; ++k) {
    const double v = -top + k * top / 2;
    ticks.push_back({k / 4.0, k == 2 ? std::string("0") : fmt::format("{:+.{}f}", v, std::max(0, decimals))});
  }
  canvas.colour_bar(ticks, fmt::format("Model - measured ({}): blue model wetter, sand model drier", D.depth), bands,
                    [&](double t) { return palette::diverging((std::floor(t * (bands - 1) + 0.5) + 0.5) / bands * 2.0 - 1.0); });
  canvas.legend_heading("Key");
  canvas.legend_text(fmt::format("{} measured cans: bias {:+.{dp}f} {u}, RMS {:.{dp}f} {u}", c.cans.size(), D(c.bias_mm),
                                 D(c.rms_mm), fmt::arg("u", D.depth), fmt::arg("dp", D.dp)));
  canvas.legend_text(fmt::format("CU {:.1f} % model, {:.1f} % measured; DU (low quarter) {:.1f} % model, {:.1f} % measured",
                                 c.model_cu, c.measured_cu, c.model_du, c.measured_du));
  canvas.legend_mark(fmt::format("<circle cx=\"13\" cy=\"6\" r=\"2.5\" fill=\"none\" stroke=\"{}\"/>", palette::ink()),
                     fmt::format("Measured can, with model - measured in {}{}", D.depth,
                                 shown < static_cast<int>(c.cans.size()) ? " (where there is room; all in the CSV)" : ""));
  canvas.legend_zone_roles();
  canvas.legend_source_marks(false);
  canvas.scale_bar();
  canvas.note(std::string("Each cell is the square around a measured can; grid cans without a measurement are left blank. ") +
              how(s));
  canvas.note("Model estimate: it does not replace measured catch-can tests, local codes or a competent person's assessment.");
  return canvas.finish();
}

}  // namespace strewn::cli
