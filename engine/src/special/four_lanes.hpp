#ifndef STREWN_SRC_FOUR_LANES_HPP
#define STREWN_SRC_FOUR_LANES_HPP

// Four doubles as one value (GCC's and Clang's vector extension): one AVX2 register in the
// x86-64-v3 build of an STREWN_FMA_CLONES function, two SSE2 halves in the plain one. For the
// batched hot paths (Owen's T series, the segments' geometry), which do per lane the arithmetic
// of the scalar code, operation for operation; GCC may still fuse a product and a sum into an
// fma in one form and not the other, unless the file is built with -ffp-contract=off (as
// segment_tail.cpp is, where the two forms must agree to the bit). Include in .cpp files only: the
// -Wpsabi note (32-byte vectors passed by value change the ABI without AVX) is silenced for the
// rest of the including file, where these helpers are inlined; GCC 12 emits it despite the
// pragma, so engine/CMakeLists.txt also passes -Wno-psabi to each file that includes this one.
#include <cmath>
#include <cstring>

#pragma GCC diagnostic ignored "-Wpsabi"

namespace strewn::detail {

// Always inlined: a 32-byte vector never crosses a call (whose ABI would differ between the builds).
#define STREWN_LANES inline __attribute__((always_inline))

typedef double V4 __attribute__((vector_size(32)));
typedef long long M4 __attribute__((vector_size(32)));  // comparisons give -1 (true) or 0 per lane

STREWN_LANES V4 load4(const double* p) {
  V4 v;
  std::memcpy(&v, p, sizeof v);
  return v;
}
STREWN_LANES void store4(double* p, V4 v) { std::memcpy(p, &v, sizeof v); }
STREWN_LANES V4 splat(double x) { return V4{x, x, x, x}; }
// x where the mask is set, else +0.
STREWN_LANES V4 masked(V4 x, M4 mask) { return (V4)((M4)x & mask); }
// a where the mask is set, else b.
STREWN_LANES V4 blend(M4 mask, V4 a, V4 b) { return (V4)(((M4)a & mask) | ((M4)b & ~mask)); }
STREWN_LANES V4 abs4(V4 x) {
  constexpr long long kNoSign = 0x7fffffffffffffffLL;
  return (V4)((M4)x & M4{kNoSign, kNoSign, kNoSign, kNoSign});
}
// Lane-wise fma: vfmadd in the x86-64-v3 build (GCC's SLP vectoriser), fma() calls in the plain one.
STREWN_LANES V4 fma4(V4 a, V4 b, V4 c) {
  V4 r;
  for (int k = 0; k < 4; ++k) r[k] = std::fma(a[k], b[k], c[k]);
  return r;
}

STREWN_LANES V4 sqrt4(V4 x) {
  V4 r;
  for (int k = 0; k < 4; ++k) r[k] = std::sqrt(x[k]);
  return r;
}
// std::min and std::max lane by lane: the same operand wins a tie or a NaN.
STREWN_LANES V4 min4(V4 a, V4 b) { return blend(b < a, b, a); }
STREWN_LANES V4 max4(V4 a, V4 b) { return blend(a < b, b, a); }

}  // namespace strewn::detail

#undef STREWN_LANES

#endif
