// The colour rule of every picture (cli/output/palette.hpp, docs/pictures.md), measured back
// with an independent sRGB -> CIELAB conversion written here from the standards: the sRGB
// transfer function and matrix of IEC 61966-2-1, XYZ -> L*a*b* of CIE 15:2004 with the D65
// white. The conversion is itself checked on published values first.
#include <catch2/catch.hpp>
#include <array>
#include <cmath>
#include <string>

#include "output/palette.hpp"

namespace {

using Lab = std::array<double, 3>;

Lab lab_of(const std::string& hex) {
  REQUIRE(hex.size() == 7);
  double rgb[3];
  for (int k = 0; k < 3; ++k) {
    const double c = std::stoi(hex.substr(1 + 2 * k, 2), nullptr, 16) / 255.0;
    rgb[k] = c <= 0.04045 ? c / 12.92 : std::pow((c + 0.055) / 1.055, 2.4);  // IEC 61966-2-1
  }
  const double X = 0.4124 * rgb[0] + 0.3576 * rgb[1] + 0.1805 * rgb[2];
  const double Y = 0.2126 * rgb[0] + 0.7152 * rgb[1] + 0.0722 * rgb[2];
  const double Z = 0.0193 * rgb[0] + 0.1192 * rgb[1] + 0.9505 * rgb[2];
  const auto f = [](double t) { return t > 216.0 / 24389.0 ? std::cbrt(t) : (24389.0 / 27.0 * t + 16.0) / 116.0; };  // CIE 15
  const double fx = f(X / 0.95047), fy = f(Y), fz = f(Z / 1.08883);
  return {116.0 * fy - 16.0, 500.0 * (fx - fy), 200.0 * (fy - fz)};
}

double hue_of(const Lab& c) {
  double h = std::atan2(c[2], c[1]) * 180.0 / M_PI;
  return h < 0 ? h + 360.0 : h;
}

}  // namespace

TEST_CASE("the test's own CIELAB conversion reproduces published values", "[palette]") {
  // sRGB red (255, 0, 0): L* 53.24, a* 80.09, b* 67.20 (D65; B. Lindbloom's tables, also the
  // usual worked example); white: L* 100, a* = b* = 0; mid grey 119: L* 50.0.
  const Lab red = lab_of("#ff0000");
  CHECK(red[0] == Approx(53.24).margin(0.02));
  CHECK(red[1] == Approx(80.09).margin(0.05));
  CHECK(red[2] == Approx(67.20).margin(0.05));
  const Lab white = lab_of("#ffffff");
  CHECK(white[0] == Approx(100.0).margin(0.01));
  CHECK(std::fabs(white[1]) < 0.02);
  CHECK(lab_of("#777777")[0] == Approx(50.03).margin(0.05));
}

TEST_CASE("the ramp falls in equal steps of lightness from L* 96 to 24, turning from sand to deep blue", "[palette]") {
  const int steps = 24;
  double previous_hue = 0.0;
  for (int k = 0; k <= steps; ++k) {
    const double t = k / static_cast<double>(steps);
    const Lab c = lab_of(strewn::cli::palette::ramp(t));
    INFO("t = " << t << ": " << strewn::cli::palette::ramp(t));
    // Eight-bit rounding moves L* by at most about 0.4.
    CHECK(c[0] == Approx(96.0 - 72.0 * t).margin(0.5));
    CHECK(c[0] == Approx(strewn::cli::palette::ramp_lightness(t)).margin(0.5));
    const double h = hue_of(c);
    CHECK(h >= 85.0);
    CHECK(h <= 275.0);
    if (k > 0) CHECK(h > previous_hue - 2.0);  // the hue turns one way
    previous_hue = h;
  }
}

TEST_CASE("alarm and doubt marks take hues the ramp leaves out; safe is darker than the ramp at its hue", "[palette]") {
  using namespace strewn::cli::palette;
  for (const std::string& c : {alarm(), doubt()}) {
    const double h = hue_of(lab_of(c));
    INFO(c << " hue " << h);
    CHECK((h < 85.0 || h > 275.0));
    CHECK(lab_of(c)[0] == Approx(45.0).margin(0.5));
  }
  CHECK(lab_of(safe())[0] == Approx(45.0).margin(0.5));
  CHECK(lab_of(ramp(0.32))[0] - lab_of(safe())[0] > 25.0);  // the ramp's own green is far lighter
  CHECK(lab_of(ink())[0] == Approx(15.0).margin(0.5));
  CHECK(std::fabs(lab_of(grey())[1]) < 0.5);  // neutral
}

TEST_CASE("a colour outside sRGB keeps its lightness and hue and gives up chroma", "[palette]") {
  // L* 90 at hue 300 cannot carry chroma 80 in sRGB.
  const Lab c = lab_of(strewn::cli::palette::from_lch(90, 80, 300));
  CHECK(c[0] == Approx(90.0).margin(0.5));
  CHECK(hue_of(c) == Approx(300.0).margin(3.0));
  CHECK(std::hypot(c[1], c[2]) < 80.0);
}

TEST_CASE("the diverging scale darkens equally both ways from a neutral middle, sand below and blue above", "[palette]") {
  using namespace strewn::cli::palette;
  const Lab middle = lab_of(diverging(0.0));
  CHECK(middle[0] == Approx(96.0).margin(0.5));
  CHECK(std::hypot(middle[1], middle[2]) < 1.0);  // no colour at zero
  for (int k = 1; k <= 10; ++k) {
    const double t = k / 10.0;
    const Lab wet = lab_of(diverging(t)), dry = lab_of(diverging(-t));
    INFO("t = " << t << ": " << diverging(t) << " / " << diverging(-t));
    CHECK(wet[0] == Approx(96.0 - 56.0 * t).margin(0.5));  // equal L* steps, to 40 at the ends
    CHECK(dry[0] == Approx(wet[0]).margin(0.6));            // the same lightness either way
    if (k >= 3) {  // once there is chroma enough to have a measurable hue
      CHECK(std::fabs(hue_of(wet) - 265.0) < 8.0);
      CHECK(std::fabs(hue_of(dry) - 95.0) < 8.0);
    }
  }
  CHECK(diverging(3.0) == diverging(1.0));  // clamped
}
