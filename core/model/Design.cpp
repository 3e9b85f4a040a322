#include "core/model/Design.h"

#include <algorithm>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

Weight multiply(const Weight &a, const Weight &b)
{
    if (a.isExact() && b.isExact())
        return Weight::exact(a.rational() * b.rational());
    return Weight::approx(a.value() * b.value());
}

} // namespace

QString factorLabel(const Design &d, int f)
{
    const QString n = d.factors[size_t(f)].factor.name;
    return n.isEmpty() ? QString(QChar(u'A' + f)) : n;
}

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

} // namespace cb
