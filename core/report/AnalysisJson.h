#pragma once

#include "core/analysis/Analysis.h"
#include "core/model/Scheme.h"

#include <QJsonObject>

namespace cb {

// The analysis as one JSON object (the command line's --json output; keys in DEVELOPERS.md).
QJsonObject analysisToJson(const Scheme &scheme, const Analysis &analysis);

// Helpers shared by every JSON writer: non-finite numbers become null.
QJsonValue jsonNumber(double v);
QJsonValue jsonNumber(const std::optional<double> &v);

} // namespace cb
