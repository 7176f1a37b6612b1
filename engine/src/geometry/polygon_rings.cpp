#include "geometry/polygon_rings.hpp"

#include "geometry/region_internal.hpp"
#include "strewn/error.hpp"
#include "strewn/region_ops.hpp"

namespace strewn {

namespace {

// A ceiling on the work of the validity test (Boost.Geometry's is_valid, n log n on most
// layouts but near n^2 on some: 40,000 squares in a row take 2.8 s, 200,000 took 210 s).
template <class Polygons>
void check_ring_count(const Polygons& polygons, const std::string& what) {
  constexpr std::size_t kMaxRings = 50000;
  std::size_t rings = 0;
  for (const auto& polygon : polygons) rings += polygon.size();
  if (rings > kMaxRings)
    throw input_error(what + ": " + std::to_string(rings) + " rings, more than the " + std::to_string(kMaxRings) +
                      " one zone may hold; split the layer into several zones");
}

}  // namespace

Region region_from_polygons(const std::vector<PolygonRings>& polygons, const std::string& what) {
  check_ring_count(polygons, what);
  std::vector<PolygonLoops> loops;
  std::size_t count = 0;
  for (const PolygonRings& polygon : polygons) {
    PolygonLoops& out = loops.emplace_back();
    for (Ring ring : polygon) {
      ++count;
      if (ring.size() > 1 && ring.front() == ring.back()) ring.pop_back();
      if (ring.size() < 3)
        throw input_error(what + ": ring " + std::to_string(count) + " has fewer than 3 distinct points");
      Loop loop;
      for (std::size_t k = 0; k < ring.size(); ++k) loop.push_back(Edge::segment(ring[k], ring[(k + 1) % ring.size()]));
      out.push_back(std::move(loop));
    }
  }
  return region_from_polygon_loops(std::move(loops), what);
}

Region region_from_polygon_loops(std::vector<PolygonLoops> polygons, const std::string& what) {
  check_ring_count(polygons, what);
  Region region;
  std::vector<std::size_t> first;  // index of each polygon's outer ring among the loops
  for (PolygonLoops& polygon : polygons) {
    first.push_back(region.loops.size());
    for (Loop& loop : polygon) region.loops.push_back(std::move(loop));
  }
  if (region.loops.empty()) throw input_error(what + ": no polygon");
  const Validity v = check_validity(region);
  if (!v.valid) throw input_error(what + ": " + v.fault);
  // Each hole inside its own outer ring: nesting alone would take a hole outside it for more
  // area. Validity rules out crossings, so a hole's edge midpoints are all inside or all outside
  // its outer ring, but for any that lie on that ring itself: the majority decides.
  first.push_back(region.loops.size());
  for (std::size_t pi = 0; pi + 1 < first.size(); ++pi) {
    const Loop& outer = region.loops[first[pi]];
    for (std::size_t h = first[pi] + 1; h < first[pi + 1]; ++h) {
      const Loop& hole = region.loops[h];
      std::size_t inside = 0;
      for (const Edge& e : hole)
        if (loop_winding(outer, e.point(0.5 * (e.param_from() + e.param_to()))) != 0) ++inside;
      if (2 * inside <= hole.size())
        throw input_error(what + ": hole " + std::to_string(h - first[pi]) + " of polygon " +
                          std::to_string(pi + 1) + " (ring " + std::to_string(h + 1) +
                          ") lies outside its outer ring; a hole must lie inside the ring it belongs to");
    }
  }
  return normalised(std::move(region));
}

}  // namespace strewn
