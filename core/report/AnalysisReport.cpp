#include "core/report/AnalysisReport.h"

#include "core/analysis/Compare.h"
#include "core/analysis/DesignAnalysis.h"
#include "core/base/NumberText.h"
#include "core/model/Design.h"
#include "core/report/TextTable.h"

#include <cmath>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

QString number(double v)
{
    if (std::isinf(v))
        return u"singular"_s; // a zero singular value: no number to show
    return numberText(v, 6);
}

QString yesNoMatrix(const Analysis &a, const SquareTable<bool> &m)
{
    QStringList header{QString()};
    for (int j = 0; j < a.columnCount; ++j)
        header << QString::number(j + 1);
    TextTable table(header, 4);
    for (int i = 0; i < a.columnCount; ++i) {
        QStringList r{u"%1 %2"_s.arg(i + 1).arg(a.columnNames[i])};
        for (int j = 0; j < a.columnCount; ++j)
            r << (i == j ? kMissingMark.toString() : (m(i, j) ? u"yes"_s : u"NO"_s));
        table.addRow(r);
    }
    return table.text();
}

// "b1 low vs control: mean(low) - mean(control) = 0" from core's "b1: mean(low) - ...".
QString labelledSymbols(const Analysis &a, int r)
{
    const QString &symbols = a.hypothesisSymbols[r];
    return coefficientLabel(a.intercept, r, a.coefficientNames[r]) + symbols.mid(symbols.indexOf(u':'));
}

} // namespace

QString analysisReport(const Scheme &s, const Analysis &a)
{
    QString out;
    const QString name = s.factor.name.isEmpty() ? u"(unnamed factor)"_s : s.factor.name;
    out += u"Factor %1: %2 levels (%3)\n"_s.arg(name).arg(a.levelCount).arg(a.levels.join(u", "_s));
    if (s.factor.hasPlannedN()) {
        QStringList n;
        for (const Rational &r : s.factor.plannedN)
            n << rationalToString(r);
        out += u"Planned n: %1\n"_s.arg(n.join(u", "_s));
    } else {
        out += u"Planned n: equal\n"_s;
    }
    QString origin = schemeTitle(s.kind);
    if (schemeUsesReference(s.kind) && s.reference >= 0)
        origin += u", reference level %1"_s.arg(s.factor.levels[s.reference]);
    out += u"Coding: %1; intercept %2\n\n"_s.arg(origin, s.intercept ? u"on"_s : u"off"_s);

    out += u"Coding matrix (rows: levels; columns: coding columns)\n"_s;
    {
        QStringList header{u"level"_s};
        header << a.columnNames;
        TextTable table(header);
        for (int i = 0; i < a.levelCount; ++i) {
            QStringList r{a.levels[i]};
            for (const Column &c : s.columns)
                r << c.weights[size_t(i)].display();
            table.addRow(r);
        }
        QStringList sums{u"column sum"_s};
        for (const Weight &w : a.columnSums)
            sums << w.display();
        table.addRow(sums);
        out += table.text();
    }
    out += u"\n"_s;

    if (!a.fullRank) {
        out += u"Rank %1 of %2: the coefficients are not identifiable.\n"_s.arg(a.rank).arg(a.coefficientCount);
        for (const QString &d : a.dependencies)
            out += u"  dependent: %1\n"_s.arg(d);
        out += u"\n"_s;
    } else {
        out += u"What each coefficient estimates%1\n"_s.arg(a.dependsOnSizes ? u" (depends on the planned n: the model is not saturated)"_s : QString());
        for (int r = 0; r < a.coefficientCount; ++r)
            out += u"  %1\n      %2\n"_s.arg(labelledSymbols(a, r), a.hypothesisWords[r]);
        out += u"\nHypothesis matrix (rows: coefficients; columns: weights on the level means)\n"_s;
        QStringList header{u"coefficient"_s};
        header << a.levels;
        TextTable table(header);
        for (int r = 0; r < a.coefficientCount; ++r) {
            QStringList row{coefficientLabel(a.intercept, r, a.coefficientNames[r])};
            for (const Weight &w : a.hypotheses[size_t(r)])
                row << w.display();
            table.addRow(row);
        }
        out += table.text();
        out += u"\n"_s;
    }

    out += u"Design health\n"_s;
    out += u"  rank %1 of %2%3; %4 arithmetic\n"_s.arg(a.rank).arg(a.coefficientCount)
               .arg(a.fullRank ? u" (full rank)"_s : u" (RANK DEFICIENT)"_s, a.exact ? u"exact"_s : u"floating-point"_s);
    out += u"  condition number (unit-length columns, weighted by planned n): %1\n"_s
               .arg(a.conditionNumber ? number(*a.conditionNumber) : kMissingMark.toString() + u" (singular)"_s);
    QStringList ci;
    for (double v : a.conditionIndices)
        ci << number(v);
    out += u"  condition indices: %1 (30 or more flags collinearity; common practice)\n"_s.arg(ci.join(u", "_s));
    QStringList vif;
    for (int j = 0; j < a.columnCount; ++j)
        vif << u"%1 %2"_s.arg(a.columnNames[j], numberText(a.vif[size_t(j)], 6));
    out += u"  VIF (5 and 10 flag collinearity; common practice): %1\n"_s.arg(vif.join(u"; "_s));
    if (a.columnCount > 1 && a.columnCount <= 12) {
        out += u"  orthogonal as written (c_i . c_j = 0):\n"_s + yesNoMatrix(a, a.orthogonal);
        out += u"  orthogonal under the planned n (centred, n-weighted):\n"_s + yesNoMatrix(a, a.orthogonalInDesign);
    }
    if (!a.findings.empty()) {
        out += u"\nFindings\n"_s;
        for (const Finding &f : a.findings) {
            const QString tag = f.severity == Finding::Severity::Problem ? u"problem"_s
                              : f.severity == Finding::Severity::Caution ? u"caution"_s : u"note"_s;
            out += u"  [%1] %2\n"_s.arg(tag, f.message);
        }
    }
    return out;
}

QString emptyCellsReport(const EmptyCellEffects &e)
{
    if (e.emptyCells.isEmpty())
        return {};
    QString out = u"Empty cells (%1): %2; analysed over the other cells\n"_s.arg(e.why, e.emptyCells.join(u", "_s));
    out += u"  %1\n"_s.arg(e.summary);
    for (const HypothesisShift &s : e.shifts)
        out += u"  %1\n"_s.arg(s.words);
    return out + u"\n"_s;
}

QString designReport(const Design &d, const DesignAnalysis &da)
{
    QString out;
    QStringList factors;
    for (const Scheme &s : d.factors)
        factors << u"%1 (%2: %3)"_s.arg(s.factor.name, schemeTitle(s.kind), s.factor.levels.join(u", "_s));
    out += u"Design: %1\n"_s.arg(factors.join(kCrossJoiner));
    out += u"Cells (first factor slowest): %1\n"_s.arg(da.cells.join(u", "_s));
    out += u"Terms: %1\n\n"_s.arg(da.termNames.join(u", "_s));
    if (da.refused() || da.cellScheme.columns.empty()) {
        for (const Finding &f : da.analysis.findings)
            out += u"[problem] %1\n"_s.arg(f.message);
        return out;
    }
    out += emptyCellsReport(da.empty);
    QStringList colTerms;
    for (size_t j = 0; j < da.columnTerm.size(); ++j)
        colTerms << u"  column %1 '%2' belongs to %3"_s.arg(j + 1).arg(da.cellScheme.columns[j].name, da.termNames[da.columnTerm[j]]);
    out += colTerms.join(u"\n"_s) + u"\n\n"_s;
    out += analysisReport(da.cellScheme, da.analysis);
    return out;
}

QString comparisonReport(const CodingComparison &c)
{
    QString out;
    out += u"Two codings of the %1 %2\n"_s.arg(c.overCells ? u"cells"_s : u"levels"_s, c.left.levels.join(u", "_s));
    out += u"  first:  %1\n  second: %2\n\n"_s.arg(c.leftTitle, c.rightTitle);
    for (const QString &line : c.summary)
        out += line + u"\n"_s;
    out += u"\nCoefficient by coefficient (weights on the level means)\n"_s;
    auto side = [](const Analysis &a, int index, const QString &which) {
        if (index < 0)
            return u"  %1: no coefficient\n"_s.arg(which);
        if (a.hypotheses.empty())
            return u"  %1: %2 (not identifiable)\n"_s.arg(which, coefficientLabel(a.intercept, index, a.coefficientNames[index]));
        QStringList w;
        for (const Weight &x : a.hypotheses[size_t(index)])
            w << x.display();
        return u"  %1: %2\n      %3\n      weights: %4\n"_s.arg(which, labelledSymbols(a, index), a.hypothesisWords[index], w.join(u", "_s));
    };
    for (const ComparedCoefficient &cc : c.coefficients) {
        out += side(c.left, cc.left, u"first "_s);
        out += side(c.right, cc.right, u"second"_s);
        out += u"  => %1\n\n"_s.arg(cc.verdict);
    }
    out += u"Design health\n"_s;
    TextTable table({QString(), u"first"_s, u"second"_s, QString()});
    for (const HealthDifference &h : c.health)
        table.addRow({h.what, h.left, h.right, h.differs ? u"differs"_s : QString()});
    out += table.text();
    return out;
}

} // namespace cb
