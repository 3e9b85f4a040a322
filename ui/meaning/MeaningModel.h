#pragma once

#include "ui/document/DocumentTableModel.h"

namespace cb {

// What each coefficient tests, one row per coefficient (intercept first):
// the hypothesis in symbols and in words, and its weights on the level means
// for the little bar picture. Empty when the coding is rank deficient.
class MeaningModel : public DocumentTableModel
{
    Q_OBJECT

public:
    enum Role {
        TitleRole = Qt::UserRole + 1, // "b1 drip vs furrow" (cb::coefficientLabel)
        SymbolsRole,                  // "b1: mean(a, b) - mean(c) = 0"
        WordsRole,                    // "the average of a and b minus c"
        WeightsRole,                  // QList<double>: hypothesis weights per level
        WeightTextsRole,              // QStringList: the same as fractions
        LevelsRole,                   // QStringList: level names
        InterceptRole,                // bool
    };

    explicit MeaningModel(Document *document, QObject *parent = nullptr);

    QVariant data(const QModelIndex &index, int role = Qt::DisplayRole) const override;

protected:
    Shape currentShape() const override;
    QList<int> changedRoles() const override;
};

} // namespace cb
