#include "strewn/deposition.hpp"

#include <algorithm>
#include <cmath>

#include "strewn/barrier_effect.hpp"
#include "strewn/constants.hpp"
#include "strewn/error.hpp"
#include "strewn/head.hpp"
#include "strewn/region.hpp"
#include "strewn/region_builders.hpp"
#include "strewn/uniformity.hpp"

namespace strewn {
namespace {

struct Emitter {
  const Source* source;
  double amount;  // over the whole run
};

// Expected amount in a region over all sources, with its bound; `outside` integrates the
// complement (q computed directly, never 1 - p). Past the sources' barriers
// (strewn/barrier_effect.hpp): what a barrier stops lands in no region, so the complement
// counts it with what lands outside.
std::pair<double, double> amount_in(const std::vector<Emitter>& emitters, const Region& region,
                                    const IntegrateOptions& options, bool outside = false) {
  double amount = 0.0, err = 0.0;
  for (const Emitter& e : emitters) {
    const Estimate est = integrate_source(*e.source, region, options);
    amount += e.amount * (outside ? est.q : est.p);
    err += e.amount * est.abs_err;
  }
  return {amount, err};
}

// The irrigated area A of deposition.hpp: the site boundary, else the first layout's zone, else
// the target zones together.
void add_head_rates(const Site& s, Deposition& out) {
  if (s.heads.empty()) return;
  const DepositionSettings& d = *s.deposition;
  std::string from = d.site_boundary;
  if (from.empty() && !s.layouts.empty()) from = s.layouts.front().zone;
  for (const Zone& z : s.zones)
    if (from.empty() ? z.role == Role::target : z.name == from) {
      out.area_m2 += area(z.region);
      out.area_from += (out.area_from.empty() ? "" : ", ") + z.name;
    }
  double flow = 0.0;
  for (const Head& h : s.heads) {
    HeadRate r;
    r.name = h.name;
    r.layout = h.layout;
    r.position = h.position;
    r.radius_m = h.radius_m;
    r.sweep_deg = head_sweep_deg(h);
    r.flow_l_per_min = h.flow_l_per_min;
    r.own_rate_mm_per_h = head_rate_mm_per_h(h);
    if (out.area_m2 > 0.0) r.share_mm_per_h = 60.0 * h.flow_l_per_min / out.area_m2;
    flow += h.flow_l_per_min;
    out.heads.push_back(r);
  }
  if (out.area_m2 > 0.0) out.rate_mm_per_h = 60.0 * flow / out.area_m2;
  if (!out.cans.empty()) {
    double err = 0.0;
    for (const Can& c : out.cans) err += c.depth_err / static_cast<double>(out.cans.size());
    out.catch_rate_mm_per_h = out.mean_depth / d.hours;
    out.catch_rate_err = err / d.hours;
  }
  if (!d.target_depth_mm) return;
  RunTime t;
  const double target = *d.target_depth_mm;
  if (!out.cans.empty() && out.catch_rate_mm_per_h > out.catch_rate_err) {
    t.basis = "catch cans";
    t.hours = target / out.catch_rate_mm_per_h;
    // The rate may be off by its bound either way: the time's bound is the wider side.
    t.hours_err = target / (out.catch_rate_mm_per_h - out.catch_rate_err) - t.hours;
    if (out.du > 0.0) {
      t.with_allowance_hours = t.hours / (out.du / 100.0);
      t.with_allowance_err = t.hours_err / (out.du / 100.0);
    }
  } else if (out.rate_mm_per_h > 0.0) {
    t.basis = "flow over area";
    t.hours = target / out.rate_mm_per_h;
  } else {
    return;
  }
  out.run_time = t;
}

}  // namespace

Deposition compute_deposition(const Site& s) { return compute_deposition(s, kSchedulingShare); }

Deposition compute_deposition(const Site& s, double sc_share) {
  if (!(sc_share > 0.0 && sc_share <= 1.0))
    throw input_error("the scheduling coefficient's share of the area must be in (0, 1], e.g. 0.05 for 5%");
  if (!s.deposition) throw input_error(s.file + ": a [deposition] table is needed for deposition");
  const DepositionSettings& d = *s.deposition;
  Deposition out;
  out.unit = d.amount_unit == "litre" ? "L" : "count";
  out.depth_unit = d.amount_unit == "litre" ? "mm" : "per m^2";
  std::vector<Emitter> emitters;
  for (const Source& src : s.sources) {
    if (!src.amount_per_event || !src.events_per_hour)
      throw input_error(s.file + ": source '" + src.name + "': deposition needs amount_per_event and events_per_hour");
    emitters.push_back({&src, *src.amount_per_event * *src.events_per_hour * d.hours});
    out.emitted += emitters.back().amount;
  }
  if (!(out.emitted > 0.0)) throw input_error(s.file + ": the sources emit nothing (amount_per_event * events_per_hour)");
  if (d.grid) {
    const CatchGrid& g = *d.grid;
    const double can_area = kPi * g.can_diameter * g.can_diameter / 4.0, cell_area = g.spacing * g.spacing;
    const Vec2 half(g.spacing / 2, g.spacing / 2);
    std::vector<double> depths;
    for (int j = 0; j < g.rows; ++j)
      for (int i = 0; i < g.columns; ++i) {
        Can can;
        can.centre = g.origin + g.spacing * Vec2(i, j);
        const auto [in_can, can_err] = amount_in(emitters, disk(can.centre, g.can_diameter / 2), s.options);
        can.depth = in_can / can_area;
        can.depth_err = can_err / can_area;
        const auto [in_cell, cell_err] = amount_in(emitters, rectangle(can.centre - half, can.centre + half), s.options);
        can.cell_amount = in_cell;
        can.cell_amount_err = cell_err;
        can.cell_depth = in_cell / cell_area;
        out.on_grid += in_cell;
        out.on_grid_err += cell_err;
        depths.push_back(can.depth);
        out.cans.push_back(can);
      }
    const Vec2 lo = g.origin - half, hi = g.origin + g.spacing * Vec2(g.columns - 1, g.rows - 1) + half;
    std::tie(out.off_grid, out.off_grid_err) = amount_in(emitters, rectangle(lo, hi), s.options, true);
    out.mean_depth = 0.0;
    for (double x : depths) out.mean_depth += x / static_cast<double>(depths.size());
    out.min_depth = *std::min_element(depths.begin(), depths.end());
    out.max_depth = *std::max_element(depths.begin(), depths.end());
    if (out.max_depth > 0.0) {
      out.cu = christiansen_cu(depths);
      out.du = low_quarter_du(depths);
      out.sc_share = sc_share;
      out.sc = scheduling_coefficient(depths, g.rows, g.columns, sc_share);
    }
  }
  add_head_rates(s, out);
  for (const Zone& z : s.zones) {
    ZoneShare share;
    share.zone = z.name;
    share.role = to_string(z.role);
    std::tie(share.amount, share.amount_err) = amount_in(emitters, z.region, s.options);
    share.fraction = share.amount / out.emitted;
    if (z.name == d.site_boundary) {
      out.has_site = true;
      std::tie(out.off_site, out.off_site_err) = amount_in(emitters, z.region, s.options, true);
      for (const Can& c : out.cans) out.cans_outside_site += winding_number(z.region, c.centre) == 0;
    }
    out.zones.push_back(share);
  }
  return out;
}

std::vector<double> depth_at(const Site& s, const std::vector<Vec2>& points) {
  if (!s.deposition) throw input_error(s.file + ": a [deposition] table is needed for deposition");
  std::vector<double> depth(points.size(), 0.0);
  for (const Source& src : s.sources) {
    if (!src.amount_per_event || !src.events_per_hour)
      throw input_error(s.file + ": source '" + src.name + "': deposition needs amount_per_event and events_per_hour");
    const double amount = *src.amount_per_event * *src.events_per_hour * s.deposition->hours;
    for (const WeightedGaussian& c : src.model.components()) {
      const Gaussian& g = c.gaussian;
      const std::size_t index = static_cast<std::size_t>(&c - src.model.components().data());
      const bool placed = src.positions.size() == src.model.components().size();
      // What gets past the barriers whose shadow holds the point (each stops its catch).
      const auto through = [&](const Vec2& point) {
        double share_through = 1.0;
        if (placed)
          for (const Barrier& b : src.barriers)
            if (b.catch_share > 0.0 && path_crosses(b, src.positions[index], point, src.release_height))
              share_through *= 1.0 - b.catch_share;
        return share_through;
      };
      if (g.family().is_normal()) {
        const double scale = amount * c.weight * g.peak_density();
        for (std::size_t k = 0; k < points.size(); ++k) {
          const Vec2 z = g.whitening() * (points[k] - g.mean());  // in the frame of the mean
          depth[k] += scale * through(points[k]) * std::exp(-0.5 * z.squaredNorm());
        }
        continue;
      }
      const ScatterFamily& f = g.family();
      const double det = g.cholesky()(0, 0) * g.cholesky()(1, 1);
      const double share = f.has_arc() ? f.arc_sweep_deg() / 360.0 : 1.0;
      const double scale = amount * c.weight / (det * share);
      for (std::size_t k = 0; k < points.size(); ++k) {
        const Vec2 v = points[k] - g.mean();
        if (f.has_arc()) {  // the wedge's rays run through the mean, in site directions
          const double a = std::fmod(std::atan2(v.y(), v.x()) * 180.0 / kPi - f.arc_from_deg() + 720.0, 360.0);
          if (!(a <= f.arc_sweep_deg())) continue;
        }
        depth[k] += scale * through(points[k]) * f.density((g.whitening() * v).norm());
      }
    }
  }
  return depth;
}

}  // namespace strewn
