#ifndef STREWN_SRC_OWENS_T_BATCH_HPP
#define STREWN_SRC_OWENS_T_BATCH_HPP

namespace strewn::detail {

// T(h1, a1) and T(h2, a2) together, equal to two owens_t calls to within 2e-15 relative (the
// lanes take their exponentials, erf and atan from vector routines). When both fall in the same
// region of Patefield & Tandy's table the two series run interleaved, sharing what depends on
// h alone when h1 = h2 (the two ends of an edge). NaN, |a| > 1 and the special values go
// through owens_t().
void owens_t_two(double h1, double a1, double h2, double a2, double& t1, double& t2) noexcept;

// t[i] = T(h[i], a[i]) for i < n, equal to owens_t calls to within 2e-15 relative (the
// lanes' vector exp, expm1, erf and atan round differently from the scalar ones): the pairs are grouped by region of the table and each group's
// series run four lanes at a time, so that the processor's vector units and pipeline are full.
void owens_t_many(const double* h, const double* a, double* t, int n) noexcept;

// x[i] = Q(x[i]) = erfc(x[i] / sqrt 2) / 2 for i < n, the erfcs in one batch (vector_math.hpp);
// the same compensated argument as normal_upper_tail().
void normal_upper_tails(double* x, int n) noexcept;

}  // namespace strewn::detail

#endif
