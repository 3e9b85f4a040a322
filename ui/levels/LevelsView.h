#pragma once

#include <QTableView>

namespace cb {

class LevelsModel;

// The levels table: edit in place, drag rows or press Ctrl+Up / Ctrl+Down to reorder.
class LevelsView : public QTableView
{
    Q_OBJECT

public:
    explicit LevelsView(QWidget *parent = nullptr);
    void setLevelsModel(LevelsModel *model);

    // Moves the current level one place up (-1) or down (+1) and follows it.
    bool moveCurrent(int step);

protected:
    void keyPressEvent(QKeyEvent *event) override;
    // Enter commits and moves down, as in the coding grid: the next name goes to the next level.
    void closeEditor(QWidget *editor, QAbstractItemDelegate::EndEditHint hint) override;

private:
    LevelsModel *m_model = nullptr;
};

} // namespace cb
