// The largest spacing of a layout meeting CU, DU and keep-out limits (strewn/spacing.hpp).
#include "strewn/spacing.hpp"

#include <algorithm>
#include <cmath>
#include <fmt/format.h>

#include "strewn/closest_names.hpp"
#include "strewn/deposition.hpp"
#include "strewn/error.hpp"
#include "strewn/head.hpp"
#include "strewn/input_file.hpp"
#include "strewn/layout.hpp"

namespace strewn {
namespace {

const Layout& find_layout(const Site& s, const std::string& name) {
  std::vector<std::string> names;
  for (const Layout& l : s.layouts) {
    if (l.name == name) return l;
    names.push_back(l.name);
  }
  if (s.layouts.empty()) throw request_error("layout", "the site has no [[layout]] to space");
  std::string list;
  for (const std::string& n : names) list += (list.empty() ? "" : ", ") + ("'" + n + "'");
  throw request_error("layout", "no layout named '" + quoted_excerpt(name) + "'" + did_you_mean(name, names) + " (the site has " + list + ")");
}

}  // namespace

bool SpacingCheck::holds() const { return failing() == nullptr; }

const SpacingLimit* SpacingCheck::failing() const {
  for (const SpacingLimit& l : limits)
    if (!l.holds()) return &l;
  return nullptr;
}

Site with_layout_spacing(const Site& s, const std::string& layout, double spacing_m) {
  const Layout& old = find_layout(s, layout);
  Site out = s;
  Layout& l = *std::find_if(out.layouts.begin(), out.layouts.end(), [&](const Layout& x) { return x.name == layout; });
  if (!(spacing_m > 0.0 && std::isfinite(spacing_m))) throw input_error("layout '" + layout + "': the spacing must be above 0");
  // A rectangular layout keeps its aspect ratio: the row spacing scales with the spacing.
  if (l.pattern == LayoutPattern::rectangular) l.row_spacing_m = old.row_spacing_m * spacing_m / old.spacing_m;
  l.spacing_m = spacing_m;
  const auto zone = std::find_if(s.zones.begin(), s.zones.end(), [&](const Zone& z) { return z.name == l.zone; });
  if (zone == s.zones.end()) throw input_error("layout '" + layout + "' covers an unknown zone '" + l.zone + "'");
  const std::vector<Head> placed = layout_heads(l, zone->region);
  // The layout's old heads and their sources out, the new ones in at the same place in the lists
  // (the reader's order: [[source]]s, [[head]]s, then each layout's heads).
  std::vector<std::string> gone;
  for (const Head& h : s.heads)
    if (h.layout == layout) gone.push_back(h.name);
  const auto is_gone = [&](const std::string& name) { return std::find(gone.begin(), gone.end(), name) != gone.end(); };
  auto h_at = std::find_if(out.heads.begin(), out.heads.end(), [&](const Head& h) { return h.layout == layout; });
  const std::size_t head_pos = static_cast<std::size_t>(h_at - out.heads.begin());
  out.heads.erase(std::remove_if(out.heads.begin(), out.heads.end(), [&](const Head& h) { return h.layout == layout; }), out.heads.end());
  out.heads.insert(out.heads.begin() + static_cast<std::ptrdiff_t>(std::min(head_pos, out.heads.size())), placed.begin(), placed.end());
  auto s_at = std::find_if(out.sources.begin(), out.sources.end(), [&](const Source& x) { return is_gone(x.name); });
  const std::size_t source_pos = static_cast<std::size_t>(s_at - out.sources.begin());
  out.sources.erase(std::remove_if(out.sources.begin(), out.sources.end(), [&](const Source& x) { return is_gone(x.name); }),
                    out.sources.end());
  std::vector<Source> sources;
  for (const Head& h : placed) {
    sources.push_back(head_source(h));
    sources.back().barriers = s.barriers;  // as the reader does (site_io.cpp)
  }
  out.sources.insert(out.sources.begin() + static_cast<std::ptrdiff_t>(std::min(source_pos, out.sources.size())), sources.begin(),
                     sources.end());
  return out;
}

SpacingCheck check_spacing(const Site& s, const SpacingQuery& q, double spacing_m) {
  const std::string name = q.layout.empty() && s.layouts.size() == 1 ? s.layouts.front().name : q.layout;
  const Site at = with_layout_spacing(s, name, spacing_m);
  const Layout& l = find_layout(at, name);
  const Deposition d = compute_deposition(at);
  SpacingCheck c;
  c.spacing_m = spacing_m;
  c.row_spacing_m = l.pattern == LayoutPattern::rectangular ? l.row_spacing_m : 0.0;
  c.heads = static_cast<std::size_t>(std::count_if(at.heads.begin(), at.heads.end(), [&](const Head& h) { return h.layout == name; }));
  c.cu = d.cu;
  c.du = d.du;
  if (q.min_cu) c.limits.push_back({"CU", d.cu, *q.min_cu, d.cu - *q.min_cu, {}});  // no zone: CU and DU
  if (q.min_du) c.limits.push_back({"DU", d.du, *q.min_du, d.du - *q.min_du, {}});
  // A run: the one that applies the scenario's target depth when it has one (fewer heads run
  // longer), else the scenario's hours. The amounts scale with the run's length; its bound too.
  double run = 1.0;
  if (d.run_time && s.deposition->hours > 0.0) run = (d.run_time->hours + d.run_time->hours_err) / s.deposition->hours;
  c.run_hours = d.run_time ? d.run_time->hours : s.deposition->hours;
  if (q.max_litres_per_zone)
    for (const ZoneShare& z : d.zones)
      if (z.role == to_string(Role::keep_out)) {
        const double upper = run * (z.amount + z.amount_err);  // judged on the upper bound
        c.limits.push_back({"litres on zone '" + z.zone + "'", upper, *q.max_litres_per_zone, *q.max_litres_per_zone - upper, z.zone});
      }
  return c;
}

SpacingAnswer solve_spacing(const Site& s, const SpacingQuery& q, const ProgressFn& progress) {
  SpacingQuery query = q;
  if (query.layout.empty()) {
    if (s.layouts.size() > 1) {
      std::string list;
      for (const Layout& l : s.layouts) list += (list.empty() ? "'" : ", '") + l.name + "'";
      throw request_error("layout", "spacing: the site has several layouts (" + list + "); name the one to space");
    }
    if (s.layouts.empty()) throw request_error("layout", "spacing: the site has no [[layout]] to space");
    query.layout = s.layouts.front().name;
  }
  const Layout& layout = find_layout(s, query.layout);
  if (!query.min_cu && !query.min_du && !query.max_litres_per_zone)
    throw request_error("limits", "spacing: give at least one limit (a least CU, a least DU or most litres per keep-out zone)");
  if ((query.min_cu || query.min_du) && !(s.deposition && s.deposition->grid))
    throw request_error("grid", "spacing: CU and DU come from the cans: the scenario needs [deposition] catch_grid");
  if (!(query.least_of_radius > 0.0 && query.most_of_radius > query.least_of_radius && std::isfinite(query.most_of_radius) &&
        query.steps >= 1 && query.tolerance_m > 0.0))
    throw request_error("range", "spacing: the window must satisfy 0 < least < most, with steps >= 1 and a positive tolerance");
  SpacingAnswer a;
  a.layout = query.layout;
  a.least_m = query.least_of_radius * layout.head.radius_m;
  a.most_m = query.most_of_radius * layout.head.radius_m;
  const double expected = query.steps + 1.0 + std::ceil(std::log2((a.most_m - a.least_m) / query.steps / query.tolerance_m + 1.0));
  const auto check = [&](double x) {
    ++a.evaluations;
    SpacingCheck c = check_spacing(s, query, x);
    if (progress) progress(std::min(0.99, a.evaluations / std::max(expected, 1.0)));
    return c;
  };
  // The whole scan (a keep-out limit fails at small spacings, CU and DU at large ones): the
  // largest spacing that passes, and the one after it, which fails.
  std::vector<SpacingCheck> scan;
  int last_pass = -1;
  for (int i = 0; i <= query.steps; ++i) {
    const double x = i == query.steps ? a.most_m : a.least_m + (a.most_m - a.least_m) * i / query.steps;
    scan.push_back(check(x));
    if (scan.back().holds()) last_pass = i;
  }
  if (last_pass < 0) {
    const SpacingLimit& l = *scan.front().failing();
    a.why = fmt::format("{} cannot be met: even at the smallest spacing tried ({:g} x the radius), it is {:.6g} against {:.6g}",
                        l.name == "CU" ? "CU >= target" : l.name == "DU" ? "DU >= target" : l.name + " <= limit",
                        query.least_of_radius, l.value, l.target);
    a.at = scan.front();
  } else if (last_pass == query.steps) {
    a.found = a.holds_to_end = true;
    a.at = scan.back();
  } else {
    // Bisection between the largest passing spacing and the next, failing one.
    a.found = true;
    SpacingCheck pass = scan[static_cast<std::size_t>(last_pass)], fail = scan[static_cast<std::size_t>(last_pass) + 1];
    while (fail.spacing_m - pass.spacing_m > query.tolerance_m) {
      SpacingCheck c = check(0.5 * (pass.spacing_m + fail.spacing_m));
      (c.holds() ? pass : fail) = std::move(c);
    }
    a.at = std::move(pass);
    a.beyond = std::move(fail);
  }
  if (progress) progress(1.0);
  return a;
}

}  // namespace strewn
