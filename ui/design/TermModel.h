#pragma once

#include <QAbstractItemModel>
#include <QStringList>

#include <vector>

namespace cb {

// The design's candidate terms, each with a tick (in the model or not) and, when included,
// its design columns below it. The design panel writes the rows from the document; ticking
// a term changes nothing here, it emits toggled() and the panel makes the edit.
class TermModel : public QAbstractItemModel
{
    Q_OBJECT

public:
    struct ColumnRow
    {
        QString label;
        int column = 0; // the design column (0-based, without the intercept)
        friend bool operator==(const ColumnRow &, const ColumnRow &) = default;
    };
    struct TermRow
    {
        QString name;
        QString toolTip;
        bool included = false;
        std::vector<ColumnRow> columns;
        friend bool operator==(const TermRow &, const TermRow &) = default;
    };

    static constexpr int ColumnRole = Qt::UserRole + 1; // on a column's row: its design column

    explicit TermModel(QObject *parent = nullptr);

    // dataChanged for the rows that differ while every term keeps its number of columns, else a reset.
    void setTerms(std::vector<TermRow> terms);
    // The row that shows a design column; invalid when no included term has it.
    QModelIndex indexOfColumn(int column) const;
    int rowsShown() const; // terms and columns together

    QModelIndex index(int row, int column, const QModelIndex &parent = {}) const override;
    QModelIndex parent(const QModelIndex &child) const override;
    int rowCount(const QModelIndex &parent = {}) const override;
    int columnCount(const QModelIndex &parent = {}) const override;
    QVariant data(const QModelIndex &index, int role) const override;
    Qt::ItemFlags flags(const QModelIndex &index) const override;
    bool setData(const QModelIndex &index, const QVariant &value, int role) override;

signals:
    void toggled(int term, bool include);

private:
    // A term's row has internal id 0; a column's row has its term's row + 1.
    static constexpr quintptr kTermRow = 0;

    std::vector<TermRow> m_terms;
};

} // namespace cb
