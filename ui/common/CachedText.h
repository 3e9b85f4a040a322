#pragma once

#include <QFont>
#include <QHash>
#include <QHeaderView>
#include <QStyledItemDelegate>

class QPainter;
class QRect;
class QString;
class QTableView;
class QWidget;

namespace cb {

// Most of the time the window spends repainting after an edit goes into shaping text (HarfBuzz
// through QTextLayout), and the texts are the same short strings every time: fractions, level
// names, column names, card titles. QPainter::drawText and the style's item text lay the string
// out anew on every paint; these functions keep each laid-out text (QStaticText) per string,
// font, width and alignment, so a text is shaped once and then only drawn.

// Draws text as QPainter::drawText(rect, flags, text) does for the flags the window uses:
// alignment, and Qt::TextWordWrap (lines broken at words to the rect's width). The painter's
// font and pen are used.
void drawCachedText(QPainter *painter, const QRect &rect, int flags, const QString &text);

// The item delegate of the window's views: a cell is drawn by the style as usual (background,
// check box, icon, focus), and its text comes from the cache when it fits on one line or, in a
// view with word wrap, when its wrapped lines fit the cell (laid out as the style lays wrapped
// item text out: lines without leading). Text that would be elided, text with line breaks of
// its own and a cell being edited are drawn by QStyledItemDelegate itself.
// The size of an item that shows only text is measured by the style once per text, font and
// wrapping width, and remembered: a list with word wrap asks for every row's size on each paint,
// and fitting a grid's column measures every cell of it.
class CachedTextDelegate : public QStyledItemDelegate
{
public:
    using QStyledItemDelegate::QStyledItemDelegate;
    void paint(QPainter *painter, const QStyleOptionViewItem &option, const QModelIndex &index) const override;
    QSize sizeHint(const QStyleOptionViewItem &option, const QModelIndex &index) const override;
    // A one-line text cut short to fit its cell shows whole in the cell's tooltip, unless the
    // model gives the cell a tooltip of its own.
    bool helpEvent(QHelpEvent *event, QAbstractItemView *view, const QStyleOptionViewItem &option, const QModelIndex &index) override;

private:
    struct SizeKey
    {
        QString text;
        QFont font;
        int width; // the wrapping width; -1 for one line
        int features;
        const QStyle *style;
        friend bool operator==(const SizeKey &, const SizeKey &) = default;
        friend size_t qHash(const SizeKey &key, size_t seed = 0)
        {
            return qHashMulti(seed, key.text, key.font, key.width, key.features, key.style);
        }
    };
    mutable QHash<SizeKey, QSize> m_sizes;
};

// The tooltip that shows a cut-short text whole: on one line, as typed.
QString wholeTextTip(const QString &text);

// A header that measures each section's text once per text, font and style: the view asks for
// the header's size hint (every section measured) whenever a section's text changes, and the
// grid's column names change with most edits. Sections with an icon or a size of their own are
// measured as QHeaderView measures them, every time.
class CachedHeaderView : public QHeaderView
{
public:
    using QHeaderView::QHeaderView;

protected:
    QSize sectionSizeFromContents(int logicalIndex) const override;

private:
    struct SizeKey
    {
        QString text;
        QFont font;
        bool sortIndicator;
        const QStyle *style;
        friend bool operator==(const SizeKey &, const SizeKey &) = default;
        friend size_t qHash(const SizeKey &key, size_t seed = 0)
        {
            return qHashMulti(seed, key.text, key.font, key.sortIndicator, key.style);
        }
    };
    mutable QHash<SizeKey, QSize> m_sizes;
};

// Gives view two CachedHeaderViews, set up as QTableView sets up its own (clickable sections that
// highlight with the selection). Call it first, before the headers are configured.
void useCachedHeaders(QTableView *view);

// Gives root and every item view under it that has the default delegate a CachedTextDelegate (views
// with a delegate of their own keep it). The window calls this once, after building its panels.
void useCachedText(QWidget *root);

} // namespace cb
