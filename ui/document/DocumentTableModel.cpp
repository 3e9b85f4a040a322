#include "ui/document/DocumentTableModel.h"

#include "ui/common/ChangedCells.h"
#include "ui/document/Document.h"

namespace cb {

DocumentTableModel::DocumentTableModel(Document *document, QObject *parent)
    : QAbstractTableModel(parent)
    , m_document(document)
{
    connect(document, &Document::changed, this, &DocumentTableModel::follow);
}

int DocumentTableModel::rowCount(const QModelIndex &parent) const
{
    return parent.isValid() ? 0 : m_shape.rows;
}

int DocumentTableModel::columnCount(const QModelIndex &parent) const
{
    return parent.isValid() ? 0 : m_shape.columns;
}

QList<int> DocumentTableModel::changedRoles() const
{
    return {Qt::DisplayRole, Qt::EditRole, Qt::ToolTipRole, Qt::ForegroundRole, Qt::BackgroundRole, Qt::FontRole};
}

QList<QVariantList> DocumentTableModel::headerLook(Qt::Orientation orientation, int count) const
{
    static const int roles[] = {Qt::DisplayRole, Qt::ToolTipRole, Qt::DecorationRole, Qt::ForegroundRole, Qt::BackgroundRole, Qt::FontRole};
    QList<QVariantList> out;
    out.reserve(count);
    for (int section = 0; section < count; ++section) {
        QVariantList look;
        for (int role : roles)
            look << headerData(section, orientation, role);
        out << look;
    }
    return out;
}

// One headerDataChanged over the sections from the first that changed to the last.
void DocumentTableModel::emitChangedHeaders(Qt::Orientation orientation, int count, QList<QVariantList> &shown)
{
    QList<QVariantList> now = headerLook(orientation, count);
    int first = -1, last = -1;
    for (int section = 0; section < count; ++section)
        if (section >= shown.size() || now[section] != shown[section]) {
            if (first < 0)
                first = section;
            last = section;
        }
    shown = std::move(now);
    if (first >= 0)
        emit headerDataChanged(orientation, first, last);
}

void DocumentTableModel::follow()
{
    const Shape next = currentShape();
    if (next != m_shape) {
        beginResetModel();
        aboutToFollow();
        showsChange(); // lets the model note what it shows now
        m_shape = next;
        endResetModel();
        m_columnHeaders = headerLook(Qt::Horizontal, m_shape.columns);
        m_rowHeaders = headerLook(Qt::Vertical, m_shape.rows);
        return;
    }
    aboutToFollow();
    if (!showsChange())
        return;
    emitChangedCells(this, m_shape.rows, m_shape.columns, [this](int row, int column) { return cellChanged(row, column); },
                     changedRoles());
    emitChangedHeaders(Qt::Horizontal, m_shape.columns, m_columnHeaders);
    emitChangedHeaders(Qt::Vertical, m_shape.rows, m_rowHeaders);
}

} // namespace cb
