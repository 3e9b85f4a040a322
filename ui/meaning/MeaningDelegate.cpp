#include "ui/meaning/MeaningDelegate.h"

#include "ui/common/CachedText.h"
#include "ui/common/Look.h"
#include "ui/meaning/MeaningModel.h"

#include "core/report/LevelBars.h"

#include <QAbstractItemView>
#include <QPainter>

#include <algorithm>
#include <cmath>

using namespace Qt::StringLiterals;

namespace cb {

namespace {
constexpr int kPad = 8;
constexpr int kGap = 3;
constexpr int kBarArea = 46;
constexpr int kMaxBarWidth = 34;
// Up to this many levels the picture names each level and writes its weight.
constexpr int kLabelledLevels = 10;

constexpr int kMaxRememberedHeights = 4000;
} // namespace

MeaningDelegate::MeaningDelegate(QAbstractItemView *view)
    : QStyledItemDelegate(view)
    , m_view(view)
{
}

int MeaningDelegate::textHeight(const QFont &font, int width, const QString &text) const
{
    if (width != m_heightsWidth || m_heights.size() > kMaxRememberedHeights) {
        m_heights.clear();
        m_heightsWidth = width;
    }
    const QString key = font.key() + u'\x1f' + text;
    auto it = m_heights.constFind(key);
    if (it != m_heights.constEnd())
        return *it;
    const int h = QFontMetrics(font).boundingRect(QRect(0, 0, std::max(width, 10), 100000), Qt::TextWordWrap, text).height();
    m_heights.insert(key, h);
    return h;
}

QFont MeaningDelegate::titleFont(const QStyleOptionViewItem &option) const
{
    QFont f = option.font;
    f.setBold(true);
    return f;
}

QFont MeaningDelegate::smallFont(const QStyleOptionViewItem &option) const
{
    QFont f = option.font;
    f.setPointSizeF(f.pointSizeF() * 0.85);
    return f;
}

int MeaningDelegate::barsHeight(int levelCount, const QFont &smallFont)
{
    const int line = QFontMetrics(smallFont).height();
    return kBarArea + (levelCount <= kLabelledLevels ? 2 * line : 0);
}

MeaningDelegate::Parts MeaningDelegate::layout(const QRect &rect, const QStyleOptionViewItem &option, const QModelIndex &index) const
{
    Parts p;
    const int w = rect.width() - 2 * kPad;
    int y = rect.top() + kPad;
    const QFont tf = titleFont(option);
    const QString title = index.data(MeaningModel::TitleRole).toString();
    const QString symbols = index.data(MeaningModel::SymbolsRole).toString();
    const QString words = index.data(MeaningModel::WordsRole).toString();
    const int k = int(index.data(MeaningModel::LevelsRole).toStringList().size());
    auto place = [&](QRect &r, int h) {
        r = QRect(rect.left() + kPad, y, w, h);
        y += h + kGap;
    };
    place(p.title, textHeight(tf, w, title));
    place(p.symbols, textHeight(smallFont(option), w, symbols));
    place(p.words, textHeight(option.font, w, words));
    place(p.bars, barsHeight(k, smallFont(option)));
    p.height = y - rect.top() + kPad - kGap;
    return p;
}

QSize MeaningDelegate::sizeHint(const QStyleOptionViewItem &option, const QModelIndex &index) const
{
    const int width = m_view ? m_view->viewport()->width() : option.rect.width();
    const Parts p = layout(QRect(0, 0, std::max(width, 120), 0), option, index);
    return {width, p.height};
}

void MeaningDelegate::paint(QPainter *painter, const QStyleOptionViewItem &option, const QModelIndex &index) const
{
    painter->save();
    const bool selected = option.state & QStyle::State_Selected;
    const QRect card = option.rect.adjusted(2, 2, -2, -2);
    painter->setPen(selected ? QPen(look::raisedBar(), 2) : QPen(QColor(0xd5, 0xd9, 0xdf), 1));
    painter->setBrush(index.data(MeaningModel::InterceptRole).toBool() ? look::footerBackground() : QColor(Qt::white));
    painter->drawRoundedRect(card, 5, 5);

    const Parts p = layout(option.rect, option, index);
    painter->setPen(option.palette.color(QPalette::Text));
    painter->setFont(titleFont(option));
    drawCachedText(painter, p.title, Qt::TextWordWrap, index.data(MeaningModel::TitleRole).toString());
    painter->setFont(smallFont(option));
    painter->setPen(look::ink(look::State::Neutral));
    drawCachedText(painter, p.symbols, Qt::TextWordWrap, index.data(MeaningModel::SymbolsRole).toString());
    painter->setFont(option.font);
    painter->setPen(option.palette.color(QPalette::Text));
    drawCachedText(painter, p.words, Qt::TextWordWrap, index.data(MeaningModel::WordsRole).toString());
    paintBars(painter, p.bars, index.data(MeaningModel::WeightsRole).value<QList<double>>(),
              index.data(MeaningModel::LevelsRole).toStringList(), index.data(MeaningModel::WeightTextsRole).toStringList(),
              smallFont(option));
    painter->restore();
}

void MeaningDelegate::paintBars(QPainter *painter, const QRect &area, const QList<double> &weights, const QStringList &labels,
                                const QStringList &valueTexts, const QFont &smallFont)
{
    const int k = int(weights.size());
    if (k == 0)
        return;
    painter->save();
    const bool labelled = k <= kLabelledLevels;
    const int line = labelled ? QFontMetrics(smallFont).height() : 0;
    const QRect chart(area.left(), area.top() + line, area.width(), area.height() - 2 * line);
    const LevelBarsLayout bars = levelBarsLayout(std::vector<double>(weights.begin(), weights.end()), chart.left(), chart.top(),
                                                 chart.width(), chart.height(), kMaxBarWidth);
    const int zeroY = int(bars.zeroY);
    const double slot = bars.slot;
    painter->setFont(smallFont);
    for (int i = 0; i < k; ++i) {
        const LevelBar &b = bars.bars[size_t(i)];
        const QRect bar(int(b.x), int(b.y), int(b.width), int(b.height));
        if (b.sign != 0)
            painter->fillRect(bar, b.sign > 0 ? look::raisedBar() : look::loweredBar());
        else {
            painter->setPen(look::quietText());
            painter->drawLine(int(b.center) - bar.width() / 2, zeroY, int(b.center) + bar.width() / 2, zeroY);
        }
        if (labelled) {
            const double w = weights[i];
            const QRect top(int(chart.left() + slot * i), area.top(), int(slot), line);
            const QRect bottom(int(chart.left() + slot * i), chart.bottom() + 1, int(slot), line);
            painter->setPen(w > 0 ? look::raisedBar() : w < 0 ? look::loweredBar() : look::quietText());
            drawCachedText(painter, top, Qt::AlignCenter, valueTexts.value(i));
            painter->setPen(look::ink(look::State::Neutral));
            drawCachedText(painter, bottom, Qt::AlignCenter, QFontMetrics(smallFont).elidedText(labels.value(i), Qt::ElideRight, int(slot) - 2));
        }
    }
    painter->setPen(QPen(look::baseline(), 1));
    painter->drawLine(chart.left(), zeroY, chart.right(), zeroY);
    painter->restore();
}

} // namespace cb
