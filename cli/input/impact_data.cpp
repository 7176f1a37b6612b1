#include "input/impact_data.hpp"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <sstream>

#include "strewn/constants.hpp"
#include "strewn/closest_names.hpp"
#include "strewn/error.hpp"
#include "strewn/input_file.hpp"
#include "strewn/shape_registry.hpp"

namespace strewn::cli {
namespace {

std::string trim(const std::string& s) {
  const auto b = s.find_first_not_of(" \t\r\"");
  const auto e = s.find_last_not_of(" \t\r\"");
  return b == std::string::npos ? "" : s.substr(b, e - b + 1);
}

std::vector<std::string> split(const std::string& line, char separator) {
  // Cut at the separators without a stream per line (a million rows should parse in well under a
  // second); "a,b," has three cells, the last empty. In a ';'-separated file (what spreadsheets
  // write where the decimal mark is a comma) a comma inside a cell is that decimal mark.
  std::vector<std::string> cells;
  std::size_t from = 0;
  for (std::size_t at = line.find(separator); at != std::string::npos; at = line.find(separator, from)) {
    cells.push_back(trim(line.substr(from, at - from)));
    from = at + 1;
  }
  if (!line.empty()) cells.push_back(trim(line.substr(from)));
  if (separator == ';')
    for (std::string& c : cells) std::replace(c.begin(), c.end(), ',', '.');
  return cells;
}

std::string lower(std::string s) {
  for (char& c : s) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return s;
}

// Decimal only: strtod also reads hexadecimal ("0x10" was taken as 16 m) and "inf" / "nan".
bool decimal(const std::string& cell) { return cell.find_first_of("xXiInN") == std::string::npos; }

bool is_number(const std::string& cell) {
  if (!decimal(cell)) return false;
  char* end = nullptr;
  std::strtod(cell.c_str(), &end);
  return !cell.empty() && end == cell.c_str() + cell.size();
}

[[noreturn]] void fail(const std::string& file, std::size_t row, const std::string& why) {
  throw input_error(file + ":" + std::to_string(row) + ": " + why);
}

double number(const std::string& file, std::size_t row, const std::string& column, const std::string& cell) {
  char* end = nullptr;
  const double v = std::strtod(cell.c_str(), &end);
  if (cell.empty() || !decimal(cell) || end != cell.c_str() + cell.size() || !std::isfinite(v))
    fail(file, row, "column '" + column + "': '" + quoted_excerpt(cell) + "' is not a number");
  // The range of every length and coordinate strewn takes (README, "Bounded work and ranges").
  if (column != "bearing_deg" && !(std::fabs(v) <= 1e12))
    fail(file, row, "column '" + column + "': " + quoted_excerpt(cell) + " is out of range (at most 1e12 from the origin, in the data's unit)");
  return v;
}

// "# aim = 1.5, 6" or "# aim: 1.5 6" (also "# AIM = [1.5, 6]"): a comment whose first word is
// aim followed by = or : gives the aim, and must then hold exactly two numbers in range; other
// comments are comments ("# aimed at the board"). A statistician's trial: "# aim = 1, 2, 3" and
// "# aim = 1, 2 junk" were read as (1, 2), and "# aim = 1, x" was dropped without a word.
std::optional<Vec2> aim_comment(const std::string& file, std::size_t row, const std::string& line) {
  std::string rest = trim(line.substr(line.find('#') + 1));
  std::string word = rest.substr(0, 3);
  for (char& c : word) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  if (word != "aim") return std::nullopt;
  rest = trim(rest.substr(3));
  if (rest.empty() || (rest[0] != '=' && rest[0] != ':')) return std::nullopt;
  rest = rest.substr(1);
  for (char& c : rest)
    if (c == ',' || c == '[' || c == ']') c = ' ';
  std::istringstream in(rest);
  std::string a, b, extra;
  in >> a >> b;
  const bool more = static_cast<bool>(in >> extra);
  const auto value = [&](const std::string& cell, double& v) {
    char* end = nullptr;
    v = std::strtod(cell.c_str(), &end);
    return !cell.empty() && end == cell.c_str() + cell.size() && std::isfinite(v);
  };
  double x = 0.0, y = 0.0;
  if (more || !value(a, x) || !value(b, y))
    fail(file, row, "the '# aim' line must give two numbers, x and y ('# aim = 1.5, 6'): '" + quoted_excerpt(trim(line)) + "'");
  if (!(std::fabs(x) <= 1e12 && std::fabs(y) <= 1e12))
    fail(file, row, "the '# aim' line's point is out of range (coordinates at most 1e12 from the origin, in the data's unit)");
  return Vec2(x, y);
}

}  // namespace

ImpactData read_impacts(const std::string& path, const std::optional<Vec2>& aim) {
  // A regular file under the size cap; a byte-order mark (spreadsheets write one) is dropped.
  std::istringstream in(read_input_file(path));
  ImpactData data;
  data.file = path;
  std::vector<std::string> header;
  char separator = ',';
  int ix = -1, iy = -1, idist = -1, ibear = -1, igroup = -1;
  std::string line;
  std::size_t row = 0, aim_row = 0;
  while (std::getline(in, line)) {
    ++row;
    if (trim(line).empty()) continue;
    if (trim(line)[0] == '#') {
      if (const auto a = aim_comment(path, row, line)) {
        if (aim_row) fail(path, row, "a second '# aim' line (the first is line " + std::to_string(aim_row) + ")");
        data.aim = a;
        aim_row = row;
      }
      continue;
    }
    if (header.empty()) {
      // The header decides the separator: ';' when it has one and no comma, else ','.
      separator = line.find(';') != std::string::npos && line.find(',') == std::string::npos ? ';' : ',';
      header = split(line, separator);
      // A first row of numbers is data without a header: which column is which is not guessed.
      if (std::all_of(header.begin(), header.end(), is_number))
        fail(path, row,
             "no header row: the first row holds numbers ('" + quoted_excerpt(trim(line)) +
                 "'); add a first line naming the columns, x,y (or distance,bearing_deg with an aim)");
      const std::vector<std::string> known = {"x", "y", "distance", "bearing_deg", "group"};
      for (std::size_t i = 0; i < header.size(); ++i) {
        const std::string h = lower(header[i]);  // X,Y as spreadsheets capitalise them
        int* slot = h == "x" ? &ix : h == "y" ? &iy : h == "distance" ? &idist : h == "bearing_deg" ? &ibear
                  : h == "group" || h == "source" ? &igroup : nullptr;
        if (slot == nullptr) {
          fail(path, row, "unknown column '" + quoted_excerpt(header[i]) + "'" + (h.size() <= 64 ? did_you_mean(h, known) : ""));
        }
        if (*slot >= 0) fail(path, row, "column '" + quoted_excerpt(header[i]) + "' appears twice");
        *slot = static_cast<int>(i);
      }
      const bool xy = ix >= 0 && iy >= 0, polar = idist >= 0 && ibear >= 0;
      if (xy == polar)
        fail(path, row, xy ? "give x, y or distance, bearing_deg, not both"
                           : "missing column: the header needs x and y, or distance and bearing_deg");
      if (aim) data.aim = aim;
      continue;
    }
    const std::vector<std::string> cells = split(line, separator);
    if (cells.size() != header.size())
      fail(path, row, "expected " + std::to_string(header.size()) + " cells, found " + std::to_string(cells.size()));
    Vec2 p;
    if (ix >= 0) {
      p = Vec2(number(path, row, "x", cells[ix]), number(path, row, "y", cells[iy]));
    } else {
      if (!data.aim) fail(path, row, "distance and bearing need an aim: --aim X Y or a '# aim = X, Y' line");
      const double d = number(path, row, "distance", cells[idist]);
      const double b = number(path, row, "bearing_deg", cells[ibear]) * kPi / 180.0;
      if (d < 0) fail(path, row, "column 'distance': must not be negative");
      p = *data.aim + d * Vec2(std::sin(b), std::cos(b));  // bearing: clockwise from north (+y)
    }
    const std::string g = igroup >= 0 ? cells[igroup] : "";
    auto it = std::find_if(data.groups.begin(), data.groups.end(), [&](const ImpactGroup& x) { return x.name == g; });
    if (it == data.groups.end()) {
      data.groups.push_back({g, {}, {}});
      it = std::prev(data.groups.end());
    }
    it->points.push_back(p);
    it->rows.push_back(row);
  }
  if (header.empty()) throw input_error(path + ": no header row (x,y or distance,bearing_deg)");
  if (data.groups.empty()) throw input_error(path + ": no impacts after the header");
  if (aim) data.aim = aim;
  return data;
}

}  // namespace strewn::cli
