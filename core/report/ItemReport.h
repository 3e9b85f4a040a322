#pragma once

#include "core/data/ItemFit.h"

#include <QString>
#include <QStringList>

namespace cb {

// What the by-item analysis and min F' are and are not, in one sentence (the report, the window).
QString itemScopeSentence();

// The by-item omnibus test and the items it counted, in one line (the report and the window).
QStringList itemSummaryLines(const ItemAnalysis &items);

// The by-item section of the fit report: its coefficients, its summary, min F' per coefficient
// beside the by-participant and by-item F, its notes and the scope sentence.
QString itemReport(const FitResult &byParticipant, const ItemAnalysis &items);

} // namespace cb
