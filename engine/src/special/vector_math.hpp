#ifndef STREWN_SRC_VECTOR_MATH_HPP
#define STREWN_SRC_VECTOR_MATH_HPP

namespace strewn::detail {

// Batched elementary functions for the inner loops that need many at once (the 13 nodes of
// Owen's T method T5, the nodes of the quadrature rules on arcs).
//
// x[i] = exp(x[i]) for i < n (in place). Built with GCC on x86-64 next to glibc's libmvec, the loop is
// vectorised through libmvec's exp, 4 lanes on AVX2 machines and 2 elsewhere (the variant is
// chosen when the library loads); otherwise it is the scalar loop. glibc documents libmvec's
// exp within 4 ulp (from memory); owens_t_test holds T to 2e-15 against Boost either way.
void exp_in_place(double* x, int n);
// x[i] = expm1(x[i]) for i < n, likewise (libmvec's expm1, glibc 2.35 and later).
void expm1_in_place(double* x, int n);
// x[i] = erfc(x[i]) for i < n, likewise (libmvec's erfc, glibc 2.35 and later).
void erfc_in_place(double* x, int n);
// x[i] = erf(x[i]) and x[i] = atan(x[i]) for i < n, likewise (glibc 2.35 and later).
void erf_in_place(double* x, int n);
void atan_in_place(double* x, int n);
// On input c[i] holds an angle; on output c[i] = cos, s[i] = sin of it (libmvec's sin and cos).
void cos_sin_in_place(double* c, double* s, int n);

}  // namespace strewn::detail

#endif
