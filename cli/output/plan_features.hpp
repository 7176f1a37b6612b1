#ifndef STREWN_CLI_PLAN_FEATURES_HPP
#define STREWN_CLI_PLAN_FEATURES_HPP

// What a plan shows besides zones and the risk, computed once for every renderer (SVG, GeoJSON,
// GeoPackage), so that they all draw the same things:
// * barrier shadows: for each source with a standing point and each barrier, the shadow
//   (strewn/barrier.hpp) from the standing point, or from each end of a throwing line (the
//   shadows from the line's inner points lie between the two), cut to the plan's extent;
// * drops: the release point under the aircraft, the flight track through it (from where the
//   aircraft was one fall time before release to where it is one fall time after) and the
//   nominal landing point, each with a label that says what it is.
#include <string>
#include <vector>

#include "strewn/region.hpp"
#include "strewn/site.hpp"

namespace strewn::cli {

struct ShadowFeature {
  std::string barrier, source;
  Vec2 from;  ///< the standing point the shadow is seen from
  Region area;
};

std::vector<ShadowFeature> plan_shadows(const Site& s, const BoundingBox& extent);

struct DropFeature {
  std::string source;
  Vec2 release, track_start, track_end, landing;
  std::string release_label, track_label, landing_label;
};

std::vector<DropFeature> plan_drops(const Site& s);

/// The part of the segment [a, b] inside the box (Liang-Barsky); false when none.
bool clip_segment(Vec2& a, Vec2& b, const BoundingBox& box);

}  // namespace strewn::cli

#endif
