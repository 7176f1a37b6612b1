#ifndef STREWN_SHAPE_REGISTRY_HPP
#define STREWN_SHAPE_REGISTRY_HPP

/// \file
/// The registry of shape kinds and the plugin host that fills it.
///
/// Every shape kind, built-in or a user's, comes from a loadable module implementing
/// strewn/plugin.h. The default search path is, in order:
///   1. <directory of the running program>/../lib/strewn/plugins  (the built-in kinds)
///   2. each directory in the environment variable STREWN_PLUGIN_PATH (':'-separated)
///   3. directories given by the caller (e.g. a command-line option)
/// The first module to provide a kind name keeps it; later duplicates are reported as warnings.
///
/// A module that cannot be opened, lacks the entry symbol, or offers a kind of another ABI
/// version is refused with a strewn::input_error naming the file and the reason; the file is
/// read first (a regular file, a 64-bit ELF shared object for this machine whose dynamic symbol
/// table holds the entry symbol), so a module without the entry symbol is refused before any of
/// its code (constructors) runs; a plugin's build
/// error comes back as a strewn::input_error naming the kind. Nothing a plugin reports crashes
/// the host.
///
/// Example:
/// \code
///   strewn::ShapeRegistry shapes = strewn::ShapeRegistry::with_default_search_path();
///   strewn::Region bench = shapes.build("rectangle",
///       R"({"centre": [3, 1], "width": 2.0, "depth": 0.5, "angle_deg": 0})");
/// \endcode

#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "strewn/closest_names.hpp"  // closest_names(), declared here before
#include "strewn/export.hpp"
#include "strewn/region.hpp"
#include "strewn/warning.hpp"

namespace strewn {

struct ShapeKindInfo {
  std::string name;
  std::string summary;
  std::string params_json;  ///< the plugin's parameter description, verbatim
  std::string module_path;  ///< file the kind was loaded from
};

struct BuildOptions {
  /// Sagitta tolerance (m) for polygonising arcs in boolean combinations (composite shapes).
  /// Non-positive: 1e-6 times the size of the operands' bounding box.
  double sagitta = 0.0;
  /// Where build() reports what it accepted but the caller should show: a parameter written
  /// under its former name (a composite's parts too), kind WarningKind::former_name, message
  /// "shape 'KIND': parameter 'r_inner' is the former name of 'inner_radius'; ...". Null: not
  /// reported (the parameter is still read).
  std::vector<Warning>* warnings = nullptr;
};

class STREWN_API ShapeRegistry {
 public:
  ShapeRegistry();
  ~ShapeRegistry();
  ShapeRegistry(ShapeRegistry&&) noexcept;
  ShapeRegistry& operator=(ShapeRegistry&&) noexcept;

  /// A registry filled from the default search path plus `extra_dirs`.
  static ShapeRegistry with_default_search_path(const std::vector<std::string>& extra_dirs = {});
  /// The directories searched by with_default_search_path, in order.
  static std::vector<std::string> default_search_path(const std::vector<std::string>& extra_dirs);

  /// Loads one module; throws strewn::input_error when it cannot be used.
  void load_module(const std::string& path);
  /// Loads every regular file *.so in a directory (other entries, e.g. a FIFO, are passed
  /// over with a warning); a directory that does not exist is skipped. A module that cannot be used throws
  /// strewn::input_error naming the file, like load_module: a broken plugin is never silent.
  void load_directory(const std::string& dir);

  std::vector<ShapeKindInfo> kinds() const;
  /// The kind of that name, or of that former name (a kind renamed: its description's
  /// "former_kind", strewn/plugin.h); nullptr for an unknown name.
  const ShapeKindInfo* find(const std::string& name) const;

  /// A renamed kind: the name it now has and the warning to show where the former one was read
  /// ("shape kind 'annular_sector' is the former name of 'ring_sector'; it is read in this release
  /// and will be refused in the next", WarningKind::former_name).
  struct Renamed {
    std::string now;
    Warning warning;
  };
  /// For a former kind name, its current name and warning; nullopt for any other name.
  std::optional<Renamed> renamed_kind(const std::string& name) const;
  /// Closest known kind names to a misspelt one (for "did you mean").
  std::vector<std::string> suggestions(const std::string& name) const;
  const std::vector<std::string>& warnings() const;

  /// Builds a normalised, validated region. Throws strewn::input_error naming the kind and the
  /// parameter or fault: unknown kind, unknown or missing parameter, wrong type, plugin error,
  /// invalid geometry, a parameter given under both its former and its new name. A former name
  /// (the plugin's alias table, "former" in its parameter description, strewn/plugin.h) is read
  /// as the new one, with a warning in options.warnings; so is a former kind name (renamed_kind).
  Region build(const std::string& kind, const std::string& params_json,
               const BuildOptions& options = {}) const;

  /// The parameters written in another length unit, in metres: every parameter the kind
  /// describes with unit "m" (a number, a point, points or point lists; a composite's parts too;
  /// under its former name too)
  /// multiplied by `metres_per_unit` (0.3048 for feet, strewn/units.hpp). Parameters left out
  /// keep their defaults, which the plugin states in metres. A kind or text build() would refuse
  /// is returned unchanged, for build() to report.
  std::string params_in_metres(const std::string& kind, const std::string& params_json, double metres_per_unit) const;

  struct Impl;  // private implementation, defined in the library

 private:
  std::unique_ptr<Impl> impl_;
};

}  // namespace strewn

#endif
