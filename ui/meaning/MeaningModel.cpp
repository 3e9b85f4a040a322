#include "ui/meaning/MeaningModel.h"

#include "ui/common/ColumnStatus.h"
#include "ui/document/Document.h"

using namespace Qt::StringLiterals;

namespace cb {

MeaningModel::MeaningModel(Document *document, QObject *parent)
    : DocumentTableModel(document, parent)
{
    follow();
}

DocumentTableModel::Shape MeaningModel::currentShape() const
{
    const Analysis &a = document()->analysis();
    return {a.hypotheses.empty() ? 0 : a.coefficientCount, 1};
}

QList<int> MeaningModel::changedRoles() const
{
    return {Qt::DisplayRole, Qt::ToolTipRole, TitleRole, SymbolsRole, WordsRole, WeightsRole, WeightTextsRole, LevelsRole, InterceptRole};
}

QVariant MeaningModel::data(const QModelIndex &index, int role) const
{
    const Analysis &a = document()->analysis();
    const int r = index.row();
    if (!index.isValid() || r < 0 || size_t(r) >= a.hypotheses.size() || r >= a.hypothesisSymbols.size())
        return {};
    const bool intercept = a.intercept && r == 0;
    switch (role) {
    case TitleRole:
        return coefficientLabel(a.intercept, r, a.coefficientNames[r]);
    case Qt::DisplayRole:
    case SymbolsRole:
        return a.hypothesisSymbols[r];
    case WordsRole:
        return intercept ? tr("The intercept is %1.").arg(a.hypothesisWords[r]) : tr("Estimates %1.").arg(a.hypothesisWords[r]);
    case Qt::ToolTipRole:
        return a.hypothesisSymbols[r] + u"\n"_s + a.hypothesisWords[r] + u"\n"_s + tr("Weights on the level means: %1").arg(a.hypothesisCombinations.value(r));
    case WeightsRole: {
        QList<double> w;
        for (const Weight &x : a.hypotheses[size_t(r)])
            w << x.value();
        return QVariant::fromValue(w);
    }
    case WeightTextsRole: {
        QStringList t;
        for (const Weight &x : a.hypotheses[size_t(r)])
            t << formatWeight(x);
        return t;
    }
    case LevelsRole:
        return a.levels;
    case InterceptRole:
        return intercept;
    default:
        return {};
    }
}

} // namespace cb
