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
// x[i] = sin(x[i]) and x[i] = log(x[i]) for i < n, likewise (libmvec's sin and log).
void sin_in_place(double* x, int n);
void log_in_place(double* x, int n);

// x[i] = log1p(x[i]) for i < n, x[i] > -1: libmvec has no log1p, so it is built from log by the
// classic correction (D. Goldberg, "What every computer scientist should know about
// floating-point arithmetic", ACM Computing Surveys 23(1), 1991, Theorem 4; the HP-15C Advanced
// Functions Handbook, 1982): with u = fl(1 + x), 1 + x = u (1 + d), d = (x - (u - 1)) / u exact
// and |d| <= eps / 2, so log1p(x) = log(u) + d to within d^2 / 2. For u in [1/2, 2] (x in
// [-1/2, 1]) (u - 1) - x is exact: u - 1 by Sterbenz's lemma, and the difference is the rounding
// error of 1 + x, itself a double. Beyond, log(u) >= log 2 and d is under an ulp of the result.
// Inline here, in the callers' own floating-point rules: under vector_math.cpp's -ffast-math,
// (u - 1) - x could be reassociated to 0.
inline void log1p_in_place(double* x, int n) {
  constexpr int kChunk = 64;
  double u[kChunk], l[kChunk];
  for (int start = 0; start < n; start += kChunk) {
    const int k = n - start < kChunk ? n - start : kChunk;
    double* v = x + start;
    for (int i = 0; i < k; ++i) l[i] = u[i] = 1.0 + v[i];
    log_in_place(l, k);
    for (int i = 0; i < k; ++i) v[i] = l[i] - ((u[i] - 1.0) - v[i]) / u[i];
  }
}

}  // namespace strewn::detail

#endif
