#pragma once

#include "ui/common/EntryTableView.h"

namespace cb {

class LevelsModel;

// The levels table: edit in place (Enter moves down), drag rows or press Ctrl+Up / Ctrl+Down to reorder.
class LevelsView : public EntryTableView
{
    Q_OBJECT

public:
    explicit LevelsView(QWidget *parent = nullptr);
    void setLevelsModel(LevelsModel *model);

    // Moves the current level one place up (-1) or down (+1) and follows it.
    bool moveCurrent(int step);

protected:
    void keyPressEvent(QKeyEvent *event) override;

private:
    LevelsModel *m_model = nullptr;
};

} // namespace cb
