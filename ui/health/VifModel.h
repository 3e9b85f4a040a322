#pragma once

#include "ui/document/DocumentTableModel.h"

namespace cb {

// Variance inflation per coding column, with its verdict against the thresholds.
class VifModel : public DocumentTableModel
{
    Q_OBJECT

public:
    enum Column { NameColumn, VifColumn, VerdictColumn, ColumnCount };

    explicit VifModel(Document *document, QObject *parent = nullptr);

    QVariant data(const QModelIndex &index, int role = Qt::DisplayRole) const override;
    QVariant headerData(int section, Qt::Orientation orientation, int role = Qt::DisplayRole) const override;

protected:
    Shape currentShape() const override;
};

} // namespace cb
