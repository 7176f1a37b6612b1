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

/// Bad input in a request a program built (a map's window, a clearance's direction, a number of
/// replicates), as opposed to a site file: an input_error that also says which field of the
/// request is wrong, so that a tool can name it in its own words (a command-line option, a
/// keyword argument). `what()` is in the library's own terms and names the field for a reader:
/// "the map window must be X0 Y0 X1 Y1 with X1 > X0 and Y1 > Y0".
class STREWN_API request_error : public input_error {
 public:
  /// `field` is the request struct's member, e.g. "window" (SiteMapRequest::window).
  request_error(std::string field, const std::string& message);
  const std::string& field() const noexcept { return field_; }

 private:
  std::string field_;
};

}  // namespace strewn

#endif
