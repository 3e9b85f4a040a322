#pragma once

#include <QAbstractItemModel>
#include <QTableView>

// What a table view shows, read through its model.
inline QString cellText(const QTableView *view, int row, int column)
{
    return view->model()->index(row, column).data().toString();
}

inline int rowCount(const QTableView *view)
{
    return view->model()->rowCount();
}
