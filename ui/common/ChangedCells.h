#pragma once

#include <QAbstractItemModel>

namespace cb {

// Tells a model's views which cells of a rows x columns table changed, the one rule for every
// table model of the window (DocumentTableModel, CellTableModel). A view repaints only the cell
// of a one-cell dataChanged, but its whole viewport for a range, so the cells that changed are
// told one by one; when more than kOneByOne changed, one dataChanged covers them all.
// `changed(row, column)` says whether a cell's look changed.
template <class Changed>
void emitChangedCells(QAbstractItemModel *model, int rows, int columns, Changed changed, const QList<int> &roles = {})
{
    constexpr int kOneByOne = 64;
    QList<QModelIndex> cells;
    int top = rows, left = columns, bottom = -1, right = -1;
    for (int r = 0; r < rows; ++r)
        for (int c = 0; c < columns; ++c)
            if (changed(r, c)) {
                if (cells.size() <= kOneByOne)
                    cells << model->index(r, c);
                top = std::min(top, r);
                bottom = std::max(bottom, r);
                left = std::min(left, c);
                right = std::max(right, c);
            }
    if (cells.size() > kOneByOne) {
        emit model->dataChanged(model->index(top, left), model->index(bottom, right), roles);
        return;
    }
    for (const QModelIndex &cell : cells)
        emit model->dataChanged(cell, cell, roles);
}

} // namespace cb
