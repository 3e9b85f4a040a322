#include "core/analysis/HypothesisText.h"

#include "core/base/TextBuilder.h"

#include <charconv>
#include <cstring>
#include <cmath>
#include <limits>
#include <algorithm>
#include <numeric>
#include <memory>
#include <optional>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

// The texts name many levels per row (k can be in the hundreds), so they are written by
// appending into one plain buffer (a fraction of the cost of QString or std::u16string
// appends of short names), never through intermediate lists and joins.
using Indices = std::vector<qsizetype>;

void appendNames(TextBuilder &out, const QStringList &levels, const Indices &which, QStringView separator)
{
    for (size_t i = 0; i < which.size(); ++i) {
        if (i > 0)
            out << separator;
        out << levels[which[i]];
    }
}

// "a", "a and b", "a, b and c"
void appendWordList(TextBuilder &out, const QStringList &levels, const Indices &which)
{
    for (size_t i = 0; i < which.size(); ++i) {
        if (i > 0 && i + 1 == which.size())
            out << u" and ";
        else if (i > 0)
            out << u", ";
        out << levels[which[i]];
    }
}

// "weekly" or "the average of weekly and twice"
void appendAverageWords(TextBuilder &out, const QStringList &levels, const Indices &which)
{
    if (which.size() > 1)
        out << u"the average of ";
    appendWordList(out, levels, which);
}

// "mean(weekly, twice)"
void appendMeanSymbol(TextBuilder &out, const QStringList &levels, const Indices &which)
{
    out << u"mean(";
    appendNames(out, levels, which, u", ");
    out << u')';
}

Indices allIndices(qsizetype k)
{
    Indices all(static_cast<size_t>(k));
    std::iota(all.begin(), all.end(), qsizetype(0));
    return all;
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
    constexpr __int128 kWide = static_cast<__int128>(1) << 62;
    if (n < kWide && n > -kWide && d < kWide) {
        // The common case, in 64 bits: 128-bit division is a slow library call.
        const long long ln = static_cast<long long>(n), ld = static_cast<long long>(d);
        const long long g = std::gcd(ln, ld);
        n = g > 1 ? ln / g : ln;
        d = g > 1 ? ld / g : ld;
    } else {
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

// Appends "(2 weekly + twice)/3" for terms with positive weights a_i/d; false when the common
// denominator does not fit.
bool appendGroup(TextBuilder &out, const std::vector<std::pair<Frac, qsizetype>> &terms, const QStringList &levels, bool parenthesise)
{
    long long d = 1;
    for (const auto &t : terms) {
        d = std::lcm(d, t.first.d);
        if (d > kFracLimit)
            return false;
    }
    const bool brackets = terms.size() > 1 && (d != 1 || parenthesise);
    if (brackets)
        out << u'(';
    char buf[24];
    for (size_t i = 0; i < terms.size(); ++i) {
        const auto &t = terms[i];
        const long long a = static_cast<long long>(static_cast<__int128>(t.first.n) * (d / t.first.d));
        if (i > 0)
            out << u" + ";
        if (a != 1) {
            out.appendAscii(buf, std::to_chars(buf, buf + sizeof buf, a).ptr);
            out << u' ';
        }
        out << levels[t.second];
    }
    if (brackets)
        out << u')';
    if (d != 1) {
        out << u'/';
        out.appendAscii(buf, std::to_chars(buf, buf + sizeof buf, d).ptr);
    }
    return true;
}

// Empty when a denominator does not fit.
QString exactCombination(const std::vector<Frac> &w, const QStringList &levels, qsizetype reserve)
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
    TextBuilder s;
    s.reserve(reserve);
    if (!pos.empty() && !appendGroup(s, pos, levels, false))
        return {};
    if (!neg.empty()) {
        if (pos.empty())
            s << u"-";
        else
            s << u" - ";
        // "x - (a + b)", not "x - a + b"
        if (!appendGroup(s, neg, levels, true))
            return {};
    }
    return s.toString();
}

// "0.67082 high - 0.22361 low ...": six decimals (or six significant digits when tiny or huge).
// Written with std::to_chars into one reserved string: rows can have hundreds of terms.
// Six significant digits of an exact magnitude beyond the range of a double ("1.5e+600"),
// through GMP's floating type, whose exponent has no such limit. buf holds 40 characters.
int scientificText(const Rational &magnitude, char *buf)
{
    const mpf_class f(magnitude, 64);
    mp_exp_t exponent = 0;
    const std::string digits = f.get_str(exponent, 10, 6); // "15" and 601 for 1.5e600
    if (digits.empty()) {
        buf[0] = '0';
        return 1;
    }
    int len = 0;
    buf[len++] = digits[0];
    if (digits.size() > 1) {
        buf[len++] = '.';
        for (size_t i = 1; i < digits.size(); ++i)
            buf[len++] = digits[i];
    }
    buf[len++] = 'e';
    const long e = long(exponent) - 1;
    buf[len++] = e < 0 ? '-' : '+';
    return int(std::to_chars(buf + len, buf + 40, e < 0 ? -e : e).ptr - buf);
}

QString numericCombination(const std::vector<Weight> &row, const QStringList &levels)
{
    TextBuilder s;
    qsizetype room = 0;
    for (const QString &l : levels)
        room += l.size() + 24;
    s.reserve(room);
    char buf[40];
    for (size_t i = 0; i < row.size(); ++i) {
        const double v = row[i].value();
        if (row[i].isExact() ? row[i].isZero() : std::abs(v) < 1e-14)
            continue;
        // An exact weight can lie beyond the range of a double (1e-400 rounds to 0, 1e400 to inf).
        const bool beyondDouble = row[i].isExact() && (!std::isfinite(v) || std::abs(v) < std::numeric_limits<double>::min());
        const bool negative = beyondDouble ? sgn(row[i].rational()) < 0 : v < 0;
        const int len = beyondDouble ? scientificText(abs(row[i].rational()), buf) : shortDecimal(std::abs(v), buf);
        if (s.isEmpty()) {
            if (negative)
                s << u'-';
        } else {
            s << (negative ? u" - " : u" + ");
        }
        if (!(len == 1 && buf[0] == '1')) {
            s.appendAscii(buf, buf + len);
            s << u' ';
        }
        s << levels[qsizetype(i)];
    }
    return s.isEmpty() ? u"0"_s : s.toString();
}

// --- Recognisers -----------------------------------------------------------------
// describeHypothesis reads a row once into RowFacts, then tries small recognisers in
// turn: each either knows the pattern of weights and writes its statement, or declines
// and writes nothing. The first that recognises the row wins; each list ends with one
// that always does. Where two could match, the order decides (TestAnalysis::recogniserOrder).

// What the recognisers know about a row.
struct RowFacts
{
    const std::vector<Weight> &row;
    const QStringList &levels;
    const std::vector<Rational> &sizes;
    QStringView label;
    size_t k = 0;
    qsizetype room = 0;  // every level name once, with separators: the longest text names each level once
    std::vector<Frac> w{}; // exact weights, simple fractions recognised in floating ones
    std::optional<Frac> total{}; // their sum; nullopt when a weight is not a simple fraction
    bool simpleFractions = false; // every weight and the combination's denominators fit
    QString combination{};        // "(weekly + twice)/2 - none", or decimals when not simpleFractions
    Indices pos{}, neg{};         // levels with positive and negative weights (simpleFractions only)
    std::vector<Frac> posValues{}, negValues{}; // distinct values, at most two kept

    // Is sign w_i + [i == at] = n_i / N for every level? (Asked only when needed: it takes
    // arbitrary precision.)
    bool weightsAreShares(int sign, qsizetype at) const
    {
        Rational nTotal = 0;
        for (const Rational &n : sizes)
            nTotal += n;
        Rational wi;
        for (size_t i = 0; i < k; ++i) {
            wi = Rational(static_cast<long>(sign * w[i].n), static_cast<unsigned long>(w[i].d));
            if (qsizetype(i) == at)
                wi += 1;
            if (wi != sizes[i] / nTotal)
                return false;
        }
        return true;
    }
};

RowFacts rowFacts(const std::vector<Weight> &row, const QStringList &levels, const std::vector<Rational> &sizes,
                  QStringView label)
{
    RowFacts f{row, levels, sizes, label};
    const size_t k = row.size();
    f.k = k;
    f.room = label.size() + 64;
    for (qsizetype i = 0; i < qsizetype(k); ++i)
        f.room += levels[i].size() + 8;
    f.w.resize(k);
    f.total = Frac{};
    // Rows repeat values (a group's weights are equal): each run of equal weights is converted
    // once and enters the sum once, as count times its value.
    for (size_t i = 0; i < k && f.total;) {
        const std::optional<Frac> v = toFrac(row[i]);
        if (!v) {
            f.total.reset();
            break;
        }
        size_t end = i + 1;
        while (end < k && row[end] == row[i])
            ++end;
        std::fill(f.w.begin() + std::ptrdiff_t(i), f.w.begin() + std::ptrdiff_t(end), *v);
        const auto run = makeFrac(static_cast<__int128>(v->n) * static_cast<__int128>(end - i), v->d);
        f.total = run ? add(*f.total, *run) : std::nullopt;
        i = end;
    }
    if (f.total)
        f.combination = exactCombination(f.w, levels, f.room);
    f.simpleFractions = f.total && !f.combination.isEmpty();
    if (!f.simpleFractions) {
        f.combination = numericCombination(row, levels);
        return f;
    }
    auto note = [](std::vector<Frac> &values, const Frac &v) {
        if (values.size() < 2 && std::find(values.begin(), values.end(), v) == values.end())
            values.push_back(v);
    };
    for (size_t i = 0; i < k; ++i) {
        if (f.w[i].n > 0) {
            f.pos.push_back(qsizetype(i));
            note(f.posValues, f.w[i]);
        } else if (f.w[i].n < 0) {
            f.neg.push_back(qsizetype(i));
            note(f.negValues, f.w[i]);
        }
    }
    return f;
}

// What a recogniser writes: the statement ("b1: ...") and the words.
struct Statement
{
    TextBuilder symbols, words;

    // "b1: "
    TextBuilder &startSymbols(const RowFacts &f)
    {
        symbols.reserve(f.room + f.combination.size());
        symbols << f.label << u": ";
        return symbols;
    }
    // "b1: <combination>", with " = 0" for a coefficient's test.
    void combinationStatement(const RowFacts &f, bool equalsZero)
    {
        startSymbols(f) << f.combination;
        if (equalsZero)
            symbols << u" = 0";
    }
};

using Recogniser = bool (*)(const RowFacts &, Statement &);

constexpr Frac kZero{}, kOne{1, 1};

// Weights that are not simple fractions: the combination in decimals.
bool notSimpleFractions(const RowFacts &f, Statement &s, bool isIntercept)
{
    if (f.simpleFractions)
        return false;
    s.combinationStatement(f, !isIntercept);
    if (isIntercept)
        s.words << u"a weighted combination of the level means: ";
    else
        s.words << u"a weighted combination of the level means (weights not simple fractions): ";
    s.words << f.combination;
    return true;
}

// Any other row (the last recogniser of each list: it always recognises): the combination,
// and what its weights sum to. An intercept is a weighted average or a combination; another
// coefficient is a contrast, or a mixture with the overall level.
bool anyCombination(const RowFacts &f, Statement &s, bool isIntercept)
{
    s.combinationStatement(f, !isIntercept);
    if (isIntercept && *f.total == kOne)
        s.words << u"a weighted average of the level means: ";
    else if (isIntercept)
        s.words << u"a combination of the level means whose weights sum to " << fracText(*f.total) << u": ";
    else if (*f.total == kZero)
        s.words << u"a contrast of the level means (weights sum to 0): ";
    else
        s.words << u"not a pure comparison: the weights sum to " << fracText(*f.total)
                << u", so it mixes the overall level with differences: ";
    s.words << f.combination;
    return true;
}

// The intercept.

bool interceptNotSimpleFractions(const RowFacts &f, Statement &s)
{
    return notSimpleFractions(f, s, true);
}

// w = e_j: "the mean of none" (treatment coding).
bool interceptOneLevelMean(const RowFacts &f, Statement &s)
{
    if (!(f.pos.size() == 1 && f.neg.empty() && f.posValues[0] == kOne))
        return false;
    appendMeanSymbol(s.startSymbols(f), f.levels, f.pos);
    s.words << u"the mean of " << f.levels[f.pos[0]];
    return true;
}

// w = 1/k everywhere (sum coding).
bool interceptUnweightedMean(const RowFacts &f, Statement &s)
{
    for (size_t i = 0; i < f.k; ++i)
        if (!(f.w[i] == Frac{1, static_cast<long long>(f.k)}))
            return false;
    appendMeanSymbol(s.startSymbols(f), f.levels, allIndices(qsizetype(f.k)));
    s.words << u"the unweighted mean of the " << QString::number(f.k) << u" level means";
    return true;
}

// w = n/N with unequal n (weighted-effect coding).
bool interceptSizeWeightedMean(const RowFacts &f, Statement &s)
{
    bool sizesEqual = true;
    for (size_t i = 0; i < f.k && sizesEqual; ++i)
        sizesEqual = f.sizes[i] == f.sizes[0];
    if (sizesEqual || !f.weightsAreShares(1, -1))
        return false;
    s.combinationStatement(f, false);
    s.words << u"the mean of the level means weighted by the planned n (the overall mean of all observations)";
    return true;
}

bool interceptCombination(const RowFacts &f, Statement &s)
{
    return anyCombination(f, s, true);
}

// The other coefficients.

bool coefficientNotSimpleFractions(const RowFacts &f, Statement &s)
{
    return notSimpleFractions(f, s, false);
}

bool nothing(const RowFacts &f, Statement &s)
{
    if (!(f.pos.empty() && f.neg.empty()))
        return false;
    s.symbols << f.label << u": 0 = 0";
    s.words << u"nothing: every weight is 0";
    return true;
}

// One level against the mean of all levels (sum coding), unweighted or weighted by n
// (weighted-effect coding): w = e_j - 1/k, or w = e_j - n/N.
bool levelMinusGrandMean(const RowFacts &f, Statement &s)
{
    if (!(*f.total == kZero && f.pos.size() == 1 && f.neg.size() + 1 == f.k))
        return false;
    const qsizetype j = f.pos[0];
    // Unweighted: w = e_j - 1/k, checked in small fractions; weighted: w + n/N = e_j.
    bool unweighted = true;
    const long long kk = static_cast<long long>(f.k);
    for (size_t i = 0; i < f.k && unweighted; ++i)
        unweighted = f.w[i] == (qsizetype(i) == j ? Frac{kk - 1, kk} : Frac{-1, kk});
    if (!unweighted && !f.weightsAreShares(-1, j))
        return false;
    s.startSymbols(f) << u"mean(" << f.levels[j] << u") - ";
    if (unweighted)
        s.symbols << u"grand mean = 0";
    else
        s.symbols << u"weighted grand mean = 0";
    s.words << f.levels[j] << u" minus ";
    if (unweighted)
        s.words << u"the unweighted mean of all " << QString::number(f.k) << u" level means";
    else
        s.words << u"the mean of all " << QString::number(f.k) << u" levels weighted by the planned n";
    return true;
}

// A difference of two averages, possibly scaled: all positive weights equal, all negative
// weights equal, and the two groups balance.
bool differenceOfAverages(const RowFacts &f, Statement &s)
{
    if (!(*f.total == kZero && f.posValues.size() == 1 && f.negValues.size() == 1))
        return false;
    const auto scale = makeFrac(static_cast<__int128>(f.posValues[0].n) * qsizetype(f.pos.size()), f.posValues[0].d);
    if (!scale)
        return false;
    const bool scaled = !(*scale == kOne);
    TextBuilder &sym = s.startSymbols(f);
    if (scaled)
        sym << fracText(*scale) << u" * (";
    appendMeanSymbol(sym, f.levels, f.pos);
    sym << u" - ";
    appendMeanSymbol(sym, f.levels, f.neg);
    if (scaled)
        sym << u")";
    sym << u" = 0";
    s.words.reserve(f.room);
    if (scaled)
        s.words << fracText(*scale) << u" times the difference: ";
    appendAverageWords(s.words, f.levels, f.pos);
    s.words << u" minus ";
    appendAverageWords(s.words, f.levels, f.neg);
    return true;
}

// An average of level means itself (cell-means style), tested against 0.
bool averageItself(const RowFacts &f, Statement &s)
{
    if (!(f.neg.empty() && f.posValues.size() == 1 && *f.total == kOne))
        return false;
    appendMeanSymbol(s.startSymbols(f), f.levels, f.pos);
    s.symbols << u" = 0";
    s.words.reserve(f.room);
    appendAverageWords(s.words, f.levels, f.pos);
    s.words << u" itself (its test asks whether it is 0)";
    return true;
}

bool contrastOrMixture(const RowFacts &f, Statement &s)
{
    return anyCombination(f, s, false);
}

constexpr Recogniser kInterceptRecognisers[] = {
    interceptNotSimpleFractions, interceptOneLevelMean, interceptUnweightedMean, interceptSizeWeightedMean,
    interceptCombination,
};

constexpr Recogniser kCoefficientRecognisers[] = {
    coefficientNotSimpleFractions, nothing, levelMinusGrandMean, differenceOfAverages, averageItself,
    contrastOrMixture,
};

template <size_t N>
void recognise(const Recogniser (&recognisers)[N], const RowFacts &f, Statement &s)
{
    for (Recogniser r : recognisers)
        if (r(f, s))
            return;
}

} // namespace

HypothesisText describeHypothesis(const std::vector<Weight> &row, const QStringList &levels,
                                  const std::vector<Rational> &sizes, bool isIntercept, QStringView label)
{
    RowFacts facts = rowFacts(row, levels, sizes, label);
    Statement s;
    if (isIntercept)
        recognise(kInterceptRecognisers, facts, s);
    else
        recognise(kCoefficientRecognisers, facts, s);
    HypothesisText out;
    out.combination = std::move(facts.combination);
    if (!s.symbols.isEmpty())
        out.symbols = s.symbols.toString();
    if (!s.words.isEmpty())
        out.words = s.words.toString();
    return out;
}

} // namespace cb
