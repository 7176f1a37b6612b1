// libFuzzer target: arbitrary bytes as a scenario file. Bad input must end in strewn::input_error
// (a clear message, exit status 2); anything else escaping, a crash, a leak or a hang is a bug.
// Relative geometry paths resolve in tests/data/cli, so the GeoJSON, WKT and template readers
// are reached too.
#include <cstddef>
#include <cstdint>
#include <string>

#include "strewn/site_io.hpp"
#include "strewn/error.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  static const strewn::ShapeRegistry shapes = strewn::ShapeRegistry::with_default_search_path({});
  const std::string text(reinterpret_cast<const char*>(data), size);
  try {
    (void)strewn::load_site_text(text, STREWN_FUZZ_BASE "/fuzz_input.toml", shapes);
  } catch (const strewn::input_error&) {
  }
  return 0;
}
