#pragma once

#include <QColor>
#include <QPointF>
#include <QString>
#include <QStringList>
#include <QWidget>

#include <optional>
#include <vector>

namespace cb {

// A small painted chart with two uses: lines over a numeric x axis (power
// against group size), or one point with an interval per category (level
// means with their confidence intervals). It only draws what it is given.
class SmallChart : public QWidget
{
    Q_OBJECT

public:
    struct Line
    {
        QString label;
        QColor color;
        std::vector<QPointF> points;
        bool dashed = false;
    };
    struct Interval
    {
        QString category;
        double value = 0.0;
        double low = 0.0;
        double high = 0.0;
    };

    explicit SmallChart(QWidget *parent = nullptr);

    void setAxisTitles(const QString &x, const QString &y);
    // Lines; a fixed y range when given (power: 0 to 1), a horizontal guide at guideY.
    void setLines(std::vector<Line> lines, std::optional<std::pair<double, double>> yRange = std::nullopt,
                  std::optional<double> guideY = std::nullopt, const QString &guideLabel = {});
    void setIntervals(std::vector<Interval> intervals);
    // Nothing to draw: the message is shown instead.
    void clear(const QString &message);

    const std::vector<Line> &lines() const { return m_lines; }
    const std::vector<Interval> &intervals() const { return m_intervals; }
    const QString &xTitle() const { return m_xTitle; }

    QSize sizeHint() const override { return {420, 260}; }
    QSize minimumSizeHint() const override { return {240, 160}; }

    // A palette of distinguishable line colours (blue, amber, teal, plum, ...).
    static QColor seriesColor(int index);

protected:
    void paintEvent(QPaintEvent *event) override;

private:
    QString m_xTitle;
    QString m_yTitle;
    QString m_message;
    std::vector<Line> m_lines;
    std::vector<Interval> m_intervals;
    std::optional<std::pair<double, double>> m_yRange;
    std::optional<double> m_guideY;
    QString m_guideLabel;
};

} // namespace cb
