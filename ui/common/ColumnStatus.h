#pragma once

#include "core/analysis/Analysis.h"
#include "ui/common/Look.h"

#include <QList>
#include <QString>

#include <optional>
#include <vector>

namespace cb {

// What the analysis says about one coding column, in words and states for the
// grid's footer, headers and tooltips. Reads core's results; computes none.
struct ColumnStatus
{
    look::State sum = look::State::Neutral;
    look::State orthogonality = look::State::Neutral; // under the planned n
    look::State vif = look::State::Neutral;
    look::State rank = look::State::Good;
    QList<int> notOrthogonalWritten; // other columns, 0-based
    QList<int> notOrthogonalInDesign;
    QString sumText;          // "✓ 0", "✗ 1/2"
    QString orthogonalityText; // "✓ none", "! 2, 3": the columns it is not orthogonal to
    QString vifText;          // "✓ 1.25", "! 6.10", "—"
    QString explanation;      // several lines for the tooltip

    // The worst of rank and VIF: what colours the whole column.
    look::State overall() const;
};

// One status per coding column; empty when the analysis has no diagnostics (invalid scheme).
std::vector<ColumnStatus> columnStatuses(const Analysis &analysis, bool plannedSizes);

look::State vifState(const std::optional<double> &vif);
QString formatVif(const std::optional<double> &vif);
// Condition numbers and indices: "1.73", "45.2", "∞".
QString formatIndex(double value);
// A weight for people: exact fraction, recognised fraction, or "≈0.6708".
QString formatWeight(const Weight &weight);
// A weight for editing and copying: "-2/3", or the full double for floating weights.
QString editableWeight(const Weight &weight, bool keepApproxMark);
// "under the planned n" or "under equal n".
QString sizesPhrase(bool plannedSizes);

} // namespace cb
