#pragma once

#include "core/analysis/Analysis.h"
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

// Aligns a table for plain text: the first column left, the others right.
QString textTable(const QStringList &header, const QList<QStringList> &rows, int indent = 2);

} // namespace cb
