#ifndef STREWN_WARNING_HPP
#define STREWN_WARNING_HPP

/// \file
/// What a reader accepted but the user should look at. Every warning carries a kind beside its
/// one-line message, so a tool decides how to show it on the kind (Python: a DeprecationWarning
/// for a former name, a UserWarning for a likely mistake), never on the message's text.

#include <string>

#include "strewn/export.hpp"

namespace strewn {

enum class WarningKind {
  former_name,     ///< a renamed key, parameter or value still read for one release
  likely_mistake,  ///< a value read as written that looks like a slip (1.5708 in a degrees key)
};

/// "former name", "likely mistake".
STREWN_API const char* to_string(WarningKind kind) noexcept;

struct Warning {
  WarningKind kind = WarningKind::likely_mistake;
  /// One line, "FILE:LINE:COLUMN: key: why" when it comes from a file.
  std::string message;
};

}  // namespace strewn

#endif
