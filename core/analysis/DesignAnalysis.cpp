#include "core/analysis/DesignAnalysis.h"

#include "core/analysis/HypothesisText.h"

#include <algorithm>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

// An interaction row as a difference of differences, e.g.
// "(weekly·clay - none·clay) - (weekly·sandy - none·sandy)", splitting on the term's last
// factor and recursing; empty when the row does not factor that way.
QString differenceOfDifferences(const Design &d, const std::vector<Weight> &h, std::vector<int> factors, const QStringList &cells)
{
    if (factors.size() <= 1) {
        const HypothesisText t = describeHypothesis(h, cells, std::vector<Rational>(h.size(), Rational(1)), false, QString());
        return t.combination;
    }
    const int g = factors.back();
    factors.pop_back();
    const int kg = d.factors[size_t(g)].levelCount();
    std::vector<int> used;
    for (int b = 0; b < kg; ++b)
        for (size_t c = 0; c < h.size(); ++c)
            if (cellLevels(d, int(c))[size_t(g)] == b && std::abs(h[c].value()) > 1e-12) {
                used.push_back(b);
                break;
            }
    if (used.size() != 2)
        return {};
    // The same cells at the two levels of g must carry opposite weights.
    auto partner = [&](size_t c, int b) {
        std::vector<int> lv = cellLevels(d, int(c));
        lv[size_t(g)] = b;
        return size_t(cellIndex(d, lv));
    };
    std::vector<Weight> at[2];
    for (int side = 0; side < 2; ++side)
        at[side].assign(h.size(), Weight(0));
    double lastSign = 0;
    for (size_t c = 0; c < h.size(); ++c) {
        if (cellLevels(d, int(c))[size_t(g)] != used[0])
            continue;
        const Weight &w0 = h[c], &w1 = h[partner(c, used[1])];
        if (std::abs(w0.value() + w1.value()) > 1e-12 * std::max(1.0, std::abs(w0.value())))
            return {};
        at[0][c] = w0;
        at[1][partner(c, used[1])] = w0.isExact() ? Weight::exact(-w1.rational()) : Weight::approx(-w1.value());
        if (std::abs(w0.value()) > 1e-12)
            lastSign = w0.value();
    }
    const QString first = differenceOfDifferences(d, at[0], factors, cells);
    const QString second = differenceOfDifferences(d, at[1], factors, cells);
    if (first.isEmpty() || second.isEmpty())
        return {};
    // Orient so that each inner difference ends on a positive weight: "(later - earlier) - (...)".
    if (lastSign < 0) {
        auto negate = [](std::vector<Weight> v) {
            for (Weight &w : v)
                w = w.isExact() ? Weight::exact(-w.rational()) : Weight::approx(-w.value());
            return v;
        };
        return u"(%1) - (%2)"_s.arg(differenceOfDifferences(d, negate(at[1]), factors, cells),
                                    differenceOfDifferences(d, negate(at[0]), factors, cells));
    }
    return u"(%1) - (%2)"_s.arg(first, second);
}

} // namespace

std::vector<Weight> DesignAnalysis::rowOverCells(int coefficient) const
{
    return overAllCells(analysis.hypotheses[size_t(coefficient)], analysedCells, int(cells.size()));
}

DesignAnalysis analyzeDesign(const Design &d, const QString &emptyWhy)
{
    DesignAnalysis out;
    auto addProblem = [&](const QString &msg) {
        out.analysis.findings.push_back(Finding{Finding::Severity::Problem, Finding::Topic::Rank, msg, -1, -1});
    };
    if (QString e = d.validate(); !e.isEmpty()) {
        addProblem(e);
        return out;
    }
    out.cells = d.cellNames();
    for (const Term &t : d.terms)
        out.termNames << termName(d, t);
    for (size_t c = 0; c < size_t(out.cells.size()); ++c) {
        if (!d.cellN.empty() && d.cellN[c] == 0)
            out.emptyCells << out.cells[qsizetype(c)];
        else
            out.analysedCells.push_back(int(c));
    }
    auto cs = cellScheme(d);
    if (!cs) {
        addProblem(cs.error());
        return out;
    }
    out.cellScheme = cs.take();
    for (size_t t = 0; t < d.terms.size(); ++t)
        out.columnTerm.insert(out.columnTerm.end(), termColumns(d, d.terms[t]).size(), int(t));
    if (!out.emptyCells.isEmpty()) {
        // Over the cells with observations, when the terms can be estimated from them.
        out.empty = checkEmptyCells(d, out.cellScheme, out.analysedCells, emptyWhy.isEmpty() ? u"planned n = 0"_s : emptyWhy);
        if (!out.empty.estimable) {
            out.analysis.levels = out.cells;
            addProblem(out.empty.refusal);
            return out;
        }
        out.cellScheme = keptCellsScheme(out.cellScheme, out.analysedCells, d.cellN);
    }
    out.analysis = analyze(out.cellScheme);
    if (!out.emptyCells.isEmpty() && out.analysis.fullRank) {
        compareWithFullDesign(out.empty, d, out.analysedCells, out.analysis);
        out.analysis.findings.push_back(Finding{Finding::Severity::Info, Finding::Topic::Hypothesis,
            u"the hypotheses and the design's health are over the %1 cells with observations (without %2)"_s
                .arg(out.analysedCells.size()).arg(out.emptyCells.join(u", "_s))});
        for (const HypothesisShift &s : out.empty.shifts)
            out.analysis.findings.push_back(Finding{Finding::Severity::Caution, Finding::Topic::Hypothesis,
                u"without %1: "_s.arg(out.emptyCells.join(u", "_s)) + s.words,
                s.coefficient - (out.analysis.intercept ? 1 : 0), -1});
    }
    const Analysis &a = out.analysis;

    // Term blocks: orthogonal when every cross pair is orthogonal under the cell n.
    const size_t nt = d.terms.size();
    out.termsOrthogonalInDesign.assign(nt, std::vector<bool>(nt, true));
    for (int i = 0; i < a.columnCount; ++i)
        for (int j = 0; j < a.columnCount; ++j)
            if (!a.orthogonalInDesign(i, j) && out.columnTerm[size_t(i)] != out.columnTerm[size_t(j)])
                out.termsOrthogonalInDesign[size_t(out.columnTerm[size_t(i)])][size_t(out.columnTerm[size_t(j)])] = false;
    for (size_t t = 0; t < nt; ++t)
        for (size_t u = t + 1; u < nt; ++u)
            if (!out.termsOrthogonalInDesign[t][u])
                out.analysis.findings.push_back(Finding{Finding::Severity::Info, Finding::Topic::Orthogonality,
                    u"terms %1 and %2 are not orthogonal under the planned cell sizes: their estimates are correlated"_s.arg(out.termNames[qsizetype(t)], out.termNames[qsizetype(u)])});

    bool mainEffectsOnly = true;
    for (const Term &t : d.terms)
        mainEffectsOnly = mainEffectsOnly && t.factors.size() == 1 && t.within < 0;
    if (a.dependsOnSizes)
        out.analysis.findings.push_back(Finding{Finding::Severity::Caution, Finding::Topic::DependsOnSizes,
            u"the model leaves out some terms%1, so the hypotheses over the cell means depend on the cell sizes"_s
                .arg(mainEffectsOnly ? u" (main effects only)"_s : QString())});

    // Interaction columns read best as differences of differences.
    if (a.fullRank) {
        const int off = a.intercept ? 1 : 0;
        for (int j = 0; j < a.columnCount; ++j) {
            const Term &t = d.terms[size_t(out.columnTerm[size_t(j)])];
            if (t.factors.size() < 2 || t.within >= 0)
                continue;
            const QString text = differenceOfDifferences(d, out.rowOverCells(j + off), t.factors, out.cells);
            if (text.isEmpty())
                continue;
            out.analysis.hypothesisCombinations[j + off] = text;
            out.analysis.hypothesisSymbols[j + off] = u"b%1: %2 = 0"_s.arg(j + 1).arg(text);
            out.analysis.hypothesisWords[j + off] = u"a difference of differences (interaction): "_s + text;
        }
    }

    // A "main effect" that only compares cells at one level of another factor is a simple effect.
    // (With empty cells the comparison with the full design says what changed, and why.)
    if (a.fullRank && out.emptyCells.isEmpty()) {
        const int off = a.intercept ? 1 : 0;
        for (int j = 0; j < a.columnCount; ++j) {
            const Term &t = d.terms[size_t(out.columnTerm[size_t(j)])];
            if (t.within >= 0)
                continue;
            for (size_t g = 0; g < d.factors.size(); ++g) {
                if (std::find(t.factors.begin(), t.factors.end(), int(g)) != t.factors.end())
                    continue;
                std::vector<bool> used(size_t(d.factors[g].levelCount()), false);
                const std::vector<Weight> row = out.rowOverCells(j + off);
                for (int c = 0; c < int(row.size()); ++c)
                    if (!row[size_t(c)].isZero() && std::abs(row[size_t(c)].value()) > 1e-12)
                        used[size_t(cellLevels(d, c)[g])] = true;
                if (std::count(used.begin(), used.end(), true) == 1) {
                    const int level = int(std::find(used.begin(), used.end(), true) - used.begin());
                    out.analysis.findings.push_back(Finding{Finding::Severity::Caution, Finding::Topic::Hypothesis,
                        u"column %1 ('%2') of %3 compares cells only at %4 = %5: it is a simple effect there, not a main effect "
                        "averaged over %4. A centred coding of %4 (sum, or +1/2 and -1/2) makes it the average effect over the levels of %4; "
                        "its interaction terms then change meaning too"_s
                            .arg(j + 1).arg(a.columnNames[j], termName(d, t), factorLabel(d, int(g)), d.factors[g].factor.levels[level]),
                        j, -1});
                }
            }
        }
    }
    return out;
}

} // namespace cb
