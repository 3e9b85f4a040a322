#pragma once

#include "ui/coding/WeightTableModel.h"

#include <QSet>

#include <vector>

namespace cb {

// The reverse direction: one row per level, one column per coefficient
// (intercept first), each column the weights on the level means that the
// coefficient tests. Editing a weight asks core for the coding that tests the
// edited hypotheses and replaces the coding columns with it. Until the typed
// hypotheses can be tested (each comparison sums to 0, no two are dependent)
// they are kept as a draft and the coding is left alone.
class HypothesisModel : public WeightTableModel
{
    Q_OBJECT

public:
    explicit HypothesisModel(Document *document, QObject *parent = nullptr);

    int weightRowCount() const override;
    std::optional<Weight> weightAt(int row, int column) const override;
    QString cellName(int row, int column) const override;

    bool hasDraft() const { return draftIsCurrent(); }
    QString draftProblem() const { return m_draftProblem; }
    // Drops the draft and shows the hypotheses of the current coding again.
    void discardDraft();
    // Starts a new comparison (a column of zeros, kept as a draft until its weights make a
    // testable set). Refused, with a message, when every level already has a coefficient.
    bool addComparison();

    QVariant data(const QModelIndex &index, int role = Qt::DisplayRole) const override;
    QVariant headerData(int section, Qt::Orientation orientation, int role = Qt::DisplayRole) const override;
    Qt::ItemFlags flags(const QModelIndex &index) const override;

signals:
    // The draft's problem, or an empty text when there is no draft.
    void draftChanged(const QString &problem);

protected:
    Shape currentShape() const override;
    void aboutToFollow() override;
    bool applyWeights(const std::vector<edits::CellWeight> &cells, const QString &actionName, const QString &mergeKey) override;

private:
    const std::vector<std::vector<Weight>> *rows() const;
    QString coefficientLabel(int column) const;

    bool draftIsCurrent() const;

    std::optional<std::vector<std::vector<Weight>>> m_draft; // coefficient x level
    quint64 m_draftRevision = 0; // the document revision the draft was typed against
    QSet<int> m_draftColumns;
    QString m_draftProblem;
};

} // namespace cb
