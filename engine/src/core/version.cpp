#include "strewn/version.hpp"

namespace strewn {
const char* library_version() noexcept { return STREWN_VERSION_STRING; }
}  // namespace strewn
