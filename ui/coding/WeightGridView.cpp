#include "ui/coding/WeightGridView.h"
#include "ui/common/CachedText.h"
#include "ui/common/HeaderChanges.h"

#include "ui/coding/WeightTableModel.h"

#include <QApplication>
#include <QClipboard>
#include <QHeaderView>
#include <QTimer>
#include <QKeyEvent>
#include <QLineEdit>
#include <QPointer>

#include <algorithm>
#include <climits>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

// Splits clipboard text from a spreadsheet into rows of cells.
QList<QStringList> parseBlock(const QString &text)
{
    QString t = text;
    t.replace(u"\r\n"_s, u"\n"_s);
    t.replace(u'\r', u'\n');
    if (t.endsWith(u'\n'))
        t.chop(1);
    QList<QStringList> rows;
    const QStringList lines = t.split(u'\n');
    for (const QString &line : lines)
        rows << line.split(u'\t');
    return rows;
}

// An inline editor over a header section; Escape cancels. Enter saves the name and goes no
// further: QLineEdit leaves it unaccepted, and the grid would take it as "edit this cell".
class HeaderEditor : public QLineEdit
{
public:
    using QLineEdit::QLineEdit;
    bool cancelled = false;

protected:
    void keyPressEvent(QKeyEvent *event) override
    {
        if (event->key() == Qt::Key_Escape) {
            cancelled = true;
            emit editingFinished(); // closes the editor whether or not it had the focus
            return;
        }
        QLineEdit::keyPressEvent(event);
        if (event->key() == Qt::Key_Return || event->key() == Qt::Key_Enter)
            event->accept();
    }
};

} // namespace

WeightGridView::WeightGridView(QWidget *parent)
    : EntryTableView(parent)
{
    useCachedHeaders(this);
    setSelectionMode(QAbstractItemView::ExtendedSelection);
    setEditTriggers(QAbstractItemView::AnyKeyPressed | QAbstractItemView::DoubleClicked | QAbstractItemView::EditKeyPressed);
    setAlternatingRowColors(false);
    horizontalHeader()->setDefaultAlignment(Qt::AlignCenter);
    horizontalHeader()->setSectionResizeMode(QHeaderView::Interactive);
    horizontalHeader()->setMinimumSectionSize(70);
    horizontalHeader()->setDefaultSectionSize(130);
    verticalHeader()->setSectionResizeMode(QHeaderView::Fixed);
    verticalHeader()->setDefaultSectionSize(fontMetrics().height() + 8); // a compact row, as in a spreadsheet
    m_narrow = new QTimer(this);
    m_narrow->setSingleShot(true);
    m_narrow->setInterval(kNarrowAfterMs);
    connect(m_narrow, &QTimer::timeout, this, [this] {
        for (const int c : std::as_const(m_toNarrow))
            if (c < m_model->columnCount())
                if (const int width = fittedWidth(c); width < columnWidth(c))
                    setColumnWidth(c, width);
        m_toNarrow.clear();
    });
    connect(horizontalHeader(), &QHeaderView::sectionDoubleClicked, this, [this](int section) {
        if (m_renamable)
            renameColumn(section);
    });
}

void WeightGridView::setWeightModel(WeightTableModel *model)
{
    m_model = model;
    setModel(model);
    connect(model, &QAbstractItemModel::modelReset, this, &WeightGridView::fitColumns);
    connect(model, &QAbstractItemModel::headerDataChanged, this, [this](Qt::Orientation o) {
        if (o == Qt::Horizontal)
            fitColumns();
    });
    relayoutOnlyWhenHeadersResize(this);
    fitColumns();
}

void WeightGridView::fitColumns()
{
    QStringList names;
    for (int c = 0; c < m_model->columnCount(); ++c)
        names << m_model->headerData(c, Qt::Horizontal, Qt::DisplayRole).toString();
    if (names == m_fittedNames)
        return;
    // Only the columns whose names changed are measured again (a status mark on one column's
    // name does not measure every cell of the grid); all of them when the columns changed.
    const bool sameColumns = names.size() == m_fittedNames.size();
    bool narrowLater = false;
    for (int c = 0; c < m_model->columnCount(); ++c) {
        if (sameColumns && names[c] == m_fittedNames[c])
            continue;
        // Set in one step: a column that keeps its width is not resized, and its view is not
        // repainted whole.
        const int width = fittedWidth(c);
        if (sameColumns && width < columnWidth(c)) {
            narrowLater = true;
            if (!m_toNarrow.contains(c))
                m_toNarrow << c;
        } else if (width != columnWidth(c)) {
            m_toNarrow.removeOne(c);
            setColumnWidth(c, width);
        }
    }
    if (!sameColumns)
        m_toNarrow.clear();
    m_fittedNames = names;
    if (narrowLater)
        m_narrow->start();
}

// The width resizeColumnToContents would give, and a margin, up to a bound.
int WeightGridView::fittedWidth(int column) const
{
    constexpr int kWidest = 240;
    const int contents = std::max(sizeHintForColumn(column), horizontalHeader()->sectionSizeHint(column));
    return std::min(kWidest, contents + 16);
}

QString WeightGridView::selectionText() const
{
    const QModelIndexList selected = selectionModel() ? selectionModel()->selectedIndexes() : QModelIndexList();
    if (!m_model || selected.isEmpty())
        return {};
    int top = INT_MAX, left = INT_MAX, bottom = -1, right = -1;
    for (const QModelIndex &i : selected) {
        if (i.row() >= m_model->weightRowCount())
            continue;
        top = std::min(top, i.row());
        bottom = std::max(bottom, i.row());
        left = std::min(left, i.column());
        right = std::max(right, i.column());
    }
    if (bottom < 0)
        return {};
    QStringList lines;
    for (int r = top; r <= bottom; ++r) {
        QStringList cells;
        for (int c = left; c <= right; ++c)
            cells << (selectionModel()->isSelected(m_model->index(r, c)) ? m_model->copyText(r, c) : QString());
        lines << cells.join(u'\t');
    }
    return lines.join(u'\n') + u"\n"_s;
}

void WeightGridView::copy()
{
    const QString text = selectionText();
    if (!text.isEmpty())
        QApplication::clipboard()->setText(text);
}

void WeightGridView::paste()
{
    pasteText(QApplication::clipboard()->text());
}

bool WeightGridView::pasteText(const QString &text)
{
    if (!m_model || text.isEmpty())
        return false;
    const QList<QStringList> block = parseBlock(text);
    const QModelIndexList selected = selectionModel()->selectedIndexes();
    std::vector<CellText> cells;
    if (block.size() == 1 && block[0].size() == 1 && selected.size() > 1) {
        // One value into every selected cell, as spreadsheets do.
        for (const QModelIndex &i : selected)
            if (i.row() < m_model->weightRowCount())
                cells.push_back(CellText{i.row(), i.column(), block[0][0]});
        return m_model->setCellTexts(cells, tr("Paste %1 into %2 cells").arg(block[0][0].trimmed()).arg(cells.size()));
    }
    const QModelIndex at = currentIndex().isValid() ? currentIndex() : m_model->index(0, 0);
    qsizetype width = 0;
    for (const QStringList &row : block)
        width = std::max(width, row.size());
    const int fitsDown = m_model->weightRowCount() - at.row();
    const int fitsRight = m_model->columnCount() - at.column();
    if (block.size() > fitsDown || width > fitsRight) {
        emit m_model->editRefused(tr("Not pasted: the copied block is %1 \u00d7 %2 cells, but from here only %3 \u00d7 %4 fit. "
                                     "Start the paste further up or to the left, or add levels or columns first.")
                                      .arg(block.size()).arg(width).arg(std::max(fitsDown, 0)).arg(std::max(fitsRight, 0)));
        return false;
    }
    for (int r = 0; r < block.size(); ++r)
        for (int c = 0; c < block[r].size(); ++c)
            cells.push_back(CellText{at.row() + r, at.column() + c, block[r][c]});
    const bool ok = m_model->setCellTexts(cells, tr("Paste %1 \u00d7 %2 weights").arg(block.size()).arg(width));
    if (ok) {
        selectionModel()->select(QItemSelection(m_model->index(at.row(), at.column()),
                                                m_model->index(at.row() + int(block.size()) - 1, at.column() + int(width) - 1)),
                                 QItemSelectionModel::ClearAndSelect);
    }
    return ok;
}

bool WeightGridView::clearSelectedCells()
{
    if (!m_model)
        return false;
    std::vector<CellText> cells;
    const QModelIndexList selected = selectionModel()->selectedIndexes();
    for (const QModelIndex &i : selected)
        if (i.row() < m_model->weightRowCount() && (i.flags() & Qt::ItemIsEditable))
            cells.push_back(CellText{i.row(), i.column(), u"0"_s});
    if (cells.empty())
        return false;
    return m_model->setCellTexts(cells, cells.size() == 1 ? tr("Clear a weight to 0") : tr("Clear %1 weights to 0").arg(cells.size()));
}

void WeightGridView::renameColumn(int column)
{
    if (!m_model || column < 0 || column >= m_model->columnCount())
        return;
    QHeaderView *header = horizontalHeader();
    auto *editor = new HeaderEditor(header->viewport());
    editor->setText(m_model->headerData(column, Qt::Horizontal, Qt::EditRole).toString());
    editor->setGeometry(header->sectionViewportPosition(column), 0, header->sectionSize(column), header->height());
    editor->selectAll();
    editor->show();
    editor->setFocus();
    QPointer<HeaderEditor> guard(editor);
    connect(editor, &QLineEdit::editingFinished, this, [this, guard, column] {
        if (!guard || !guard->isVisible())
            return;
        guard->hide();
        if (!guard->cancelled)
            m_model->setHeaderData(column, Qt::Horizontal, guard->text(), Qt::EditRole);
        guard->deleteLater();
        setFocus();
    });
}

void WeightGridView::keyPressEvent(QKeyEvent *event)
{
    if (event->matches(QKeySequence::Copy)) {
        copy();
        return;
    }
    if (event->matches(QKeySequence::Paste)) {
        paste();
        return;
    }
    if (event->key() == Qt::Key_Delete || event->key() == Qt::Key_Backspace) {
        clearSelectedCells();
        return;
    }
    if ((event->key() == Qt::Key_Return || event->key() == Qt::Key_Enter) && state() != EditingState) {
        if (currentIndex().isValid())
            edit(currentIndex());
        return;
    }
    QTableView::keyPressEvent(event);
}

int WeightGridView::entryRowCount() const
{
    return m_model ? m_model->weightRowCount() : 0;
}

} // namespace cb
