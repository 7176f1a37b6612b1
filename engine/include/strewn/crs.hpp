#ifndef STREWN_CRS_HPP
#define STREWN_CRS_HPP

/// \file
/// Coordinate reference systems, through PROJ.
///
/// A site frame is metres, x east, y north (DESIGN.md). It is tied to the globe in one of two
/// ways (docs/site-plans.md):
/// * `[site] crs`: any definition PROJ accepts ("EPSG:32633", "+proj=utm +zone=33 +datum=WGS84",
///   WKT, PROJJSON); site coordinates are that CRS's coordinates (eastings and northings of a
///   UTM zone or a national grid, in metres);
/// * `[site] origin = [lon, lat]`: a local frame whose (0, 0) is that WGS 84 point, a transverse
///   Mercator on the WGS 84 ellipsoid centred there with scale 1 (local_frame_definition). Its
///   scale error is below 1.3e-4 within 100 km of the origin (k = 1 + d^2 / (2 R^2), the series of
///   the transverse Mercator's scale factor).
///
/// Axis order is always PROJ's "traditional GIS order" (proj_normalize_for_visualization):
/// longitude before latitude, easting before northing, whatever order the authority defines
/// (EPSG:4326 is latitude first by definition; here it is [lon, lat], as in GeoJSON and KML).
///
/// Large coordinates: PROJ returns eastings and northings to well below a millimetre; the engine
/// subtracts a local reference point before anything else (strewn/integrate.hpp), so a site at
/// x ~ 5e5, y ~ 5.4e6 with centimetre spreads keeps its accuracy.
///
/// Example:
///   strewn::CrsTransform to_utm("EPSG:4326", "EPSG:32633");
///   const strewn::Vec2 en = to_utm.forward({15.0, 48.0});  // [lon, lat] -> [easting, northing]

#include <memory>
#include <string>

#include "strewn/export.hpp"
#include "strewn/scatter_model.hpp"

namespace strewn {

/// A site's origin on the globe (WGS 84, degrees).
struct GeoOrigin {
  double lon_deg = 0.0;
  double lat_deg = 0.0;
};

/// The definition of WGS 84 longitude/latitude in degrees used throughout ("EPSG:4326", read in
/// traditional GIS order: [lon, lat]).
STREWN_API const char* lon_lat_crs() noexcept;

/// The PROJ definition of the local frame about `origin`: "+proj=tmerc +lat_0=.. +lon_0=.. +k=1
/// +x_0=0 +y_0=0 +datum=WGS84 +units=m +type=crs", so that the origin maps to (0, 0). Throws
/// strewn::input_error when the origin is not a longitude within +-180 and a latitude within
/// (-90, 90).
STREWN_API std::string local_frame_definition(const GeoOrigin& origin);

/// PROJ's name of a CRS ("WGS 84 / UTM zone 33N"); throws strewn::input_error "unknown CRS
/// 'DEF' (PROJ: reason)" when PROJ cannot make a CRS of it. Use it to check a definition early.
STREWN_API std::string crs_name(const std::string& definition);

/// The same for a CRS that can be a site frame: projected (or compound with a projected
/// horizontal part) with both axes in metres. Throws strewn::input_error otherwise, e.g. for a
/// geographic CRS in degrees ("EPSG:4326") or a grid in US feet.
STREWN_API std::string site_frame_crs_name(const std::string& definition);

/// A transformation between two CRSs (or the fixed pipeline from longitude/latitude to a local
/// frame), both sides in traditional GIS order. Holds its own PROJ context: one object may be
/// used by one thread at a time.
class STREWN_API CrsTransform {
 public:
  /// From CRS `from` to CRS `to`, as PROJ chooses it (proj_create_crs_to_crs: the best
  /// operation available here for the area of use). Throws strewn::input_error naming either
  /// definition PROJ does not know, or the pair when no operation links them.
  CrsTransform(const std::string& from, const std::string& to);
  /// WGS 84 [lon, lat] (degrees) to the local frame about `origin`, as the PROJ pipeline
  /// "+proj=pipeline +step +proj=unitconvert +xy_in=deg +xy_out=rad +step +proj=tmerc ..."
  /// (no database look-up).
  static CrsTransform lon_lat_to_local(const GeoOrigin& origin);
  ~CrsTransform();
  CrsTransform(CrsTransform&&) noexcept;
  CrsTransform& operator=(CrsTransform&&) noexcept;

  /// `from` -> `to`. Throws strewn::input_error when the point is not finite or PROJ cannot
  /// transform it (outside the projection's domain).
  Vec2 forward(const Vec2& p) const;
  /// `to` -> `from`, the same way.
  Vec2 inverse(const Vec2& p) const;

 private:
  struct State;
  explicit CrsTransform(std::unique_ptr<State> state);
  std::unique_ptr<State> state_;
};

}  // namespace strewn

#endif
