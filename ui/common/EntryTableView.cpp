#include "ui/common/EntryTableView.h"

namespace cb {

void EntryTableView::closeEditor(QWidget *editor, QAbstractItemDelegate::EndEditHint hint)
{
    if (hint != QAbstractItemDelegate::SubmitModelCache) {
        QTableView::closeEditor(editor, hint);
        return;
    }
    QTableView::closeEditor(editor, QAbstractItemDelegate::NoHint);
    const QModelIndex cur = currentIndex();
    if (model() && cur.isValid() && cur.row() + 1 < entryRowCount())
        setCurrentIndex(model()->index(cur.row() + 1, cur.column()));
}

int EntryTableView::entryRowCount() const
{
    return model() ? model()->rowCount() : 0;
}

} // namespace cb
