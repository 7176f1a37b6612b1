#ifndef STREWN_SRC_SITE_FIELD_CSV_HPP
#define STREWN_SRC_SITE_FIELD_CSV_HPP

// The CSV files of field tests (a catch-can test, a leg test): `# key = value` lines that state
// the test's settings (its duration, the cans' opening, ...), a header row naming the columns,
// then rows of numbers. Lines starting with '#' that are not `# word = value` are comments, and
// blank lines are skipped. Every message is "FILE:LINE:COLUMN: why" (COLUMN counts characters
// from 1), so a user finds the cell at once.

#include <cstddef>
#include <map>
#include <optional>
#include <string>
#include <vector>

namespace strewn::field_csv {

struct Key {
  double value = 0.0;
  std::size_t line = 0, column = 0;
};

struct Row {
  std::size_t line = 0;
  std::vector<std::string> cells;
  std::vector<std::size_t> columns;  // where each cell starts (1-based characters)
};

struct Table {
  std::string name;                  // the file, for messages
  std::map<std::string, Key> keys;   // lower case
  std::vector<std::string> header;   // lower case, trimmed
  std::vector<std::size_t> header_columns;
  std::size_t header_line = 0;
  std::vector<Row> rows;
};

[[noreturn]] void fail_at(const std::string& name, std::size_t line, std::size_t column, const std::string& why);

// Reads the text. `keys` are the settings a file may state; an unknown one is refused with a
// "did you mean". Throws strewn::input_error for a missing header, a row with another number of
// cells than the header, a repeated key or a key whose value is not a finite number.
Table parse(const std::string& text, const std::string& name, const std::vector<std::string>& keys);

// The index of the header column named one of `names`, if any.
std::optional<std::size_t> column_of(const Table& t, const std::vector<std::string>& names);

// Refuses a header column not among `known`, naming it with a "did you mean" and `hint`.
void check_columns(const Table& t, const std::vector<std::string>& known, const std::string& hint);

// A cell as a finite number; else "FILE:LINE:COLUMN: <what> must be a finite number (found 'x')".
double number(const Table& t, const Row& r, std::size_t k, const std::string& what);

}  // namespace strewn::field_csv

#endif
