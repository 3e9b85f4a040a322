#include "core/report/ItemReport.h"

#include "core/analysis/Analysis.h"
#include "core/base/NumberText.h"
#include "core/report/TextTable.h"

#include <cmath>

using namespace Qt::StringLiterals;

namespace cb {

QString itemScopeSentence()
{
    return u"This is the by-participant and by-item analysis with Clark's (1973) min F\u2032, not a mixed-effects model with "
           u"crossed random effects for participants and items; many analysts fit that model next, with the exported coding, "
           u"in a statistics package."_s;
}

QStringList itemSummaryLines(const ItemAnalysis &items)
{
    const FitResult &f = items.byItem;
    // A design's items: its within-items cells (MixedFit), or with every factor between items its
    // cells, each item one value in one cell (the F test on the items' means).
    const QString unit = f.mixedDesign ? u"within cell"_s : f.byParticipant ? u"level"_s : u"cell"_s;
    if (!f.byParticipant && !f.mixedDesign)
        return {u"By item: do the cell means differ? F(%1, %2) = %3, %4, over the %5 items, each in one cell"_s
                    .arg(numberText(f.fDf1, 10), numberText(f.fDf2, 10), numberText(f.f), pClause(f.fP))
                    .arg(f.participants)};
    if (std::isnan(f.f)) // too few items with every level, or scores that do not vary in every direction: the notes say which
        return {u"By item: Hotelling's test of all %1s cannot be computed over the %2 of %3 items with every %1 (see the notes); "
                u"each coefficient is tested on its own"_s.arg(unit).arg(f.completeParticipants).arg(f.participants)};
    return {u"By item: do the %1 means differ? Hotelling's F(%2, %3) = %4, %5, over the %6 of %7 items with every %1"_s.arg(unit)
                .arg(numberText(f.fDf1, 10), numberText(f.fDf2, 10), numberText(f.f), pClause(f.fP))
                .arg(f.completeParticipants)
                .arg(f.participants)};
}

QString itemReport(const FitResult &byParticipant, const ItemAnalysis &items)
{
    const FitResult &f = items.byItem;
    QString out = u"\nBy item (column '%1'): each item's cell means over the participants' rows, each contrast on the items' "
                  u"contrast scores.\n\n"_s.arg(items.column);
    const bool adjusted = f.adjust != Adjustment::None;
    QStringList header{u"coefficient"_s, u"estimate"_s, u"SE"_s, u"t"_s, u"p"_s};
    if (adjusted)
        header << u"adjusted p (%1)"_s.arg(adjustmentId(f.adjust));
    header << u"%1% interval"_s.arg(numberText(100.0 * (1.0 - f.alpha), 4)) << u"df"_s << u"items"_s;
    TextTable table(header, 0);
    for (size_t i = 0; i < f.coefficients.size(); ++i) {
        const FitCoefficient &c = f.coefficients[i];
        QStringList row{coefficientLabel(f.intercept, int(i), c.name), numberText(c.estimate, 6), numberText(c.se), numberText(c.t),
                        pValueText(c.p)};
        if (adjusted)
            row << (c.inFamily ? pValueText(c.pAdjusted) : u"not in family"_s);
        row << u"%1 to %2"_s.arg(numberText(c.ciLow, 5), numberText(c.ciHigh, 5)) << numberText(c.df, 10)
            << QString::number(c.participants);
        table.addRow(row);
    }
    out += table.text() + u'\n';
    for (const QString &line : itemSummaryLines(items))
        out += line + u'\n';

    out += u"\nmin F\u2032 (Clark 1973): F1 = t\u00b2 by participant, F2 = t\u00b2 by item, min F\u2032 = F1 F2 / (F1 + F2)\n\n"_s;
    TextTable minF({u"coefficient"_s, u"F1"_s, u"df"_s, u"F2"_s, u"df"_s, u"min F\u2032"_s, u"df"_s, u"p"_s}, 0);
    for (size_t i = 0; i < items.minF.size(); ++i) {
        const MinFPrime &m = items.minF[i];
        const FitCoefficient &one = byParticipant.coefficients[i];
        const FitCoefficient &two = f.coefficients[i];
        minF.addRow({coefficientLabel(f.intercept, int(i), two.name), numberText(m.f1), numberText(one.df, 10), numberText(m.f2),
                     numberText(two.df, 10), u"%1"_s.arg(numberText(m.f)), u"1, %1"_s.arg(numberText(m.df2)), pValueText(m.p)});
    }
    out += minF.text() + u'\n';
    out += u"min F\u2032 is given per coefficient (one numerator df); for all levels together the two Hotelling tests stand side "
           u"by side, since Clark's bound is written for F ratios of mean squares.\n"_s;
    for (const QString &n : f.notes)
        out += u"Note: "_s + n + u'\n';
    out += u"Note: "_s + itemScopeSentence() + u'\n';
    return out;
}

} // namespace cb
