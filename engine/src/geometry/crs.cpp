// Coordinate reference systems through PROJ's C API (proj.h, PROJ 9). Every object gets its own
// PROJ context, so that errors are read from that context and never printed: PROJ logs to
// stderr by default, and a one-line message is the rule for bad input.
#include "strewn/crs.hpp"

#include <proj.h>

#include <cmath>
#include <sstream>

#include "strewn/error.hpp"

namespace strewn {
namespace {

struct ContextDeleter {
  void operator()(PJ_CONTEXT* c) const { proj_context_destroy(c); }
};
struct PjDeleter {
  void operator()(PJ* p) const { proj_destroy(p); }
};
using Context = std::unique_ptr<PJ_CONTEXT, ContextDeleter>;
using Pj = std::unique_ptr<PJ, PjDeleter>;

// PROJ's last error message per thread: its log function is the only place that says why a
// definition was refused ("crs not found"); proj_context_errno gives a bare code there.
thread_local std::string last_log;

void keep_last_message(void*, int, const char* message) {
  if (message != nullptr) last_log = message;
}

Context quiet_context() {
  Context c(proj_context_create());
  if (!c) throw input_error("PROJ: cannot create a context");
  proj_log_level(c.get(), PJ_LOG_ERROR);
  proj_log_func(c.get(), nullptr, keep_last_message);
  last_log.clear();
  return c;
}

std::string reason(PJ_CONTEXT* c) {
  if (!last_log.empty()) {
    std::string m = last_log;
    // PROJ prefixes its messages with the function's name ("proj_create: crs not found").
    if (const auto colon = m.find(": "); colon != std::string::npos && m.compare(0, 5, "proj_") == 0) m = m.substr(colon + 2);
    return m;
  }
  const int e = proj_context_errno(c);
  const char* s = e != 0 ? proj_context_errno_string(c, e) : nullptr;
  return s != nullptr ? s : "not recognised";
}

// Definitions are quoted whole when short, else their first 60 characters (a WKT can be long).
std::string quoted(const std::string& definition) {
  return "'" + (definition.size() <= 60 ? definition : definition.substr(0, 57) + "...") + "'";
}

Pj crs_object(PJ_CONTEXT* c, const std::string& definition) {
  Pj crs(definition.empty() ? nullptr : proj_create(c, definition.c_str()));
  if (!crs) throw input_error("unknown CRS " + quoted(definition) + " (PROJ: " + reason(c) + ")");
  if (!proj_is_crs(crs.get()))
    throw input_error(quoted(definition) + " is not a coordinate reference system (a PROJ string needs +type=crs)");
  return crs;
}

std::string degrees(double v) {
  std::ostringstream s;
  s.precision(17);
  s << v;
  return s.str();
}

// The tmerc step of the local frame: scale 1 and false origin 0 at the site origin.
std::string tmerc_about(const GeoOrigin& o) {
  if (!(std::isfinite(o.lon_deg) && std::isfinite(o.lat_deg) && std::abs(o.lon_deg) <= 180.0 &&
        std::abs(o.lat_deg) < 90.0))
    throw input_error("site origin must be [longitude, latitude] in degrees (|lat| < 90)");
  return "+proj=tmerc +lat_0=" + degrees(o.lat_deg) + " +lon_0=" + degrees(o.lon_deg) + " +k=1 +x_0=0 +y_0=0";
}

}  // namespace

struct CrsTransform::State {
  Context context;
  Pj operation;
};

const char* lon_lat_crs() noexcept { return "EPSG:4326"; }

std::string local_frame_definition(const GeoOrigin& origin) {
  return tmerc_about(origin) + " +datum=WGS84 +units=m +no_defs +type=crs";
}

std::string crs_name(const std::string& definition) {
  const Context c = quiet_context();
  const Pj crs = crs_object(c.get(), definition);
  const char* name = proj_get_name(crs.get());
  return name != nullptr ? name : definition;
}

std::string site_frame_crs_name(const std::string& definition) {
  const Context c = quiet_context();
  Pj crs = crs_object(c.get(), definition);
  if (proj_get_type(crs.get()) == PJ_TYPE_COMPOUND_CRS) crs.reset(proj_crs_get_sub_crs(c.get(), crs.get(), 0));
  const char* name = crs ? proj_get_name(crs.get()) : nullptr;
  const std::string shown = name != nullptr ? std::string(name) : definition;
  if (!crs || proj_get_type(crs.get()) != PJ_TYPE_PROJECTED_CRS)
    throw input_error(quoted(definition) + " (" + shown +
                      ") is not a projected CRS; the site frame needs metres east and north (a UTM zone, a national "
                      "grid), or origin = [lon, lat] for a local frame");
  const Pj cs(proj_crs_get_coordinate_system(c.get(), crs.get()));
  for (int axis = 0; cs && axis < proj_cs_get_axis_count(c.get(), cs.get()); ++axis) {
    double factor = 0.0;
    const char* unit = nullptr;
    proj_cs_get_axis_info(c.get(), cs.get(), axis, nullptr, nullptr, nullptr, &factor, &unit, nullptr, nullptr);
    if (factor != 1.0)
      throw input_error(quoted(definition) + " (" + shown + ") has axes in " + (unit ? unit : "another unit") +
                        "; the site frame needs metres");
  }
  return shown;
}

CrsTransform::CrsTransform(std::unique_ptr<State> state) : state_(std::move(state)) {}
CrsTransform::~CrsTransform() = default;
CrsTransform::CrsTransform(CrsTransform&&) noexcept = default;
CrsTransform& CrsTransform::operator=(CrsTransform&&) noexcept = default;

CrsTransform::CrsTransform(const std::string& from, const std::string& to) : state_(std::make_unique<State>()) {
  state_->context = quiet_context();
  PJ_CONTEXT* c = state_->context.get();
  const Pj a = crs_object(c, from), b = crs_object(c, to);
  Pj op(proj_create_crs_to_crs_from_pj(c, a.get(), b.get(), nullptr, nullptr));
  if (!op)
    throw input_error("no transformation from " + quoted(from) + " to " + quoted(to) + " (PROJ: " + reason(c) + ")");
  // Traditional GIS order on both sides: [lon, lat] and [easting, northing].
  state_->operation.reset(proj_normalize_for_visualization(c, op.get()));
  if (!state_->operation)
    throw input_error("no transformation from " + quoted(from) + " to " + quoted(to) + " (PROJ: " + reason(c) + ")");
}

CrsTransform CrsTransform::lon_lat_to_local(const GeoOrigin& origin) {
  auto state = std::make_unique<State>();
  state->context = quiet_context();
  const std::string pipeline =
      "+proj=pipeline +step +proj=unitconvert +xy_in=deg +xy_out=rad +step " + tmerc_about(origin) + " +ellps=WGS84";
  state->operation.reset(proj_create(state->context.get(), pipeline.c_str()));
  if (!state->operation) throw input_error("PROJ: cannot build the local frame (" + reason(state->context.get()) + ")");
  return CrsTransform(std::move(state));
}

namespace {

Vec2 apply(PJ_CONTEXT* c, PJ* op, PJ_DIRECTION direction, const Vec2& p) {
  if (!p.allFinite()) throw input_error("a point with a coordinate that is not a finite number cannot be transformed");
  proj_errno_reset(op);
  const PJ_COORD out = proj_trans(op, direction, proj_coord(p.x(), p.y(), 0.0, 0.0));
  if (proj_errno(op) != 0 || !std::isfinite(out.xy.x) || !std::isfinite(out.xy.y))
    throw input_error("point [" + degrees(p.x()) + ", " + degrees(p.y()) + "] cannot be transformed (PROJ: " +
                      proj_context_errno_string(c, proj_errno(op) != 0 ? proj_errno(op) : PROJ_ERR_COORD_TRANSFM) + ")");
  return Vec2(out.xy.x, out.xy.y);
}

}  // namespace

Vec2 CrsTransform::forward(const Vec2& p) const { return apply(state_->context.get(), state_->operation.get(), PJ_FWD, p); }
Vec2 CrsTransform::inverse(const Vec2& p) const { return apply(state_->context.get(), state_->operation.get(), PJ_INV, p); }

}  // namespace strewn
