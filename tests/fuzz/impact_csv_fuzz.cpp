// libFuzzer target: arbitrary bytes as a CSV of impacts for `strewn fit` (cli/impact_data.cpp,
// the program's CSV reader), read once with no aim and once with an aim from the command line.
// The reader takes a path, so each input is written to a private file first. Bad input must
// end in strewn::input_error; anything else escaping, a crash, a leak, a hang or undefined
// behaviour is a bug.
#include <unistd.h>

#include <cstddef>
#include <cstdint>
#include <cstdio>
#include <fstream>
#include <optional>
#include <string>

#include "input/impact_data.hpp"
#include "strewn/error.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  static const std::string path = "impact_csv_fuzz_" + std::to_string(::getpid()) + ".csv";
  {
    std::ofstream out(path, std::ios::binary | std::ios::trunc);
    out.write(reinterpret_cast<const char*>(data), static_cast<std::streamsize>(size));
  }
  for (const auto& aim : {std::optional<strewn::Vec2>{}, std::optional<strewn::Vec2>{strewn::Vec2(1.0, -2.0)}}) {
    try {
      (void)strewn::cli::read_impacts(path, aim);
    } catch (const strewn::input_error&) {
    }
  }
  std::remove(path.c_str());
  return 0;
}
