#include "ui/health/VifModel.h"

#include "ui/common/ColumnStatus.h"
#include "ui/document/Document.h"
#include "ui/common/Look.h"

using namespace Qt::StringLiterals;

namespace cb {

VifModel::VifModel(Document *document, QObject *parent)
    : DocumentTableModel(document, parent)
{
    follow();
}

DocumentTableModel::Shape VifModel::currentShape() const
{
    const Analysis &a = document()->analysis();
    return {int(a.vif.size()) == a.columnCount ? a.columnCount : 0, ColumnCount};
}

QVariant VifModel::data(const QModelIndex &index, int role) const
{
    if (!index.isValid())
        return {};
    const Analysis &a = document()->analysis();
    const int j = index.row();
    const auto &vif = a.vif[size_t(j)];
    const look::State state = vifState(vif);
    switch (index.column()) {
    case NameColumn:
        return role == Qt::DisplayRole ? QVariant(u"%1  %2"_s.arg(j + 1).arg(a.columnNames.value(j))) : QVariant();
    case VifColumn:
        if (role == Qt::DisplayRole)
            return formatVif(vif);
        if (role == Qt::TextAlignmentRole)
            return QVariant::fromValue(Qt::AlignRight | Qt::AlignVCenter);
        return {};
    case VerdictColumn:
        if (role == Qt::DisplayRole) {
            switch (state) {
            case look::State::Good: return tr("%1 fine").arg(look::mark(state));
            case look::State::Caution: return tr("%1 notable").arg(look::mark(state));
            case look::State::Problem: return tr("%1 serious").arg(look::mark(state));
            case look::State::Neutral: return tr("undefined");
            }
        }
        if (role == Qt::ForegroundRole)
            return look::ink(state);
        if (role == Qt::BackgroundRole && state != look::State::Good)
            return look::tint(state);
        if (role == Qt::ToolTipRole)
            return tr("VIF %1: fine below %2, notable from %2, serious from %3 (common practice).").arg(formatVif(vif)).arg(kVifCaution).arg(kVifProblem);
        return {};
    default:
        return {};
    }
}

QVariant VifModel::headerData(int section, Qt::Orientation orientation, int role) const
{
    if (orientation != Qt::Horizontal)
        return {};
    if (role == Qt::ToolTipRole)
        return tr("Variance inflation under the planned n: how much the column's variance grows because it overlaps the others. "
                  "Fine below %1, notable from %1, serious from %2 (common practice).").arg(kVifCaution).arg(kVifProblem);
    if (role != Qt::DisplayRole)
        return {};
    switch (section) {
    case NameColumn: return tr("Column");
    case VifColumn: return tr("VIF");
    case VerdictColumn: return tr("Verdict");
    default: return {};
    }
}

} // namespace cb
