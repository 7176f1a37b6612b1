// A plugin whose table lists no shape kinds.
#include "strewn/plugin.h"

static const strewn_shape_kind* const table[] = {nullptr};
extern "C" STREWN_PLUGIN_EXPORT const strewn_shape_kind* const* strewn_plugin_entry(void) {
  return table;
}
