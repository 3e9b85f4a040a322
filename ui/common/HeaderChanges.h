#pragma once

class QTableView;

namespace cb {

// A table view answers every headerDataChanged of its model by laying itself out again: both
// headers measured anew and the whole viewport repainted (QAbstractItemView's delayed items
// layout). Most edits rename a column of the coding grid, so every edit repainted every cell of
// the grid and its footer strip. After this call, a header change repaints only the header's
// changed sections (the header does that itself), and the view is laid out again only when the
// header's thickness changes (a name that gains or loses a line, a longer level name), or when a
// hidden view is shown after its headers changed. Call it after setModel(); views whose sections
// are sized to their contents (QHeaderView::ResizeToContents) keep Qt's way.
// Returns false when the view's own connection could not be found (a Qt that connects it
// otherwise): the view then keeps Qt's way, which is correct but slower.
bool relayoutOnlyWhenHeadersResize(QTableView *view);

} // namespace cb
