#include "ui/design/TermModel.h"

#include "ui/common/Look.h"

namespace cb {

TermModel::TermModel(QObject *parent)
    : QAbstractItemModel(parent)
{
}

void TermModel::setTerms(std::vector<TermRow> terms)
{
    bool sameShape = terms.size() == m_terms.size();
    for (size_t t = 0; sameShape && t < terms.size(); ++t)
        sameShape = terms[t].columns.size() == m_terms[t].columns.size();
    if (!sameShape) {
        beginResetModel();
        m_terms = std::move(terms);
        endResetModel();
        return;
    }
    for (size_t t = 0; t < terms.size(); ++t) {
        if (terms[t] == m_terms[t])
            continue;
        const bool termChanged = terms[t].name != m_terms[t].name || terms[t].toolTip != m_terms[t].toolTip
            || terms[t].included != m_terms[t].included;
        const bool columnsChanged = terms[t].columns != m_terms[t].columns;
        m_terms[t] = std::move(terms[t]);
        const QModelIndex term = index(int(t), 0);
        if (termChanged)
            emit dataChanged(term, term);
        if (columnsChanged)
            emit dataChanged(index(0, 0, term), index(int(m_terms[t].columns.size()) - 1, 0, term));
    }
}

QModelIndex TermModel::indexOfColumn(int column) const
{
    for (size_t t = 0; t < m_terms.size(); ++t)
        for (size_t c = 0; c < m_terms[t].columns.size(); ++c)
            if (m_terms[t].columns[c].column == column)
                return createIndex(int(c), 0, quintptr(t) + 1);
    return {};
}

int TermModel::rowsShown() const
{
    int rows = 0;
    for (const TermRow &t : m_terms)
        rows += 1 + int(t.columns.size());
    return rows;
}

QModelIndex TermModel::index(int row, int column, const QModelIndex &parent) const
{
    if (column != 0 || row < 0)
        return {};
    if (!parent.isValid())
        return row < int(m_terms.size()) ? createIndex(row, 0, kTermRow) : QModelIndex();
    if (parent.internalId() != kTermRow || row >= int(m_terms[size_t(parent.row())].columns.size()))
        return {};
    return createIndex(row, 0, quintptr(parent.row()) + 1);
}

QModelIndex TermModel::parent(const QModelIndex &child) const
{
    if (!child.isValid() || child.internalId() == kTermRow)
        return {};
    return createIndex(int(child.internalId() - 1), 0, kTermRow);
}

int TermModel::rowCount(const QModelIndex &parent) const
{
    if (!parent.isValid())
        return int(m_terms.size());
    return parent.internalId() == kTermRow ? int(m_terms[size_t(parent.row())].columns.size()) : 0;
}

int TermModel::columnCount(const QModelIndex &) const
{
    return 1;
}

QVariant TermModel::data(const QModelIndex &index, int role) const
{
    if (!index.isValid())
        return {};
    if (index.internalId() != kTermRow) {
        const ColumnRow &c = m_terms[size_t(index.internalId() - 1)].columns[size_t(index.row())];
        switch (role) {
        case Qt::DisplayRole: return c.label;
        case Qt::ToolTipRole: return tr("Show this column's weights over the cells");
        case ColumnRole: return c.column;
        default: return {};
        }
    }
    const TermRow &t = m_terms[size_t(index.row())];
    switch (role) {
    case Qt::DisplayRole: return t.name;
    case Qt::CheckStateRole: return t.included ? Qt::Checked : Qt::Unchecked;
    case Qt::ForegroundRole: return t.included ? QVariant() : QVariant(look::quietText());
    case Qt::ToolTipRole: return t.toolTip.isEmpty() ? QVariant() : QVariant(t.toolTip);
    default: return {};
    }
}

Qt::ItemFlags TermModel::flags(const QModelIndex &index) const
{
    if (!index.isValid())
        return Qt::NoItemFlags;
    return index.internalId() == kTermRow ? Qt::ItemIsEnabled | Qt::ItemIsUserCheckable : Qt::ItemIsEnabled | Qt::ItemIsSelectable;
}

bool TermModel::setData(const QModelIndex &index, const QVariant &value, int role)
{
    if (!index.isValid() || index.internalId() != kTermRow || role != Qt::CheckStateRole)
        return false;
    const bool include = value.toInt() == Qt::Checked;
    if (include != m_terms[size_t(index.row())].included)
        emit toggled(index.row(), include);
    return true;
}

} // namespace cb
