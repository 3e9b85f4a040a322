#include "HypothesisText.h"

#include <charconv>
#include <cmath>
#include <limits>
#include <algorithm>
#include <numeric>
#include <optional>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

QString joinWords(const QStringList &items)
{
    if (items.size() <= 1)
        return items.join(QString());
    if (items.size() == 2)
        return items[0] + u" and "_s + items[1];
    return QStringList(items.mid(0, items.size() - 1)).join(u", "_s) + u" and "_s + items.last();
}

// "weekly" or "the average of weekly and twice"
QString averageWords(const QStringList &names)
{
    return names.size() == 1 ? names[0] : u"the average of "_s + joinWords(names);
}

QString meanSymbol(const QStringList &names)
{
    return u"mean("_s + names.join(u", "_s) + u")"_s;
}

// A small exact fraction for the texts (64-bit; rows that do not fit are shown as decimals).
// Hypothesis rows can have hundreds of entries, so the texts avoid arbitrary precision.
struct Frac
{
    long long n = 0;
    long long d = 1;
    bool operator==(const Frac &o) const { return n == o.n && d == o.d; }
};

constexpr long long kFracLimit = 1LL << 40;

std::optional<Frac> makeFrac(__int128 n, __int128 d)
{
    if (d < 0) {
        n = -n;
        d = -d;
    }
    __int128 a = n < 0 ? -n : n, b = d;
    while (b != 0) {
        const __int128 t = a % b;
        a = b;
        b = t;
    }
    if (a > 1) {
        n /= a;
        d /= a;
    }
    if (n > kFracLimit || n < -kFracLimit || d > kFracLimit)
        return std::nullopt;
    return Frac{static_cast<long long>(n), static_cast<long long>(d)};
}

std::optional<Frac> add(const Frac &a, const Frac &b)
{
    return makeFrac(static_cast<__int128>(a.n) * b.d + static_cast<__int128>(b.n) * a.d, static_cast<__int128>(a.d) * b.d);
}

std::optional<Frac> toFrac(const Weight &w)
{
    if (w.isExact()) {
        const Rational &q = w.rational();
        if (!mpz_fits_slong_p(q.get_num_mpz_t()) || !mpz_fits_slong_p(q.get_den_mpz_t()))
            return std::nullopt;
        return makeFrac(q.get_num().get_si(), q.get_den().get_si());
    }
    if (std::abs(w.value()) < 1e-13)
        return Frac{};
    long long n = 0, d = 1;
    if (recogniseFraction(w.value(), n, d))
        return Frac{n, d};
    return std::nullopt;
}

QString fracText(const Frac &f)
{
    return f.d == 1 ? QString::number(f.n) : u"%1/%2"_s.arg(f.n).arg(f.d);
}

// "(2 weekly + twice)/3" for terms with positive weights a_i/d.
QString groupText(const std::vector<std::pair<Frac, qsizetype>> &terms, const QStringList &levels)
{
    long long d = 1;
    for (const auto &t : terms) {
        d = std::lcm(d, t.first.d);
        if (d > kFracLimit)
            return {};
    }
    QString body;
    for (const auto &t : terms) {
        const __int128 a = static_cast<__int128>(t.first.n) * (d / t.first.d);
        if (!body.isEmpty())
            body += u" + "_s;
        if (a != 1)
            body += QString::number(static_cast<long long>(a)) + u' ';
        body += levels[t.second];
    }
    if (d == 1)
        return body;
    if (terms.size() > 1)
        body = u"("_s + body + u")"_s;
    return body + u"/"_s + QString::number(d);
}

QString exactCombination(const std::vector<Frac> &w, const QStringList &levels)
{
    std::vector<std::pair<Frac, qsizetype>> pos, neg;
    for (size_t i = 0; i < w.size(); ++i) {
        if (w[i].n > 0)
            pos.emplace_back(w[i], qsizetype(i));
        else if (w[i].n < 0)
            neg.emplace_back(Frac{-w[i].n, w[i].d}, qsizetype(i));
    }
    if (pos.empty() && neg.empty())
        return u"0"_s;
    QString s;
    if (!pos.empty())
        s = groupText(pos, levels);
    if (!neg.empty()) {
        QString n = groupText(neg, levels);
        if (neg.size() > 1 && !n.startsWith(u'('))
            n = u"("_s + n + u")"_s; // "x - (a + b)", not "x - a + b"
        s += (pos.empty() ? u"-"_s : u" - "_s) + n;
    }
    return s;
}

// "0.67082 high - 0.22361 low ...": six decimals (or six significant digits when tiny or huge).
// Written with std::to_chars into one reserved string: rows can have hundreds of terms.
QString numericCombination(const std::vector<Weight> &row, const QStringList &levels)
{
    QString s;
    s.reserve(qsizetype(row.size()) * 24);
    char buf[40];
    for (size_t i = 0; i < row.size(); ++i) {
        const double v = row[i].value();
        if (v == 0.0 || (!row[i].isExact() && std::abs(v) < 1e-14))
            continue;
        const int len = shortDecimal(std::abs(v), buf);
        if (s.isEmpty()) {
            if (v < 0)
                s += u'-';
        } else {
            s += v < 0 ? u" - "_s : u" + "_s;
        }
        if (!(len == 1 && buf[0] == '1')) {
            s += QLatin1StringView(buf, len);
            s += u' ';
        }
        s += levels[qsizetype(i)];
    }
    return s.isEmpty() ? u"0"_s : s;
}

} // namespace

HypothesisText describeHypothesis(const std::vector<Weight> &row, const QStringList &levels,
                                  const std::vector<Rational> &sizes, bool isIntercept, const QString &label)
{
    HypothesisText out;
    const size_t k = row.size();
    // Exact weights, recognising simple fractions in floating ones; the sum on the way.
    std::vector<Frac> w(k);
    std::optional<Frac> total = Frac{};
    // Rows repeat values (a group's weights are equal): remember the last conversion.
    double lastValue = std::numeric_limits<double>::quiet_NaN();
    std::optional<Frac> lastFrac;
    for (size_t i = 0; i < k && total; ++i) {
        if (row[i].isExact() || row[i].value() != lastValue) {
            lastFrac = toFrac(row[i]);
            lastValue = row[i].isExact() ? std::numeric_limits<double>::quiet_NaN() : row[i].value();
        }
        const auto &f = lastFrac;
        if (f) {
            w[i] = *f;
            total = add(*total, *f);
        } else {
            total.reset();
        }
    }
    if (total)
        out.combination = exactCombination(w, levels);
    if (!total || out.combination.isEmpty()) {
        out.combination = numericCombination(row, levels);
        out.symbols = label + u": "_s + out.combination + (isIntercept ? QString() : u" = 0"_s);
        out.words = isIntercept ? u"a weighted combination of the level means: "_s + out.combination
                                : u"a weighted combination of the level means (weights not simple fractions): "_s + out.combination;
        return out;
    }

    QStringList posNames, negNames;
    std::vector<Frac> posValues, negValues; // distinct values, at most two kept
    auto note = [](std::vector<Frac> &values, const Frac &f) {
        if (values.size() < 2 && std::find(values.begin(), values.end(), f) == values.end())
            values.push_back(f);
    };
    for (size_t i = 0; i < k; ++i) {
        if (w[i].n > 0) {
            posNames << levels[qsizetype(i)];
            note(posValues, w[i]);
        } else if (w[i].n < 0) {
            negNames << levels[qsizetype(i)];
            note(negValues, w[i]);
        }
    }
    const Frac zero{}, one{1, 1};

    if (isIntercept) {
        Rational nTotal = 0;
        for (const Rational &n : sizes)
            nTotal += n;
        bool equal = true, byN = true, sizesEqual = true;
        for (size_t i = 0; i < k; ++i) {
            equal = equal && w[i] == Frac{1, static_cast<long long>(k)};
            byN = byN && Rational(static_cast<long>(w[i].n), static_cast<unsigned long>(w[i].d)) == sizes[i] / nTotal;
            sizesEqual = sizesEqual && sizes[i] == sizes[0];
        }
        if (posNames.size() == 1 && negNames.isEmpty() && posValues[0] == one) {
            out.symbols = label + u": "_s + meanSymbol(posNames);
            out.words = u"the mean of "_s + posNames[0];
        } else if (equal) {
            out.symbols = label + u": "_s + meanSymbol(levels);
            out.words = u"the unweighted mean of the %1 level means"_s.arg(k);
        } else if (byN && !sizesEqual) {
            out.symbols = label + u": "_s + out.combination;
            out.words = u"the mean of the level means weighted by the planned n (the overall mean of all observations)"_s;
        } else {
            out.symbols = label + u": "_s + out.combination;
            out.words = *total == one ? u"a weighted average of the level means: "_s + out.combination
                                      : u"a combination of the level means whose weights sum to %1: "_s.arg(fracText(*total)) + out.combination;
        }
        return out;
    }

    if (posNames.isEmpty() && negNames.isEmpty()) {
        out.symbols = label + u": 0 = 0"_s;
        out.words = u"nothing: every weight is 0"_s;
        return out;
    }
    // One level against the mean of all levels (sum coding), unweighted or weighted by n
    // (weighted-effect coding): w = e_j - 1/k, or w = e_j - n/N.
    if (*total == zero && posNames.size() == 1 && negNames.size() + 1 == qsizetype(k)) {
        const qsizetype j = levels.indexOf(posNames[0]);
        bool unweighted = true, weighted = true;
        Rational nTotal = 0;
        for (const Rational &n : sizes)
            nTotal += n;
        for (size_t i = 0; i < k; ++i) {
            const Rational wi(static_cast<long>(w[i].n), static_cast<unsigned long>(w[i].d));
            const Rational unit = qsizetype(i) == j ? 1 : 0;
            unweighted = unweighted && wi == unit - Rational(1, static_cast<long>(k));
            weighted = weighted && wi == unit - sizes[i] / nTotal;
        }
        if (unweighted || weighted) {
            const QString what = unweighted ? u"the unweighted mean of all %1 level means"_s.arg(k)
                                            : u"the mean of all %1 levels weighted by the planned n"_s.arg(k);
            out.symbols = label + u": mean(%1) - %2 = 0"_s.arg(posNames[0], unweighted ? u"grand mean"_s : u"weighted grand mean"_s);
            out.words = posNames[0] + u" minus "_s + what;
            return out;
        }
    }
    // A difference of two averages, possibly scaled: all positive weights equal,
    // all negative weights equal, and the two groups balance.
    if (*total == zero && posValues.size() == 1 && negValues.size() == 1) {
        const auto scale = makeFrac(static_cast<__int128>(posValues[0].n) * posNames.size(), posValues[0].d);
        QString diff = meanSymbol(posNames) + u" - "_s + meanSymbol(negNames);
        QString words = averageWords(posNames) + u" minus "_s + averageWords(negNames);
        if (scale && !(*scale == one)) {
            diff = fracText(*scale) + u" * ("_s + diff + u")"_s;
            words = fracText(*scale) + u" times the difference: "_s + words;
        }
        if (scale) {
            out.symbols = label + u": "_s + diff + u" = 0"_s;
            out.words = words;
            return out;
        }
    }
    if (negNames.isEmpty() && posValues.size() == 1 && *total == one) {
        // An average of level means itself (cell-means style), tested against 0.
        out.symbols = label + u": "_s + meanSymbol(posNames) + u" = 0"_s;
        out.words = averageWords(posNames) + u" itself (its test asks whether it is 0)"_s;
        return out;
    }
    out.symbols = label + u": "_s + out.combination + u" = 0"_s;
    if (*total == zero)
        out.words = u"a contrast of the level means (weights sum to 0): "_s + out.combination;
    else
        out.words = u"not a pure comparison: the weights sum to %1, so it mixes the overall level with differences: "_s
                        .arg(fracText(*total)) + out.combination;
    return out;
}

} // namespace cb
