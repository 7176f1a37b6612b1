#ifndef STREWN_LAYOUT_HPP
#define STREWN_LAYOUT_HPP

/// \file
/// A layout: heads placed on a regular spacing over a polygon zone, as a designer lays out a
/// lawn or a pitch.
///
///  - square: rows and columns `spacing` apart; rectangular: `spacing` along x and `row_spacing`
///    along y; triangular: rows spacing * sqrt(3)/2 apart, every other row shifted by half a
///    spacing (each head equidistant from its four nearest neighbours in the next rows).
///    The spacings are the largest allowed: the polygon's bounding box is divided into the
///    fewest equal steps no longer than them, so that heads stand on both edges of the box
///    (a 40 m side at 12 m spacing gets four 10 m steps). Grid points inside the polygon or on
///    its boundary get a head.
///  - perimeter: heads only along the boundary, at every corner and at the fewest equal steps
///    no longer than `spacing` along each side.
///
/// Heads on the boundary throw inward (unless boundary_arcs is false): at a corner over the
/// corner's interior angle (90 degrees at a rectangle's corner), on a side over a half circle.
/// Inside heads are full circles. A part-circle head gets the template's flow times its sweep
/// / 360 (matched precipitation: the same depth per hour as the full circle, common practice).
///
/// Example (a made-up 40 m x 30 m lawn, triangular profile, head-to-head spacing):
/// \code
///   strewn::Layout l;
///   l.name = "lawn";
///   l.pattern = strewn::LayoutPattern::square;
///   l.head.radius_m = 12.0;
///   l.head.flow_l_per_min = 30.0;
///   l.head.profile = strewn::generic_profile("triangular", 12.0);
///   l.spacing_m = l.head.radius_m;  // head-to-head
///   std::vector<strewn::Head> heads = strewn::layout_heads(l, strewn::rectangle({0, 0}, {40, 30}));
/// \endcode

#include <string>
#include <vector>

#include "strewn/export.hpp"
#include "strewn/head.hpp"
#include "strewn/region.hpp"

namespace strewn {

enum class LayoutPattern { square, triangular, rectangular, perimeter };

/// "square", "triangular", "rectangular", "perimeter" (the order of LayoutPattern).
STREWN_API const std::vector<std::string>& layout_pattern_names();

struct Layout {
  std::string name;
  std::string zone;  ///< the zone whose polygon it covers (for reports)
  LayoutPattern pattern = LayoutPattern::square;
  double spacing_m = 1.0;      ///< largest spacing between heads (along x for rectangular)
  double row_spacing_m = 0.0;  ///< rectangular only: largest spacing between rows
  bool boundary_arcs = true;   ///< heads on the boundary throw inward
  Head head;                   ///< every head's radius, full-circle flow, profile and wind
};

/// The most heads one layout may place (a spacing typed in the wrong unit would otherwise place
/// millions).
constexpr std::size_t kMaxLayoutHeads = 5000;

/// The heads, named "<layout> head 1", ... row by row (perimeter: corner by corner), with
/// Head::layout set. `zone` must be one loop of straight sides (a polygon without holes).
/// Throws input_error for another zone, a spacing that is not positive, or more than
/// kMaxLayoutHeads heads.
STREWN_API std::vector<Head> layout_heads(const Layout& layout, const Region& zone);

}  // namespace strewn

#endif
