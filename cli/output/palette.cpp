#include "output/palette.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <fmt/format.h>

#include "strewn/constants.hpp"

namespace strewn::cli::palette {
namespace {

// CIELAB to linear sRGB. Lab -> XYZ (CIE 15:2004, D65 reference white Xn 0.95047, Zn 1.08883),
// XYZ -> linear RGB with the matrix of IEC 61966-2-1.
std::array<double, 3> linear_rgb(double l, double a, double b) {
  const double fy = (l + 16.0) / 116.0, fx = fy + a / 500.0, fz = fy - b / 200.0;
  const auto inv = [](double t) { return t > 6.0 / 29.0 ? t * t * t : 3.0 * (6.0 / 29.0) * (6.0 / 29.0) * (t - 4.0 / 29.0); };
  const double x = 0.95047 * inv(fx), y = inv(fy), z = 1.08883 * inv(fz);
  return {3.2406 * x - 1.5372 * y - 0.4986 * z, -0.9689 * x + 1.8758 * y + 0.0415 * z, 0.0557 * x - 0.2040 * y + 1.0570 * z};
}

bool in_gamut(const std::array<double, 3>& c) {
  return std::all_of(c.begin(), c.end(), [](double v) { return v >= -1e-9 && v <= 1.0 + 1e-9; });
}

int encode(double linear) {  // the sRGB transfer function (IEC 61966-2-1), to 8 bits
  const double v = std::clamp(linear, 0.0, 1.0);
  const double g = v <= 0.0031308 ? 12.92 * v : 1.055 * std::pow(v, 1.0 / 2.4) - 0.055;
  return static_cast<int>(std::lround(255.0 * g));
}

constexpr double kRampLightTop = 96.0, kRampLightBottom = 24.0, kRampHueFrom = 95.0, kRampHueTo = 265.0,
                 kRampChroma = 30.0, kRampChromaGain = 16.0;
// The diverging scale's arms end at L* 40, lighter than the ramp's end (24), so that the
// difference values printed in ink (L* 15) stay readable on every cell; C* 45 there.
constexpr double kDivergingLightEnd = 40.0, kDivergingChroma = 45.0;

}  // namespace

std::string from_lch(double lightness, double chroma, double hue_deg) {
  const double h = hue_deg * kPi / 180.0;
  // Keep L* and hue; halve the chroma interval until the colour fits in sRGB.
  double lo = 0.0, hi = chroma;
  std::array<double, 3> c = linear_rgb(lightness, chroma * std::cos(h), chroma * std::sin(h));
  if (!in_gamut(c)) {
    for (int k = 0; k < 40; ++k) {
      const double mid = (lo + hi) / 2;
      (in_gamut(linear_rgb(lightness, mid * std::cos(h), mid * std::sin(h))) ? lo : hi) = mid;
    }
    c = linear_rgb(lightness, lo * std::cos(h), lo * std::sin(h));
  }
  return fmt::format("#{:02x}{:02x}{:02x}", encode(c[0]), encode(c[1]), encode(c[2]));
}

double ramp_lightness(double t) {
  return kRampLightTop + (kRampLightBottom - kRampLightTop) * std::clamp(t, 0.0, 1.0);
}

std::string ramp(double t) {
  t = std::clamp(t, 0.0, 1.0);
  return from_lch(ramp_lightness(t), kRampChroma + kRampChromaGain * t, kRampHueFrom + (kRampHueTo - kRampHueFrom) * t);
}

double diverging_lightness(double t) {
  return kRampLightTop + (kDivergingLightEnd - kRampLightTop) * std::min(std::fabs(t), 1.0);
}

std::string diverging(double t) {
  t = std::clamp(t, -1.0, 1.0);
  return from_lch(diverging_lightness(t), kDivergingChroma * std::fabs(t), t < 0 ? kRampHueFrom : kRampHueTo);
}

std::string alarm() { return from_lch(45, 70, 30); }
std::string doubt() { return from_lch(45, 55, 320); }
std::string safe() { return from_lch(45, 45, 150); }
std::string ink() { return from_lch(15, 0, 0); }
std::string grey() { return from_lch(50, 0, 0); }
std::string frame() { return from_lch(80, 0, 0); }

}  // namespace strewn::cli::palette
