#ifndef STREWN_STATUS_HPP
#define STREWN_STATUS_HPP

/// \file
/// How a computation ended: every result of the site modules (assess, design, uncertainty,
/// deposition, maps) and of the searches in strewn/solve.hpp carries a Status beside its
/// human-readable message. Code decides on the status, never on the message's text.

#include "strewn/export.hpp"

namespace strewn {

enum class Status {
  converged,          ///< the answer meets the requested accuracy
  tolerance_not_met,  ///< an answer, but its bound is above the request (the message says by how much)
  budget_exhausted,   ///< stopped at an evaluation, step or replicate budget before the request was met
  no_answer,          ///< nothing meets the conditions within the search window (the message names why)
};

/// "converged", "tolerance not met", "budget exhausted", "no answer".
STREWN_API const char* to_string(Status status) noexcept;

}  // namespace strewn

#endif
