#ifndef STREWN_SITE_IO_HPP
#define STREWN_SITE_IO_HPP

/// \file
/// Reading a site from a scenario file (TOML; the format is docs/scenario-format.md). Every key
/// and value is checked, and the first problem throws strewn::input_error with one line
/// "FILE:LINE:COLUMN: key: reason", with the nearest accepted key for a misspelt one. Relative
/// paths of templates and geometry files start at the scenario file's folder.
///
/// Example:
///   const strewn::Site site = strewn::load_site("shapes/throwing_lane.toml");

#include <string>

#include "strewn/export.hpp"
#include "strewn/shape_registry.hpp"
#include "strewn/site.hpp"
#include "strewn/work.hpp"

namespace strewn {

/// Reads `path` (a regular file under the input size cap, strewn/input_file.hpp) with the shape
/// kinds of `shapes`.
STREWN_API Site load_site(const std::string& path, const ShapeRegistry& shapes);
/// The same with the built-in shape kinds and STREWN_PLUGIN_PATH
/// (ShapeRegistry::with_default_search_path).
STREWN_API Site load_site(const std::string& path);

/// The same from text already in memory; `name` names it in messages and anchors relative paths.
STREWN_API Site load_site_text(const std::string& text, const std::string& name, const ShapeRegistry& shapes);

/// While one lives, the long work of reading a site on this thread (a drop's Monte Carlo check of
/// its falls, strewn/drop.hpp) reports its estimate and progress to these, as a command's own
/// work does (strewn/work.hpp). Scopes nest; the innermost is told.
class STREWN_API LoadProgressScope {
 public:
  LoadProgressScope(EstimateFn estimate, ProgressFn progress);
  ~LoadProgressScope();
  LoadProgressScope(const LoadProgressScope&) = delete;
  LoadProgressScope& operator=(const LoadProgressScope&) = delete;

 private:
  EstimateFn estimate_, outer_estimate_;
  ProgressFn progress_, outer_progress_;
};

}  // namespace strewn

#endif
