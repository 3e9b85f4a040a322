#include "core/base/AllocatorTuning.h"

#include <cstdlib> // defines __GLIBC__ with the GNU C library

#if defined(__GLIBC__)
#include <malloc.h>
#endif

namespace cb {

void tuneAllocatorForRepeatedAnalyses()
{
#if defined(__GLIBC__)
    constexpr int kMiB = 1024 * 1024;
    mallopt(M_MMAP_THRESHOLD, 32 * kMiB);
    mallopt(M_TRIM_THRESHOLD, 64 * kMiB);
#endif
}

} // namespace cb
