#pragma once

#include "ui/common/EntryTableView.h"

class QTimer;

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
    // Fits the columns to their names and weights after the shape or the names changed. While
    // the columns stay the same, a column widens at once and narrows only after a pause
    // (kNarrowAfterMs): a width change moves every column to its right, so narrowing a column
    // on every typed weight made the grid jump, and repainted it whole, with each keystroke.
    void fitColumns();
    int fittedWidth(int column) const;
    static constexpr int kNarrowAfterMs = 1500;

    WeightTableModel *m_model = nullptr;
    QStringList m_fittedNames;
    QTimer *m_narrow = nullptr;
    QList<int> m_toNarrow; // columns fitted wider than their names now need
    bool m_renamable = false;
};

} // namespace cb
