/* An out-of-tree shape plugin in plain C: a right triangle with legs along +x and +y. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <strewn/plugin.h>

/* Reads "legs": <number> from the parameter JSON (the host has already checked its type). */
static int build(const char* params_json, const strewn_sink* sink, char* error, size_t size) {
  const char* at = strstr(params_json, "\"legs\":");
  double legs = at ? atof(at + 7) : 0.0;
  if (!(legs > 0.0)) {
    snprintf(error, size, "parameter 'legs' must be positive");
    return STREWN_BAD_PARAMETER;
  }
  if (sink->begin_loop(sink->user_data, 0.0, 0.0) || sink->line_to(sink->user_data, legs, 0.0) ||
      sink->line_to(sink->user_data, 0.0, legs) || sink->end_loop(sink->user_data))
    return STREWN_SINK_REFUSED;
  return STREWN_OK;
}

static const strewn_shape_kind kind = {
    sizeof(strewn_shape_kind), STREWN_PLUGIN_ABI_VERSION, "right_triangle",
    "Right triangle with its right angle at the origin",
    "{\"params\": [{\"name\": \"legs\", \"type\": \"number\", \"unit\": \"m\", \"required\": true,"
    " \"description\": \"length of both legs\"}]}",
    build};
static const strewn_shape_kind* const table[] = {&kind, NULL};

STREWN_PLUGIN_EXPORT const strewn_shape_kind* const* strewn_plugin_entry(void) { return table; }
