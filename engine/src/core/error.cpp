#include "strewn/error.hpp"

namespace strewn {
input_error::input_error(const std::string& message) : std::runtime_error(message) {}
}  // namespace strewn
