// A shared object without the entry symbol: not a strewn plugin.
extern "C" __attribute__((visibility("default"))) int something_else(void) { return 42; }
