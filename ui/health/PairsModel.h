#pragma once

#include "ui/document/DocumentTableModel.h"

namespace cb {

// The compact pairwise view: an m x m table of coding columns. Above the
// diagonal: orthogonal as written (plain cross-product 0). Below it: orthogonal
// under the planned n (centred, n-weighted cross-product 0). Each cell shows a
// symbol; its tooltip gives the cross-product from core.
class PairsModel : public DocumentTableModel
{
    Q_OBJECT

public:
    explicit PairsModel(Document *document, QObject *parent = nullptr);

    QVariant data(const QModelIndex &index, int role = Qt::DisplayRole) const override;
    QVariant headerData(int section, Qt::Orientation orientation, int role = Qt::DisplayRole) const override;

protected:
    Shape currentShape() const override;
};

} // namespace cb
