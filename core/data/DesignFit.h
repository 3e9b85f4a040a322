#pragma once

#include "core/analysis/DesignAnalysis.h"
#include "core/data/DataFit.h"

namespace cb {

// A design fitted to data over its cells.
struct DesignFit
{
    FitResult fit;
    DesignAnalysis design; // the analysis the fit used: over the cells with data when some have none
};

// The data decide which cells are empty: a cell with no rows (after the mapping) is left out, and
// the design is fitted over the others when its terms can be estimated from them
// (analyzeDesign over the observed cell sizes, empty cells "no rows in the data"); the fit's notes
// then say which coefficients test something different from the full design. Refused with the
// reason (the empty cells, the terms that cannot be estimated, which to leave out) otherwise.
// With every cell in the data this is fitScheme on the design's cells (planned sizes; a cell
// planned empty takes the mean planned size of the others).
Result<DesignFit> fitDesign(const Design &design, const DataSummary &data, const FitOptions &options = {},
                            const LevelMapping &mapping = {});

} // namespace cb
