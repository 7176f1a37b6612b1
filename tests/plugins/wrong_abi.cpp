// A plugin built against a future ABI: the host must refuse it by version.
#include "strewn/plugin.h"

static int build(const char*, const strewn_sink*, char*, size_t) { return STREWN_OK; }
static const strewn_shape_kind kind = {sizeof(strewn_shape_kind), STREWN_PLUGIN_ABI_VERSION + 1,
                                       "future_shape", "from a newer strewn", R"({"params": []})",
                                       build};
static const strewn_shape_kind* const table[] = {&kind, nullptr};
extern "C" STREWN_PLUGIN_EXPORT const strewn_shape_kind* const* strewn_plugin_entry(void) {
  return table;
}
