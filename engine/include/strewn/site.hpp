#ifndef STREWN_SITE_HPP
#define STREWN_SITE_HPP

/// \file
/// The site model: a site plan's sources (each a scatter model with its exposure), its zones
/// (each a region with a role, an optional limit and an occupancy), what a fit recorded about
/// the data behind a spread, and the settings of a deposition run. Plain values: a program
/// builds a Site in code or reads one from a scenario file (strewn/site_io.hpp).
///
/// Coordinates are site metres, x east, y north (DESIGN.md), whatever unit the file was written in
/// (Site::units says which, for a tool to print lengths in it). Example, one thrower and a bench:
///   strewn::Site site;
///   strewn::Source thrower;
///   thrower.name = "thrower";
///   thrower.model = strewn::Gaussian::from_axes({0, 20}, 1.5, 0.8, 90);
///   thrower.events_per_session = 60;
///   site.sources.push_back(thrower);
///   strewn::Zone bench;
///   bench.name = "bench";
///   bench.role = strewn::Role::keep_out;
///   bench.region = strewn::ShapeRegistry::with_default_search_path({}).build(
///       "rectangle", R"({"centre": [6, 18], "width": 2, "depth": 0.6})");
///   bench.limit = 1e-4;
///   site.zones.push_back(bench);

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "strewn/barrier.hpp"
#include "strewn/export.hpp"
#include "strewn/exposure.hpp"
#include "strewn/integrate.hpp"
#include "strewn/layout.hpp"
#include "strewn/crs.hpp"
#include "strewn/drop.hpp"
#include "strewn/region_io.hpp"
#include "strewn/thrower.hpp"
#include "strewn/units.hpp"
#include "strewn/warning.hpp"

namespace strewn {

/// What a zone is for: where impacts should go, where they must not, or reported only (a zone
/// of interest without a verdict of its own). The order matches to_string's names.
enum class Role { target, keep_out, report_only };

/// "target", "keep_out", "report_only" (a scenario file's former "watch" still reads as
/// report_only, with a warning).
STREWN_API const char* to_string(Role role) noexcept;

/// What a fit recorded about the data behind a source's spread (written by `strewn fit`), so
/// that the uncertainty of an assessment (strewn/uncertainty.hpp) can resample it.
struct FitRecord {
  enum class Kind { impacts, counts, censored };
  Kind kind = Kind::impacts;
  double confidence = 0.95;
  std::uint64_t n = 0;                      ///< impacts: sample size; counts: trials
  Vec2 mean = Vec2::Zero();                 ///< impacts
  Mat2 covariance = Mat2::Identity();       ///< impacts
  std::uint64_t k = 0;                      ///< counts: within radius
  std::uint64_t measured = 0, outside = 0;  ///< censored
  double radius = 0.0;                      ///< counts, censored
};

/// A source given by a drop from flight (strewn/drop.hpp): what the file said and the spread it
/// became (Source::model is spread.model).
struct DropSource {
  DropParameters parameters;
  DropUncertainty uncertainty;
  DropSpreadOptions options;
  DropSpread spread;
  /// The file named the intended landing point (`aim`); else Source::aim is the mean landing,
  /// which moves with the drop's parameters (a sweep of its height, strewn/sweep.hpp).
  bool aim_given = false;
};

/// One thrower, nozzle or release point.
struct Source {
  std::string name;
  Vec2 aim = Vec2::Zero();
  ScatterModel model = Gaussian::from_axes({0, 0}, 1, 1, 0);
  double events_per_session = 1.0;
  double sessions_per_year = 1.0;
  /// For deposition: material emitted per event (unit in DepositionSettings) and events per hour.
  std::optional<double> amount_per_event;
  std::optional<double> events_per_hour;
  std::optional<FitRecord> fit;
  /// A name for each component of `model`, in its order (the core first, "core" unless the file
  /// names it); a scenario's [[source.component]] tables may give each a `label`.
  std::vector<std::string> component_labels;
  /// Set when the scatter came from a drop's physics (`drop = {...}`); aim is then the
  /// intended landing point (the mean landing unless the file gives `aim`).
  std::optional<DropSource> drop;
  /// Where the ground paths of the impacts start (the thrower's standing point), one per
  /// component of `model` in its order; empty for a source without a position (no barrier can
  /// then apply to it).
  std::vector<Vec2> positions;
  /// When the spread was derived from a thrower (strewn/thrower.hpp): what was given, so that a
  /// tool can show the spread it became; a throwing line's components are its standing points.
  std::optional<Thrower> thrower;
  /// The release height for barriers with a height (strewn/barrier.hpp), m.
  std::optional<double> release_height;
  /// The barriers between this source and the zones (the loader gives every source with a
  /// position all of the site's barriers); used only with `positions`.
  std::vector<Barrier> barriers;
  Exposure exposure() const { return {events_per_session, sessions_per_year}; }
};

/// A region of the site plan with a role.
struct Zone {
  std::string name;
  Role role = Role::report_only;
  std::string shape;          ///< how the region was described (a shape kind, "wkt", a template)
  Region region;
  std::string geometry_file;  ///< when the geometry came from a GeoJSON/WKT file or a template
  std::optional<double> limit;  ///< on the probability of at least one hit per limit_per
  Period limit_per = Period::session;
  /// Fraction of the exposure time someone is in the zone, for individual risk (1 = always).
  std::optional<double> occupancy;
};

/// A catch-can grid: cans of the given opening diameter at origin + (i, j) * spacing.
struct CatchGrid {
  Vec2 origin = Vec2::Zero();
  double spacing = 1.0;
  int columns = 0, rows = 0;
  double can_diameter = 0.1;
};

struct DepositionSettings {
  std::string amount_unit = "litre";  ///< litre (depth in mm) or count (per m^2)
  double hours = 1.0;
  std::optional<CatchGrid> grid;
  std::string site_boundary;  ///< the zone that is the site: impacts outside it count as off site
  /// The depth a watering run must apply, mm (`target_depth`, in mm or inches as the site's
  /// units say): deposition then gives the run time for it.
  std::optional<double> target_depth_mm;
};

struct Site {
  std::string file;  ///< the scenario file it was read from (names it in messages)
  std::string site_name = "unnamed site";
  std::string notes;
  /// How the site frame is tied to the globe (strewn/crs.hpp): `crs`, a PROJ definition of a
  /// projected CRS in metres whose coordinates the site uses, or `origin`, the WGS 84 point at
  /// (0, 0) of a local frame; at most one of them.
  std::string crs;
  std::optional<GeoOrigin> origin;
  /// The unit of the lengths in the scenario file (`[site] units`); every value here is in metres,
  /// converted on reading, and a tool prints lengths back in this unit.
  LengthUnit units = LengthUnit::metre;
  std::vector<Source> sources;
  /// Sprinkler heads ([[head]] and those a [[layout]] placed, in that order; strewn/head.hpp).
  /// Each is also a source at the end of `sources`, in the same order, under the same name.
  std::vector<Head> heads;
  /// The [[layout]] tables that placed heads (strewn/layout.hpp).
  std::vector<Layout> layouts;
  std::vector<Zone> zones;
  /// Nets, fences and walls ([[barrier]]); each source with a position holds a copy in
  /// Source::barriers, which is what the computations use.
  std::vector<Barrier> barriers;
  IntegrateOptions options;
  std::optional<DepositionSettings> deposition;
  /// Every file read for this site: the scenario itself, templates, GeoJSON and WKT files
  /// (a tool's outputs may not be any of them).
  std::vector<std::string> input_files;
  /// What the loader accepted but the user should look at, one line each with file, line and key
  /// ("FILE:LINE:COLUMN: key: ..."): a former spelling (`[[source.wild]]`, `role = "watch"`, ...)
  /// that still reads for one release, and a likely mistake: an angle in degrees whose value is a
  /// common angle in radians (1.5708), a spread whose sigma is larger than the whole plan, a bias
  /// many sigmas long, an exposure of zero. The site is read exactly as written; nothing is
  /// corrected. Each carries its kind (strewn/warning.hpp): tools show them by it (the command
  /// line on stderr, Python as a DeprecationWarning or a UserWarning).
  std::vector<Warning> warnings;
};

/// The box around every zone's region, every source's aim and position, and every barrier (what a
/// plan of the site shows).
STREWN_API BoundingBox site_extent(const Site& site);

/// The source aimed at another point, as `solve aim` and a sweep's aim_x / aim_y move it: a
/// plain source's spread moves with the aim; a thrower's is derived again from its new distance
/// and direction (toward = aim; its bias and other components move with the aim), since a
/// thrower's spread grows with the throw. Throws strewn::input_error when the aim falls on the
/// thrower's standing point.
STREWN_API Source aimed_at(const Source& source, const Vec2& aim);

/// The PROJ definition of the site frame's CRS: `crs` when given, else the local frame about
/// `origin` (local_frame_definition), else empty (a frame tied to nothing).
STREWN_API std::string site_frame_crs(const Site& site);

/// WGS 84 [lon, lat] to the site frame (inverse(): site metres to [lon, lat]): the pipeline
/// about `origin`, or PROJ's transformation to `crs`. Throws strewn::input_error when the frame
/// is tied to neither.
STREWN_API CrsTransform lon_lat_to_site(const Site& site);

}  // namespace strewn

#endif
