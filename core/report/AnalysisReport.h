#pragma once

#include "core/analysis/Analysis.h"
#include "core/analysis/DesignAnalysis.h"
#include "core/model/Scheme.h"

#include <QList>
#include <QString>
#include <QStringList>

namespace cb {

// A plain-text report of a scheme and its analysis, for the terminal.
QString analysisReport(const Scheme &scheme, const Analysis &analysis);

// A plain-text report of a design of crossed factors, over its cells.
struct Design;
struct DesignAnalysis;
QString designReport(const Design &design, const DesignAnalysis &analysis);
// The empty cells, what they change (one line per changed coefficient); empty without empty cells.
// The design report and the fit report of a design both include it.
QString emptyCellsReport(const EmptyCellEffects &effects);

// A plain-text report of two codings compared (core/analysis/Compare.h), for the terminal.
struct CodingComparison;
QString comparisonReport(const CodingComparison &comparison);

} // namespace cb
