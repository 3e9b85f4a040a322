#pragma once

#include "core/data/DataFit.h"
#include "core/model/Scheme.h"

#include <QString>
#include <QStringList>

namespace cb {

// What a fit answers, in the order a user asks it: do the level (or cell) means differ
// (F and p), then the spread within them and the share of the variance they explain.
// One line each; the command line prints them under its table, the window shows them
// above its own.
QStringList fitSummaryLines(const FitResult &fit, bool cells);

// The plain-text report of the fit subcommand. design: the scheme is a design's cells.
QString fitReport(const Scheme &scheme, bool design, const DataSummary &data, const FitResult &fit);

} // namespace cb
