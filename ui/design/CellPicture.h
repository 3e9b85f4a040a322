#pragma once

#include "core/base/Weight.h"

#include <QStringList>
#include <QWidget>

#include <vector>

namespace cb {

// One design column's hypothesis weights over the cells, drawn as a grid: rows are
// the levels of the first factor, columns those of the second; a third factor gives
// one small grid per level, side by side. Each cell shows the exact weight, a sign
// symbol (▲ above zero, ▼ below) and a tint that deepens with the size of the weight;
// zero cells stay plain. It only draws what it is given.
class CellPicture : public QWidget
{
    Q_OBJECT

public:
    struct Content
    {
        QString rowFactor, columnFactor, blockFactor; // factor names (blockFactor empty with two factors)
        QStringList rows, columns, blocks;            // level names
        std::vector<Weight> weights;                  // over the cells, the first factor varying slowest
        std::vector<bool> empty;                      // cells without observations (hatched, "empty"); may be left empty
    };

    explicit CellPicture(QWidget *parent = nullptr);

    void setContent(Content content);
    void clear();
    bool isEmpty() const { return m_content.weights.empty(); }
    // The text shown in each cell (A-major), as Weight::display gives it; "empty" for an empty cell.
    QStringList cellTexts() const;
    // "▲", "▼" or "" for each cell.
    QStringList cellSigns() const;
    // Number of small grids side by side (one per level of a third factor, else 1).
    int blockCount() const;

    QSize sizeHint() const override;
    QSize minimumSizeHint() const override { return sizeHint(); }

protected:
    void paintEvent(QPaintEvent *event) override;

private:
    struct Metrics
    {
        int rowHeader, cell, cellHeight, blockGap, top;
    };
    Metrics metrics() const;
    QString keyText() const;
    bool hasEmptyCells() const;
    bool isEmptyCell(size_t cell) const { return cell < m_content.empty.size() && m_content.empty[cell]; }

    Content m_content;
    double m_largest = 0;
};

} // namespace cb
