#include "strewn/input_file.hpp"

#include <algorithm>
#include <cerrno>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include "strewn/error.hpp"
#include "geometry/nesting_scan.hpp"

namespace strewn {
namespace {

const char* kind_of(mode_t mode) {
  if (S_ISDIR(mode)) return "is a directory";
  if (S_ISFIFO(mode)) return "is a FIFO (named pipe), not a regular file";
  if (S_ISCHR(mode)) return "is a character device, not a regular file";
  if (S_ISBLK(mode)) return "is a block device, not a regular file";
  if (S_ISSOCK(mode)) return "is a socket, not a regular file";
  return "is not a regular file";
}

struct Descriptor {
  int fd = -1;
  ~Descriptor() {
    if (fd >= 0) ::close(fd);
  }
};

std::string too_large(const std::string& path, std::uint64_t cap) {
  return path + ": larger than the input limit of " + std::to_string(cap) +
         " bytes (set STREWN_MAX_INPUT_BYTES to raise it)";
}

}  // namespace

std::uint64_t max_input_bytes() {
  const char* v = std::getenv("STREWN_MAX_INPUT_BYTES");
  if (v == nullptr || *v == '\0') return kDefaultMaxInputBytes;
  char* end = nullptr;
  errno = 0;
  const unsigned long long n = std::strtoull(v, &end, 10);
  if (errno != 0 || end == v || *end != '\0' || n == 0 || v[0] == '-')
    throw input_error(std::string("STREWN_MAX_INPUT_BYTES must be a whole number of bytes, found '") +
                      quoted_excerpt(v) + "'");
  return n;
}

std::string read_input_file(const std::string& path) {
  const std::uint64_t cap = max_input_bytes();
  Descriptor d;
  // O_NONBLOCK: opening a FIFO without a writer must not wait; it is refused below anyway.
  d.fd = ::open(path.c_str(), O_RDONLY | O_NOCTTY | O_NONBLOCK | O_CLOEXEC);
  if (d.fd < 0) throw input_error(path + ": cannot be read: " + std::strerror(errno));
  struct stat st {};
  if (::fstat(d.fd, &st) != 0) throw input_error(path + ": cannot be read: " + std::strerror(errno));
  if (!S_ISREG(st.st_mode)) throw input_error(path + ": " + kind_of(st.st_mode));
  if (static_cast<std::uint64_t>(st.st_size) > cap) throw input_error(too_large(path, cap));
  const int flags = ::fcntl(d.fd, F_GETFL);
  if (flags >= 0) ::fcntl(d.fd, F_SETFL, flags & ~O_NONBLOCK);
  // Bounded read: at most cap + 1 bytes whatever the file does meanwhile.
  std::string text;
  text.resize(static_cast<std::size_t>(st.st_size) + 1);
  std::size_t used = 0;
  for (;;) {
    if (used == text.size()) {
      if (used > cap) throw input_error(too_large(path, cap));
      text.resize(static_cast<std::size_t>(std::min<std::uint64_t>(cap + 1, 2 * used + 4096)));
    }
    const ssize_t n = ::read(d.fd, &text[used], text.size() - used);
    if (n < 0) {
      if (errno == EINTR) continue;
      throw input_error(path + ": cannot be read: " + std::strerror(errno));
    }
    if (n == 0) break;
    used += static_cast<std::size_t>(n);
  }
  if (used > cap) throw input_error(too_large(path, cap));
  text.resize(used);
  // A UTF-8 byte-order mark (spreadsheets write one) is not part of the content.
  if (text.compare(0, 3, "\xEF\xBB\xBF") == 0) text.erase(0, 3);
  return text;
}

void check_toml_nesting(const std::string& text, const std::string& file) {
  int depth = 0;
  int dots = 0;  // dots of the current key or value segment: a float has one, a key one per part
  std::size_t line = 1;
  const auto refuse = [&](const std::string& what) {
    throw input_error(file + ":" + std::to_string(line) + ": " + what + " (the limit is " +
                      std::to_string(kMaxNesting) + ", checked before parsing)");
  };
  const std::size_t n = text.size();
  for (std::size_t i = 0; i < n; ++i) {
    const char c = text[i];
    if (c == '\n') {
      ++line;
      dots = 0;
    } else if (c == '#') {
      while (i + 1 < n && text[i + 1] != '\n') ++i;
    } else if (c == '"' || c == '\'') {
      const bool basic = c == '"';
      const bool multi = i + 2 < n && text[i + 1] == c && text[i + 2] == c;
      i += multi ? 3 : 1;
      for (; i < n; ++i) {
        if (text[i] == '\n') {
          if (!multi) break;  // an unterminated string: toml++ reports it
          ++line;
        } else if (basic && text[i] == '\\') {
          if (i + 1 < n && text[i + 1] == '\n') ++line;
          ++i;
        } else if (text[i] == c && (!multi || (i + 2 < n && text[i + 1] == c && text[i + 2] == c))) {
          if (multi) {
            i += 2;
            while (i + 1 < n && text[i + 1] == c) ++i;  // up to two quotes may end the content
          }
          break;
        }
      }
      if (i < n && text[i] == '\n') --i;  // let the loop count the line
    } else if (c == '[' || c == '{') {
      dots = 0;
      if (++depth > kMaxNesting) refuse("arrays or inline tables nested more than " + std::to_string(kMaxNesting) + " deep");
    } else if (c == ']' || c == '}') {
      dots = 0;
      if (depth > 0) --depth;
    } else if (c == '=' || c == ',') {
      dots = 0;
    } else if (c == '.') {
      if (++dots >= kMaxNesting) refuse("a dotted key of more than " + std::to_string(kMaxNesting) + " parts");
    }
  }
}

// The engine's one scan (geometry/nesting_scan.hpp, also used by the GeoJSON reader).
void check_json_nesting(const std::string& text, const std::string& what) {
  static_assert(kMaxNesting == detail::kMaxJsonNesting, "one nesting limit for JSON input");
  detail::check_json_nesting(text, what);
}

namespace {

// Length of the well-formed UTF-8 sequence starting at value[i] (RFC 3629: no overlong forms,
// no surrogates, at most U+10FFFF), or 0.
std::size_t utf8_length(const std::string& value, std::size_t i) {
  const auto at = [&](std::size_t k) { return static_cast<unsigned char>(value[k]); };
  const unsigned char c = at(i);
  std::size_t n = 0;
  unsigned char lo = 0x80, hi = 0xBF;  // the second byte's range
  if (c < 0x80) return 1;
  if (c >= 0xC2 && c <= 0xDF) n = 2;
  else if (c >= 0xE0 && c <= 0xEF) n = 3, lo = c == 0xE0 ? 0xA0 : 0x80, hi = c == 0xED ? 0x9F : 0xBF;
  else if (c >= 0xF0 && c <= 0xF4) n = 4, lo = c == 0xF0 ? 0x90 : 0x80, hi = c == 0xF4 ? 0x8F : 0xBF;
  else return 0;
  if (i + n > value.size() || at(i + 1) < lo || at(i + 1) > hi) return 0;
  for (std::size_t k = 2; k < n; ++k)
    if ((at(i + k) & 0xC0) != 0x80) return 0;
  return n;
}

}  // namespace

// Bytes that are not UTF-8 text, and control characters, as \xNN: a message shows what the file
// holds without writing raw bytes to the terminal.
std::string quoted_excerpt(const std::string& value, std::size_t keep) {
  std::string out;
  std::size_t i = 0;
  for (; i < value.size() && out.size() < keep;) {
    const std::size_t n = utf8_length(value, i);
    const unsigned char c = static_cast<unsigned char>(value[i]);
    if (n == 0 || (n == 1 && (c < 0x20 || c == 0x7F))) {
      char hex[8];
      std::snprintf(hex, sizeof hex, "\\x%02X", static_cast<unsigned>(c));
      out += hex;
      ++i;
    } else {
      out.append(value, i, n);
      i += n;
    }
  }
  if (i < value.size()) out += "... (" + std::to_string(value.size()) + " bytes)";
  return out;
}

}  // namespace strewn
