#ifndef STREWN_INPUT_FILE_HPP
#define STREWN_INPUT_FILE_HPP

/// \file
/// Reading input files safely: every file a site reads (scenario, template, GeoJSON/WKT, CSV) is
/// a regular file under a size cap, and nested text is pre-scanned before a recursive parser
/// sees it. Tools read their own inputs (field data, options given as JSON) through the same.

#include <cstddef>
#include <cstdint>
#include <string>

#include "strewn/export.hpp"

namespace strewn {

/// Default cap on the size of any one input file (scenario, template, GeoJSON/WKT, CSV).
constexpr std::uint64_t kDefaultMaxInputBytes = 64ull << 20;  // 64 MiB
/// Nesting limit of the pre-scan before any parser sees a file: brackets and braces, and the
/// parts of one dotted TOML key.
constexpr int kMaxNesting = 256;

/// The cap in force: STREWN_MAX_INPUT_BYTES (a whole number of bytes) if set, else the default.
STREWN_API std::uint64_t max_input_bytes();

/// Reads a whole input file, refusing anything but a regular file (a directory, a FIFO, a device
/// such as /dev/zero) and anything larger than max_input_bytes(). The size is checked on the
/// open descriptor before reading and the read stops at the cap, so a file that grows meanwhile
/// cannot exhaust memory. Throws strewn::input_error starting with the path.
STREWN_API std::string read_input_file(const std::string& path);

/// Refuses TOML nested deeper than kMaxNesting (arrays, inline tables) or with a dotted key of
/// more than kMaxNesting parts, before toml++ parses it (its recursion overflows the stack at
/// some tens of thousands). The error names the file and the line.
STREWN_API void check_toml_nesting(const std::string& text, const std::string& file);

/// The same for JSON a caller gives (a map footprint's parameters), before it is parsed and
/// copied (nlohmann::json recurses once per level). The engine checks GeoJSON files and shape
/// parameters itself (engine/src/nesting_scan.hpp).
STREWN_API void check_json_nesting(const std::string& text, const std::string& what);

/// Shortens a value quoted in a message: at most `keep` bytes, then "... (N bytes)"; bytes that
/// are not UTF-8 text and control characters are written as \xNN.
STREWN_API std::string quoted_excerpt(const std::string& value, std::size_t keep = 60);

}  // namespace strewn

#endif
