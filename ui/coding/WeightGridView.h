#pragma once

#include "ui/common/EntryTableView.h"

namespace cb {

class WeightTableModel;

// A spreadsheet-like view of a weight grid: type to edit, Enter moves down,
// Ctrl+C / Ctrl+V copy and paste rectangular blocks as tab-separated text,
// Delete clears the selected cells to 0. Each paste or clear is one undo step.
// Column names can be edited by double-clicking the header.
class WeightGridView : public EntryTableView
{
    Q_OBJECT

public:
    explicit WeightGridView(QWidget *parent = nullptr);

    void setWeightModel(WeightTableModel *model);
    WeightTableModel *weightModel() const { return m_model; }
    void setColumnsRenamable(bool renamable) { m_renamable = renamable; }

    // Tab-separated text of the selection's bounding rectangle.
    QString selectionText() const;
    // Pastes tab-separated text at the current cell (or fills the selection with one value).
    bool pasteText(const QString &text);
    bool clearSelectedCells();
    // Opens the inline editor for a column name.
    void renameColumn(int column);

public slots:
    void copy();
    void paste();

protected:
    void keyPressEvent(QKeyEvent *event) override;
    int entryRowCount() const override; // the weight rows, not the footers

private:
    // Fits the columns to their names and weights after the shape or the names changed.
    void fitColumns();

    WeightTableModel *m_model = nullptr;
    QStringList m_fittedNames;
    bool m_renamable = false;
};

} // namespace cb
