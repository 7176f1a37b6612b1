// The README's library example: load a scenario, assess it, print each zone's verdict.
#include <cstdio>
#include <strewn/assess.hpp>
#include <strewn/error.hpp>
#include <strewn/site_io.hpp>

int main(int argc, char** argv) {
  if (argc != 2) return 2;
  try {
    const strewn::Site site = strewn::load_site(argv[1]);  // built-in shapes + STREWN_PLUGIN_PATH
    for (const strewn::ZoneResult& z : strewn::assess(site).zones) {
      const char* verdict = !z.limit_holds     ? "no limit"
                            : *z.limit_holds   ? "limit holds"
                            : z.limit_undecided ? "limit not shown to hold"
                                                : "limit exceeded";
      std::printf("%-28s %.3g +- %.2g per session: %s\n", z.zone->name.c_str(), z.total_per_session,
                  z.total_per_session_err, verdict);
    }
  } catch (const strewn::input_error& e) {
    std::fprintf(stderr, "%s\n", e.what());
    return 2;
  }
}
