#include "ui/common/CellTable.h"

#include "ui/common/ChangedCells.h"

#include <QComboBox>
#include <QEvent>
#include <QFont>
#include <QHeaderView>
#include <QSignalBlocker>
#include <QStyledItemDelegate>
#include <QTableView>

#include <algorithm>

namespace cb {

TableCell textCell(const QString &text, bool numeric)
{
    TableCell c;
    c.text = text;
    c.numeric = numeric;
    return c;
}

CellTableModel::CellTableModel(const QStringList &headers, QObject *parent)
    : QAbstractTableModel(parent)
    , m_headers(headers)
    , m_columns(int(headers.size()))
{
}

void CellTableModel::setHeaders(const QStringList &headers)
{
    if (headers == m_headers)
        return;
    if (headers.size() != m_headers.size()) {
        beginResetModel();
        m_headers = headers;
        m_columns = int(headers.size());
        m_rows.clear();
        endResetModel();
        return;
    }
    m_headers = headers;
    emit headerDataChanged(Qt::Horizontal, 0, m_columns - 1);
}

void CellTableModel::setHeaderToolTip(int column, const QString &toolTip)
{
    while (m_headerTips.size() <= column)
        m_headerTips << QString();
    m_headerTips[column] = toolTip;
}

void CellTableModel::setRowHeaders(const QStringList &headers)
{
    if (headers == m_rowHeaders)
        return;
    m_rowHeaders = headers;
    if (!m_rows.empty())
        emit headerDataChanged(Qt::Vertical, 0, int(m_rows.size()) - 1);
}

void CellTableModel::setRows(TableRows rows)
{
    for (auto &row : rows)
        row.resize(size_t(m_columns));
    if (rows.size() != m_rows.size()) {
        beginResetModel();
        m_rows = std::move(rows);
        endResetModel();
        return;
    }
    // Same shape: the views hear of the cells that changed (ui/common/ChangedCells.h).
    TableRows before = std::exchange(m_rows, std::move(rows));
    emitChangedCells(this, int(m_rows.size()), m_columns, [&](int r, int c) {
        return !(m_rows[size_t(r)][size_t(c)] == before[size_t(r)][size_t(c)]);
    });
}

int CellTableModel::rowCount(const QModelIndex &parent) const
{
    return parent.isValid() ? 0 : int(m_rows.size());
}

int CellTableModel::columnCount(const QModelIndex &parent) const
{
    return parent.isValid() ? 0 : m_columns;
}

QVariant CellTableModel::data(const QModelIndex &index, int role) const
{
    if (!index.isValid())
        return {};
    const TableCell &c = cell(index.row(), index.column());
    switch (role) {
    case Qt::DisplayRole:
    case Qt::EditRole: return c.text;
    case Qt::ToolTipRole: return c.toolTip.isEmpty() ? QVariant() : QVariant(c.toolTip);
    case Qt::ForegroundRole: return c.ink.isValid() ? QVariant(c.ink) : QVariant();
    case Qt::BackgroundRole: return c.background.isValid() ? QVariant(c.background) : QVariant();
    case Qt::TextAlignmentRole:
        if (c.centred)
            return int(Qt::AlignCenter);
        return c.numeric ? int(Qt::AlignRight | Qt::AlignVCenter) : QVariant();
    case Qt::FontRole:
        if (!c.italic)
            return {};
        {
            QFont f;
            f.setItalic(true);
            return f;
        }
    case ChoicesRole: return c.choices.isEmpty() ? QVariant() : QVariant(c.choices);
    default: return {};
    }
}

QVariant CellTableModel::headerData(int section, Qt::Orientation orientation, int role) const
{
    if (orientation == Qt::Vertical)
        return role == Qt::DisplayRole && section < m_rowHeaders.size() ? QVariant(m_rowHeaders[section]) : QVariant();
    if (role == Qt::DisplayRole)
        return m_headers.value(section);
    if (role == Qt::ToolTipRole && section < m_headerTips.size() && !m_headerTips[section].isEmpty())
        return m_headerTips[section];
    return {};
}

Qt::ItemFlags CellTableModel::flags(const QModelIndex &index) const
{
    if (!index.isValid())
        return Qt::NoItemFlags;
    const TableCell &c = cell(index.row(), index.column());
    Qt::ItemFlags f = Qt::ItemIsEnabled | Qt::ItemIsSelectable;
    if (c.editable || !c.choices.isEmpty())
        f |= Qt::ItemIsEditable;
    return f;
}

bool CellTableModel::setData(const QModelIndex &index, const QVariant &value, int role)
{
    if (!index.isValid() || role != Qt::EditRole || !(flags(index) & Qt::ItemIsEditable))
        return false;
    const TableCell &c = cell(index.row(), index.column());
    if (!c.choices.isEmpty() ? c.choices.value(value.toInt()) == c.text : value.toString() == c.text)
        return true; // nothing changed
    emit edited(index.row(), index.column(), value);
    return true;
}

namespace {

// A combo box over a choice cell: choosing commits at once.
class ChoiceDelegate : public QStyledItemDelegate
{
public:
    using QStyledItemDelegate::QStyledItemDelegate;

    QWidget *createEditor(QWidget *parent, const QStyleOptionViewItem &, const QModelIndex &index) const override
    {
        if (!index.data(CellTableModel::ChoicesRole).isValid())
            return nullptr;
        auto *box = new QComboBox(parent);
        connect(box, &QComboBox::currentIndexChanged, this, [this, box] {
            emit const_cast<ChoiceDelegate *>(this)->commitData(box);
        });
        return box;
    }
    void setEditorData(QWidget *editor, const QModelIndex &index) const override
    {
        auto *box = qobject_cast<QComboBox *>(editor);
        if (!box)
            return;
        const QStringList choices = index.data(CellTableModel::ChoicesRole).toStringList();
        const QSignalBlocker block(box);
        if (box->count() != choices.size() || [&] {
                for (int i = 0; i < choices.size(); ++i)
                    if (box->itemText(i) != choices[i])
                        return true;
                return false;
            }()) {
            box->clear();
            box->addItems(choices);
        }
        box->setCurrentIndex(std::max(0, int(choices.indexOf(index.data(Qt::EditRole).toString()))));
    }
    void setModelData(QWidget *editor, QAbstractItemModel *model, const QModelIndex &index) const override
    {
        if (auto *box = qobject_cast<QComboBox *>(editor))
            model->setData(index, box->currentIndex());
    }
};

} // namespace

void showChoices(QTableView *view, int column)
{
    view->setItemDelegateForColumn(column, new ChoiceDelegate(view));
    auto open = [view, column] {
        for (int r = 0; r < view->model()->rowCount(); ++r)
            view->openPersistentEditor(view->model()->index(r, column));
    };
    QObject::connect(view->model(), &QAbstractItemModel::modelReset, view, open);
    open();
}

namespace {

// Keeps a result table's columns to their share of the view's width as the view is resized.
class ColumnLimit : public QObject
{
public:
    explicit ColumnLimit(QTableView *view)
        : QObject(view)
        , m_view(view)
    {
        view->installEventFilter(this);
        apply();
    }

    bool eventFilter(QObject *watched, QEvent *event) override
    {
        if (watched == m_view && (event->type() == QEvent::Resize || event->type() == QEvent::FontChange))
            apply();
        return QObject::eventFilter(watched, event);
    }

private:
    void apply()
    {
        const int least = 16 * m_view->fontMetrics().horizontalAdvance(u'M');
        const int limit = std::max(least, m_view->width() / 2);
        if (m_view->horizontalHeader()->maximumSectionSize() != limit)
            m_view->horizontalHeader()->setMaximumSectionSize(limit);
    }

    QTableView *m_view;
};

} // namespace

void setUpResultTable(QTableView *view)
{
    view->verticalHeader()->hide();
    view->verticalHeader()->setDefaultSectionSize(22);
    view->setWordWrap(false);
    view->setTextElideMode(Qt::ElideMiddle);
    new ColumnLimit(view);
}

} // namespace cb
