#include "ui/document/DocumentTableModel.h"

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

void DocumentTableModel::follow()
{
    const Shape next = currentShape();
    if (next != m_shape) {
        beginResetModel();
        aboutToFollow();
        showsChange(); // lets the model note what it shows now
        m_shape = next;
        endResetModel();
        return;
    }
    aboutToFollow();
    if (!showsChange())
        return;
    if (m_shape.rows > 0 && m_shape.columns > 0)
        emit dataChanged(index(0, 0), index(m_shape.rows - 1, m_shape.columns - 1), changedRoles());
    if (m_shape.columns > 0)
        emit headerDataChanged(Qt::Horizontal, 0, m_shape.columns - 1);
    if (m_shape.rows > 0)
        emit headerDataChanged(Qt::Vertical, 0, m_shape.rows - 1);
}

} // namespace cb
