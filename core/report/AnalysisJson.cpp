#include "core/report/AnalysisJson.h"

#include "core/analysis/DesignAnalysis.h"
#include "core/base/JsonArray.h"

#include <QJsonArray>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

QJsonArray numbers(const std::vector<Weight> &ws)
{
    return jsonArray(ws, [](const Weight &w) { return jsonNumber(w.value()); });
}

QJsonArray exactStrings(const std::vector<Weight> &ws)
{
    return jsonArray(ws, [](const Weight &w) {
        return w.isExact() ? QJsonValue(rationalToString(w.rational())) : QJsonValue(QJsonValue::Null);
    });
}

QJsonArray rows(const SquareTable<bool> &t)
{
    QJsonArray a;
    for (int i = 0; i < t.size(); ++i) {
        QJsonArray row;
        for (int j = 0; j < t.size(); ++j)
            row.append(t(i, j));
        a.append(row);
    }
    return a;
}

QString severityId(Finding::Severity s)
{
    switch (s) {
    case Finding::Severity::Info: return u"info"_s;
    case Finding::Severity::Caution: return u"caution"_s;
    case Finding::Severity::Problem: return u"problem"_s;
    }
    return {};
}

} // namespace

QJsonObject analysisToJson(const Scheme &scheme, const Analysis &a)
{
    QJsonObject o;
    o[u"levels"_s] = QJsonArray::fromStringList(a.levels);
    o[u"column_names"_s] = QJsonArray::fromStringList(a.columnNames);
    o[u"coefficient_names"_s] = QJsonArray::fromStringList(a.coefficientNames);
    o[u"intercept"_s] = a.intercept;
    o[u"scheme"_s] = schemeId(scheme.kind);
    o[u"exact"_s] = a.exact;

    // Coding: k rows of m.
    std::vector<std::vector<Weight>> coding(size_t(a.levelCount));
    for (int i = 0; i < a.levelCount; ++i)
        for (const Column &c : scheme.columns)
            coding[size_t(i)].push_back(i < int(c.weights.size()) ? c.weights[size_t(i)] : Weight());
    o[u"coding"_s] = jsonArray(coding, numbers);
    o[u"coding_exact"_s] = jsonArray(coding, exactStrings);

    if (a.fullRank) {
        o[u"hypotheses"_s] = jsonArray(a.hypotheses, numbers);
        o[u"hypotheses_exact"_s] = jsonArray(a.hypotheses, exactStrings);
        o[u"hypothesis_text"_s] = QJsonArray::fromStringList(a.hypothesisSymbols);
        o[u"hypothesis_words"_s] = QJsonArray::fromStringList(a.hypothesisWords);
        o[u"hypothesis_combinations"_s] = QJsonArray::fromStringList(a.hypothesisCombinations);
    } else {
        o[u"hypotheses"_s] = QJsonValue::Null;
        o[u"hypotheses_exact"_s] = QJsonValue::Null;
        o[u"hypothesis_text"_s] = QJsonValue::Null;
        o[u"hypothesis_words"_s] = QJsonValue::Null;
        o[u"hypothesis_combinations"_s] = QJsonValue::Null;
    }
    o[u"depends_on_sizes"_s] = a.dependsOnSizes;
    o[u"rank"_s] = a.rank;
    o[u"full_rank"_s] = a.fullRank;
    o[u"dependencies"_s] = QJsonArray::fromStringList(a.dependencies);
    o[u"column_sums"_s] = numbers(a.columnSums);
    o[u"column_sums_exact"_s] = exactStrings(a.columnSums);
    o[u"orthogonal"_s] = rows(a.orthogonal);
    o[u"orthogonal_in_design"_s] = rows(a.orthogonalInDesign);
    o[u"condition_number"_s] = jsonNumber(a.conditionNumber);
    o[u"condition_indices"_s] = jsonNumbers(a.conditionIndices);
    o[u"vif"_s] = jsonNumbers(a.vif);
    QJsonArray corr;
    for (Eigen::Index i = 0; i < a.correlation.rows(); ++i) {
        QJsonArray r;
        for (Eigen::Index j = 0; j < a.correlation.cols(); ++j)
            r.append(jsonNumber(a.correlation(i, j)));
        corr.append(r);
    }
    o[u"correlation"_s] = corr;
    QJsonArray warnings;
    QJsonArray findings;
    for (const Finding &f : a.findings) {
        if (f.severity != Finding::Severity::Info)
            warnings.append(f.message);
        QJsonObject fo;
        fo[u"severity"_s] = severityId(f.severity);
        fo[u"message"_s] = f.message;
        findings.append(fo);
    }
    o[u"warnings"_s] = warnings;
    o[u"findings"_s] = findings;
    return o;
}

QJsonObject designAnalysisToJson(const Design &d, const DesignAnalysis &da)
{
    QJsonObject o = analysisToJson(da.cellScheme, da.analysis);
    o[u"design"_s] = true;
    o[u"cells"_s] = QJsonArray::fromStringList(da.cells);
    QJsonArray factors;
    for (const Scheme &s : d.factors)
        factors.append(QJsonObject{{u"name"_s, s.factor.name}, {u"levels"_s, QJsonArray::fromStringList(s.factor.levels)}});
    o[u"factors"_s] = factors;
    o[u"terms"_s] = QJsonArray::fromStringList(da.termNames);
    o[u"column_terms"_s] = jsonArray(da.columnTerm, [&](int t) { return da.termNames[t]; });
    QJsonArray to;
    for (const auto &r : da.termsOrthogonalInDesign) {
        QJsonArray row;
        for (bool b : r)
            row.append(b);
        to.append(row);
    }
    o[u"terms_orthogonal_in_design"_s] = to;
    o[u"empty_cells"_s] = QJsonArray::fromStringList(da.emptyCells);
    const QJsonObject empty = emptyCellsToJson(da.empty);
    for (auto it = empty.constBegin(); it != empty.constEnd(); ++it)
        o[it.key()] = it.value();
    return o;
}

QJsonObject emptyCellsToJson(const EmptyCellEffects &e)
{
    QJsonObject o;
    if (e.emptyCells.isEmpty())
        return o;
    auto weights = [](const std::vector<Weight> &row) { return jsonArray(row, [](const Weight &w) { return jsonNumber(w.value()); }); };
    QJsonArray shifts;
    for (const HypothesisShift &s : e.shifts)
        shifts.append(QJsonObject{{u"coefficient"_s, s.coefficient},
                                  {u"label"_s, s.label},
                                  {u"term"_s, s.term},
                                  {u"full_design"_s, s.before},
                                  {u"now"_s, s.after},
                                  {u"full_design_weights"_s, weights(s.beforeRow)},
                                  {u"weights"_s, weights(s.afterRow)},
                                  {u"empty_cell_weights"_s, QJsonArray::fromStringList(s.emptyWeights)},
                                  {u"reweighted_cells"_s, QJsonArray::fromStringList(s.reweighted)},
                                  {u"words"_s, s.words}});
    QJsonArray unestimable;
    for (const UnestimableCoefficient &u : e.unestimable)
        unestimable.append(QJsonObject{{u"coefficient"_s, u.coefficient},
                                       {u"label"_s, u.label},
                                       {u"term"_s, u.term},
                                       {u"only_in_empty_cells"_s, u.onlyInEmptyCells}});
    o[u"empty_cells_reason"_s] = e.why;
    o[u"estimable"_s] = e.estimable;
    o[u"estimable_rank"_s] = e.rank;
    if (!e.estimable) {
        o[u"not_estimable"_s] = unestimable;
        o[u"leave_out_terms"_s] = QJsonArray::fromStringList(e.leaveOut);
        o[u"refusal"_s] = e.refusal;
        return o;
    }
    o[u"full_design_empty_cell_n"_s] = e.fullCellN;
    o[u"changed_hypotheses"_s] = shifts;
    o[u"unchanged_hypotheses"_s] = QJsonArray::fromStringList(e.unchanged);
    o[u"empty_cells_summary"_s] = e.summary;
    return o;
}

} // namespace cb
