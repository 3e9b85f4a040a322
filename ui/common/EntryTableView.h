#pragma once

#include <QTableView>

namespace cb {

// A table typed into like a spreadsheet: Enter commits the cell and moves down to the next
// row that takes entries (the next name goes to the next level). The levels table, the weight
// grids and the power planner's inputs share it.
class EntryTableView : public QTableView
{
    Q_OBJECT

public:
    using QTableView::QTableView;

protected:
    void closeEditor(QWidget *editor, QAbstractItemDelegate::EndEditHint hint) override;
    // Rows Enter may move into (a grid's footer rows take no entries); all rows by default.
    virtual int entryRowCount() const;
};

} // namespace cb
