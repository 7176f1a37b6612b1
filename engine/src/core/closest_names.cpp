#include "strewn/closest_names.hpp"

#include <algorithm>
#include <string>
#include <vector>

namespace strewn {
namespace {

// Levenshtein distance; names are short, so the quadratic table is fine.
std::size_t edit_distance(const std::string& a, const std::string& b) {
  std::vector<std::size_t> row(b.size() + 1);
  for (std::size_t j = 0; j <= b.size(); ++j) row[j] = j;
  for (std::size_t i = 1; i <= a.size(); ++i) {
    std::size_t diagonal = row[0];
    row[0] = i;
    for (std::size_t j = 1; j <= b.size(); ++j) {
      const std::size_t substitution = diagonal + (a[i - 1] == b[j - 1] ? 0 : 1);
      diagonal = row[j];
      row[j] = std::min({row[j] + 1, row[j - 1] + 1, substitution});
    }
  }
  return row[b.size()];
}

}  // namespace

std::vector<std::string> closest_names(const std::string& word,
                                       const std::vector<std::string>& candidates) {
  const std::size_t allowed = std::max<std::size_t>(2, word.size() / 3);
  std::size_t best = allowed + 1;
  std::vector<std::string> out;
  for (const auto& c : candidates) {
    const std::size_t d = edit_distance(word, c);
    if (d < best) {
      best = d;
      out.clear();
    }
    if (d == best) out.push_back(c);
  }
  return out;
}

std::string did_you_mean(const std::string& word, const std::vector<std::string>& candidates) {
  const auto close = closest_names(word, candidates);
  return close.empty() ? std::string() : " (did you mean '" + close.front() + "'?)";
}

}  // namespace strewn
