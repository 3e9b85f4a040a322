#include "ui/common/CachedText.h"

#include <QAbstractItemView>
#include <QApplication>
#include <QHash>
#include <QPainter>
#include <QStaticText>
#include <QTextOption>

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
    if (size.width() > area.width()) { // elided or wrapped: the style's own way
        QStyledItemDelegate::paint(painter, option, index);
        return;
    }
    style->drawControl(QStyle::CE_ItemViewItem, &opt, painter, widget);
    QPalette::ColorGroup group = opt.state & QStyle::State_Enabled ? QPalette::Normal : QPalette::Disabled;
    if (group == QPalette::Normal && !(opt.state & QStyle::State_Active))
        group = QPalette::Inactive;
    painter->save();
    painter->setFont(opt.font);
    painter->setPen(opt.palette.color(group, opt.state & QStyle::State_Selected ? QPalette::HighlightedText : QPalette::Text));
    // Lines as the style's text layout aligns them: across in fractional pixels inside the area,
    // down as a block of whole pixels.
    const Qt::Alignment align = QStyle::visualAlignment(opt.direction, opt.displayAlignment);
    qreal x = area.x();
    if (align & Qt::AlignRight)
        x += area.width() - laid.size().width();
    else if (align & Qt::AlignHCenter)
        x += (area.width() - laid.size().width()) / 2;
    painter->drawStaticText(QPointF(x, QStyle::alignedRect(opt.direction, opt.displayAlignment, size, area).top()), laid);
    painter->restore();
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
