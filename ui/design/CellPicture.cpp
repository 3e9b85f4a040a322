#include "ui/design/CellPicture.h"

#include "ui/common/Look.h"

#include <QPainter>

#include <algorithm>
#include <cmath>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

const QString kAbove = u"\u25b2"_s;
const QString kBelow = u"\u25bc"_s;
constexpr double kZero = 1e-12;

QString signOf(const Weight &w)
{
    const double v = w.value();
    return v > kZero ? kAbove : (v < -kZero ? kBelow : QString());
}

} // namespace

CellPicture::CellPicture(QWidget *parent)
    : QWidget(parent)
{
    setObjectName(u"cellPicture"_s);
    setSizePolicy(QSizePolicy::Minimum, QSizePolicy::Fixed);
}

void CellPicture::setContent(Content content)
{
    m_content = std::move(content);
    m_largest = 0;
    for (const Weight &w : m_content.weights)
        m_largest = std::max(m_largest, std::abs(w.value()));
    updateGeometry();
    update();
}

void CellPicture::clear()
{
    setContent({});
}

QStringList CellPicture::cellTexts() const
{
    QStringList out;
    for (size_t c = 0; c < m_content.weights.size(); ++c)
        out << (isEmptyCell(c) ? tr("empty") : m_content.weights[c].display(true));
    return out;
}

QStringList CellPicture::cellSigns() const
{
    QStringList out;
    for (const Weight &w : m_content.weights)
        out << signOf(w);
    return out;
}

QString CellPicture::keyText() const
{
    return tr("%1 above zero   %2 below zero   plain: not compared").arg(kAbove, kBelow);
}

bool CellPicture::hasEmptyCells() const
{
    return std::find(m_content.empty.begin(), m_content.empty.end(), true) != m_content.empty.end();
}

int CellPicture::blockCount() const
{
    return std::max(1, int(m_content.blocks.size()));
}

CellPicture::Metrics CellPicture::metrics() const
{
    const QFontMetrics fm = fontMetrics();
    int rowHeader = fm.horizontalAdvance(m_content.rowFactor) + 8;
    for (const QString &r : m_content.rows)
        rowHeader = std::max(rowHeader, fm.horizontalAdvance(r) + 12);
    int cell = fm.horizontalAdvance(u"\u25b2 \u22121/12"_s) + 12;
    for (const QString &c : m_content.columns)
        cell = std::max(cell, fm.horizontalAdvance(c) + 10);
    for (const QString &t : cellTexts())
        cell = std::max(cell, fm.horizontalAdvance(kAbove + u" "_s + t) + 14);
    const int lines = m_content.blocks.isEmpty() ? 2 : 3; // [block title,] column factor, column levels
    return {rowHeader, cell, fm.height() + 16, 14, lines * (fm.height() + 4)};
}

QSize CellPicture::sizeHint() const
{
    if (isEmpty())
        return {0, 0};
    const Metrics m = metrics();
    const int blocks = blockCount();
    const int grid = m.rowHeader + blocks * int(m_content.columns.size()) * m.cell + (blocks - 1) * m.blockGap + 2;
    const int width = std::max(grid, fontMetrics().horizontalAdvance(keyText()) + 4);
    const int height = m.top + int(m_content.rows.size()) * m.cellHeight + (hasEmptyCells() ? 2 : 1) * fontMetrics().height() + 8;
    return {width, height};
}

void CellPicture::paintEvent(QPaintEvent *)
{
    if (isEmpty())
        return;
    QPainter p(this);
    p.setRenderHint(QPainter::Antialiasing, false);
    const Metrics m = metrics();
    const QFontMetrics fm = fontMetrics();
    const int rows = int(m_content.rows.size());
    const int cols = int(m_content.columns.size());
    const int blocks = blockCount();
    const int lineH = fm.height() + 4;
    QFont bold = font();
    bold.setBold(true);

    // Row factor name above the row labels, at the level of the column labels.
    p.setPen(look::quietText());
    p.drawText(QRect(0, m.top - lineH, m.rowHeader - 6, lineH), Qt::AlignLeft | Qt::AlignVCenter, m_content.rowFactor);
    p.setPen(palette().color(QPalette::WindowText));
    for (int r = 0; r < rows; ++r)
        p.drawText(QRect(0, m.top + r * m.cellHeight, m.rowHeader - 6, m.cellHeight), Qt::AlignRight | Qt::AlignVCenter,
                   m_content.rows[r]);

    for (int b = 0; b < blocks; ++b) {
        const int left = m.rowHeader + b * (cols * m.cell + m.blockGap);
        int y = 0;
        if (!m_content.blocks.isEmpty()) {
            p.setPen(palette().color(QPalette::WindowText));
            p.setFont(bold);
            p.drawText(QRect(left, y, cols * m.cell, lineH), Qt::AlignHCenter | Qt::AlignVCenter,
                       u"%1 = %2"_s.arg(m_content.blockFactor, m_content.blocks[b]));
            p.setFont(font());
            y += lineH;
        }
        p.setPen(look::quietText());
        p.drawText(QRect(left, y, cols * m.cell, lineH), Qt::AlignHCenter | Qt::AlignVCenter, m_content.columnFactor);
        y += lineH;
        p.setPen(palette().color(QPalette::WindowText));
        for (int c = 0; c < cols; ++c)
            p.drawText(QRect(left + c * m.cell, y, m.cell, lineH), Qt::AlignHCenter | Qt::AlignVCenter, m_content.columns[c]);

        for (int r = 0; r < rows; ++r)
            for (int c = 0; c < cols; ++c) {
                const size_t cell = size_t((r * cols + c) * blocks + b);
                const Weight &w = m_content.weights[cell];
                const QRect box(left + c * m.cell, m.top + r * m.cellHeight, m.cell, m.cellHeight);
                const QString sign = signOf(w);
                if (!sign.isEmpty()) {
                    // Tint deepens with |w| relative to the largest weight in the column.
                    QColor fill = w.value() > 0 ? look::raisedBar() : look::loweredBar();
                    const double share = m_largest > 0 ? std::abs(w.value()) / m_largest : 0;
                    fill.setAlphaF(float(0.18 + 0.5 * share));
                    p.fillRect(box, fill);
                }
                p.setPen(look::baseline());
                p.drawRect(box.adjusted(0, 0, -1, -1));
                if (isEmptyCell(cell)) {
                    QColor hatch = look::baseline();
                    hatch.setAlphaF(0.45f);
                    p.fillRect(box.adjusted(1, 1, -1, -1), QBrush(hatch, Qt::BDiagPattern));
                    p.setPen(look::quietText());
                    p.drawText(box, Qt::AlignCenter, tr("empty"));
                    continue;
                }
                p.setPen(sign.isEmpty() ? look::quietText() : palette().color(QPalette::WindowText));
                p.setFont(sign.isEmpty() ? font() : bold);
                const QString text = sign.isEmpty() ? w.display(true) : sign + u" "_s + w.display(true);
                p.drawText(box, Qt::AlignCenter, text);
                p.setFont(font());
            }
    }
    // A key under the grid, so the symbols read without the colours.
    p.setPen(look::quietText());
    p.drawText(QRect(0, m.top + rows * m.cellHeight + 4, width(), fm.height()), Qt::AlignLeft | Qt::AlignVCenter, keyText());
    if (hasEmptyCells())
        p.drawText(QRect(0, m.top + rows * m.cellHeight + 4 + fm.height(), width(), fm.height()), Qt::AlignLeft | Qt::AlignVCenter,
                   tr("hatched: an empty cell, without observations"));
}

} // namespace cb
