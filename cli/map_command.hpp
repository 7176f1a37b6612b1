#ifndef STREWN_CLI_MAP_COMMAND_HPP
#define STREWN_CLI_MAP_COMMAND_HPP

// `strewn map FILE`: options, the map and its contours, outputs.

#include <CLI/CLI.hpp>
#include <iosfwd>
#include <string>
#include <vector>

#include "risk_map_output.hpp"
#include "strewn/shape_registry.hpp"
#include "strewn/work.hpp"

namespace strewn::cli {

struct MapRequest {
  std::string footprint_kind = "person";
  std::string footprint_params = "{}";  // JSON; a kind with a centre gets [0, 0] unless given
  std::string per = "session";
  int cells = 200;                      // along the longer side
  std::vector<double> window;           // x0 y0 x1 y1, empty: automatic
  int threads = 0;
  bool force = false;                   // run even above the work ceiling (strewn/work.hpp)
};

// The map and contours for a scenario; `progress` may be empty.
MapResult make_risk_map(const Scenario& s, const ShapeRegistry& shapes, const MapRequest& r,
                        const ProgressFn& progress);

class MapCommand {
 public:
  explicit MapCommand(CLI::App& parent);
  bool chosen() const { return app_->parsed(); }
  int run(const ShapeRegistry& shapes, std::ostream& out, std::ostream& err, bool terminal) const;

 private:
  CLI::App* app_;
  std::string file_, format_ = "table", svg_, csv_, geojson_;
  MapRequest request_;
};

}  // namespace strewn::cli

#endif
