#pragma once

// The benchmarks' main: analyses are measured as the window runs them, with its allocator
// settings (core/AllocatorTuning.h).
#include "core/base/AllocatorTuning.h"

#include <benchmark/benchmark.h>

inline int runBenchmarks(int argc, char **argv)
{
    cb::tuneAllocatorForRepeatedAnalyses();
    benchmark::Initialize(&argc, argv);
    if (benchmark::ReportUnrecognizedArguments(argc, argv))
        return 1;
    benchmark::RunSpecifiedBenchmarks();
    benchmark::Shutdown();
    return 0;
}
