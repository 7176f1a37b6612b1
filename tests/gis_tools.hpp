#ifndef STREWN_TESTS_GIS_TOOLS_HPP
#define STREWN_TESTS_GIS_TOOLS_HPP

// PROJ's and GDAL's own programs (cs2cs, projinfo, ogr2ogr, gdalinfo, gdallocationinfo from
// Debian's proj-bin and gdal-bin), run from tests as the independent side of a check, and a
// scratch folder per test for the files they make.

#include <cstdio>
#include <filesystem>
#include <stdexcept>
#include <string>

namespace strewn::test {

struct ToolRun {
  int status = -1;
  std::string out;  // standard output
};

/// Runs a shell command, standard error discarded, and returns its exit status and output.
inline ToolRun run_tool(const std::string& command) {
  ToolRun r;
  FILE* pipe = ::popen((command + " 2>/dev/null").c_str(), "r");
  if (pipe == nullptr) throw std::runtime_error("cannot run: " + command);
  char buffer[4096];
  std::size_t n = 0;
  while ((n = std::fread(buffer, 1, sizeof buffer, pipe)) > 0) r.out.append(buffer, n);
  const int s = ::pclose(pipe);
  r.status = WIFEXITED(s) ? WEXITSTATUS(s) : -1;
  return r;
}

/// A fresh, empty folder under the test binary folder.
inline std::string scratch_dir(const std::string& name) {
  const std::filesystem::path p = std::filesystem::path(STREWN_TEST_BINARY_DIR) / "gis_scratch" / name;
  std::filesystem::remove_all(p);
  std::filesystem::create_directories(p);
  return p.string();
}

/// Writes text to a file.
inline void write_text(const std::string& path, const std::string& text) {
  FILE* f = std::fopen(path.c_str(), "w");
  if (f == nullptr) throw std::runtime_error("cannot write " + path);
  std::fwrite(text.data(), 1, text.size(), f);
  std::fclose(f);
}

}  // namespace strewn::test

#endif
