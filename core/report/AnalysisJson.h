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

} // namespace cb
