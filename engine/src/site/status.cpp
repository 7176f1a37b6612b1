#include "strewn/status.hpp"

namespace strewn {

const char* to_string(Status status) noexcept {
  switch (status) {
    case Status::converged: return "converged";
    case Status::tolerance_not_met: return "tolerance not met";
    case Status::budget_exhausted: return "budget exhausted";
    case Status::no_answer: return "no answer";
  }
  return "?";
}

}  // namespace strewn
