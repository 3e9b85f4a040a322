#pragma once

#include <QAbstractTableModel>
#include <QColor>
#include <QStringList>

#include <vector>

class QTableView;

namespace cb {

// One cell as a panel wants it shown: the text and how it looks. A panel writes its
// tables as rows of these from its own state; the model shows them.
struct TableCell
{
    QString text;
    QString toolTip;
    QColor ink;        // invalid: the view's text colour
    QColor background; // invalid: none
    bool numeric = false; // right-aligned
    bool centred = false;
    bool italic = false;
    bool editable = false;
    // A choice among these texts (the view shows a combo box, see showChoices); text is the chosen one.
    QStringList choices;

    friend bool operator==(const TableCell &, const TableCell &) = default;
};

using TableRows = std::vector<std::vector<TableCell>>;

// A plain cell: text, right-aligned when it is a number.
TableCell textCell(const QString &text, bool numeric = true);

// The table model of the panels that show computed results (power, data check, design):
// setRows takes the whole table as the panel's state says it is now, and the model tells the
// views what differs: dataChanged over the cells that changed when the shape stays, a reset
// when the number of rows or columns changes. Typing into an editable cell or choosing in a
// choice cell changes nothing here; it emits edited() and the panel updates its state.
class CellTableModel : public QAbstractTableModel
{
    Q_OBJECT

public:
    explicit CellTableModel(const QStringList &headers, QObject *parent = nullptr);

    void setRows(TableRows rows);
    void setHeaders(const QStringList &headers);
    void setHeaderToolTip(int column, const QString &toolTip);
    void setRowHeaders(const QStringList &headers); // empty: none
    const TableCell &cell(int row, int column) const { return m_rows[size_t(row)][size_t(column)]; }

    int rowCount(const QModelIndex &parent = {}) const override;
    int columnCount(const QModelIndex &parent = {}) const override;
    QVariant data(const QModelIndex &index, int role) const override;
    QVariant headerData(int section, Qt::Orientation orientation, int role) const override;
    Qt::ItemFlags flags(const QModelIndex &index) const override;
    // Text for an editable cell, or the chosen index (int) for a choice cell.
    bool setData(const QModelIndex &index, const QVariant &value, int role = Qt::EditRole) override;

    static constexpr int ChoicesRole = Qt::UserRole + 1;

signals:
    // The user typed `value` (a text) or chose (an int, the index in choices) in a cell.
    void edited(int row, int column, const QVariant &value);

private:
    QStringList m_headers;
    QStringList m_headerTips;
    QStringList m_rowHeaders;
    TableRows m_rows;
    int m_columns;
};

// Shows the choice cells of `column` as combo boxes that stay open, as they did when each row
// had its own (reopened after every reset of the model).
void showChoices(QTableView *view, int column);

// The usual look of the panels' tables: no row numbers, compact rows, no wrapping. No column
// grows past half the view's width (at least 16 em), so on a narrow panel the figures stay in
// sight beside a long test or coefficient name; the name is then cut in its middle, keeping its
// start and its end (the part of the design), and shows whole in its tooltip.
void setUpResultTable(QTableView *view);

} // namespace cb
