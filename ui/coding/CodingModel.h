#pragma once

#include "ui/common/ColumnStatus.h"
#include "ui/coding/WeightTableModel.h"

#include <vector>

namespace cb {

// The coding grid: one row per level, one column per coding column, followed
// by footer rows that say, per column, whether it sums to zero, which columns
// it is not orthogonal to under the planned n, and its VIF.
class CodingModel : public WeightTableModel
{
    Q_OBJECT

public:
    enum FooterRow { SumRow, OrthogonalityRow, VifRow, FooterRowCount };

    explicit CodingModel(Document *document, QObject *parent = nullptr);

    int weightRowCount() const override;
    std::optional<Weight> weightAt(int row, int column) const override;
    QString cellName(int row, int column) const override;
    // Which footer row a table row is, or -1 for a level row.
    int footerRow(int row) const;
    const ColumnStatus *status(int column) const;

    QVariant data(const QModelIndex &index, int role = Qt::DisplayRole) const override;
    QVariant headerData(int section, Qt::Orientation orientation, int role = Qt::DisplayRole) const override;
    bool setHeaderData(int section, Qt::Orientation orientation, const QVariant &value, int role = Qt::EditRole) override;
    Qt::ItemFlags flags(const QModelIndex &index) const override;

    // Names (core/analysis/ColumnNames.h): a column the user named whose hypothesis has
    // changed since is stale, and its header shows kStaleNameMark.
    static constexpr QStringView kStaleNameMark = u"\u2260"; // ≠
    bool nameIsStale(int column) const;
    bool nameIsUsers(int column) const;
    // The name the tool gives the column for what it tests now.
    QString generatedName(int column) const;
    // One undo step each: back to the generated name (it follows edits again), or keep the
    // user's name for what the column tests now.
    bool useGeneratedName(int column);
    bool keepName(int column);

protected:
    Shape currentShape() const override;
    void aboutToFollow() override;
    bool cellChanged(int row, int column) const override;
    bool applyWeights(const std::vector<edits::CellWeight> &cells, const QString &actionName, const QString &mergeKey) override;

private:
    QVariant footerData(int footer, int column, int role) const;
    QVariant footerHeader(int footer, int role) const;
    QString nowTests(int column) const;

    std::vector<ColumnStatus> m_status;
    // What the grid showed before the latest change, to tell which cells it repaints: typing
    // one weight changes one cell and the footer, not the whole grid.
    std::vector<ColumnStatus> m_shownStatus;
    std::vector<std::vector<Weight>> m_shownWeights;
    std::vector<std::vector<Weight>> m_weights;
};

} // namespace cb
