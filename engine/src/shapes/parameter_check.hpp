#ifndef STREWN_SRC_PARAMETER_CHECK_HPP
#define STREWN_SRC_PARAMETER_CHECK_HPP

// Checks a shape's parameters against the plugin's description before the plugin sees them, so
// that every plugin gets the same clear messages: unknown parameter (with "did you mean"),
// missing required parameter, wrong type, value not among the choices. Fills in defaults.

#include <nlohmann/json.hpp>
#include <string>

namespace strewn::detail {

// Throws strewn::input_error "shape 'KIND': ..." on the first problem.
void check_parameters(const std::string& kind, const nlohmann::json& description,
                      nlohmann::json& params);

}  // namespace strewn::detail

#endif
