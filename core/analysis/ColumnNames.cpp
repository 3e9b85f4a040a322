#include "core/analysis/ColumnNames.h"

#include <algorithm>
#include <cmath>
#include <optional>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

constexpr size_t kMaxListed = 3;          // a group of more levels is counted, not listed
constexpr qsizetype kMaxCombination = 32; // a longer combination makes no name

using Indices = std::vector<int>;

// The hypothesis row of coding column `column`, or null when the coding has none.
const std::vector<Weight> *hypothesisRow(const Analysis &a, int column)
{
    const size_t r = size_t(column + (a.intercept ? 1 : 0));
    if (!a.fullRank || column < 0 || r >= a.hypotheses.size())
        return nullptr;
    return &a.hypotheses[r];
}

// "A", "A, B", "A, B, C", "5 levels"
QString groupText(const QStringList &levels, const Indices &group)
{
    if (group.size() > kMaxListed)
        return u"%1 levels"_s.arg(group.size());
    QStringList names;
    for (int i : group)
        names << levels[i];
    return names.join(u", "_s);
}

// The sum of the weights at `which`: exact when they all are.
Weight sumOf(const std::vector<Weight> &row, const Indices &which)
{
    const bool exact = std::all_of(which.begin(), which.end(), [&](int i) { return row[size_t(i)].isExact(); });
    if (exact) {
        Rational q = 0;
        for (int i : which)
            q += row[size_t(i)].rational();
        return Weight::exact(q);
    }
    double d = 0;
    for (int i : which)
        d += row[size_t(i)].value();
    return Weight::approx(d);
}

// The polynomial trends over the positions, unweighted and under the planned n, made once per
// naming pass and only when a row needs them (they cost O(k^3) for k levels).
class Trends
{
public:
    explicit Trends(const Scheme &s)
        : m_scheme(s)
    {
    }
    const std::vector<double> &weights(bool weighted) { return fill(weighted).w; }
    const std::vector<std::vector<double>> &basis(bool weighted) { return fill(weighted).basis; }

private:
    struct Set
    {
        std::vector<double> w;
        std::vector<std::vector<double>> basis;
    };
    const Set &fill(bool weighted)
    {
        std::optional<Set> &set = m_sets[weighted ? 1 : 0];
        if (!set) {
            std::vector<double> x;
            for (const Weight &p : m_scheme.factor.positions())
                x.push_back(p.value());
            Set made;
            made.w = weighted ? m_scheme.factor.sizesAsDouble() : std::vector<double>(x.size(), 1.0);
            made.basis = floatPolynomialTrends(x, made.w);
            set = std::move(made);
        }
        return *set;
    }
    const Scheme &m_scheme;
    std::optional<Set> m_sets[2];
};

// "linear", "quadratic", ... when the row is proportional to a polynomial trend over the
// positions, unweighted or under the planned n (the hypotheses of the polynomial schemes).
std::optional<QString> trendName(Trends &trends, const std::vector<double> &r)
{
    const size_t k = r.size();
    if (k < 3)
        return std::nullopt;
    double rr = 0;
    for (double v : r)
        rr += v * v;
    for (bool weighted : {false, true}) {
        const std::vector<double> &w = trends.weights(weighted);
        const auto &basis = trends.basis(weighted);
        for (size_t d = 0; d < basis.size(); ++d) {
            double rt = 0, tt = 0;
            for (size_t i = 0; i < k; ++i) {
                const double t = basis[d][i] * w[i];
                rt += r[i] * t;
                tt += t * t;
            }
            if (std::isfinite(rt) && std::isfinite(tt) && tt > 0 && rt * rt >= (1 - 1e-12) * rr * tt)
                return degreeName(int(d) + 1);
        }
    }
    return std::nullopt;
}

QString hypothesisName(const Scheme &s, const Analysis &a, const std::vector<Weight> &row, int column, Trends &trends)
{
    const QStringList &L = s.factor.levels;
    const int k = int(row.size());
    std::vector<double> r(static_cast<size_t>(k));
    double top = 0, total = 0;
    for (int i = 0; i < k; ++i) {
        r[size_t(i)] = row[size_t(i)].value();
        top = std::max(top, std::abs(r[size_t(i)]));
        total += r[size_t(i)];
    }
    const double tol = 1e-9 * std::max(top, 1e-300);
    const auto same = [tol](double x, double y) { return std::abs(x - y) <= tol; };
    Indices pos, neg;
    for (int i = 0; i < k; ++i) {
        if (r[size_t(i)] > tol)
            pos.push_back(i);
        else if (r[size_t(i)] < -tol)
            neg.push_back(i);
    }
    if (pos.empty() && neg.empty())
        return u"nothing"_s;
    const bool allEqual = [&] {
        for (const Indices *g : {&pos, &neg})
            for (int i : *g)
                if (!same(r[size_t(i)], r[size_t(g->front())]))
                    return false;
        return true;
    }();
    // A mean itself (without an intercept): "A", "mean of A, B".
    if (neg.empty() && allEqual && same(total, 1))
        return pos.size() == 1 ? L[pos[0]] : u"mean of "_s + groupText(L, pos);
    if (same(total, 0) && pos.size() == 1 && int(neg.size()) + 1 == k) {
        // One level minus the mean of all levels, unweighted (sum) or weighted by n.
        const int j = pos[0];
        const std::vector<double> n = s.factor.sizesAsDouble();
        double nTotal = 0;
        for (double v : n)
            nTotal += v;
        bool unweighted = true, weighted = true;
        for (int i = 0; i < k; ++i) {
            const double e = i == j ? 1.0 : 0.0;
            unweighted = unweighted && same(r[size_t(i)], e - 1.0 / k);
            weighted = weighted && same(r[size_t(i)], e - n[size_t(i)] / nTotal);
        }
        if (unweighted)
            return u"%1 vs mean"_s.arg(L[j]);
        if (weighted)
            return u"%1 vs weighted mean"_s.arg(L[j]);
    }
    // A polynomial trend before a difference of averages (k = 4: quadratic is ends vs middle),
    // but one level against another stays a difference (k = 3: linear is the last vs the first).
    if (same(total, 0) && !(pos.size() == 1 && neg.size() == 1))
        if (auto trend = trendName(trends, r))
            return *trend;
    if (same(total, 0) && allEqual) {
        // The difference of two averages, scaled by the positive group's total weight.
        // The group on the right of "vs", named by where it lies when one level stands against it.
        const auto against = [&](const Indices &g, const Indices &one) {
            if (g.size() < 2 || one.size() != 1)
                return groupText(L, g);
            const int at = one[0];
            bool later = true, earlier = true;
            for (size_t i = 0; i < g.size(); ++i) {
                later = later && g[i] == at + 1 + int(i);
                earlier = earlier && g[i] == int(i);
            }
            if (later && g.back() == k - 1)
                return u"later"_s;
            if (earlier && g.back() == at - 1)
                return u"earlier"_s;
            if (int(g.size()) + 1 == k)
                return u"others"_s;
            return groupText(L, g);
        };
        const QString name = u"%1 vs %2"_s.arg(groupText(L, pos), against(neg, pos));
        const Weight scale = sumOf(row, pos);
        if (same(scale.value(), 1))
            return name;
        return u"%1 (%2)"_s.arg(scale.display(), name);
    }
    const size_t h = size_t(column + (a.intercept ? 1 : 0));
    if (h < size_t(a.hypothesisCombinations.size()) && a.hypothesisCombinations[qsizetype(h)].size() <= kMaxCombination)
        return a.hypothesisCombinations[qsizetype(h)];
    return u"column %1"_s.arg(column + 1);
}

bool sameRow(const std::vector<Weight> &a, const std::vector<Weight> &b)
{
    if (a.size() != b.size())
        return false;
    double top = 0;
    for (const Weight &w : a)
        top = std::max(top, std::abs(w.value()));
    for (size_t i = 0; i < a.size(); ++i) {
        if (a[i].isExact() && b[i].isExact()) {
            if (a[i].rational() != b[i].rational())
                return false;
        } else if (std::abs(a[i].value() - b[i].value()) > 1e-9 * top) {
            return false;
        }
    }
    return true;
}

QString generatedName(const Scheme &scheme, const Analysis &analysis, int column, Trends &trends)
{
    if (column < 0 || column >= scheme.columnCount())
        return {};
    if (scheme.kind != SchemeKind::Custom)
        return scheme.columns[size_t(column)].name;
    const std::vector<Weight> *row = hypothesisRow(analysis, column);
    return row ? hypothesisName(scheme, analysis, *row, column, trends) : u"column %1"_s.arg(column + 1);
}

} // namespace

QString generatedColumnName(const Scheme &scheme, const Analysis &analysis, int column)
{
    Trends trends(scheme);
    return generatedName(scheme, analysis, column, trends);
}

bool nameIsStale(const Scheme &scheme, const Analysis &analysis, int column)
{
    if (column < 0 || column >= scheme.columnCount())
        return false;
    const Column &c = scheme.columns[size_t(column)];
    const std::vector<Weight> *row = hypothesisRow(analysis, column);
    return c.named && row && !c.namedFor.empty() && !sameRow(c.namedFor, *row);
}

Scheme withCurrentNames(Scheme scheme)
{
    if (scheme.kind != SchemeKind::Custom)
        return scheme;
    const bool needed = std::any_of(scheme.columns.begin(), scheme.columns.end(),
                                    [](const Column &c) { return !c.named || c.namedFor.empty(); });
    if (!needed || !scheme.validate().isEmpty())
        return scheme;
    const Analysis a = analyze(scheme, AnalysisScope::Hypotheses);
    Trends trends(scheme);
    QStringList taken;
    for (const Column &c : scheme.columns)
        if (c.named)
            taken << c.name;
    for (int j = 0; j < scheme.columnCount(); ++j) {
        Column &c = scheme.columns[size_t(j)];
        if (c.named) {
            if (c.namedFor.empty())
                if (const std::vector<Weight> *row = hypothesisRow(a, j))
                    c.namedFor = *row;
            continue;
        }
        QString name = generatedName(scheme, a, j, trends);
        if (taken.contains(name))
            name = u"%1 (%2)"_s.arg(name).arg(j + 1);
        taken << name;
        c.name = name;
    }
    return scheme;
}

} // namespace cb
