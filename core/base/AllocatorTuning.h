#pragma once

namespace cb {

// Called once at the start of programs that analyse repeatedly (the window, the benchmarks).
// An analysis of a large factor allocates and frees several megabytes on every edit (k x k
// matrices, the per-pair tables, the hypothesis texts). With glibc's defaults, blocks above
// 128 KiB are mapped from the kernel and handed back on free, and the top of the heap is trimmed,
// so each new analysis faults the same memory back in: about 1300 page faults and 1.6 ms of a
// 10 ms analysis at k = 200 (bench/BenchAnalysis, random coding). Keeping freed memory for reuse
// (blocks up to 32 MiB from the heap, up to 64 MiB of free heap top retained) removes that.
// Does nothing on other C libraries.
void tuneAllocatorForRepeatedAnalyses();

} // namespace cb
