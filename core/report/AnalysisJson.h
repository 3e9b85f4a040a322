#pragma once

#include "core/analysis/Analysis.h"
#include "core/analysis/DesignAnalysis.h"
#include "core/base/NumberText.h"
#include "core/model/Scheme.h"

#include <QJsonObject>

namespace cb {

// The analysis as one JSON object (the command line's --json output; keys in DEVELOPERS.md).
QJsonObject analysisToJson(const Scheme &scheme, const Analysis &analysis);
// A design's analysis: the cell scheme's analysis plus the design's keys.
QJsonObject designAnalysisToJson(const Design &design, const DesignAnalysis &analysis);
// The keys a design with empty cells adds (empty without empty cells): empty_cells_reason,
// estimable, estimable_rank; when estimable full_design_empty_cell_n, changed_hypotheses [{coefficient,
// label, term, full_design, now, full_design_weights, weights, empty_cell_weights,
// reweighted_cells, words}], unchanged_hypotheses, empty_cells_summary; when not, not_estimable
// [{coefficient, label, term, only_in_empty_cells}], leave_out_terms and refusal.
QJsonObject emptyCellsToJson(const EmptyCellEffects &effects);

} // namespace cb
