#ifndef STREWN_CLI_PALETTE_HPP
#define STREWN_CLI_PALETTE_HPP

// Every colour of every picture strewn draws, from one rule of our own (docs/pictures.md):
// colours are chosen in CIELAB (CIE 15:2004, D65 white) as lightness L*, chroma C* and hue h,
// and converted to sRGB (IEC 61966-2-1); a colour outside sRGB keeps its L* and hue and loses
// chroma until it fits, so lightness is exactly what the rule says (to the 8-bit rounding).
//
// - The ramp (risk, depth): L* falls in equal steps from 96 to 24 while the hue turns from 95
//   (sand) through 180 (sea green) to 265 (deep blue) and C* rises from 30 to 46. Equal L* steps make equal
//   value steps look equal, also in greyscale and for the common colour-vision deficiencies.
// - Marks that must never be read as a field value take hues the ramp leaves out (between 265
//   and 95 through 0, reds and purples) at L* 45: `alarm` (h 30: exceeded limits, unsafe
//   areas, outliers, a source's aim and mean; its spread's rings are ink on a white halo) and `doubt` (h 320: a limit not shown to hold, a tolerance not
//   met). `safe` (h 150, L* 45) marks a limit that holds: a hue of the ramp, but 30 or more L*
//   darker than any field colour of that hue.
// - The diverging scale (differences, e.g. model minus measured): the ramp's two ends taken
//   apart. Zero is the ramp's lightest step without colour (L* 96, C* 0); each arm darkens in
//   equal L* steps to 40 with C* rising from 0 to 45, the negative arm at the ramp's dry hue 95
//   (sand to olive), the positive arm at its wet hue 265 (pale to deep blue). Equal |t| gives
//   equal L* on both sides, so a difference reads the same either way, also in greyscale; the
//   sign is in the hue alone.
// - Ink and greys: C* 0 at L* 15 (text, outlines), 50 (secondary lines) and 80 (frames).
#include <string>

namespace strewn::cli::palette {

/// An sRGB colour "#rrggbb" from CIELAB lightness, chroma and hue (degrees).
std::string from_lch(double lightness, double chroma, double hue_deg);

/// The ramp at t in [0, 1] (clamped): 0 lightest (lowest value), 1 darkest (highest).
std::string ramp(double t);
/// Lightness of the ramp at t, for tests and for choosing text colour on a field cell.
double ramp_lightness(double t);

/// The diverging scale at t in [-1, 1] (clamped): 0 neutral, -1 darkest sand, +1 darkest blue.
std::string diverging(double t);
/// Its lightness at t (symmetric in t).
double diverging_lightness(double t);

std::string alarm();      // exceeded, unsafe, outlier, source marks
std::string doubt();      // not shown to hold / tolerance not met
std::string safe();       // holds
std::string ink();        // text and outlines
std::string grey();       // secondary lines (decade contours, ticks)
std::string frame();      // frames and grid lines

}  // namespace strewn::cli::palette

#endif
