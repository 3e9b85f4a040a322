#include "ui/levels/LevelsView.h"

#include "ui/levels/LevelsModel.h"

#include <QHeaderView>
#include <QKeyEvent>

namespace cb {

LevelsView::LevelsView(QWidget *parent)
    : EntryTableView(parent)
{
    setSelectionBehavior(QAbstractItemView::SelectRows);
    setSelectionMode(QAbstractItemView::SingleSelection);
    setDragEnabled(true);
    setAcceptDrops(true);
    setDropIndicatorShown(true);
    setDragDropMode(QAbstractItemView::InternalMove);
    setDragDropOverwriteMode(false);
    setDefaultDropAction(Qt::MoveAction);
    setEditTriggers(QAbstractItemView::AnyKeyPressed | QAbstractItemView::DoubleClicked | QAbstractItemView::EditKeyPressed);
    verticalHeader()->setSectionResizeMode(QHeaderView::Fixed);
    setWordWrap(false);
}

void LevelsView::setLevelsModel(LevelsModel *model)
{
    m_model = model;
    setModel(model);
    horizontalHeader()->setSectionResizeMode(LevelsModel::NameColumn, QHeaderView::Stretch);
    // The number columns are fitted when the levels change, not on every edit of a weight
    // (the model stays silent then; measuring every row each time would cost).
    auto fit = [this] {
        for (int c = LevelsModel::SizeColumn; c < LevelsModel::ColumnCount; ++c)
            resizeColumnToContents(c);
    };
    connect(model, &QAbstractItemModel::modelReset, this, fit);
    connect(model, &QAbstractItemModel::dataChanged, this, fit); // only when levels, sizes or roles changed
    fit();
}

bool LevelsView::moveCurrent(int step)
{
    const QModelIndex cur = currentIndex();
    if (!m_model || !cur.isValid())
        return false;
    const int to = cur.row() + step;
    const int column = cur.column();
    if (!m_model->moveLevel(cur.row(), to))
        return false;
    setCurrentIndex(m_model->index(to, column));
    return true;
}

void LevelsView::keyPressEvent(QKeyEvent *event)
{
    if (event->modifiers() & Qt::ControlModifier) {
        if (event->key() == Qt::Key_Up) {
            moveCurrent(-1);
            return;
        }
        if (event->key() == Qt::Key_Down) {
            moveCurrent(+1);
            return;
        }
    }
    EntryTableView::keyPressEvent(event);
}

} // namespace cb
