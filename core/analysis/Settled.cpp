#include "core/analysis/Settled.h"

#include "core/analysis/ColumnNames.h"

namespace cb {

Study settled(Study study)
{
    study = consistent(std::move(study));
    for (Scheme &s : study.design.factors)
        s = withCurrentNames(std::move(s));
    return study;
}

} // namespace cb
