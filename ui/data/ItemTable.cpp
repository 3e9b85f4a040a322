#include "ui/data/ItemTable.h"

#include "core/analysis/Analysis.h"
#include "core/base/NumberText.h"

#include <QCoreApplication>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

QString tr(const char *text)
{
    return QCoreApplication::translate("ItemTable", text);
}

} // namespace

QStringList itemTableHeaders()
{
    return {tr("Coefficient"), tr("By item"), tr("t (df)"), tr("p"), u"min F\u2032"_s, tr("df"), tr("p (min F\u2032)")};
}

TableRows itemTableRows(const ItemAnalysis &items)
{
    const FitResult &f = items.byItem;
    TableRows rows;
    for (size_t i = 0; i < f.coefficients.size(); ++i) {
        const FitCoefficient &c = f.coefficients[i];
        const MinFPrime m = i < items.minF.size() ? items.minF[i] : MinFPrime{};
        TableCell t = textCell(u"%1 (%2)"_s.arg(numberText(c.t, 3), numberText(c.df, 10)));
        t.toolTip = tr("On the contrast scores of %1 items").arg(c.participants);
        TableCell minF = textCell(numberText(m.f, 4));
        minF.toolTip = tr("F1 = %1 by participant, F2 = %2 by item; min F\u2032 = F1 F2 / (F1 + F2) (Clark 1973)")
                           .arg(numberText(m.f1, 4), numberText(m.f2, 4));
        rows.push_back({textCell(coefficientLabel(f.intercept, int(i), c.name), false), textCell(numberText(c.estimate, 4)), t,
                        textCell(pValueText(c.p)), minF, textCell(u"1, %1"_s.arg(numberText(m.df2, 4))), textCell(pValueText(m.p))});
    }
    return rows;
}

} // namespace cb
