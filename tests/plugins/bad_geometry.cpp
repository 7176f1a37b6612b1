// Plugins that misuse the sink: a self-intersecting bow tie, a NaN coordinate, a line before any
// loop, a loop left open, and one that ignores a refusal and carries on.
#include <cmath>

#include "strewn/plugin.h"

static int bow_tie(const char*, const strewn_sink* s, char*, size_t) {
  s->begin_loop(s->user_data, 0, 0);
  s->line_to(s->user_data, 1, 1);
  s->line_to(s->user_data, 1, 0);
  s->line_to(s->user_data, 0, 1);
  s->end_loop(s->user_data);
  return STREWN_OK;
}
static int nan_point(const char*, const strewn_sink* s, char*, size_t) {
  s->begin_loop(s->user_data, 0, 0);
  if (s->line_to(s->user_data, NAN, 1) != 0) return STREWN_SINK_REFUSED;
  return STREWN_OK;
}
static int line_first(const char*, const strewn_sink* s, char*, size_t) {
  s->line_to(s->user_data, 1, 1);  // ignores the refusal
  return STREWN_OK;
}
static int left_open(const char*, const strewn_sink* s, char*, size_t) {
  s->begin_loop(s->user_data, 0, 0);
  s->line_to(s->user_data, 1, 0);
  s->line_to(s->user_data, 1, 1);
  return STREWN_OK;
}
#define KIND(NAME, FN) \
  static const strewn_shape_kind NAME = {sizeof(strewn_shape_kind), STREWN_PLUGIN_ABI_VERSION, \
                                         #NAME, "misbehaves", R"({"params": []})", FN};
KIND(bow_tie_shape, bow_tie)
KIND(nan_shape, nan_point)
KIND(line_first_shape, line_first)
KIND(left_open_shape, left_open)
static const strewn_shape_kind* const table[] = {&bow_tie_shape, &nan_shape, &line_first_shape,
                                                 &left_open_shape, nullptr};
extern "C" STREWN_PLUGIN_EXPORT const strewn_shape_kind* const* strewn_plugin_entry(void) {
  return table;
}
