#ifndef STREWN_SRC_PARAMETER_CHECK_HPP
#define STREWN_SRC_PARAMETER_CHECK_HPP

// Checks a shape's parameters against the plugin's description before the plugin sees them, so
// that every plugin gets the same clear messages: unknown parameter (with "did you mean"),
// missing required parameter, wrong type, value not among the choices. Fills in defaults.

#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "strewn/warning.hpp"

namespace strewn::detail {

// Former names to new ones, by the "former" entries of the description (the alias table of a
// kind): each former name used is renamed in `params` (its value mapped when the entry has
// "values") and reported in `warnings` when that is not null. Throws strewn::input_error when a
// former and a new name are both given. Runs before check_parameters.
void rename_former_parameters(const std::string& kind, const nlohmann::json& description,
                              nlohmann::json& params, std::vector<Warning>* warnings);

// Throws strewn::input_error "shape 'KIND': ..." on the first problem.
void check_parameters(const std::string& kind, const nlohmann::json& description,
                      nlohmann::json& params);

}  // namespace strewn::detail

#endif
