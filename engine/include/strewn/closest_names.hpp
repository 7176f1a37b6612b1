#ifndef STREWN_CLOSEST_NAMES_HPP
#define STREWN_CLOSEST_NAMES_HPP

/// \file
/// Suggestions for a misspelt name (a shape kind, a parameter, a key, a command), so that every
/// "unknown ..." message offers the same hint:
///
///     throw strewn::input_error("unknown shape kind '" + kind + "'" + strewn::did_you_mean(kind, kinds));

#include <string>
#include <vector>

#include "strewn/export.hpp"

namespace strewn {

/// Closest candidates to `word` by edit distance (at most 2 edits, or a third of its length),
/// all those at the smallest distance, in the candidates' order.
STREWN_API std::vector<std::string> closest_names(const std::string& word,
                                                  const std::vector<std::string>& candidates);

/// " (did you mean 'x'?)" with x the first of closest_names(word, candidates), or "" when none
/// is close: the tail of an "unknown ..." message.
STREWN_API std::string did_you_mean(const std::string& word, const std::vector<std::string>& candidates);

}  // namespace strewn

#endif
