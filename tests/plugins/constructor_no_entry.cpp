// A shared object with a constructor but no entry symbol: the host must refuse it from the file
// alone, before dlopen() runs the constructor (which leaves a mark the test looks for).
#include <cstdlib>

__attribute__((constructor)) static void leave_a_mark() { setenv("STREWN_TEST_CONSTRUCTOR_RAN", "1", 1); }

extern "C" __attribute__((visibility("default"))) int not_the_entry(void) { return 7; }
