#include "core/model/Scheme.h"

#include "core/base/NameTable.h"

#include <algorithm>
#include <cmath>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

struct SchemeInfo
{
    SchemeKind value;
    const char16_t *id;
    const char16_t *title;
    const char16_t *summary;
    bool usesReference;
};

constexpr SchemeInfo kSchemes[] = {
    {SchemeKind::Indicator, u"indicator", u"Indicator (one-hot)",
     u"One column per level. Without an intercept each coefficient is that level's mean; with an intercept the design is rank deficient.", false},
    {SchemeKind::Treatment, u"treatment", u"Treatment (dummy)",
     u"Each coefficient is a level's mean minus the reference level's mean; the intercept is the reference mean.", true},
    {SchemeKind::Sum, u"sum", u"Sum (effect, deviation)",
     u"Each coefficient is a level's mean minus the unweighted mean of all level means; the base level is coded -1.", true},
    {SchemeKind::WeightedEffect, u"weighted-effect", u"Weighted effect",
     u"Each coefficient is a level's mean minus the mean weighted by the planned group sizes (Sweeney & Ulveling 1972).", true},
    {SchemeKind::Simple, u"simple", u"Simple",
     u"Each coefficient is a level's mean minus the reference mean; the intercept is the unweighted mean of the level means.", true},
    {SchemeKind::Helmert, u"helmert", u"Helmert",
     u"Each coefficient is a level's mean minus the mean of all later levels.", false},
    {SchemeKind::ReverseHelmert, u"reverse-helmert", u"Reverse Helmert",
     u"Each coefficient is a level's mean minus the mean of all earlier levels.", false},
    {SchemeKind::Successive, u"successive", u"Successive differences",
     u"Each coefficient is a level's mean minus the previous level's mean.", false},
    {SchemeKind::Polynomial, u"polynomial", u"Orthogonal polynomial",
     u"Linear, quadratic, ... trends over the level positions, orthogonal to each other.", false},
    {SchemeKind::Custom, u"custom", u"Custom",
     u"Weights typed by hand.", false},
};

const SchemeInfo &info(SchemeKind kind)
{
    return rowOf(kSchemes, kind);
}

// Columns from closed forms; each scheme's hypotheses are checked exactly in TestSchemes.
std::vector<Column> comparisonColumns(const Factor &f, SchemeKind kind, int ref)
{
    const int k = f.levelCount();
    const QStringList &L = f.levels;
    std::vector<Column> cols;
    auto column = [k](QString name) {
        return Column{std::move(name), std::vector<Weight>(size_t(k), Weight(0))};
    };
    switch (kind) {
    case SchemeKind::Indicator:
        for (int j = 0; j < k; ++j) {
            Column c = column(L[j]);
            c.weights[size_t(j)] = Weight(1);
            cols.push_back(std::move(c));
        }
        break;
    case SchemeKind::Treatment:
    case SchemeKind::Simple:
        for (int j = 0; j < k; ++j) {
            if (j == ref)
                continue;
            Column c = column(u"%1 vs %2"_s.arg(L[j], L[ref]));
            for (int i = 0; i < k; ++i) {
                Rational v = kind == SchemeKind::Simple ? Rational(-1, k) : Rational(0);
                if (i == j)
                    v += 1;
                c.weights[size_t(i)] = Weight::exact(v);
            }
            cols.push_back(std::move(c));
        }
        break;
    case SchemeKind::Sum:
    case SchemeKind::WeightedEffect: {
        const std::vector<Rational> n = f.sizes();
        for (int j = 0; j < k; ++j) {
            if (j == ref)
                continue;
            Column c = column(kind == SchemeKind::Sum ? u"%1 vs mean"_s.arg(L[j]) : u"%1 vs weighted mean"_s.arg(L[j]));
            c.weights[size_t(j)] = Weight(1);
            c.weights[size_t(ref)] = kind == SchemeKind::Sum ? Weight(-1) : Weight::exact(-n[size_t(j)] / n[size_t(ref)]);
            cols.push_back(std::move(c));
        }
        break;
    }
    case SchemeKind::Helmert:
        // Column i: (k-i-1)/(k-i) at level i, -1/(k-i) at each later level (0-based i).
        for (int i = 0; i + 1 < k; ++i) {
            Column c = column(u"%1 vs later"_s.arg(L[i]));
            const int later = k - i - 1;
            c.weights[size_t(i)] = Weight::exact(Rational(later, later + 1));
            for (int l = i + 1; l < k; ++l)
                c.weights[size_t(l)] = Weight::exact(Rational(-1, later + 1));
            cols.push_back(std::move(c));
        }
        break;
    case SchemeKind::ReverseHelmert:
        // Column j (level j+1, 0-based): -1/(j+2) on earlier levels, (j+1)/(j+2) on level j+1.
        for (int j = 0; j + 1 < k; ++j) {
            Column c = column(u"%1 vs earlier"_s.arg(L[j + 1]));
            for (int l = 0; l <= j; ++l)
                c.weights[size_t(l)] = Weight::exact(Rational(-1, j + 2));
            c.weights[size_t(j + 1)] = Weight::exact(Rational(j + 1, j + 2));
            cols.push_back(std::move(c));
        }
        break;
    case SchemeKind::Successive:
        // Column i (0-based, comparing level i+1 with level i): -(k-i-1)/k up to level i, (i+1)/k after.
        for (int i = 0; i + 1 < k; ++i) {
            Column c = column(u"%1 vs %2"_s.arg(L[i + 1], L[i]));
            for (int l = 0; l < k; ++l)
                c.weights[size_t(l)] = Weight::exact(l <= i ? Rational(-(k - i - 1), k) : Rational(i + 1, k));
            cols.push_back(std::move(c));
        }
        break;
    default:
        break;
    }
    return cols;
}

} // namespace

QString degreeName(int degree)
{
    static const char16_t *names[] = {u"constant", u"linear", u"quadratic", u"cubic", u"quartic", u"quintic"};
    if (degree < 6)
        return QString::fromUtf16(names[degree]);
    return u"degree %1"_s.arg(degree);
}

QString schemeId(SchemeKind kind) { return QString::fromUtf16(info(kind).id); }
QString schemeTitle(SchemeKind kind) { return QString::fromUtf16(info(kind).title); }
QString schemeSummary(SchemeKind kind) { return QString::fromUtf16(info(kind).summary); }
bool schemeUsesReference(SchemeKind kind) { return info(kind).usesReference; }

std::optional<SchemeKind> schemeFromId(const QString &id)
{
    return valueFromId(kSchemes, id);
}

QString schemeIdList(bool withCustom)
{
    return idList(kSchemes, [withCustom](SchemeKind k) { return withCustom || k != SchemeKind::Custom; });
}

QList<SchemeKind> standardSchemes()
{
    QList<SchemeKind> out;
    for (const SchemeInfo &i : kSchemes)
        if (i.value != SchemeKind::Custom)
            out << i.value;
    return out;
}

int defaultReference(SchemeKind kind, int levelCount)
{
    switch (kind) {
    case SchemeKind::Treatment:
    case SchemeKind::Simple:
        return 0;
    case SchemeKind::Sum:
    case SchemeKind::WeightedEffect:
        return levelCount - 1;
    default:
        return -1;
    }
}

bool Scheme::allExact() const
{
    for (const Column &c : columns)
        for (const Weight &w : c.weights)
            if (!w.isExact())
                return false;
    return true;
}

QString Scheme::validate() const
{
    if (QString e = factor.validate(); !e.isEmpty())
        return e;
    const int k = levelCount();
    if (columns.empty())
        return u"columns: a scheme needs at least one coding column"_s;
    if (columnCount() > k)
        return u"columns: %1 columns for %2 levels; at most %2 are possible"_s.arg(columnCount()).arg(k);
    for (int j = 0; j < columnCount(); ++j)
        if (int(columns[size_t(j)].weights.size()) != k)
            return u"columns: column %1 ('%2') has %3 weights for %4 levels; give one per level"_s
                .arg(j + 1).arg(columns[size_t(j)].name).arg(columns[size_t(j)].weights.size()).arg(k);
    return {};
}

std::optional<std::vector<std::vector<Rational>>> exactPolynomialTrends(const std::vector<Rational> &x,
                                                                        const std::vector<Rational> &w)
{
    // Three-term (Stieltjes) recurrence: p_{j+1} = (x - a_j) p_j - b_j p_{j-1}, exact.
    const size_t k = x.size();
    std::vector<std::vector<Rational>> p;
    p.emplace_back(k, Rational(1));
    std::vector<Rational> prevNorm;
    auto inner = [&](const std::vector<Rational> &u, const std::vector<Rational> &v, bool timesX) {
        Rational s = 0;
        for (size_t i = 0; i < k; ++i)
            s += w[i] * u[i] * v[i] * (timesX ? x[i] : Rational(1));
        return s;
    };
    std::vector<Rational> norms{inner(p[0], p[0], false)};
    for (size_t j = 0; j + 1 < k; ++j) {
        const Rational a = inner(p[j], p[j], true) / norms[j];
        std::vector<Rational> next(k);
        for (size_t i = 0; i < k; ++i)
            next[i] = (x[i] - a) * p[j][i];
        if (j > 0) {
            const Rational b = norms[j] / norms[j - 1];
            for (size_t i = 0; i < k; ++i)
                next[i] -= b * p[j - 1][i];
        }
        norms.push_back(inner(next, next, false));
        if (norms.back() == 0)
            return std::nullopt;
        p.push_back(std::move(next));
    }
    p.erase(p.begin());
    return p;
}

std::vector<std::vector<double>> floatPolynomialTrends(const std::vector<double> &x, const std::vector<double> &w)
{
    // Gram-Schmidt of x * q_j against all earlier q, twice ("twice is enough"), under weights w.
    const size_t k = x.size();
    std::vector<std::vector<double>> q;
    auto dot = [&](const std::vector<double> &u, const std::vector<double> &v) {
        double s = 0;
        for (size_t i = 0; i < k; ++i)
            s += w[i] * u[i] * v[i];
        return s;
    };
    auto normalise = [&](std::vector<double> &v) {
        const double n = std::sqrt(dot(v, v));
        for (double &e : v)
            e /= n;
    };
    // Centre and scale positions so that the products stay well scaled.
    double mean = 0, wsum = 0;
    for (size_t i = 0; i < k; ++i) {
        mean += w[i] * x[i];
        wsum += w[i];
    }
    mean /= wsum;
    double spread = 0;
    for (size_t i = 0; i < k; ++i)
        spread = std::max(spread, std::abs(x[i] - mean));
    std::vector<double> t(k);
    for (size_t i = 0; i < k; ++i)
        t[i] = (x[i] - mean) / spread;
    q.emplace_back(k, 1.0);
    normalise(q[0]);
    for (size_t j = 0; j + 1 < k; ++j) {
        std::vector<double> v(k);
        for (size_t i = 0; i < k; ++i)
            v[i] = t[i] * q[j][i];
        for (int pass = 0; pass < 2; ++pass)
            for (const auto &u : q) {
                const double c = dot(u, v);
                for (size_t i = 0; i < k; ++i)
                    v[i] -= c * u[i];
            }
        normalise(v);
        q.push_back(std::move(v));
    }
    q.erase(q.begin());
    return q;
}

Result<std::vector<Column>> standardColumns(const Factor &factor, SchemeKind kind, const SchemeOptions &options)
{
    using R = Result<std::vector<Column>>;
    if (QString e = factor.validate(); !e.isEmpty())
        return R::failure(e);
    const int k = factor.levelCount();
    if (kind == SchemeKind::Custom)
        return R::failure(u"scheme: 'custom' has no standard columns; type the weights"_s);
    int ref = options.reference;
    if (schemeUsesReference(kind)) {
        if (ref < 0)
            ref = defaultReference(kind, k);
        if (ref >= k)
            return R::failure(u"reference: level %1 does not exist; the factor has %2 levels"_s.arg(ref + 1).arg(k));
    }
    if (kind != SchemeKind::Polynomial)
        return R(comparisonColumns(factor, kind, ref));

    // Polynomial trends.
    const std::vector<Weight> pos = factor.positions();
    bool exactPositions = true;
    for (const Weight &p : pos)
        exactPositions = exactPositions && p.isExact();
    const std::vector<Rational> sizes = options.polynomialWeighted ? factor.sizes() : std::vector<Rational>(size_t(k), Rational(1));
    std::vector<Column> cols;
    const bool exactFeasible = exactPositions && k <= 40;
    if (options.polynomialForm == PolynomialForm::Integer) {
        if (!exactFeasible)
            return R::failure(u"polynomial: the integer form needs exact (rational) positions and at most 40 levels"_s);
        std::vector<Rational> x;
        for (const Weight &p : pos)
            x.push_back(p.rational());
        auto trends = exactPolynomialTrends(x, sizes);
        if (!trends)
            return R::failure(u"spacing: the positions do not support %1 distinct trends"_s.arg(k - 1));
        for (size_t d = 0; d < trends->size(); ++d) {
            // Smallest integer multiple: times lcm of denominators, over gcd of numerators.
            mpz_class l = 1, g = 0;
            for (const Rational &v : (*trends)[d])
                mpz_lcm(l.get_mpz_t(), l.get_mpz_t(), v.get_den_mpz_t());
            for (const Rational &v : (*trends)[d])
                mpz_gcd(g.get_mpz_t(), g.get_mpz_t(), mpz_class(v.get_num() * (l / v.get_den())).get_mpz_t());
            Column c{degreeName(int(d) + 1), {}};
            // Sign convention: the last nonzero value is positive (rising trend ends high).
            Rational sign = 1;
            for (auto it = (*trends)[d].rbegin(); it != (*trends)[d].rend(); ++it)
                if (*it != 0) {
                    sign = *it > 0 ? 1 : -1;
                    break;
                }
            for (const Rational &v : (*trends)[d])
                c.weights.push_back(Weight::exact(sign * v * Rational(l) / Rational(g)));
            cols.push_back(std::move(c));
        }
        return R(std::move(cols));
    }
    std::vector<std::vector<double>> values;
    if (exactFeasible) {
        std::vector<Rational> x;
        for (const Weight &p : pos)
            x.push_back(p.rational());
        auto trends = exactPolynomialTrends(x, sizes);
        if (!trends)
            return R::failure(u"spacing: the positions do not support %1 distinct trends"_s.arg(k - 1));
        for (const auto &t : *trends) {
            Rational norm2 = 0;
            for (const Rational &v : t)
                norm2 += v * v;
            // v / |t| as sign(v) sqrt(v^2 / |t|^2): the ratio lies in [0, 1], so positions such as
            // 1e300 and 1e-300, whose trend values overflow a double, still give finite columns.
            std::vector<double> col;
            for (const Rational &v : t) {
                const double share = std::sqrt(nearestDouble(Rational(v * v / norm2)));
                col.push_back(v < 0 ? -share : share);
            }
            values.push_back(std::move(col));
        }
    } else {
        std::vector<double> x, wd;
        for (const Weight &p : pos)
            x.push_back(p.value());
        for (const Rational &s : sizes)
            wd.push_back(s.get_d());
        values = floatPolynomialTrends(x, wd);
        for (auto &col : values) {
            double norm = 0;
            for (double v : col)
                norm += v * v;
            norm = std::sqrt(norm);
            for (double &v : col)
                v /= norm;
            if (!std::all_of(col.begin(), col.end(), [](double v) { return std::isfinite(v); }))
                return R::failure(u"spacing: the positions span too wide a range for trends up to degree %1 in floating point "
                                  u"(their powers overflow); rescale them, or write them as exact numbers"_s.arg(k - 1));
        }
    }
    for (size_t d = 0; d < values.size(); ++d) {
        double last = 0;
        for (auto it = values[d].rbegin(); it != values[d].rend(); ++it)
            if (std::abs(*it) > 1e-12) {
                last = *it;
                break;
            }
        Column c{degreeName(int(d) + 1), {}};
        for (double v : values[d]) {
            const double s = last < 0 ? -v : v;
            c.weights.push_back(s == 0.0 ? Weight(0) : Weight::approx(std::abs(s) < 1e-15 ? 0.0 : s));
        }
        cols.push_back(std::move(c));
    }
    return R(std::move(cols));
}

SchemeOptions schemeOptions(const Scheme &s)
{
    SchemeOptions o;
    o.reference = schemeUsesReference(s.kind) && s.reference >= 0 && s.reference < s.levelCount() ? s.reference : -1;
    o.polynomialForm = s.polynomialForm;
    o.polynomialWeighted = s.polynomialWeighted;
    return o;
}

Result<Scheme> makeScheme(const Factor &factor, SchemeKind kind, const SchemeOptions &options)
{
    auto cols = standardColumns(factor, kind, options);
    if (!cols)
        return Result<Scheme>::failure(cols.error());
    Scheme s;
    s.factor = factor;
    s.kind = kind;
    s.reference = schemeUsesReference(kind) ? (options.reference < 0 ? defaultReference(kind, factor.levelCount()) : options.reference) : -1;
    s.polynomialForm = options.polynomialForm;
    s.polynomialWeighted = options.polynomialWeighted;
    s.intercept = kind != SchemeKind::Indicator;
    s.columns = cols.take();
    return Result<Scheme>(std::move(s));
}

} // namespace cb
