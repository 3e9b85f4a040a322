#include "core/model/Design.h"

#include "core/report/AnalysisJson.h"
#include "core/analysis/HypothesisText.h"
#include "core/files/SchemeFile.h"
#include "core/base/JsonArray.h"

#include <QJsonArray>
#include <QJsonDocument>

#include <algorithm>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

QString factorLabel(const Design &d, int f)
{
    const QString n = d.factors[size_t(f)].factor.name;
    return n.isEmpty() ? QString(QChar(u'A' + f)) : n;
}

Weight multiply(const Weight &a, const Weight &b)
{
    if (a.isExact() && b.isExact())
        return Weight::exact(a.rational() * b.rational());
    return Weight::approx(a.value() * b.value());
}

// Columns of one term over the cells: Kronecker products, factor by factor.
std::vector<Column> termColumns(const Design &d, const Term &t)
{
    const int cells = d.cellCount();
    // For each factor, the list of vectors over its levels that enter the product.
    std::vector<std::vector<Column>> perFactor(d.factors.size());
    for (size_t f = 0; f < d.factors.size(); ++f) {
        const Scheme &s = d.factors[f];
        if (std::find(t.factors.begin(), t.factors.end(), int(f)) != t.factors.end()) {
            perFactor[f] = s.columns;
        } else if (int(f) == t.within) {
            for (int l = 0; l < s.levelCount(); ++l) {
                Column c{s.factor.levels[l], std::vector<Weight>(size_t(s.levelCount()), Weight(0))};
                c.weights[size_t(l)] = Weight(1);
                perFactor[f].push_back(std::move(c));
            }
        } else {
            perFactor[f].push_back(Column{QString(), std::vector<Weight>(size_t(s.levelCount()), Weight(1))});
        }
    }
    std::vector<Column> out{Column{QString(), std::vector<Weight>(size_t(cells), Weight(1))}};
    std::vector<std::vector<int>> choice{{}};
    // Enumerate combinations, the term's first factor slowest.
    std::vector<size_t> idx(d.factors.size(), 0);
    std::vector<std::vector<int>> levelsOfCells(static_cast<size_t>(cells));
    for (int cell = 0; cell < cells; ++cell)
        levelsOfCells[size_t(cell)] = cellLevels(d, cell);
    std::vector<Column> result;
    while (true) {
        Column c;
        QStringList nameParts;
        QString withinPart;
        c.weights.assign(size_t(cells), Weight(1));
        for (int cell = 0; cell < cells; ++cell) {
            const std::vector<int> &lv = levelsOfCells[size_t(cell)];
            Weight w(1);
            for (size_t f = 0; f < d.factors.size(); ++f)
                w = multiply(w, perFactor[f][idx[f]].weights[size_t(lv[f])]);
            c.weights[size_t(cell)] = std::move(w);
        }
        for (size_t f = 0; f < d.factors.size(); ++f) {
            if (int(f) == t.within)
                withinPart = perFactor[f][idx[f]].name;
            else if (!perFactor[f][idx[f]].name.isEmpty())
                nameParts << perFactor[f][idx[f]].name;
        }
        c.name = nameParts.join(kCrossJoiner);
        if (!withinPart.isEmpty())
            c.name += u" (within %1)"_s.arg(withinPart);
        result.push_back(std::move(c));
        // Next combination: the last factor changes fastest.
        int f = int(d.factors.size()) - 1;
        while (f >= 0 && ++idx[size_t(f)] == perFactor[size_t(f)].size()) {
            idx[size_t(f)] = 0;
            --f;
        }
        if (f < 0)
            break;
    }
    return result;
}

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

std::vector<int> cellLevels(const Design &d, int cell)
{
    std::vector<int> out(d.factors.size());
    for (int f = int(d.factors.size()) - 1; f >= 0; --f) {
        const int k = d.factors[size_t(f)].levelCount();
        out[size_t(f)] = cell % k;
        cell /= k;
    }
    return out;
}

int cellIndex(const Design &d, const std::vector<int> &levels)
{
    int idx = 0;
    for (size_t f = 0; f < d.factors.size(); ++f)
        idx = idx * d.factors[f].levelCount() + levels[f];
    return idx;
}

int Design::cellCount() const
{
    int n = 1;
    for (const Scheme &s : factors)
        n *= std::max(1, s.levelCount());
    return n;
}

QStringList Design::cellNames() const
{
    const QString joiner = cellJoiner();
    QStringList out;
    for (int c = 0; c < cellCount(); ++c) {
        const std::vector<int> lv = cellLevels(*this, c);
        QStringList parts;
        for (size_t f = 0; f < factors.size(); ++f)
            parts << factors[f].factor.levels[lv[f]];
        out << parts.join(joiner);
    }
    return out;
}

std::vector<Term> Design::fullFactorial(int factorCount)
{
    std::vector<Term> out;
    for (int mask = 1; mask < (1 << factorCount); ++mask) {
        Term t;
        for (int f = 0; f < factorCount; ++f)
            if (mask & (1 << f))
                t.factors.push_back(f);
        out.push_back(t);
    }
    std::stable_sort(out.begin(), out.end(), [](const Term &a, const Term &b) { return a.factors.size() < b.factors.size(); });
    return out;
}

QString Design::validate() const
{
    if (factors.size() < 2 || factors.size() > size_t(kMaxDesignFactors))
        return u"design.factors: a design crosses 2 or 3 factors, got %1"_s.arg(factors.size());
    for (size_t f = 0; f < factors.size(); ++f) {
        if (QString e = factors[f].validate(); !e.isEmpty())
            return u"design.factors[%1] (%2): %3"_s.arg(f).arg(factorLabel(*this, int(f)), e);
        for (size_t g = 0; g < f; ++g)
            if (!factors[f].factor.name.isEmpty() && factors[f].factor.name == factors[g].factor.name)
                return u"design.factors[%1]: the name '%2' is used twice; factor names must differ"_s.arg(f).arg(factors[f].factor.name);
    }
    long long cells = 1;
    for (const Scheme &s : factors)
        cells *= s.levelCount();
    if (cells > kMaxCells)
        return u"design.factors: %1 cells (the product of the factors' level counts); at most %2 are supported"_s.arg(cells).arg(kMaxCells);
    if (terms.empty())
        return u"design.terms: give at least one term"_s;
    for (size_t t = 0; t < terms.size(); ++t) {
        const Term &term = terms[t];
        if (term.factors.empty())
            return u"design.terms[%1]: a term needs at least one factor"_s.arg(t);
        for (int f : term.factors)
            if (f < 0 || f >= int(factors.size()))
                return u"design.terms[%1]: unknown factor"_s.arg(t);
        if (term.within >= int(factors.size()) || (term.within >= 0 && std::find(term.factors.begin(), term.factors.end(), term.within) != term.factors.end()))
            return u"design.terms[%1]: 'within' must name another factor of the design"_s.arg(t);
    }
    if (!cellN.empty()) {
        if (cellN.size() != size_t(cells))
            return u"design.cell_n: %1 sizes for %2 cells; give one per cell, the first factor varying slowest"_s.arg(cellN.size()).arg(cells);
        for (size_t c = 0; c < cellN.size(); ++c)
            if (cellN[c] < 0)
                return u"design.cell_n[%1]: negative size %2; sizes must be 0 (an empty cell) or more"_s.arg(c).arg(rationalToString(cellN[c]));
    }
    return {};
}

QString termName(const Design &d, const Term &t)
{
    QStringList parts;
    for (int f : t.factors)
        parts << factorLabel(d, f);
    QString n = parts.join(kCrossJoiner);
    if (t.within >= 0)
        n += u" within "_s + factorLabel(d, t.within);
    return n;
}

Result<Scheme> cellScheme(const Design &d)
{
    using R = Result<Scheme>;
    if (QString e = d.validate(); !e.isEmpty())
        return R::failure(e);
    Scheme s;
    s.kind = SchemeKind::Custom;
    s.intercept = d.intercept;
    s.factor.levels = d.cellNames();
    QStringList names;
    for (const Scheme &f : d.factors)
        names << f.factor.name;
    s.factor.name = names.join(kCrossJoiner);
    if (!d.cellN.empty()) {
        bool anyEmpty = false;
        for (const Rational &n : d.cellN)
            anyEmpty = anyEmpty || n == 0;
        if (!anyEmpty)
            s.factor.plannedN = d.cellN;
    }
    for (const Term &t : d.terms)
        for (Column &c : termColumns(d, t))
            s.columns.push_back(std::move(c));
    if (s.columnCount() > s.levelCount())
        return R::failure(u"design.terms: %1 columns for %2 cells; leave out a term (a nested term replaces a main effect plus its interaction)"_s
                              .arg(s.columnCount()).arg(s.levelCount()));
    return R(std::move(s));
}

DesignAnalysis analyzeDesign(const Design &d)
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
    for (size_t c = 0; c < d.cellN.size(); ++c)
        if (d.cellN[c] == 0)
            out.emptyCells << out.cells[qsizetype(c)];
    auto cs = cellScheme(d);
    if (!cs) {
        addProblem(cs.error());
        return out;
    }
    out.cellScheme = cs.take();
    for (size_t t = 0; t < d.terms.size(); ++t)
        out.columnTerm.insert(out.columnTerm.end(), termColumns(d, d.terms[t]).size(), int(t));
    if (!out.emptyCells.isEmpty()) {
        // Refuse rather than guess: a cell mean with no observations cannot enter any hypothesis.
        out.analysis.levels = out.cells;
        addProblem(u"empty cells (planned n = 0): %1. Every cell needs observations for the cell-means hypotheses; "
                   "give them a planned n or leave out the terms that need them"_s.arg(out.emptyCells.join(u", "_s)));
        return out;
    }
    out.analysis = analyze(out.cellScheme);
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
            const QString text = differenceOfDifferences(d, a.hypotheses[size_t(j + off)], t.factors, out.cells);
            if (text.isEmpty())
                continue;
            out.analysis.hypothesisCombinations[j + off] = text;
            out.analysis.hypothesisSymbols[j + off] = u"b%1: %2 = 0"_s.arg(j + 1).arg(text);
            out.analysis.hypothesisWords[j + off] = u"a difference of differences (interaction): "_s + text;
        }
    }

    // A "main effect" that only compares cells at one level of another factor is a simple effect.
    if (a.fullRank) {
        const int off = a.intercept ? 1 : 0;
        for (int j = 0; j < a.columnCount; ++j) {
            const Term &t = d.terms[size_t(out.columnTerm[size_t(j)])];
            if (t.within >= 0)
                continue;
            for (size_t g = 0; g < d.factors.size(); ++g) {
                if (std::find(t.factors.begin(), t.factors.end(), int(g)) != t.factors.end())
                    continue;
                std::vector<bool> used(size_t(d.factors[g].levelCount()), false);
                for (int c = 0; c < a.levelCount; ++c)
                    if (!a.hypotheses[size_t(j + off)][size_t(c)].isZero() && std::abs(a.hypotheses[size_t(j + off)][size_t(c)].value()) > 1e-12)
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
    return o;
}

QByteArray designToJson(const Design &d)
{
    QJsonArray factors;
    for (const Scheme &s : d.factors) {
        QJsonObject f = schemeToObject(s);
        f.remove(u"intercept"_s);
        f.remove(u"notes"_s);
        factors.append(f);
    }
    QJsonArray terms;
    for (const Term &t : d.terms) {
        QJsonArray names;
        for (int f : t.factors)
            names.append(factorLabel(d, f));
        QJsonObject to{{u"factors"_s, names}};
        if (t.within >= 0)
            to[u"within"_s] = factorLabel(d, t.within);
        terms.append(to);
    }
    QJsonObject design{{u"factors"_s, factors}, {u"terms"_s, terms}};
    if (!d.cellN.empty()) {
        design[u"cell_n"_s] = jsonArray(d.cellN, [](const Rational &r) { return rationalToString(r); });
    }
    QJsonObject root{{u"format"_s, QString::fromLatin1(kSchemeFormatTag)}, {u"version"_s, kSchemeFormatVersion},
                     {u"design"_s, design}, {u"intercept"_s, d.intercept}, {u"notes"_s, d.notes}};
    return QJsonDocument(root).toJson(QJsonDocument::Indented);
}

bool isDesignJson(const QByteArray &data)
{
    return QJsonDocument::fromJson(data).object().contains(u"design"_s);
}

Result<Design> designFromJson(const QByteArray &data, const QString &where)
{
    using R = Result<Design>;
    auto root = schemeDocumentRoot(data, where);
    if (!root)
        return R::failure(root.error());
    auto fail = [&](const QString &field, const QString &what) { return R::failure(u"%1: field '%2': %3"_s.arg(where, field, what)); };
    const QJsonValue dv = root->value(u"design"_s);
    if (!dv.isObject())
        return fail(u"design"_s, u"expected an object with factors and terms"_s);
    const QJsonObject dobj = dv.toObject();
    Design d;
    const QJsonArray factors = dobj.value(u"factors"_s).toArray();
    if (!dobj.value(u"factors"_s).isArray() || factors.size() < 2 || factors.size() > kMaxDesignFactors)
        return fail(u"design.factors"_s, u"expected an array of 2 or 3 factors"_s);
    for (qsizetype f = 0; f < factors.size(); ++f) {
        if (!factors[f].isObject())
            return fail(u"design.factors[%1]"_s.arg(f), u"expected an object with factor, scheme and columns"_s);
        auto s = schemeFromObject(factors[f].toObject(), where, u"design.factors[%1]."_s.arg(f));
        if (!s)
            return R::failure(s.error());
        d.factors.push_back(s.take());
    }
    auto factorIndex = [&](const QJsonValue &v) -> int {
        for (size_t f = 0; f < d.factors.size(); ++f)
            if (v.toString() == factorLabel(d, int(f)))
                return int(f);
        return -1;
    };
    const QJsonValue tv = dobj.value(u"terms"_s);
    if (tv.isUndefined()) {
        d.terms = Design::fullFactorial(int(d.factors.size()));
    } else {
        if (!tv.isArray())
            return fail(u"design.terms"_s, u"expected an array of terms such as {\"factors\": [\"A\", \"B\"]}"_s);
        const QJsonArray terms = tv.toArray();
        for (qsizetype t = 0; t < terms.size(); ++t) {
            const QString path = u"design.terms[%1]"_s.arg(t);
            const QJsonObject to = terms[t].toObject();
            if (!terms[t].isObject() || !to.value(u"factors"_s).isArray())
                return fail(path, u"expected an object with a \"factors\" array of factor names"_s);
            Term term;
            const QJsonArray names = to.value(u"factors"_s).toArray();
            for (qsizetype i = 0; i < names.size(); ++i) {
                if (!names[i].isString())
                    return fail(u"%1.factors[%2]"_s.arg(path).arg(i), u"expected a factor name (a string)"_s);
                const int f = factorIndex(names[i]);
                if (f < 0)
                    return fail(u"%1.factors[%2]"_s.arg(path).arg(i), u"%1 is not a factor of the design"_s.arg(quoted(names[i].toString())));
                term.factors.push_back(f);
            }
            std::sort(term.factors.begin(), term.factors.end());
            if (to.contains(u"within"_s)) {
                if (!to.value(u"within"_s).isString())
                    return fail(path + u".within"_s, u"expected a factor name (a string)"_s);
                term.within = factorIndex(to.value(u"within"_s));
                if (term.within < 0)
                    return fail(path + u".within"_s, u"%1 is not a factor of the design"_s.arg(quoted(to.value(u"within"_s).toString())));
            }
            d.terms.push_back(term);
        }
    }
    if (dobj.contains(u"cell_n"_s) && !dobj.value(u"cell_n"_s).isNull()) {
        if (!dobj.value(u"cell_n"_s).isArray())
            return fail(u"design.cell_n"_s, u"expected an array of planned cell sizes such as [\"12\", \"10\"], one per cell"_s);
        const QJsonArray n = dobj.value(u"cell_n"_s).toArray();
        for (qsizetype c = 0; c < n.size(); ++c) {
            if (!n[c].isString() && !n[c].isDouble())
                return fail(u"design.cell_n[%1]"_s.arg(c), u"expected a planned cell size of 0 or more, as a string such as \"12\" or a number"_s);
            auto w = parseWeight(n[c].isString() ? n[c].toString() : doubleToString(n[c].toDouble()));
            if (!w || !w->isExact() || w->rational() < 0)
                return fail(u"design.cell_n[%1]"_s.arg(c), u"expected a planned cell size of 0 or more"_s);
            d.cellN.push_back(w->rational());
        }
    }
    const QJsonValue iv = root->value(u"intercept"_s);
    if (!iv.isUndefined() && !iv.isBool())
        return fail(u"intercept"_s, u"expected true or false"_s);
    d.intercept = iv.toBool(true);
    const QJsonValue nv = root->value(u"notes"_s);
    if (!nv.isUndefined() && !nv.isString())
        return fail(u"notes"_s, u"expected a string"_s);
    d.notes = nv.toString();
    if (QString e = d.validate(); !e.isEmpty())
        return R::failure(where + u": "_s + e);
    return R(std::move(d));
}

} // namespace cb
