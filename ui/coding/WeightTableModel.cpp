#include "ui/coding/WeightTableModel.h"

#include "ui/common/ColumnStatus.h"

using namespace Qt::StringLiterals;

namespace cb {

bool WeightTableModel::setCellTexts(const std::vector<CellText> &cells, const QString &actionName)
{
    std::vector<edits::CellWeight> changed;
    for (const CellText &c : cells) {
        const std::optional<Weight> old = weightAt(c.row, c.column);
        if (!old) {
            emit editRefused(tr("Not accepted: %1 cannot be edited.").arg(cellName(c.row, c.column)));
            return false;
        }
        // An unchanged text is no edit, even for a floating weight whose text reads back as a decimal.
        if (c.text.trimmed() == editableWeight(*old, true) || c.text.trimmed() == editableWeight(*old, false))
            continue;
        auto w = parseWeight(c.text);
        if (!w) {
            emit editRefused(tr("Not accepted at %1: %2. The previous value %3 is kept.")
                                 .arg(cellName(c.row, c.column), w.error(), formatWeight(*old)));
            return false;
        }
        if (*w == *old)
            continue;
        changed.push_back(edits::CellWeight{c.row, c.column, *w});
    }
    if (changed.empty())
        return true;
    const QString key = changed.size() == 1 ? u"%1,%2"_s.arg(changed[0].level).arg(changed[0].column) : QString();
    if (!applyWeights(changed, actionName, key))
        return false;
    emit editAccepted();
    return true;
}

bool WeightTableModel::setData(const QModelIndex &index, const QVariant &value, int role)
{
    if (role != Qt::EditRole || !index.isValid() || index.row() >= weightRowCount())
        return false;
    const QString what = tr("Type %1 at %2").arg(value.toString().trimmed(), cellName(index.row(), index.column()));
    return setCellTexts({CellText{index.row(), index.column(), value.toString()}}, what);
}

QString WeightTableModel::copyText(int row, int column) const
{
    const auto w = weightAt(row, column);
    return w ? editableWeight(*w, false) : QString();
}

Qt::ItemFlags WeightTableModel::weightFlags(const QModelIndex &index) const
{
    if (!index.isValid())
        return Qt::NoItemFlags;
    Qt::ItemFlags f = Qt::ItemIsEnabled | Qt::ItemIsSelectable;
    if (index.row() < weightRowCount() && weightAt(index.row(), index.column()))
        f |= Qt::ItemIsEditable;
    return f;
}

} // namespace cb
