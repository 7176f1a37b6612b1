#include "output_file.hpp"

#include <cstdio>
#include <filesystem>
#include <fstream>
#include <unistd.h>

#include "strewn/error.hpp"

namespace strewn::cli {

void write_file_atomically(const std::string& path, const std::string& content) {
  const std::string temporary = path + ".part-" + std::to_string(::getpid());
  {
    std::ofstream out(temporary, std::ios::binary | std::ios::trunc);
    out << content;
    out.flush();
    if (!out) {
      std::error_code ignored;
      std::filesystem::remove(temporary, ignored);
      throw input_error("cannot write '" + path + "'");
    }
  }
  std::error_code ec;
  std::filesystem::rename(temporary, path, ec);
  if (ec) {
    std::filesystem::remove(temporary, ec);
    throw input_error("cannot write '" + path + "'");
  }
}

}  // namespace strewn::cli
