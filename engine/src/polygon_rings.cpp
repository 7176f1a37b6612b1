#include "polygon_rings.hpp"

#include "strewn/error.hpp"
#include "strewn/region_ops.hpp"

namespace strewn {

Region region_from_rings(const std::vector<Ring>& rings, const std::string& what) {
  Region region;
  for (std::size_t i = 0; i < rings.size(); ++i) {
    Ring ring = rings[i];
    if (ring.size() > 1 && ring.front() == ring.back()) ring.pop_back();
    if (ring.size() < 3)
      throw input_error(what + ": ring " + std::to_string(i + 1) + " has fewer than 3 distinct points");
    Loop loop;
    for (std::size_t k = 0; k < ring.size(); ++k) loop.push_back(Edge::segment(ring[k], ring[(k + 1) % ring.size()]));
    region.loops.push_back(std::move(loop));
  }
  if (region.loops.empty()) throw input_error(what + ": no polygon");
  const Validity v = check_validity(region);
  if (!v.valid) throw input_error(what + ": " + v.fault);
  return normalised(std::move(region));
}

}  // namespace strewn
