#ifndef STREWN_PLUGIN_H
#define STREWN_PLUGIN_H

/* The shape plugin ABI: plain C, stable, versioned.
 *
 * A plugin module exports one symbol, strewn_plugin_entry, returning a NULL-terminated array of
 * shape kinds. Each kind has a name (a short stable id), a one-line summary, a JSON description of
 * its parameters and a build function. The build function reads its parameters (a JSON object)
 * and emits closed loops through the sink the host passes in; it needs no numerics.
 *
 * Rules of the boundary:
 *  - Nothing is thrown across it: build returns STREWN_OK or an error code and writes a one-line,
 *    NUL-terminated message into `error` (at most error_size bytes, the host owns the buffer).
 *  - Structs carry struct_size; fields are only ever appended, so a host reads only the fields
 *    a module's struct_size covers. abi_version changes when the meaning of a field changes,
 *    and a host refuses kinds of another abi_version.
 *  - The side that allocates frees: the module owns the strings and tables it returns (they must
 *    live as long as the module is loaded); the host owns the sink and the error buffer.
 *
 * Coordinates are metres in the site frame, angles degrees counter-clockwise from +x.
 *
 * Parameter description (params_json): {"params": [ {"name": "radius", "type": "number",
 *   "unit": "m", "required": true, "description": "..."}, ... ]}  with type one of
 *   number, point ([x, y]), points ([[x, y], ...]), point_lists ([[[x, y], ...], ...]),
 *   string (optionally with "choices": [...]), parts (composite: [{"kind", "operation",
 *   "params"}, ...]). Optional parameters may carry "default".
 *   A renamed parameter lists its former spelling, which the host still reads for one release
 *   with a warning (the plugin sees only the new name): "former": {"name": "r_inner"}; a string
 *   parameter whose values were renamed too maps them: "former": {"name": "swing", "values":
 *   {"left": "left_seen_from_hinge", ...}}. Giving both spellings is refused.
 *   A renamed kind names its former name at the top level, "former_kind": "annular_sector": the
 *   host reads a shape of that kind as this one for one release, with a warning.
 */

#include <stddef.h>
#include <stdint.h>

#ifdef __cplusplus
extern "C" {
#endif

#define STREWN_PLUGIN_ABI_VERSION 1u
#define STREWN_PLUGIN_ENTRY_SYMBOL "strewn_plugin_entry"

#if defined(_WIN32)
#define STREWN_PLUGIN_EXPORT __declspec(dllexport)
#else
#define STREWN_PLUGIN_EXPORT __attribute__((visibility("default")))
#endif

enum strewn_status {
  STREWN_OK = 0,
  STREWN_BAD_PARAMETER = 1, /* a parameter is missing, malformed or out of range */
  STREWN_SINK_REFUSED = 2,  /* a sink callback returned non-zero; stop and return it */
  STREWN_INTERNAL = 3       /* anything else; the message says what */
};

enum strewn_operation {
  STREWN_UNION = 0,
  STREWN_DIFFERENCE = 1, /* what was emitted so far minus the new part */
  STREWN_INTERSECTION = 2
};

/* Callbacks owned by the host. Each returns 0 on success, non-zero when it refuses (the message
 * is then already recorded by the host); the plugin should stop and return STREWN_SINK_REFUSED. */
typedef struct strewn_sink {
  uint32_t struct_size;
  void* user_data;
  /* Starts a loop at (x, y). */
  int (*begin_loop)(void* user_data, double x, double y);
  /* Straight segment from the current point. */
  int (*line_to)(void* user_data, double x, double y);
  /* Elliptic arc: centre (cx, cy), semi-axes rx along the direction rotation_deg and ry across
   * it; the parameter angle runs from t_from_deg to t_to_deg (counter-clockwise when t_to_deg >
   * t_from_deg). When the current point is not the arc's first point, a straight segment joins
   * them. */
  int (*arc_to)(void* user_data, double cx, double cy, double rx, double ry, double rotation_deg,
                double t_from_deg, double t_to_deg);
  /* Closes the loop back to its first point. */
  int (*end_loop)(void* user_data);
  /* Builds a shape of another kind from its JSON parameters and combines it with everything
   * emitted so far by this build (loops emitted earlier form one region). */
  int (*combine)(void* user_data, int operation, const char* kind, const char* params_json);
} strewn_sink;

typedef int (*strewn_build_fn)(const char* params_json, const strewn_sink* sink, char* error,
                               size_t error_size);

typedef struct strewn_shape_kind {
  uint32_t struct_size;
  uint32_t abi_version; /* STREWN_PLUGIN_ABI_VERSION the kind was built against */
  const char* name;     /* short stable id: lowercase letters, digits and '_' */
  const char* summary;  /* one line */
  const char* params_json;
  strewn_build_fn build;
} strewn_shape_kind;

typedef const strewn_shape_kind* const* (*strewn_plugin_entry_fn)(void);

#ifdef __cplusplus
}
#endif

#endif
