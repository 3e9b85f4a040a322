#include "ui/health/PairsModel.h"

#include "ui/common/ColumnStatus.h"
#include "ui/document/Document.h"
#include "ui/common/Look.h"

#include <QFont>

#include <cmath>

using namespace Qt::StringLiterals;

namespace cb {

PairsModel::PairsModel(Document *document, QObject *parent)
    : DocumentTableModel(document, parent)
{
    follow();
}

DocumentTableModel::Shape PairsModel::currentShape() const
{
    const Analysis &a = document()->analysis();
    const int m = a.orthogonal.size() == a.columnCount ? a.columnCount : 0;
    return {m, m};
}

QVariant PairsModel::data(const QModelIndex &index, int role) const
{
    if (!index.isValid())
        return {};
    const Analysis &a = document()->analysis();
    const int i = index.row(), j = index.column();
    if (i == j) {
        if (role == Qt::DisplayRole)
            return QString::number(i + 1);
        if (role == Qt::ForegroundRole)
            return look::quietText();
        if (role == Qt::TextAlignmentRole)
            return QVariant::fromValue(Qt::AlignCenter);
        if (role == Qt::ToolTipRole)
            return tr("Column %1 \u2018%2\u2019").arg(i + 1).arg(a.columnNames.value(i));
        return {};
    }
    const bool written = i < j;
    const bool orthogonal = written ? a.orthogonal(i, j) : a.orthogonalInDesign(i, j);
    const look::State state = orthogonal ? look::State::Good : (written ? look::State::Neutral : look::State::Caution);
    switch (role) {
    case Qt::DisplayRole:
        return orthogonal ? look::mark(look::State::Good) : look::mark(look::State::Problem);
    case Qt::TextAlignmentRole:
        return QVariant::fromValue(Qt::AlignCenter);
    case Qt::ForegroundRole:
        return orthogonal ? look::ink(look::State::Good) : look::ink(written ? look::State::Neutral : look::State::Caution);
    case Qt::BackgroundRole:
        return look::tint(state);
    case Qt::FontRole: {
        QFont f;
        f.setBold(!orthogonal);
        return f;
    }
    case Qt::ToolTipRole: {
        const int a1 = std::min(i, j), a2 = std::max(i, j);
        const QString pair = tr("Columns %1 \u2018%2\u2019 and %3 \u2018%4\u2019").arg(a1 + 1).arg(a.columnNames.value(a1)).arg(a2 + 1).arg(a.columnNames.value(a2));
        if (written)
            return pair + u"\n"_s
                + (orthogonal ? tr("\u2713 orthogonal as written: the sum of products of their weights is 0.")
                              : tr("\u2717 not orthogonal as written: the sum of products of their weights is %1.")
                                    .arg(formatWeight(a.crossProducts(i, j))))
                + u"\n"_s + tr("(Above the diagonal: as written. Below: %1.)").arg(sizesPhrase(document()->scheme().factor.hasPlannedN()));
        const bool planned = document()->scheme().factor.hasPlannedN();
        return pair + u"\n"_s
            + (orthogonal ? tr("\u2713 orthogonal %1: their estimates are uncorrelated.").arg(sizesPhrase(planned))
                          : tr("\u2717 not orthogonal %1: the centred, n-weighted sum of products is %2, so their estimates are correlated (r = %3).")
                                .arg(sizesPhrase(planned), formatWeight(a.designCrossProducts(i, j)),
                                     std::isnan(a.correlation(i, j)) ? tr("undefined")
                                                                     : QString::number(a.correlation(i, j), 'f', 3)))
            + u"\n"_s + tr("(Below the diagonal: %1. Above: as written.)").arg(sizesPhrase(planned));
    }
    default:
        return {};
    }
}

QVariant PairsModel::headerData(int section, Qt::Orientation, int role) const
{
    const Analysis &a = document()->analysis();
    if (role == Qt::DisplayRole)
        return QString::number(section + 1);
    if (role == Qt::ToolTipRole)
        return tr("Column %1 \u2018%2\u2019").arg(section + 1).arg(a.columnNames.value(section));
    return {};
}

} // namespace cb
