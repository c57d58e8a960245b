// The one rule by which the engine's hot loops get a processor-specific form. A kernel marked
// LIVEPROB_FAST_CLONES is compiled twice on x86-64, for x86-64-v3 (AVX2 with FMA) and for the
// baseline, and the loader picks the clone by processor features ("arch=x86-64-v3"; not
// "arch=haswell", which picks by processor model and gave every other processor the slow
// baseline). Clang 14 (Debian's; only the fuzz preset uses it) knows no "arch=x86-64-v3" for
// versioned functions: it builds the baseline alone. The loader runs a clone's resolver before
// any sanitizer runtime has started, so sanitizer builds compile the files holding such kernels
// uninstrumented (engine/core/CMakeLists.txt lists them).
#pragma once

#if defined(__x86_64__) && !defined(__clang__)
#define LIVEPROB_HAS_FAST_CLONES 1
#define LIVEPROB_FAST_CLONE "arch=x86-64-v3"
#define LIVEPROB_FAST_CLONES __attribute__((target_clones(LIVEPROB_FAST_CLONE, "default")))
#else
#define LIVEPROB_FAST_CLONES
#endif
