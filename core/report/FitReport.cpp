#include "core/report/FitReport.h"

#include "core/analysis/Analysis.h"
#include "core/base/NumberText.h"
#include "core/report/TextTable.h"

#include <cmath>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

QString percent(double share)
{
    return std::isfinite(share) ? numberText(100.0 * share, 3) + u'%' : kMissingMark.toString();
}

} // namespace

QStringList fitSummaryLines(const FitResult &fit, bool cells)
{
    if (fit.byParticipant && std::isnan(fit.f)) // too few complete participants, or singular scores: the notes say which
        return {u"Hotelling's test of all %1 cannot be computed (see the notes); each coefficient is tested on its own"_s.arg(
                    fit.mixedDesign ? u"within cells"_s : u"levels"_s),
                u"%1 participants, %2 with every %3"_s.arg(fit.participants).arg(fit.completeParticipants).arg(
                    fit.mixedDesign ? u"within cell"_s : u"level"_s)};
    if (fit.mixedDesign) // core/data/MixedFit.h; the notes list the other multivariate tests
        return {u"Do the within cells differ? F(%1, %2) = %3, %4; tests that %5"_s.arg(numberText(fit.fDf1, 10), numberText(fit.fDf2, 10),
                                                                               numberText(fit.f), pClause(fit.fP), fit.omnibusHypothesis),
                u"%1 participants, %2 with every within cell"_s.arg(fit.participants).arg(fit.completeParticipants)};
    if (fit.byParticipant)
        return {u"Do the level means differ? F(%1, %2) = %3, %4; tests %5"_s.arg(numberText(fit.fDf1, 10), numberText(fit.fDf2, 10),
                                                                              numberText(fit.f), pClause(fit.fP), fit.omnibusHypothesis),
                u"%1 participants, %2 with every level"_s.arg(fit.participants).arg(fit.completeParticipants)};
    const QString unit = cells ? u"cell"_s : u"level"_s;
    const QString question = fit.centred ? u"Do the %1 means differ?"_s.arg(unit) : u"Does any coefficient differ from 0?"_s;
    const QString test = u"%1 F(%2, %3) = %4, %5; tests that %6"_s.arg(question, numberText(fit.fDf1, 10), numberText(fit.fDf2, 10),
                                                                       numberText(fit.f), pClause(fit.fP), fit.omnibusHypothesis);
    const QString spread = u"Spread within %1s: SD %2 (%3 df)"_s.arg(unit, numberText(fit.sigma), numberText(fit.df, 10));
    const QString observations = u"%1 observations in %2 %3s"_s.arg(numberText(fit.totalN, 10)).arg(fit.levels.size()).arg(unit);
    const QString share = fit.centred
        ? u"The %1s explain %2 of the variance (%3)"_s.arg(unit, percent(fit.rSquared), observations)
        : u"The coefficients explain %1 of the sum of squares about 0 (%2)"_s.arg(percent(fit.rSquared), observations);
    return {test, spread, share};
}

QString fitReport(const Scheme &scheme, bool design, const DataSummary &data, const FitResult &fit)
{
    QString out;
    if (design)
        out += u"Fit of the design's coding over the cells of %1 to %2"_s.arg(scheme.factor.name, data.source);
    else
        out += u"Fit of the %1 coding to %2"_s.arg(schemeTitle(scheme.kind), data.source);
    if (data.fromSummaryTable) {
        out += u" (summary table)\n"_s;
    } else {
        QStringList columns{data.columns.value(data.factorIndex)};
        for (int i : data.moreFactorIndices)
            columns << data.columns.value(i);
        out += u"%1%2', response '%3'%4)\n"_s.arg(columns.size() > 1 ? u" (cells from columns '"_s : u" (levels from column '"_s,
                                                  columns.join(u"', '"_s), data.columns.value(data.responseIndex),
                                                  data.weighted ? u", weighted"_s : QString());
        out += u"%1 rows read, %2 used, %3 left out.\n"_s.arg(data.records).arg(data.usedRows).arg(data.skippedRows);
    }
    if (data.participantIndex >= 0)
        out += u"By participant (column '%1'): the participants' cell means, each contrast on their contrast scores.\n"_s.arg(
            data.columns.value(data.participantIndex));
    for (const QString &c : fit.cautions) // before the figures they qualify
        out += u"Caution: "_s + c + u'\n';
    out += u'\n';

    TextTable levels({design ? u"cell"_s : u"level"_s, u"n"_s, u"mean"_s, u"SD"_s}, 0);
    for (size_t j = 0; j < fit.levelStats.size(); ++j) {
        const RunningStats &s = fit.levelStats[j];
        levels.addRow({fit.levels.value(qsizetype(j)), numberText(s.n, 10), numberText(s.mean, 6), numberText(s.sd(), 5)});
    }
    out += levels.text() + u'\n';

    const bool adjusted = fit.adjust != Adjustment::None;
    QStringList header{u"coefficient"_s, u"estimate"_s, u"from means"_s, u"SE"_s, u"t"_s, u"p"_s};
    if (adjusted)
        header << u"adjusted p (%1)"_s.arg(adjustmentId(fit.adjust));
    header << u"%1% interval"_s.arg(numberText(100.0 * (1.0 - fit.alpha), 4));
    if (fit.byParticipant)
        header << u"df"_s << u"participants"_s;
    TextTable table(header, 0);
    for (size_t i = 0; i < fit.coefficients.size(); ++i) {
        const FitCoefficient &c = fit.coefficients[i];
        QStringList row{coefficientLabel(fit.intercept, int(i), c.name), numberText(c.estimate, 6),
                        (c.agrees ? QString() : u"! "_s) + numberText(c.hypothesisEstimate, 6), numberText(c.se),
                        numberText(c.t), pValueText(c.p)};
        if (adjusted)
            row << (c.inFamily ? pValueText(c.pAdjusted) : u"not in family"_s);
        row << u"%1 to %2"_s.arg(numberText(c.ciLow, 5), numberText(c.ciHigh, 5));
        if (fit.byParticipant)
            row << numberText(c.df, 10) << QString::number(c.participants);
        table.addRow(row);
        if (!c.hypothesis.isEmpty())
            table.addNote(u"tests "_s + c.hypothesis);
    }
    out += table.text() + u'\n';
    for (const QString &line : fitSummaryLines(fit, design))
        out += line + u'\n';
    for (const QString &n : fit.notes)
        out += u"Note: "_s + n + u'\n';
    if (data.skippedRows > 0) {
        out += u"\nRows left out (%1):\n"_s.arg(data.skippedRows);
        for (const RowProblem &r : data.skipped)
            out += u"  line %1: %2\n"_s.arg(r.line).arg(r.message);
        if (data.skippedRows > qint64(data.skipped.size()))
            out += u"  and %1 more\n"_s.arg(data.skippedRows - qint64(data.skipped.size()));
    }
    return out;
}

} // namespace cb
