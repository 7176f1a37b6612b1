#include "commands/former_names.hpp"

#include <fmt/format.h>
#include <fmt/ostream.h>

#include "strewn/error.hpp"
#include "strewn/site_io.hpp"

namespace strewn::cli {

void FormerNames::warn(std::ostream& err) const {
  for (const Entry& e : entries_) {
    if (!e.app->parsed() || e.app->count(e.former) == 0) continue;
    if (e.app->count(e.now) > 0) throw input_error(e.former + " is the former name of " + e.now + ": give " + e.now + " only");
    fmt::print(err, "strewn: warning: {} is the former name of {}; it is read in this release and will be refused in the next\n",
               e.former, e.now);
  }
}

}  // namespace strewn::cli
