#pragma once
// Shared by the analysis tests: whether any finding's message contains a piece of text.
#include "core/analysis/Analysis.h"

namespace cb::test {

inline bool hasFinding(const Analysis &a, const QString &part)
{
    for (const Finding &f : a.findings)
        if (f.message.contains(part))
            return true;
    return false;
}

} // namespace cb::test
