#ifndef STREWN_CLI_THROWER_OUTPUT_HPP
#define STREWN_CLI_THROWER_OUTPUT_HPP

// What every output says about throwers and barriers: the spread each thrower's dispersion
// became at its distance, and the share of events each barrier stops (strewn/thrower.hpp,
// strewn/barrier_effect.hpp). One sentence each for the table and the report, a JSON value each.
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "strewn/assess.hpp"

namespace strewn::cli {

std::vector<std::string> thrower_sentences(const Site& s);
std::vector<std::string> barrier_sentences(const Site& s, const Assessment& a);
nlohmann::json throwers_json(const Site& s);
nlohmann::json barriers_json(const Site& s, const Assessment& a);

}  // namespace strewn::cli

#endif
