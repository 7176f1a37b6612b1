// libFuzzer target: arbitrary bytes as a WKT or GeoJSON geometry file. Every input goes to the
// WKT reader and to the GeoJSON reader (longitude/latitude about an origin, with and without a
// feature name, and site metres). Bad input must end in strewn::input_error (one clear line);
// anything else escaping, a crash, a leak, a hang or undefined behaviour is a bug.
#include <cstddef>
#include <cstdint>
#include <string>

#include "strewn/error.hpp"
#include "strewn/region_io.hpp"

namespace {

template <class F>
void expect_input_error_only(F&& read) {
  try {
    (void)read();
  } catch (const strewn::input_error&) {
  }
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string text(reinterpret_cast<const char*>(data), size);
  expect_input_error_only([&] { return strewn::region_from_wkt(text); });
  strewn::GeoJsonOptions lon_lat;
  lon_lat.origin = strewn::GeoOrigin{-30.0, 45.0};  // a made-up point at sea
  expect_input_error_only([&] { return strewn::region_from_geojson(text, lon_lat); });
  lon_lat.feature = "back lane";
  expect_input_error_only([&] { return strewn::region_from_geojson(text, lon_lat); });
  strewn::GeoJsonOptions metres;
  metres.positions = strewn::GeoJsonPositions::site_metres;
  expect_input_error_only([&] { return strewn::region_from_geojson(text, metres); });
  return 0;
}
