#pragma once

#include <QTableView>

namespace cb {

class WeightTableModel;

// The footer rows of a weight grid (sum to 0, orthogonality, VIF) in a strip of their
// own under the grid, so they stay in sight while a long grid scrolls. The strip shows
// the grid's own model: the grid hides the footer rows, the strip hides the weight rows.
// Both keep the same column widths, row-header width and horizontal scrolling; the
// strip carries the one horizontal scroll bar, at the bottom where a reader expects it.
class FooterStrip : public QTableView
{
    Q_OBJECT

public:
    FooterStrip(QTableView *grid, WeightTableModel *model, QWidget *parent = nullptr);

    QSize sizeHint() const override;
    QSize minimumSizeHint() const override { return {QTableView::minimumSizeHint().width(), footerHeight()}; }

private:
    // Which rows each view shows, and the strip's height, after the model's shape changed.
    void splitRows();
    // The same row-header width in both, so the columns line up.
    void alignHeaders();
    int footerHeight() const;

    QTableView *m_grid;
    WeightTableModel *m_model;
};

} // namespace cb
