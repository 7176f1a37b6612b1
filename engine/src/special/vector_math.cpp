// Compiled with -ffast-math -fopenmp-simd when libmvec is used (engine/CMakeLists.txt): GCC
// calls the vector variants only under __FAST_MATH__. Nothing else lives in this file, so the
// looser floating-point rules touch only this loop; the library is not linked with
// -ffast-math, so the flush-to-zero start-up code is not pulled in.
#include "special/vector_math.hpp"

#include <cmath>

namespace strewn::detail {

#if defined(STREWN_VECTOR_MATH)
__attribute__((target_clones("avx2", "default")))
#endif
void exp_in_place(double* x, int n) {
#pragma omp simd
  for (int i = 0; i < n; ++i) x[i] = std::exp(x[i]);
}

#if defined(STREWN_VECTOR_MATH)
__attribute__((target_clones("avx2", "default")))
#endif
void expm1_in_place(double* x, int n) {
#pragma omp simd
  for (int i = 0; i < n; ++i) x[i] = std::expm1(x[i]);
}

#if defined(STREWN_VECTOR_MATH)
__attribute__((target_clones("avx2", "default")))
#endif
void erfc_in_place(double* x, int n) {
#pragma omp simd
  for (int i = 0; i < n; ++i) x[i] = std::erfc(x[i]);
}

#if defined(STREWN_VECTOR_MATH)
__attribute__((target_clones("avx2", "default")))
#endif
void erf_in_place(double* x, int n) {
#pragma omp simd
  for (int i = 0; i < n; ++i) x[i] = std::erf(x[i]);
}

#if defined(STREWN_VECTOR_MATH)
__attribute__((target_clones("avx2", "default")))
#endif
void atan_in_place(double* x, int n) {
#pragma omp simd
  for (int i = 0; i < n; ++i) x[i] = std::atan(x[i]);
}

#if defined(STREWN_VECTOR_MATH)
__attribute__((target_clones("avx2", "default")))
#endif
void sin_in_place(double* x, int n) {
#pragma omp simd
  for (int i = 0; i < n; ++i) x[i] = std::sin(x[i]);
}

#if defined(STREWN_VECTOR_MATH)
__attribute__((target_clones("avx2", "default")))
#endif
void log_in_place(double* x, int n) {
#pragma omp simd
  for (int i = 0; i < n; ++i) x[i] = std::log(x[i]);
}

#if defined(STREWN_VECTOR_MATH)
__attribute__((target_clones("avx2", "default")))
#endif
void cos_sin_in_place(double* __restrict c, double* __restrict s, int n) {
  // Two loops: in one, GCC fuses sin and cos into a scalar sincos call, which it does not
  // vectorise; apart, each goes through libmvec.
#pragma omp simd
  for (int i = 0; i < n; ++i) s[i] = std::sin(c[i]);
#pragma omp simd
  for (int i = 0; i < n; ++i) c[i] = std::cos(c[i]);
}

}  // namespace strewn::detail
