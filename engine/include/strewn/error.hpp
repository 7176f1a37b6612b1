#ifndef STREWN_ERROR_HPP
#define STREWN_ERROR_HPP

#include <stdexcept>
#include <string>

#include "strewn/export.hpp"

namespace strewn {

/// The one exception type for bad input: an invalid spread, a malformed region, a shape
/// parameter out of range, a plugin that cannot be loaded. `what()` is one line that names the
/// offending item; callers add the file, line and key they know about.
/// Numerical outcomes (tolerance not met, methods disagreeing) are never exceptions: they are
/// reported in the result structs.
class STREWN_API input_error : public std::runtime_error {
 public:
  explicit input_error(const std::string& message);
};

}  // namespace strewn

#endif
