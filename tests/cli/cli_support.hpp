#ifndef STREWN_TESTS_CLI_SUPPORT_HPP
#define STREWN_TESTS_CLI_SUPPORT_HPP

// What the per-command tests share: the command run in-process (cli_run.hpp), the test data, the
// demo scenario, reading a written file, a real XML parse of a written SVG, and small scenarios
// written on the fly.

#include <cstdlib>
#include <fstream>
#include <iterator>
#include <string>

#include "cli_run.hpp"

namespace strewn::test {

inline const std::string data = STREWN_TEST_DATA_DIR "/cli/";
inline const std::string demo = STREWN_SOURCE_DIR "/shapes/throwing_lane.toml";

inline std::string read_file(const std::string& path) {
  std::ifstream in(path);
  return std::string((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
}

// A real XML parse of a written SVG, by Python's xml.etree (Debian's python3), not by strewn.
inline bool xml_parses(const std::string& path) {
  const std::string cmd = "/usr/bin/python3 -c 'import sys, xml.etree.ElementTree as E; "
                          "r = E.parse(sys.argv[1]).getroot(); sys.exit(0 if r.tag.endswith(\"svg\") else 1)' \"" +
                          path + "\"";
  return std::system(cmd.c_str()) == 0;
}

// A one-source, one-zone scenario with the given pieces, written beside the test binary.
inline std::string scenario_with(const std::string& name, const std::string& settings, const std::string& spread,
                                 const std::string& exposure, const std::string& params, const std::string& zone_extra) {
  const std::string path = std::string(STREWN_TEST_BINARY_DIR) + "/" + name + ".toml";
  std::ofstream f(path);
  f << "[settings]\n" << settings << "\n[[source]]\nmean = [0, 0]\nspread = " << spread << "\n" << exposure
    << "\n[[zone]]\nname = \"z\"\nrole = \"keep_out\"\nshape = \"disk\"\nparams = " << params << "\n" << zone_extra << "\n";
  return path;
}

}  // namespace strewn::test

#endif
