#ifndef STREWN_SITE_MAP_HPP
#define STREWN_SITE_MAP_HPP

/// \file
/// A site's risk map: the footprint built from a shape kind, the grid chosen from the site (or an
/// extent given), every source combined per event, session or year (strewn/risk_map.hpp, with the
/// combiner of strewn/exposure.hpp), and iso-risk contours at the keep-out limits stated for the
/// map's period and at the decades 1e-2 .. 1e-8 inside the map's range, and the area at or above
/// each of those limits.

#include <string>
#include <vector>

#include "strewn/contours.hpp"
#include "strewn/distribute.hpp"
#include "strewn/export.hpp"
#include "strewn/risk_area.hpp"
#include "strewn/risk_map.hpp"
#include "strewn/shape_registry.hpp"
#include "strewn/site.hpp"
#include "strewn/status.hpp"
#include "strewn/warning.hpp"
#include "strewn/work.hpp"

namespace strewn {

struct SiteMapRequest {
  std::string footprint_kind = "person";
  std::string footprint_params = "{}";  ///< JSON; a kind with a centre gets [0, 0] unless given
  /// Metres per unit of the footprint's lengths (0.3048 when its parameters are in feet).
  double footprint_metres_per_unit = 1.0;
  Period per = Period::session;
  int cells = 200;              ///< along the longer side
  std::vector<double> extent;   ///< x0 y0 x1 y1 in m; empty: the zones, the aims and 3 sigma, plus 5%
  int threads = 0;              ///< 0: as many as the machine has
  bool force = false;           ///< run even above the work ceiling (strewn/work.hpp)
  /// Shares the map's row tiles among processes (strewn/distribute.hpp); nullptr: this process.
  const Distributor* distributor = nullptr;
};

struct LabelledContours {
  ContourSet set;
  std::string label;  ///< "1e-4" or "limit of 'bench' (1e-4)"
};

/// Where a person standing would be at risk at or above a keep-out limit (strewn/risk_area.hpp):
/// one per distinct limit stated for the map's period, also when the area is empty (the limit
/// is not reached anywhere in the window).
struct UnsafeArea {
  double level = 0.0;
  std::vector<std::string> zones;  ///< the zones whose limit this is
  Region area;                     ///< normalised loops of straight edges, in site metres
  double square_metres = 0.0;
};

struct SiteMap {
  RiskMap map;
  std::string footprint;  ///< the kind and its parameters, as JSON
  std::string footprint_kind;
  std::string footprint_params;  ///< JSON object, with the centre the map stands it on
  Period per = Period::session;
  std::vector<LabelledContours> contours;
  std::vector<UnsafeArea> unsafe_areas;
  Status status = Status::converged;  ///< tolerance_not_met when some cell missed its tolerance
  /// What the footprint's build accepted but the caller should show: a parameter under its former
  /// name (kind WarningKind::former_name; ShapeRegistry::build). Both names together are refused.
  std::vector<Warning> warnings;
  /// The request gave an extent that holds no part of any zone and no source's mean impact
  /// point: the map is of empty ground (on a projected site, `0 0 10 10` is the equator), so its
  /// zeros say nothing about the site; the caller should say so.
  bool extent_holds_nothing = false;
  /// The narrowest feature of the risk field (m): twice the smallest principal sigma of any
  /// source component plus the footprint's smaller side. The field's peaks are about this wide,
  /// so cells wider than it (grid.spacing > resolvable_width; a zone 1e12 m across makes the
  /// automatic extent's cells 5e9 m) can fall between them: the largest risk and the unsafe
  /// areas may then be understated (a board with p 0.85 per session mapped as "largest risk 0").
  /// The caller should say so.
  double resolvable_width = 0.0;
  bool cells_too_coarse() const { return map.grid.spacing > resolvable_width; }
};

/// The warning for cells_too_coarse(), in the engine's words (lengths in metres).
STREWN_API std::string coarse_cells_warning(const SiteMap& m);

/// The grid of a map: `cells` along the longer side of the extent (or of the automatic one).
/// Throws request_error (field "extent") for an extent that is not X0 Y0 X1 Y1 with X1 > X0, Y1 > Y0 within +-1e12 m.
STREWN_API GridSpec site_map_grid(const Site& site, const std::vector<double>& extent, int cells);

/// The map and its contours; `progress` may be empty. With a distributor, only the gathering
/// process's SiteMap holds the map, contours and unsafe areas (the others' map is empty). Throws request_error for a bad footprint or
/// extent (its field names the request's member), and strewn::work_error (strewn/work.hpp) above kMapWorkCeiling unless request.force.
STREWN_API SiteMap make_site_map(const Site& site, const ShapeRegistry& shapes, const SiteMapRequest& request,
                                 const ProgressFn& progress = {});

}  // namespace strewn

#endif
