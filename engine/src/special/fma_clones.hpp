#ifndef STREWN_SRC_FMA_CLONES_HPP
#define STREWN_SRC_FMA_CLONES_HPP

// STREWN_FMA_CLONES before a function builds it twice, for x86-64-v3 (FMA, AVX2) and for plain
// x86-64, and the loader picks one for the processor at hand (GCC's target_clones); `flatten`
// inlines what it calls from the same file into each build. For the hot paths whose series
// are chains of multiply-adds and whose geometry leans on std::fma, which is a library call
// without the instruction. Other compilers and processors get the one plain build.
#if defined(__GNUC__) && !defined(__clang__) && defined(__x86_64__)
#define STREWN_FMA_CLONES __attribute__((flatten, target_clones("arch=x86-64-v3", "default")))
#else
#define STREWN_FMA_CLONES
#endif

#endif
