#pragma once

#include "core/analysis/Analysis.h"
#include "core/analysis/EmptyCells.h"
#include "core/model/Design.h"

#include <QStringList>

#include <vector>

namespace cb {

// What a design implies over the cell means.
struct DesignAnalysis
{
    QStringList cells;
    QStringList termNames;
    std::vector<int> columnTerm;  // term index of each coding column
    Scheme cellScheme;            // the equivalent one-factor scheme over the cells
    Analysis analysis;            // hypotheses, diagnostics and findings over the cells
    // term x term: every column of one term orthogonal to every column of the other under the cell n
    std::vector<std::vector<bool>> termsOrthogonalInDesign;
    QStringList emptyCells;
    // The cells the analysis is over (indices into cells): every cell, or those with observations
    // when some are empty. cellScheme and analysis have one level per analysed cell.
    std::vector<int> analysedCells;
    // With empty cells: whether the terms can be estimated from the others, and what the empty
    // cells change in the hypotheses (core/analysis/EmptyCells.h). When not estimable the
    // analysis is left empty, cellScheme is over every cell and the refusal is a problem finding.
    EmptyCellEffects empty;
    bool refused() const { return analysis.levelCount == 0; }
    // A hypothesis row of the analysis over every cell of the design (0 at empty cells).
    std::vector<Weight> rowOverCells(int coefficient) const;
};

// emptyWhy says how the cells with cell n 0 are empty, for the messages (default "planned n = 0").
DesignAnalysis analyzeDesign(const Design &design, const QString &emptyWhy = {});

} // namespace cb
