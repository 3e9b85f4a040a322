#pragma once

#include "core/analysis/Analysis.h"
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
};

DesignAnalysis analyzeDesign(const Design &design);

} // namespace cb
