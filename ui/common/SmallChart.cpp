#include "ui/common/SmallChart.h"

#include "ui/common/Look.h"

#include <QPainter>
#include <QPainterPath>

#include <algorithm>
#include <cmath>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

// Tick positions from lo to hi at a round step (1, 2 or 5 times a power of ten).
std::vector<double> ticks(double lo, double hi, int wanted)
{
    const double span = hi - lo;
    if (!(span > 0.0) || !std::isfinite(span))
        return {lo};
    const double raw = span / std::max(1, wanted);
    const double magnitude = std::pow(10.0, std::floor(std::log10(raw)));
    double step = magnitude;
    for (double m : {1.0, 2.0, 5.0, 10.0})
        if (m * magnitude >= raw) {
            step = m * magnitude;
            break;
        }
    std::vector<double> out;
    for (double t = std::ceil(lo / step) * step; t <= hi + step * 1e-9; t += step)
        out.push_back(std::abs(t) < step * 1e-9 ? 0.0 : t);
    return out;
}

QString tickText(double v)
{
    return QString::number(v, 'g', 6);
}

} // namespace

SmallChart::SmallChart(QWidget *parent)
    : QWidget(parent)
{
    setAutoFillBackground(true);
    QPalette p = palette();
    p.setColor(QPalette::Window, Qt::white);
    setPalette(p);
}

QColor SmallChart::seriesColor(int index)
{
    static const QColor colors[] = {
        look::raisedBar(),       QColor(0xd6, 0x7a, 0x1e), QColor(0x17, 0x8a, 0x77), QColor(0x8e, 0x3b, 0x8f),
        QColor(0x5a, 0x60, 0x6b), QColor(0xb8, 0x3b, 0x3b), QColor(0x6a, 0x9a, 0x2c), QColor(0x1f, 0x9e, 0xc4),
    };
    constexpr int count = int(sizeof(colors) / sizeof(colors[0]));
    return colors[((index % count) + count) % count];
}

void SmallChart::setAxisTitles(const QString &x, const QString &y)
{
    m_xTitle = x;
    m_yTitle = y;
    update();
}

void SmallChart::setLines(std::vector<Line> lines, std::optional<std::pair<double, double>> yRange,
                          std::optional<double> guideY, const QString &guideLabel)
{
    m_lines = std::move(lines);
    m_intervals.clear();
    m_yRange = yRange;
    m_guideY = guideY;
    m_guideLabel = guideLabel;
    m_message.clear();
    update();
}

void SmallChart::setIntervals(std::vector<Interval> intervals)
{
    m_intervals = std::move(intervals);
    m_lines.clear();
    m_yRange.reset();
    m_guideY.reset();
    m_message.clear();
    update();
}

void SmallChart::clear(const QString &message)
{
    m_lines.clear();
    m_intervals.clear();
    m_message = message;
    update();
}

void SmallChart::paintEvent(QPaintEvent *)
{
    QPainter p(this);
    p.setRenderHint(QPainter::Antialiasing);
    const QFontMetrics fm(font());
    const QColor axisInk = look::ink(look::State::Neutral);
    if (m_lines.empty() && m_intervals.empty()) {
        p.setPen(look::quietText());
        p.drawText(rect().adjusted(12, 12, -12, -12), Qt::AlignCenter | Qt::TextWordWrap, m_message);
        return;
    }

    // Data ranges.
    double xLo = 0.0, xHi = 1.0, yLo = 0.0, yHi = 1.0;
    if (!m_lines.empty()) {
        xLo = yLo = std::numeric_limits<double>::infinity();
        xHi = yHi = -std::numeric_limits<double>::infinity();
        for (const Line &l : m_lines)
            for (const QPointF &pt : l.points) {
                if (!std::isfinite(pt.x()) || !std::isfinite(pt.y()))
                    continue;
                xLo = std::min(xLo, pt.x());
                xHi = std::max(xHi, pt.x());
                yLo = std::min(yLo, pt.y());
                yHi = std::max(yHi, pt.y());
            }
    } else {
        xLo = -0.5;
        xHi = double(m_intervals.size()) - 0.5;
        yLo = std::numeric_limits<double>::infinity();
        yHi = -yLo;
        for (const Interval &iv : m_intervals)
            for (double v : {iv.value, iv.low, iv.high})
                if (std::isfinite(v)) {
                    yLo = std::min(yLo, v);
                    yHi = std::max(yHi, v);
                }
        const double pad = (yHi - yLo) * 0.08;
        yLo -= pad;
        yHi += pad;
    }
    if (m_yRange) {
        yLo = m_yRange->first;
        yHi = m_yRange->second;
    }
    if (!std::isfinite(xLo) || !std::isfinite(yLo) || xHi <= xLo)
        xLo = 0.0, xHi = std::max(1.0, xHi);
    if (!std::isfinite(yLo) || !std::isfinite(yHi) || yHi <= yLo)
        yLo = std::isfinite(yLo) ? yLo - 1.0 : 0.0, yHi = yLo + 2.0;

    const std::vector<double> yTicks = ticks(yLo, yHi, 5);
    int yLabelWidth = 0;
    for (double t : yTicks)
        yLabelWidth = std::max(yLabelWidth, fm.horizontalAdvance(tickText(t)));
    int legendWidth = 0;
    for (const Line &l : m_lines)
        legendWidth = std::max(legendWidth, std::min(200, fm.horizontalAdvance(l.label)) + 30);
    const int line = fm.height();
    // The legend goes to the right of the plot when that leaves the plot room, otherwise under it
    // (a narrow panel and long contrast names left no plot at all, and the chart stayed blank).
    const int leftMargin = line + yLabelWidth + 14;
    constexpr int kNarrowestPlot = 140;
    const bool legendBelow = !m_lines.empty() && rect().width() - leftMargin - (legendWidth + 10) < kNarrowestPlot;
    const int legendHeight = legendBelow ? int(m_lines.size()) * (line + 4) + 4 : 0;
    const QRect plot = rect().adjusted(leftMargin, line / 2 + 4, legendBelow ? -10 : -(legendWidth + 10), -(2 * line + 12 + legendHeight));
    if (plot.width() < 40 || plot.height() < 40) {
        p.setPen(look::quietText());
        p.drawText(rect().adjusted(12, 12, -12, -12), Qt::AlignCenter | Qt::TextWordWrap,
                   tr("Too little room for the chart: make this panel larger."));
        return;
    }
    auto px = [&](double x) { return plot.left() + (x - xLo) / (xHi - xLo) * plot.width(); };
    auto py = [&](double y) { return plot.bottom() - (y - yLo) / (yHi - yLo) * plot.height(); };

    // Grid, ticks and axis titles.
    p.setPen(QPen(QColor(0xe3, 0xe6, 0xea), 1));
    for (double t : yTicks)
        p.drawLine(QPointF(plot.left(), py(t)), QPointF(plot.right(), py(t)));
    p.setPen(axisInk);
    for (double t : yTicks)
        p.drawText(QRectF(plot.left() - yLabelWidth - 8, py(t) - line / 2.0, yLabelWidth + 2, line),
                   Qt::AlignRight | Qt::AlignVCenter, tickText(t));
    if (!m_lines.empty()) {
        for (double t : ticks(xLo, xHi, std::max(2, plot.width() / 45))) {
            p.drawLine(QPointF(px(t), plot.bottom()), QPointF(px(t), plot.bottom() + 4));
            p.drawText(QRectF(px(t) - 40, plot.bottom() + 5, 80, line), Qt::AlignHCenter | Qt::AlignTop, tickText(t));
        }
    } else {
        for (size_t i = 0; i < m_intervals.size(); ++i)
            p.drawText(QRectF(px(double(i)) - plot.width() / (2.0 * m_intervals.size()), plot.bottom() + 5,
                              plot.width() / double(m_intervals.size()), line),
                       Qt::AlignHCenter | Qt::AlignTop,
                       fm.elidedText(m_intervals[i].category, Qt::ElideRight, plot.width() / int(m_intervals.size()) - 4));
    }
    p.drawLine(plot.bottomLeft(), plot.bottomRight());
    p.drawLine(plot.bottomLeft(), plot.topLeft());
    p.drawText(QRect(plot.left(), plot.bottom() + line + 8, plot.width(), line), Qt::AlignHCenter, m_xTitle);
    p.save();
    p.translate(2, plot.center().y());
    p.rotate(-90);
    p.drawText(QRect(-plot.height() / 2, 0, plot.height(), line), Qt::AlignHCenter | Qt::AlignTop, m_yTitle);
    p.restore();

    p.setClipRect(plot.adjusted(-1, -1, 1, 1));
    if (m_guideY) {
        p.setPen(QPen(look::baseline(), 1, Qt::DashLine));
        p.drawLine(QPointF(plot.left(), py(*m_guideY)), QPointF(plot.right(), py(*m_guideY)));
        p.drawText(QRectF(plot.left() + 4, py(*m_guideY) - line - 1, plot.width() - 8, line), Qt::AlignLeft | Qt::AlignBottom, m_guideLabel);
    }
    for (const Line &l : m_lines) {
        QPainterPath path;
        bool started = false;
        for (const QPointF &pt : l.points) {
            if (!std::isfinite(pt.y())) {
                started = false;
                continue;
            }
            const QPointF at(px(pt.x()), py(pt.y()));
            if (started)
                path.lineTo(at);
            else
                path.moveTo(at);
            started = true;
        }
        p.setPen(QPen(l.color, 2, l.dashed ? Qt::DashLine : Qt::SolidLine));
        p.drawPath(path);
    }
    for (size_t i = 0; i < m_intervals.size(); ++i) {
        const Interval &iv = m_intervals[i];
        const double x = px(double(i));
        p.setPen(QPen(look::raisedBar(), 2));
        if (std::isfinite(iv.low) && std::isfinite(iv.high)) {
            p.drawLine(QPointF(x, py(iv.low)), QPointF(x, py(iv.high)));
            p.drawLine(QPointF(x - 6, py(iv.low)), QPointF(x + 6, py(iv.low)));
            p.drawLine(QPointF(x - 6, py(iv.high)), QPointF(x + 6, py(iv.high)));
        }
        p.setBrush(look::raisedBar());
        p.drawEllipse(QPointF(x, py(iv.value)), 4, 4);
    }
    p.setClipping(false);

    // The legend, to the right of the plot or under its axis title.
    const int legendLeft = legendBelow ? plot.left() - 30 : plot.right() + 10;
    const int labelWidth = legendBelow ? rect().right() - legendLeft - 34 : legendWidth - 30;
    int y = legendBelow ? plot.bottom() + 2 * line + 12 : plot.top();
    for (const Line &l : m_lines) {
        p.setPen(QPen(l.color, 2, l.dashed ? Qt::DashLine : Qt::SolidLine));
        p.drawLine(legendLeft, y + line / 2, legendLeft + 20, y + line / 2);
        p.setPen(axisInk);
        p.drawText(QRect(legendLeft + 24, y, labelWidth, line), Qt::AlignLeft | Qt::AlignVCenter,
                   fm.elidedText(l.label, Qt::ElideRight, labelWidth));
        y += line + 4;
    }
}

} // namespace cb
