#include "core/analysis/EmptyCells.h"

#include "core/analysis/HypothesisText.h"

#include <Eigen/LU>

#include <algorithm>
#include <cmath>
#include <numeric>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

// At most this many cells are listed in a sentence; the rest are counted.
constexpr int kCellsListed = 6;

QString listed(const QStringList &items)
{
    if (items.size() <= kCellsListed)
        return items.join(u", "_s);
    return u"%1 and %2 more"_s.arg(items.mid(0, kCellsListed).join(u", "_s)).arg(items.size() - kCellsListed);
}

bool sameWeight(const Weight &a, const Weight &b)
{
    if (a.isExact() && b.isExact())
        return a.rational() == b.rational();
    return std::abs(a.value() - b.value()) <= 1e-9 * std::max({1.0, std::abs(a.value()), std::abs(b.value())});
}

// The design rows ([1 | C], or C) at the kept cells, as doubles.
Eigen::MatrixXd keptRows(const Scheme &cells, const std::vector<int> &kept)
{
    const int off = cells.intercept ? 1 : 0;
    Eigen::MatrixXd x(Eigen::Index(kept.size()), cells.columnCount() + off);
    for (size_t r = 0; r < kept.size(); ++r) {
        if (off)
            x(Eigen::Index(r), 0) = 1.0;
        for (int c = 0; c < cells.columnCount(); ++c)
            x(Eigen::Index(r), c + off) = cells.columns[size_t(c)].weights[size_t(kept[r])].value();
    }
    return x;
}

Eigen::FullPivLU<Eigen::MatrixXd> decomposed(const Eigen::MatrixXd &x)
{
    Eigen::FullPivLU<Eigen::MatrixXd> lu(x);
    lu.setThreshold(1e-10);
    return lu;
}

// The term of each coefficient (-1 for the intercept).
std::vector<int> coefficientTerms(const Design &d, bool intercept)
{
    std::vector<int> out;
    if (intercept)
        out.push_back(-1);
    for (size_t t = 0; t < d.terms.size(); ++t)
        out.insert(out.end(), termColumns(d, d.terms[t]).size(), int(t));
    return out;
}

QString coefficientTermName(const Design &d, int term)
{
    return term < 0 ? u"the constant"_s : termName(d, d.terms[size_t(term)]);
}

QString weightText(const Weight &w)
{
    return w.display(true);
}

} // namespace

std::vector<Rational> filledCellN(const Design &d)
{
    Rational sum(0);
    int filled = 0;
    for (const Rational &n : d.cellN)
        if (n > 0) {
            sum += n;
            ++filled;
        }
    if (filled == 0 || filled == int(d.cellN.size()))
        return d.cellN;
    const Rational mean = sum / filled;
    std::vector<Rational> out = d.cellN;
    for (Rational &n : out)
        if (n == 0)
            n = mean;
    return out;
}

Scheme keptCellsScheme(const Scheme &cells, const std::vector<int> &kept, const std::vector<Rational> &cellN)
{
    Scheme s = cells;
    s.factor.levels.clear();
    s.factor.plannedN.clear();
    for (int c : kept) {
        s.factor.levels << cells.factor.levels[c];
        if (!cellN.empty())
            s.factor.plannedN.push_back(cellN[size_t(c)]);
    }
    for (Column &col : s.columns) {
        std::vector<Weight> w;
        w.reserve(kept.size());
        for (int c : kept)
            w.push_back(col.weights[size_t(c)]);
        col.weights = std::move(w);
    }
    return s;
}

std::vector<Weight> overAllCells(const std::vector<Weight> &row, const std::vector<int> &kept, int cellCount)
{
    std::vector<Weight> out(size_t(cellCount), Weight(0));
    for (size_t r = 0; r < kept.size() && r < row.size(); ++r)
        out[size_t(kept[r])] = row[r];
    return out;
}

EmptyCellEffects checkEmptyCells(const Design &d, const Scheme &cells, const std::vector<int> &kept, const QString &why)
{
    EmptyCellEffects e;
    e.why = why;
    const QStringList names = cells.factor.levels;
    std::vector<bool> isKept(size_t(names.size()), false);
    for (int c : kept)
        isKept[size_t(c)] = true;
    for (qsizetype c = 0; c < names.size(); ++c)
        if (!isKept[size_t(c)])
            e.emptyCells << names[c];
    const Eigen::MatrixXd x = keptRows(cells, kept);
    e.coefficients = int(x.cols());
    if (kept.empty()) {
        e.estimable = false;
        e.refusal = u"every cell is empty (%1): there is nothing to estimate; give the cells observations"_s.arg(why);
        return e;
    }
    const auto lu = decomposed(x);
    e.rank = int(lu.rank());
    e.estimable = e.rank == e.coefficients;
    if (e.estimable)
        return e;

    // A coefficient b_j can be estimated when the unit vector e_j lies in X_r's row space, that is
    // when every vector of X_r's null space is 0 at j.
    const Eigen::MatrixXd kernel = lu.kernel();
    const std::vector<int> terms = coefficientTerms(d, cells.intercept);
    const int off = cells.intercept ? 1 : 0;
    QStringList parts;
    for (int j = 0; j < e.coefficients; ++j) {
        if (kernel.row(j).norm() <= 1e-9 * std::max(1.0, kernel.norm()))
            continue;
        UnestimableCoefficient u;
        u.coefficient = j;
        u.label = coefficientLabel(cells.intercept, j, j < off ? kInterceptName.toString() : cells.columns[size_t(j - off)].name);
        u.term = coefficientTermName(d, terms[size_t(j)]);
        u.onlyInEmptyCells = x.col(j).cwiseAbs().maxCoeff() <= 1e-12;
        parts << u"%1 (%2%3)"_s.arg(u.label, terms[size_t(j)] < 0 ? u.term : u"term "_s + u.term,
                                    u.onlyInEmptyCells ? u"; its only non-zero weights are in the empty cell%1"_s.arg(e.emptyCells.size() > 1 ? u"s"_s : QString())
                                                       : QString());
        e.unestimable.push_back(std::move(u));
    }
    // Which single term, left out, lets the others be estimated: the highest order first.
    std::vector<int> order(d.terms.size());
    std::iota(order.begin(), order.end(), 0);
    std::stable_sort(order.begin(), order.end(), [&](int a, int b) {
        return d.terms[size_t(a)].factors.size() + (d.terms[size_t(a)].within >= 0 ? 1 : 0)
             > d.terms[size_t(b)].factors.size() + (d.terms[size_t(b)].within >= 0 ? 1 : 0);
    });
    for (int t : order) {
        std::vector<Eigen::Index> keep;
        for (int j = 0; j < e.coefficients; ++j)
            if (terms[size_t(j)] != t)
                keep.push_back(j);
        if (keep.empty())
            continue;
        Eigen::MatrixXd rest(x.rows(), Eigen::Index(keep.size()));
        for (size_t j = 0; j < keep.size(); ++j)
            rest.col(Eigen::Index(j)) = x.col(keep[j]);
        if (decomposed(rest).rank() == Eigen::Index(keep.size()))
            e.leaveOut << termName(d, d.terms[size_t(t)]);
    }
    const bool several = e.emptyCells.size() > 1;
    QString advice;
    if (!e.leaveOut.isEmpty())
        advice = e.leaveOut.size() == 1
            ? u"Leave out the term %1: the other terms can be estimated without it"_s.arg(e.leaveOut.front())
            : u"Leave out the term %1 (or one of %2): the other terms can be estimated without it"_s.arg(
                  e.leaveOut.front(), e.leaveOut.mid(1).join(u", "_s));
    else
        advice = u"No single term can be left out to fix this: leave out several terms, or give the empty cell%1 observations"_s.arg(
            several ? u"s"_s : QString());
    e.refusal = u"empty cell%1 (%2): %3. The chosen terms cannot be estimated from the %4 with observations (rank %5 for %6 "
                "coefficients). Not estimable: %7. %8"_s
                    .arg(several ? u"s"_s : QString(), why, listed(e.emptyCells))
                    .arg(kept.size() == 1 ? u"1 cell"_s : u"%1 cells"_s.arg(kept.size()))
                    .arg(e.rank)
                    .arg(e.coefficients)
                    .arg(parts.join(u"; "_s), advice);
    return e;
}

void compareWithFullDesign(EmptyCellEffects &e, const Design &d, const std::vector<int> &kept, const Analysis &reduced)
{
    Design full = d;
    full.cellN = filledCellN(d);
    const auto fullCells = cellScheme(full);
    if (!fullCells || reduced.hypotheses.empty())
        return;
    Scheme fullScheme = fullCells.value();
    // cellScheme leaves the sizes out when a cell is empty; filled, none is.
    const Analysis a = analyze(fullScheme);
    if (!a.fullRank || a.hypotheses.size() != reduced.hypotheses.size())
        return;
    Rational fill(0);
    for (size_t c = 0; c < d.cellN.size(); ++c)
        if (d.cellN[c] == 0)
            fill = full.cellN[c];
    e.fullCellN = d.cellN.empty() ? u"equal sizes"_s : rationalToString(fill, true);
    const QStringList names = fullScheme.factor.levels;
    const std::vector<int> terms = coefficientTerms(d, reduced.intercept);
    std::vector<bool> isKept(size_t(names.size()), false);
    for (int c : kept)
        isKept[size_t(c)] = true;
    const std::vector<Rational> ones(size_t(names.size()), Rational(1));
    QStringList changed;
    for (size_t j = 0; j < a.hypotheses.size(); ++j) {
        const std::vector<Weight> before = a.hypotheses[j];
        const std::vector<Weight> after = overAllCells(reduced.hypotheses[j], kept, int(names.size()));
        const QString label = coefficientLabel(reduced.intercept, int(j), reduced.coefficientNames.value(qsizetype(j)));
        bool same = true;
        for (size_t c = 0; c < before.size() && same; ++c)
            same = sameWeight(before[c], after[c]);
        if (same) {
            e.unchanged << label;
            continue;
        }
        HypothesisShift s;
        s.coefficient = int(j);
        s.label = label;
        s.term = coefficientTermName(d, terms[j]);
        s.beforeRow = before;
        s.afterRow = after;
        const bool isIntercept = reduced.intercept && j == 0;
        s.before = describeHypothesis(before, names, ones, isIntercept, label).combination;
        s.after = describeHypothesis(after, names, ones, isIntercept, label).combination;
        for (qsizetype c = 0; c < names.size(); ++c) {
            if (!isKept[size_t(c)]) {
                if (!before[size_t(c)].isZero())
                    s.emptyWeights << u"%1 %2"_s.arg(names[c], weightText(before[size_t(c)]));
            } else if (!sameWeight(before[size_t(c)], after[size_t(c)])) {
                s.reweighted << u"%1 %2 \u2192 %3"_s.arg(names[c], weightText(before[size_t(c)]), weightText(after[size_t(c)]));
            }
        }
        QString sentence = u"%1 (%2) now tests %3 = 0 instead of %4 = 0"_s.arg(s.label, s.term, s.after, s.before);
        if (!s.emptyWeights.isEmpty())
            sentence += u"; in the full design it weighed the empty cell%1 (%2)"_s.arg(s.emptyWeights.size() > 1 ? u"s"_s : QString(),
                                                                                     listed(s.emptyWeights));
        if (!s.reweighted.isEmpty())
            sentence += u"; it now weighs %1 %2 differently (%3)"_s.arg(s.reweighted.size())
                            .arg(s.reweighted.size() == 1 ? u"cell mean"_s : u"cell means"_s, listed(s.reweighted));
        s.words = sentence;
        changed << s.label;
        e.shifts.push_back(std::move(s));
    }
    const QString cellsText = u"empty cell%1 %2"_s.arg(e.emptyCells.size() > 1 ? u"s"_s : QString(), listed(e.emptyCells));
    const QString against = d.cellN.empty() ? u"the full design (every cell, equal sizes)"_s
                                            : u"the full design (the same terms, the empty cell%1 at the mean size of the others, %2)"_s.arg(
                                                  e.emptyCells.size() > 1 ? u"s"_s : QString(), e.fullCellN);
    if (changed.isEmpty())
        e.summary = u"the %1 (%2) change%3 no hypothesis: every coefficient tests what it tests in %4"_s.arg(
            cellsText, e.why, e.emptyCells.size() > 1 ? QString() : u"s"_s, against);
    else
        e.summary = u"the %1 (%2) change%3 what %4 of %5 coefficients test compared with %6: %7%8"_s
                        .arg(cellsText, e.why, e.emptyCells.size() > 1 ? QString() : u"s"_s)
                        .arg(changed.size())
                        .arg(a.hypotheses.size())
                        .arg(against, changed.join(u", "_s),
                             e.unchanged.isEmpty() ? QString() : u"; unchanged: "_s + e.unchanged.join(u", "_s));
}

} // namespace cb
