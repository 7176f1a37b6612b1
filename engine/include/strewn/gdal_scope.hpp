#ifndef STREWN_GDAL_SCOPE_HPP
#define STREWN_GDAL_SCOPE_HPP

/// \file
/// GDAL calls made by strewn, in the engine (vector sources) and in tools over it (GeoTIFF and
/// GeoPackage outputs), run inside a GdalScope: GDAL's drivers are registered once, and its
/// errors, which GDAL prints to stderr by default, are kept for the one-line message instead
/// (a quiet handler for this thread, and GDAL's last error cleared on entry).
///
/// Example:
///   strewn::GdalScope gdal;
///   if (!open_something()) throw strewn::input_error("plan.gpkg: " + gdal.reason("cannot open"));

#include <string>

#include "strewn/export.hpp"

namespace strewn {

class STREWN_API GdalScope {
 public:
  GdalScope();
  ~GdalScope();
  GdalScope(const GdalScope&) = delete;
  GdalScope& operator=(const GdalScope&) = delete;

  /// GDAL's last error message in this scope, or `fallback` when it gave none.
  static std::string reason(const std::string& fallback);
  /// Whether a GDAL call in this scope failed (some drivers report a bad filter only so).
  static bool failed();
};

}  // namespace strewn

#endif
