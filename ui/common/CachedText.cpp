#include "ui/common/CachedText.h"

#include <QAbstractItemView>
#include <QApplication>
#include <QHash>
#include <QHelpEvent>
#include <QListView>
#include <QPainter>
#include <QStaticText>
#include <QTableView>
#include <QTextLayout>
#include <QTextOption>
#include <QToolTip>

#include <memory>
#include <typeinfo>

namespace cb {

namespace {

struct TextKey
{
    QString text;
    QFont font;
    int width = -1; // -1: one line; otherwise the width lines are broken at
    int alignment = 0;
    friend bool operator==(const TextKey &, const TextKey &) = default;
};

size_t qHash(const TextKey &key, size_t seed = 0)
{
    return qHashMulti(seed, key.text, key.font, key.width, key.alignment);
}

// The laid-out text for key (a shared copy: drawing it keeps the cached layout current). The
// cache is dropped whole when it grows past its bound: the texts of one study are a few hundred,
// and a rebuild costs one shaping per text.
QStaticText laidOut(const TextKey &key)
{
    static QHash<TextKey, QStaticText> cache;
    constexpr qsizetype kMaxTexts = 8192;
    auto found = cache.constFind(key);
    if (found != cache.constEnd())
        return *found;
    if (cache.size() >= kMaxTexts)
        cache.clear();
    QStaticText text(key.text);
    text.setTextFormat(Qt::PlainText);
    QTextOption option(Qt::Alignment(key.alignment));
    option.setWrapMode(key.width >= 0 ? QTextOption::WordWrap : QTextOption::NoWrap);
    text.setTextOption(option);
    if (key.width >= 0)
        text.setTextWidth(key.width);
    text.prepare(QTransform(), key.font);
    return *cache.insert(key, text);
}

// Item text wrapped as the style wraps it (QCommonStyle's view item text): word wrap at the text
// area's width, each line placed right under the last without leading. Kept laid out per text,
// font, width, alignment and direction, like the texts above.
struct WrappedKey
{
    QString text;
    QFont font;
    int width = 0;
    int alignment = 0;
    int direction = 0;
    friend bool operator==(const WrappedKey &, const WrappedKey &) = default;
};

size_t qHash(const WrappedKey &key, size_t seed = 0)
{
    return qHashMulti(seed, key.text, key.font, key.width, key.alignment, key.direction);
}

struct Wrapped
{
    QTextLayout layout;
    qreal height = 0;
    bool fits = true; // no line wider than the width (a word longer than a line is elided by the style)
};

// A shared copy: the cache may be dropped whole while the caller still draws it.
std::shared_ptr<const Wrapped> wrapped(const WrappedKey &key)
{
    static QHash<WrappedKey, std::shared_ptr<Wrapped>> cache;
    constexpr qsizetype kMaxTexts = 2048;
    if (auto found = cache.constFind(key); found != cache.constEnd())
        return *found;
    if (cache.size() >= kMaxTexts)
        cache.clear();
    auto w = std::make_shared<Wrapped>();
    w->layout.setText(key.text);
    w->layout.setFont(key.font);
    QTextOption option;
    option.setWrapMode(QTextOption::WordWrap);
    option.setTextDirection(Qt::LayoutDirection(key.direction));
    option.setAlignment(Qt::Alignment(key.alignment));
    w->layout.setTextOption(option);
    w->layout.setCacheEnabled(true);
    w->layout.beginLayout();
    for (QTextLine line = w->layout.createLine(); line.isValid(); line = w->layout.createLine()) {
        line.setLineWidth(key.width);
        line.setPosition(QPointF(0, w->height));
        w->height += line.height();
        w->fits = w->fits && line.naturalTextWidth() <= key.width;
    }
    w->layout.endLayout();
    return *cache.insert(key, std::move(w));
}

} // namespace

void drawCachedText(QPainter *painter, const QRect &rect, int flags, const QString &text)
{
    if (text.isEmpty())
        return;
    const bool wrap = flags & Qt::TextWordWrap;
    const int horizontal = flags & Qt::AlignHorizontal_Mask;
    const QStaticText laid = laidOut({text, painter->font(), wrap ? rect.width() : -1, wrap ? horizontal : 0});
    // Placed in the rect as drawText places its block, in fractional pixels: wrapped lines are
    // aligned inside the rect's width by the text's own option.
    const QSizeF size(wrap ? rect.width() : laid.size().width(), laid.size().height());
    const Qt::Alignment align = QStyle::visualAlignment(painter->layoutDirection(), Qt::Alignment(flags));
    qreal x = rect.x(), y = rect.y();
    if (!wrap && (align & Qt::AlignRight))
        x += rect.width() - size.width();
    else if (!wrap && (align & Qt::AlignHCenter))
        x += (rect.width() - size.width()) / 2;
    if (align & Qt::AlignBottom)
        y += rect.height() - size.height();
    else if (align & Qt::AlignVCenter)
        y += (rect.height() - size.height()) / 2;
    painter->drawStaticText(QPointF(x, y), laid);
}

void CachedTextDelegate::paint(QPainter *painter, const QStyleOptionViewItem &option, const QModelIndex &index) const
{
    QStyleOptionViewItem opt = option;
    initStyleOption(&opt, index);
    const QString text = opt.text;
    if (text.isEmpty() || (opt.state & QStyle::State_Editing) || text.contains(u'\n') || text.contains(QChar::LineSeparator)) {
        QStyledItemDelegate::paint(painter, option, index);
        return;
    }
    const QWidget *widget = opt.widget;
    const QStyle *style = widget ? widget->style() : QApplication::style();
    // The style places the text in what the check box and icon leave, less a margin on each side
    // (QCommonStyle's item text); with the text taken out it measures nothing.
    opt.text.clear();
    const int margin = style->pixelMetric(QStyle::PM_FocusFrameHMargin, nullptr, widget) + 1;
    const QRect area = style->subElementRect(QStyle::SE_ItemViewItemText, &opt, widget).adjusted(margin, 0, -margin, 0);
    const QStaticText laid = laidOut({text, opt.font, -1, 0});
    const QSize size = laid.size().toSize();
    const Qt::Alignment align = QStyle::visualAlignment(opt.direction, opt.displayAlignment);
    std::shared_ptr<const Wrapped> lines;
    if (size.width() > area.width()) {
        // Wrapped when every line fits the area; otherwise elided: the style's own way.
        if (opt.features & QStyleOptionViewItem::WrapText)
            lines = wrapped({text, opt.font, area.width(), int(align), int(opt.direction)});
        if (!lines || !lines->fits || lines->height > area.height()) {
            QStyledItemDelegate::paint(painter, option, index);
            return;
        }
    }
    // The style draws the focus frame last, over the text: without the text, it is drawn here
    // after the text as well.
    const bool focus = opt.state & QStyle::State_HasFocus;
    opt.state &= ~QStyle::State_HasFocus;
    style->drawControl(QStyle::CE_ItemViewItem, &opt, painter, widget);
    QPalette::ColorGroup group = opt.state & QStyle::State_Enabled ? QPalette::Normal : QPalette::Disabled;
    if (group == QPalette::Normal && !(opt.state & QStyle::State_Active))
        group = QPalette::Inactive;
    painter->save();
    painter->setFont(opt.font);
    painter->setPen(opt.palette.color(group, opt.state & QStyle::State_Selected ? QPalette::HighlightedText : QPalette::Text));
    if (lines) {
        // The block of lines placed down the area as the style places it, by its whole-pixel size.
        const QSize block = lines->layout.boundingRect().size().toSize();
        lines->layout.draw(painter, QPointF(area.x(), QStyle::alignedRect(Qt::LayoutDirectionAuto, opt.displayAlignment, block, area).top()));
    } else {
        // One line as the style's text layout aligns it: across in fractional pixels inside the
        // area, down as a block of whole pixels.
        qreal x = area.x();
        if (align & Qt::AlignRight)
            x += area.width() - laid.size().width();
        else if (align & Qt::AlignHCenter)
            x += (area.width() - laid.size().width()) / 2;
        painter->drawStaticText(QPointF(x, QStyle::alignedRect(opt.direction, opt.displayAlignment, size, area).top()), laid);
    }
    painter->restore();
    if (focus) { // as QCommonStyle's item view item draws it
        opt.state |= QStyle::State_HasFocus;
        QStyleOptionFocusRect frame;
        frame.QStyleOption::operator=(opt);
        frame.rect = style->subElementRect(QStyle::SE_ItemViewItemFocusRect, &opt, widget);
        frame.state |= QStyle::State_KeyboardFocusChange | QStyle::State_Item;
        const QPalette::ColorGroup enabled = opt.state & QStyle::State_Enabled ? QPalette::Normal : QPalette::Disabled;
        frame.backgroundColor = opt.palette.color(enabled, opt.state & QStyle::State_Selected ? QPalette::Highlight : QPalette::Window);
        style->drawPrimitive(QStyle::PE_FrameFocusRect, &frame, painter, widget);
    }
}

QSize CachedTextDelegate::sizeHint(const QStyleOptionViewItem &option, const QModelIndex &index) const
{
    if (index.data(Qt::SizeHintRole).isValid())
        return QStyledItemDelegate::sizeHint(option, index);
    QStyleOptionViewItem opt = option;
    initStyleOption(&opt, index);
    // The style's measure of an item with only text (QCommonStyle's item size) depends on the
    // text, the font, the style's margins and, when it wraps, the width it wraps at. Items with
    // an icon or a check box, or with the icon above or below, are measured every time.
    constexpr auto kOthers = QStyleOptionViewItem::HasDecoration | QStyleOptionViewItem::HasCheckIndicator;
    const bool left = opt.decorationPosition == QStyleOptionViewItem::Left || opt.decorationPosition == QStyleOptionViewItem::Right;
    const QWidget *widget = opt.widget;
    const QStyle *style = widget ? widget->style() : QApplication::style();
    if (opt.text.isEmpty() || (opt.features & kOthers) || !left)
        return style->sizeFromContents(QStyle::CT_ItemViewItem, &opt, QSize(), widget);
    const bool wrap = opt.features & QStyleOptionViewItem::WrapText;
    // A list lays its rows out at its width less its spacing on both sides, but measures a row
    // it paints at the width of its contents, which includes that spacing (QListView, list mode):
    // a row that needed one line more at the narrower width was painted a line short and cut off.
    // Rows of a list are measured at most as wide as the list paints them.
    if (const auto *list = qobject_cast<const QListView *>(opt.widget); wrap && list && opt.rect.isValid()) {
        const int painted = list->viewport()->width() - 2 * list->spacing();
        if (painted > 0 && opt.rect.width() > painted)
            opt.rect.setWidth(painted);
    }
    constexpr auto kMeasured = QStyleOptionViewItem::WrapText | QStyleOptionViewItem::HasDisplay;
    SizeKey key{opt.text, opt.font, wrap && opt.rect.isValid() ? opt.rect.width() : -1, int(opt.features & kMeasured), style};
    if (auto found = m_sizes.constFind(key); found != m_sizes.constEnd())
        return *found;
    constexpr qsizetype kMaxSizes = 8192;
    if (m_sizes.size() >= kMaxSizes)
        m_sizes.clear();
    const QSize size = style->sizeFromContents(QStyle::CT_ItemViewItem, &opt, QSize(), widget);
    m_sizes.insert(std::move(key), size);
    return size;
}

QString wholeTextTip(const QString &text)
{
    // As rich text the escaped name shows as typed, whatever it holds, and on one line.
    return QStringLiteral("<p style='white-space:pre'>") + text.toHtmlEscaped() + QStringLiteral("</p>");
}

bool CachedTextDelegate::helpEvent(QHelpEvent *event, QAbstractItemView *view, const QStyleOptionViewItem &option,
                                   const QModelIndex &index)
{
    if (event && view && index.isValid() && event->type() == QEvent::ToolTip && !index.data(Qt::ToolTipRole).isValid()) {
        QStyleOptionViewItem opt = option;
        initStyleOption(&opt, index);
        const bool oneLine = !(opt.features & QStyleOptionViewItem::WrapText) && !opt.text.contains(QChar::LineSeparator);
        if (!opt.text.isEmpty() && oneLine && sizeHint(option, index).width() > option.rect.width()) {
            QToolTip::showText(event->globalPos(), wholeTextTip(opt.text), view->viewport(), option.rect);
            return true;
        }
    }
    return QStyledItemDelegate::helpEvent(event, view, option, index);
}

QSize CachedHeaderView::sectionSizeFromContents(int logicalIndex) const
{
    const QAbstractItemModel *m = model();
    if (!m || m->headerData(logicalIndex, orientation(), Qt::SizeHintRole).isValid()
        || m->headerData(logicalIndex, orientation(), Qt::DecorationRole).isValid())
        return QHeaderView::sectionSizeFromContents(logicalIndex);
    // What QHeaderView's measure depends on besides the style's metrics: the text, the font (the
    // section's own or the header's) and whether a sort indicator is shown.
    const QVariant fontData = m->headerData(logicalIndex, orientation(), Qt::FontRole);
    SizeKey key{m->headerData(logicalIndex, orientation(), Qt::DisplayRole).toString(),
                fontData.canConvert<QFont>() ? fontData.value<QFont>() : font(), isSortIndicatorShown(), style()};
    if (auto found = m_sizes.constFind(key); found != m_sizes.constEnd())
        return *found;
    constexpr qsizetype kMaxSizes = 4096;
    if (m_sizes.size() >= kMaxSizes)
        m_sizes.clear();
    const QSize size = QHeaderView::sectionSizeFromContents(logicalIndex);
    m_sizes.insert(std::move(key), size);
    return size;
}

void useCachedHeaders(QTableView *view)
{
    for (const Qt::Orientation orientation : {Qt::Horizontal, Qt::Vertical}) {
        auto *header = new CachedHeaderView(orientation, view);
        header->setSectionsClickable(true);
        header->setHighlightSections(true);
        if (orientation == Qt::Horizontal)
            view->setHorizontalHeader(header);
        else
            view->setVerticalHeader(header);
    }
}

void useCachedText(QWidget *root)
{
    QList<QAbstractItemView *> views = root->findChildren<QAbstractItemView *>();
    if (auto *self = qobject_cast<QAbstractItemView *>(root))
        views.prepend(self);
    for (QAbstractItemView *view : views) {
        QAbstractItemDelegate *current = view->itemDelegate();
        if (!current || typeid(*current) != typeid(QStyledItemDelegate)) // a delegate of its own stays
            continue;
        view->setItemDelegate(new CachedTextDelegate(view));
        if (current->parent() == view)
            current->deleteLater();
    }
}

} // namespace cb
