#ifndef STREWN_OWENS_T_HPP
#define STREWN_OWENS_T_HPP

/// \file
/// Owen's T function in double precision,
///   T(h, a) = 1/(2 pi) * integral_0^a exp(-h^2 (1 + x^2) / 2) / (1 + x^2) dx,
/// by the algorithm of Patefield & Tandy (2000, J. Stat. Softw. 5(5)): the (h, a) plane is
/// divided into regions, each served by one of six series or quadrature methods T1..T6 with the
/// published orders and coefficients. About an order of magnitude faster than
/// boost::math::owens_t, against which it is tested.

#include <cstddef>

#include "strewn/export.hpp"

namespace strewn {

/// T(h, a) for any finite h, a. NaN in, NaN out.
STREWN_API double owens_t(double h, double a) noexcept;

/// t[i] = T(h[i], a[i]) for i < n: the same values as n single calls (to within 2e-15 relative:
/// the lanes take their exponentials and arctangents from vector routines), faster per value
/// when many are wanted: the pairs are grouped by method and the series run four at a time.
STREWN_API void owens_t(const double* h, const double* a, double* t, std::size_t n) noexcept;

/// Upper tail of the standard normal, Q(x) = 1 - Phi(x) = erfc(x / sqrt 2) / 2.
STREWN_API double normal_upper_tail(double x) noexcept;

}  // namespace strewn

#endif
