// A plugin whose build always reports an error, and one that fills the whole error buffer
// without a terminating NUL: both must come back as one clear message.
#include <cstring>

#include "strewn/plugin.h"

static int fails(const char*, const strewn_sink*, char* error, size_t size) {
  std::strncpy(error, "the survey file for this shape is missing", size);
  return STREWN_BAD_PARAMETER;
}
static int overflows(const char*, const strewn_sink*, char* error, size_t size) {
  std::memset(error, 'x', size);
  return STREWN_INTERNAL;
}
static const strewn_shape_kind failing = {sizeof(strewn_shape_kind), STREWN_PLUGIN_ABI_VERSION,
                                          "always_fails", "reports an error", R"({"params": []})",
                                          fails};
static const strewn_shape_kind overflowing = {sizeof(strewn_shape_kind),
                                              STREWN_PLUGIN_ABI_VERSION, "overflows_error",
                                              "fills the error buffer", R"({"params": []})",
                                              overflows};
static const strewn_shape_kind* const table[] = {&failing, &overflowing, nullptr};
extern "C" STREWN_PLUGIN_EXPORT const strewn_shape_kind* const* strewn_plugin_entry(void) {
  return table;
}
