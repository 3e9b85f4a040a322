#include "ui/meaning/MeaningModel.h"

#include "ui/common/ColumnStatus.h"
#include "ui/document/Document.h"

#include <algorithm>

using namespace Qt::StringLiterals;

namespace cb {

namespace {
// Where the active factor's own columns sit among a design's coding columns: the first column of
// its main effect (the Design tab numbers b1, b2, ... over those). 0 outside a design or when its
// main effect is not a term.
int firstDesignColumn(const Document &d)
{
    if (!d.isDesign())
        return 0;
    const std::vector<Term> &terms = d.design().terms;
    const std::vector<int> &columnTerm = d.designAnalysis().columnTerm;
    for (size_t t = 0; t < terms.size(); ++t) {
        if (terms[t].factors != std::vector<int>{d.study().active} || terms[t].within >= 0)
            continue;
        const auto found = std::find(columnTerm.begin(), columnTerm.end(), int(t));
        return found == columnTerm.end() ? 0 : int(found - columnTerm.begin());
    }
    return 0;
}
} // namespace

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
        // In a design, the factor's coefficients carry the design's numbers (as in the Design tab).
        return coefficientLabel(a.intercept, intercept ? 0 : r + firstDesignColumn(*document()), a.coefficientNames[r]);
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
