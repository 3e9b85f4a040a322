#pragma once

#include "ui/document/DocumentTableModel.h"
#include "core/model/SchemeEdits.h"

#include <QString>

#include <optional>
#include <vector>

namespace cb {

// A cell of a weight grid and the text typed or pasted into it.
struct CellText
{
    int row = 0;
    int column = 0;
    QString text;
};

// A grid of weights whose rows are the factor's levels (the coding grid and the
// hypothesis grid). Typing, pasting and clearing all arrive as cell texts; a
// bad text refuses the whole edit, keeps the previous values and says why.
class WeightTableModel : public DocumentTableModel
{
    Q_OBJECT

public:
    using DocumentTableModel::DocumentTableModel;

    // Rows that hold weights; footer rows may follow them.
    virtual int weightRowCount() const = 0;
    // The weight in a cell, or nothing where there is none to edit.
    virtual std::optional<Weight> weightAt(int row, int column) const = 0;
    // "level 'none', column 2 ('drip vs furrow')"
    virtual QString cellName(int row, int column) const = 0;

    // Applies the texts as one undo step. Cells whose value would not change are skipped.
    bool setCellTexts(const std::vector<CellText> &cells, const QString &actionName);
    bool setData(const QModelIndex &index, const QVariant &value, int role = Qt::EditRole) override;
    // Text for the clipboard: exact fractions, floating weights at full precision.
    QString copyText(int row, int column) const;

signals:
    void editRefused(const QString &message);
    void editAccepted();

protected:
    // Applies parsed, changed weights. `mergeKey` is set for single-cell edits.
    virtual bool applyWeights(const std::vector<edits::CellWeight> &cells, const QString &actionName, const QString &mergeKey) = 0;
    Qt::ItemFlags weightFlags(const QModelIndex &index) const;
};

} // namespace cb
