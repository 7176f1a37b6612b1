// Reading a radial profile (strewn/radial_profile.hpp) from CSV: a header naming the distance's
// unit, then rows "distance, rate". Every message names the file and the line.
#include <cctype>
#include <cstdio>
#include <cmath>
#include <sstream>

#include "strewn/closest_names.hpp"
#include "strewn/error.hpp"
#include "strewn/input_file.hpp"
#include "strewn/radial_profile.hpp"

namespace strewn {

namespace {

std::string trimmed(const std::string& s) {
  std::size_t a = 0, b = s.size();
  while (a < b && std::isspace(static_cast<unsigned char>(s[a]))) ++a;
  while (b > a && std::isspace(static_cast<unsigned char>(s[b - 1]))) --b;
  return s.substr(a, b - a);
}

std::vector<std::string> fields(const std::string& line) {
  std::vector<std::string> out;
  std::stringstream s(line);
  std::string f;
  while (std::getline(s, f, ',')) out.push_back(trimmed(f));
  if (!line.empty() && line.back() == ',') out.emplace_back();
  return out;
}

[[noreturn]] void fail_at(const std::string& name, std::size_t line, const std::string& why) {
  throw input_error(name + ":" + std::to_string(line) + ": " + why);
}

}  // namespace

RadialProfile parse_radial_profile_csv(const std::string& text, const std::string& name, std::optional<LengthUnit> declared,
                                       LengthUnit bare) {
  std::stringstream in(text);
  std::string line;
  std::size_t number = 0;
  bool header = false;
  double metres = 0.0;
  std::vector<double> distance, rate;
  std::vector<std::size_t> lines;
  while (std::getline(in, line)) {
    ++number;
    if (!line.empty() && line.back() == '\r') line.pop_back();
    const std::string t = trimmed(line);
    if (t.empty() || t[0] == '#') continue;
    const std::vector<std::string> f = fields(t);
    if (f.size() != 2) fail_at(name, number, "expected two columns (distance, rate), found " + std::to_string(f.size()));
    if (!header) {
      std::string d = f[0];
      for (char& c : d) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
      std::optional<LengthUnit> own;
      if (d.rfind("distance_", 0) == 0) {
        own = length_unit_from(d.substr(9));
        if (!own)
          fail_at(name, number, "unknown unit in column '" + f[0] + "'" +
                                    did_you_mean(d.substr(9), length_unit_spellings()) + " (use distance_m or distance_ft)");
      } else if (d != "distance") {
        fail_at(name, number, "the first column must be distance_m, distance_ft or distance (found '" + f[0] + "')" +
                                  did_you_mean(d, {"distance_m", "distance_ft", "distance"}));
      }
      if (own && declared && *own != *declared)
        fail_at(name, number, std::string("the column says ") + symbol(*own) + " but profile_unit says " + symbol(*declared));
      std::string r = f[1];
      for (char& c : r) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
      if (r.rfind("rate", 0) != 0)
        fail_at(name, number, "the second column must be rate (or rate_<unit>, e.g. rate_mm_per_h), found '" + f[1] + "'" +
                                  did_you_mean(r, {"rate"}));
      metres = metres_per(own ? *own : declared ? *declared : bare);
      header = true;
      continue;
    }
    double v[2];
    for (int k = 0; k < 2; ++k) {
      std::size_t used = 0;
      try {
        v[k] = std::stod(f[k], &used);
      } catch (const std::exception&) {
        used = 0;
      }
      if (used == 0 || used != f[k].size() || !std::isfinite(v[k]))
        fail_at(name, number, std::string(k == 0 ? "distance" : "rate") + " must be a finite number (found '" + f[k] + "')");
    }
    distance.push_back(metres * v[0]);
    rate.push_back(v[1]);
    lines.push_back(number);
  }
  if (!header) fail_at(name, number, "no header: the first line must be 'distance_m, rate' (or distance_ft)");
  try {
    return RadialProfile(distance, rate, name);
  } catch (const input_error& e) {
    // "profile row K: why" from the table becomes the file's line of row K.
    const std::string what = e.what();
    std::size_t row = 0;
    if (std::sscanf(what.c_str(), "profile row %zu:", &row) == 1 && row >= 1 && row <= lines.size())
      fail_at(name, lines[row - 1], what.substr(what.find(':') + 2));
    fail_at(name, number, what);
  }
}

RadialProfile read_radial_profile_csv(const std::string& path, std::optional<LengthUnit> declared, LengthUnit bare) {
  return parse_radial_profile_csv(read_input_file(path), path, declared, bare);
}

}  // namespace strewn
