#include "ui/coding/FooterStrip.h"
#include "ui/common/CachedText.h"
#include "ui/common/HeaderChanges.h"

#include "ui/coding/WeightTableModel.h"

#include <QHeaderView>
#include <QScrollBar>
#include <QTimer>

#include <algorithm>

namespace cb {

FooterStrip::FooterStrip(QTableView *grid, WeightTableModel *model, QWidget *parent)
    : QTableView(parent)
    , m_grid(grid)
    , m_model(model)
{
    useCachedHeaders(this);
    setModel(model);
    relayoutOnlyWhenHeadersResize(this);
    setObjectName(grid->objectName() + QStringLiteral("Footer"));
    setFocusPolicy(Qt::NoFocus);
    setSelectionMode(QAbstractItemView::NoSelection);
    setEditTriggers(QAbstractItemView::NoEditTriggers);
    horizontalHeader()->hide();
    horizontalHeader()->setMinimumSectionSize(grid->horizontalHeader()->minimumSectionSize());
    verticalHeader()->setSectionResizeMode(QHeaderView::Fixed);
    verticalHeader()->setDefaultSectionSize(grid->verticalHeader()->defaultSectionSize());
    setVerticalScrollBarPolicy(Qt::ScrollBarAlwaysOff);
    setHorizontalScrollBarPolicy(Qt::ScrollBarAsNeeded);
    setSizePolicy(QSizePolicy::Expanding, QSizePolicy::Fixed);
    setWordWrap(false);
    m_grid->setHorizontalScrollBarPolicy(Qt::ScrollBarAlwaysOff);

    // One horizontal position for both.
    connect(horizontalScrollBar(), &QScrollBar::valueChanged, m_grid->horizontalScrollBar(), &QScrollBar::setValue);
    connect(m_grid->horizontalScrollBar(), &QScrollBar::valueChanged, horizontalScrollBar(), &QScrollBar::setValue);
    // The strip needs its scroll bar's room only when the columns are wider than the view.
    connect(horizontalScrollBar(), &QScrollBar::rangeChanged, this, [this] { setFixedHeight(footerHeight()); });
    // An empty gutter where the grid has its vertical scroll bar, so both viewports are equally wide.
    connect(m_grid->verticalScrollBar(), &QScrollBar::rangeChanged, this, [this](int, int max) {
        setVerticalScrollBarPolicy(max > 0 ? Qt::ScrollBarAlwaysOn : Qt::ScrollBarAlwaysOff);
    });
    // Column widths follow the grid (which fits them to names and weights).
    connect(m_grid->horizontalHeader(), &QHeaderView::sectionResized, this,
            [this](int section, int, int size) { setColumnWidth(section, size); });
    connect(m_grid->verticalHeader(), &QHeaderView::geometriesChanged, this, &FooterStrip::alignHeaders);
    connect(model, &QAbstractItemModel::modelReset, this, &FooterStrip::splitRows);
    connect(model, &QAbstractItemModel::rowsInserted, this, &FooterStrip::splitRows);
    connect(model, &QAbstractItemModel::rowsRemoved, this, &FooterStrip::splitRows);
    connect(model, &QAbstractItemModel::layoutChanged, this, &FooterStrip::splitRows);
    // Level names set the headers' width; a column's name (changed by most edits) does not.
    connect(model, &QAbstractItemModel::headerDataChanged, this, [this](Qt::Orientation orientation) {
        if (orientation == Qt::Vertical)
            alignHeaders();
    });
    splitRows();
}

void FooterStrip::splitRows()
{
    const int weights = m_model->weightRowCount();
    for (int r = 0; r < m_model->rowCount(); ++r) {
        m_grid->setRowHidden(r, r >= weights);
        setRowHidden(r, r < weights);
    }
    for (int c = 0; c < m_model->columnCount(); ++c)
        setColumnWidth(c, m_grid->columnWidth(c));
    setFixedHeight(footerHeight());
    alignHeaders();
    // The grid fits its columns after the same reset; take the widths it settles on.
    QTimer::singleShot(0, this, [this] {
        for (int c = 0; c < m_model->columnCount(); ++c)
            setColumnWidth(c, m_grid->columnWidth(c));
        horizontalScrollBar()->setValue(m_grid->horizontalScrollBar()->value());
    });
}

void FooterStrip::alignHeaders()
{
    QHeaderView *mine = verticalHeader(), *theirs = m_grid->verticalHeader();
    const int width = std::max(mine->sizeHint().width(), theirs->sizeHint().width());
    if (mine->minimumWidth() != width)
        mine->setMinimumWidth(width);
    if (theirs->minimumWidth() != width)
        theirs->setMinimumWidth(width);
}

int FooterStrip::footerHeight() const
{
    int rows = 0;
    for (int r = m_model->weightRowCount(); r < m_model->rowCount(); ++r)
        rows += rowHeight(r) > 0 ? rowHeight(r) : verticalHeader()->defaultSectionSize();
    const bool bar = horizontalScrollBar()->maximum() > 0;
    return rows + 2 * frameWidth() + (bar ? horizontalScrollBar()->sizeHint().height() : 0);
}

QSize FooterStrip::sizeHint() const
{
    return {QTableView::sizeHint().width(), footerHeight()};
}

} // namespace cb
