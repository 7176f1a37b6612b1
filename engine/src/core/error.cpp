#include "strewn/error.hpp"

#include <utility>

namespace strewn {
input_error::input_error(const std::string& message) : std::runtime_error(message) {}

request_error::request_error(std::string field, const std::string& message)
    : input_error(message), field_(std::move(field)) {}
}  // namespace strewn
