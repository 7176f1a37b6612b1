#include "field_csv.hpp"

#include <cctype>
#include <cmath>
#include <sstream>

#include "strewn/closest_names.hpp"
#include "strewn/error.hpp"
#include "strewn/input_file.hpp"

namespace strewn::field_csv {
namespace {

std::string lower(std::string s) {
  for (char& c : s) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return s;
}

// Splits at commas; each cell trimmed, with the column (1-based) where its text starts.
void split(const std::string& line, std::vector<std::string>& cells, std::vector<std::size_t>& columns) {
  cells.clear();
  columns.clear();
  std::size_t start = 0;
  while (true) {
    const std::size_t end = line.find(',', start);
    const std::size_t stop = end == std::string::npos ? line.size() : end;
    std::size_t a = start, b = stop;
    while (a < b && std::isspace(static_cast<unsigned char>(line[a]))) ++a;
    while (b > a && std::isspace(static_cast<unsigned char>(line[b - 1]))) --b;
    cells.push_back(line.substr(a, b - a));
    columns.push_back(a + 1);
    if (end == std::string::npos) break;
    start = end + 1;
  }
}

// The whole text as a finite decimal number, or nothing. (std::stod also reads hexadecimal:
// a cell "0x10" was taken as 16 m.)
std::optional<double> finite_number(const std::string& text) {
  if (text.find_first_of("xX") != std::string::npos) return std::nullopt;
  std::size_t used = 0;
  double x = 0.0;
  try {
    x = std::stod(text, &used);
  } catch (const std::exception&) {
    return std::nullopt;
  }
  if (used == 0 || used != text.size() || !std::isfinite(x)) return std::nullopt;
  return x;
}

bool is_word(const std::string& s) {
  if (s.empty()) return false;
  for (char c : s)
    if (!(std::isalnum(static_cast<unsigned char>(c)) || c == '_')) return false;
  return true;
}

}  // namespace

void fail_at(const std::string& name, std::size_t line, std::size_t column, const std::string& why) {
  throw input_error(name + ":" + std::to_string(line) + ":" + std::to_string(column) + ": " + why);
}

Table parse(const std::string& text, const std::string& name, const std::vector<std::string>& keys) {
  Table t;
  t.name = name;
  std::stringstream in(text);
  std::string line;
  std::size_t number = 0;
  while (std::getline(in, line)) {
    ++number;
    if (!line.empty() && line.back() == '\r') line.pop_back();
    std::size_t first = 0;
    while (first < line.size() && std::isspace(static_cast<unsigned char>(line[first]))) ++first;
    if (first == line.size()) continue;
    if (line[first] == '#') {
      // "# word = value" states a setting; any other '#' line is a comment.
      const std::size_t eq = line.find('=', first);
      if (eq == std::string::npos) continue;
      std::size_t a = first + 1, b = eq;
      while (a < b && std::isspace(static_cast<unsigned char>(line[a]))) ++a;
      while (b > a && std::isspace(static_cast<unsigned char>(line[b - 1]))) --b;
      const std::string key = lower(line.substr(a, b - a));
      if (!is_word(key)) continue;
      if (!t.header.empty()) fail_at(name, number, a + 1, "the setting '" + key + "' must come before the header row");
      bool known = false;
      for (const std::string& k : keys) known = known || k == key;
      if (!known) fail_at(name, number, a + 1, "unknown setting '" + quoted_excerpt(key, 30) + "'" + did_you_mean(key, keys));
      if (t.keys.count(key)) fail_at(name, number, a + 1, "the setting '" + key + "' is given twice");
      std::size_t v = eq + 1;
      while (v < line.size() && std::isspace(static_cast<unsigned char>(line[v]))) ++v;
      std::string value = line.substr(v);
      while (!value.empty() && std::isspace(static_cast<unsigned char>(value.back()))) value.pop_back();
      const std::optional<double> x = finite_number(value);
      if (!x) fail_at(name, number, v + 1, key + " must be a finite number (found '" + quoted_excerpt(value, 30) + "')");
      t.keys[key] = Key{*x, number, v + 1};
      continue;
    }
    if (t.header.empty()) {
      split(line, t.header, t.header_columns);
      for (std::string& h : t.header) h = lower(h);
      t.header_line = number;
      continue;
    }
    Row r;
    r.line = number;
    split(line, r.cells, r.columns);
    if (r.cells.size() != t.header.size())
      fail_at(name, number, r.columns.size() > t.header.size() ? r.columns[t.header.size()] : line.size() + 1,
              "expected " + std::to_string(t.header.size()) + " cells as in the header, found " +
                  std::to_string(r.cells.size()));
    t.rows.push_back(std::move(r));
  }
  if (t.header.empty()) fail_at(name, number == 0 ? 1 : number, 1, "no header row naming the columns");
  return t;
}

std::optional<std::size_t> column_of(const Table& t, const std::vector<std::string>& names) {
  for (std::size_t k = 0; k < t.header.size(); ++k)
    for (const std::string& n : names)
      if (t.header[k] == n) return k;
  return std::nullopt;
}

double number(const Table& t, const Row& r, std::size_t k, const std::string& what) {
  const std::optional<double> x = finite_number(r.cells[k]);
  if (!x) fail_at(t.name, r.line, r.columns[k], what + " must be a finite number (found '" + quoted_excerpt(r.cells[k], 30) + "')");
  return *x;
}

void check_columns(const Table& t, const std::vector<std::string>& known, const std::string& hint) {
  for (std::size_t k = 0; k < t.header.size(); ++k) {
    bool ok = false;
    for (const std::string& n : known) ok = ok || t.header[k] == n;
    if (!ok)
      fail_at(t.name, t.header_line, t.header_columns[k],
              "unknown column '" + quoted_excerpt(t.header[k], 30) + "'" + did_you_mean(t.header[k], known) + " (" + hint + ")");
  }
}

}  // namespace strewn::field_csv
