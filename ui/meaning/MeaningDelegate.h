#pragma once

#include <QHash>
#include <QStyledItemDelegate>

class QAbstractItemView;

namespace cb {

// Paints one coefficient of the meaning list as a card: its name, the
// hypothesis in symbols and in words, and a bar per level showing the weight
// the hypothesis puts on that level's mean (above the line: counted in,
// below: subtracted).
class MeaningDelegate : public QStyledItemDelegate
{
    Q_OBJECT

public:
    explicit MeaningDelegate(QAbstractItemView *view);

    void paint(QPainter *painter, const QStyleOptionViewItem &option, const QModelIndex &index) const override;
    QSize sizeHint(const QStyleOptionViewItem &option, const QModelIndex &index) const override;

    // Draws hypothesis weights as bars in `area` (used by the cards; public for reuse in panels).
    static void paintBars(QPainter *painter, const QRect &area, const QList<double> &weights, const QStringList &labels,
                          const QStringList &valueTexts, const QFont &smallFont);
    static int barsHeight(int levelCount, const QFont &smallFont);

private:
    struct Parts
    {
        QRect title;
        QRect symbols;
        QRect words;
        QRect bars;
        int height = 0;
    };
    Parts layout(const QRect &rect, const QStyleOptionViewItem &option, const QModelIndex &index) const;
    // Height of wrapped text, remembered per text and width: after an edit only the
    // hypotheses that changed are measured again.
    int textHeight(const QFont &font, int width, const QString &text) const;
    QFont titleFont(const QStyleOptionViewItem &option) const;
    QFont smallFont(const QStyleOptionViewItem &option) const;

    QAbstractItemView *m_view;
    mutable QHash<QString, int> m_heights;
    mutable int m_heightsWidth = -1;
};

} // namespace cb
