#include "strewn/warning.hpp"

namespace strewn {

const char* to_string(WarningKind kind) noexcept {
  switch (kind) {
    case WarningKind::former_name: return "former name";
    case WarningKind::likely_mistake: return "likely mistake";
  }
  return "?";
}

}  // namespace strewn
