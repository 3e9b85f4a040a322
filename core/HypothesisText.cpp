#include "HypothesisText.h"

#include <map>

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

// "(2 weekly + twice)/3" for terms with positive weights a_i/d.
QString groupText(const std::vector<std::pair<Rational, QString>> &terms)
{
    mpz_class d = 1;
    for (const auto &t : terms)
        mpz_lcm(d.get_mpz_t(), d.get_mpz_t(), t.first.get_den_mpz_t());
    QStringList parts;
    for (const auto &t : terms) {
        const mpz_class a = t.first.get_num() * (d / t.first.get_den());
        parts << (a == 1 ? t.second : QString::fromStdString(a.get_str()) + u" "_s + t.second);
    }
    QString body = parts.join(u" + "_s);
    if (d == 1)
        return body;
    if (parts.size() > 1)
        body = u"("_s + body + u")"_s;
    return body + u"/"_s + QString::fromStdString(d.get_str());
}

QString exactCombination(const std::vector<Rational> &w, const QStringList &levels)
{
    std::vector<std::pair<Rational, QString>> pos, neg;
    for (size_t i = 0; i < w.size(); ++i) {
        if (w[i] > 0)
            pos.emplace_back(w[i], levels[qsizetype(i)]);
        else if (w[i] < 0)
            neg.emplace_back(-w[i], levels[qsizetype(i)]);
    }
    if (pos.empty() && neg.empty())
        return u"0"_s;
    QString s;
    if (!pos.empty())
        s = groupText(pos);
    if (!neg.empty()) {
        QString n = groupText(neg);
        if (neg.size() > 1 && !n.startsWith(u'('))
            n = u"("_s + n + u")"_s; // "x - (a + b)", not "x - a + b"
        s += (pos.empty() ? u"-"_s : u" - "_s) + n;
    }
    return s;
}

QString numericCombination(const std::vector<Weight> &row, const QStringList &levels)
{
    QString s;
    for (size_t i = 0; i < row.size(); ++i) {
        const double v = row[i].value();
        if (v == 0.0 || (!row[i].isExact() && std::abs(v) < 1e-14))
            continue;
        const QString mag = Weight::approx(std::abs(v)).display();
        const QString term = (mag == u"1"_s ? QString() : mag + u" "_s) + levels[qsizetype(i)];
        if (s.isEmpty())
            s = v < 0 ? u"-"_s + term : term;
        else
            s += (v < 0 ? u" - "_s : u" + "_s) + term;
    }
    return s.isEmpty() ? u"0"_s : s;
}

} // namespace

HypothesisText describeHypothesis(const std::vector<Weight> &row, const QStringList &levels,
                                  const std::vector<Rational> &sizes, bool isIntercept, const QString &label)
{
    HypothesisText out;
    const size_t k = row.size();
    // Exact weights, recognising simple fractions in floating ones.
    std::vector<Rational> w(k);
    bool exact = true;
    for (size_t i = 0; i < k && exact; ++i) {
        if (row[i].isExact()) {
            w[i] = row[i].rational();
        } else if (std::abs(row[i].value()) < 1e-13) {
            w[i] = 0;
        } else if (auto r = recogniseFraction(row[i].value())) {
            w[i] = *r;
        } else {
            exact = false;
        }
    }
    if (!exact) {
        out.combination = numericCombination(row, levels);
        out.symbols = label + u": "_s + out.combination + (isIntercept ? QString() : u" = 0"_s);
        out.words = isIntercept ? u"a weighted combination of the level means: "_s + out.combination
                                : u"a weighted combination of the level means (weights not simple fractions): "_s + out.combination;
        return out;
    }
    out.combination = exactCombination(w, levels);
    Rational total = 0;
    for (const Rational &v : w)
        total += v;

    QStringList posNames, negNames;
    std::map<Rational, int> posValues, negValues;
    for (size_t i = 0; i < k; ++i) {
        if (w[i] > 0) {
            posNames << levels[qsizetype(i)];
            posValues[w[i]]++;
        } else if (w[i] < 0) {
            negNames << levels[qsizetype(i)];
            negValues[w[i]]++;
        }
    }

    if (isIntercept) {
        Rational nTotal = 0;
        for (const Rational &n : sizes)
            nTotal += n;
        bool equal = true, byN = true, sizesEqual = true;
        for (size_t i = 0; i < k; ++i) {
            equal = equal && w[i] == Rational(1, long(k));
            byN = byN && w[i] == sizes[i] / nTotal;
            sizesEqual = sizesEqual && sizes[i] == sizes[0];
        }
        if (posNames.size() == 1 && negNames.isEmpty() && w[size_t(levels.indexOf(posNames[0]))] == 1) {
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
            out.words = total == 1 ? u"a weighted average of the level means: "_s + out.combination
                                   : u"a combination of the level means whose weights sum to %1: "_s.arg(rationalToString(total)) + out.combination;
        }
        return out;
    }

    if (posNames.isEmpty() && negNames.isEmpty()) {
        out.symbols = label + u": 0 = 0"_s;
        out.words = u"nothing: every weight is 0"_s;
        return out;
    }
    // A difference of two averages, possibly scaled: all positive weights equal,
    // all negative weights equal, and the two groups balance.
    if (total == 0 && posValues.size() == 1 && negValues.size() == 1) {
        const Rational scale = posValues.begin()->first * long(posNames.size());
        QString diff = meanSymbol(posNames) + u" - "_s + meanSymbol(negNames);
        QString words = averageWords(posNames) + u" minus "_s + averageWords(negNames);
        if (scale != 1) {
            diff = rationalToString(scale) + u" * ("_s + diff + u")"_s;
            words = rationalToString(scale) + u" times the difference: "_s + words;
        }
        out.symbols = label + u": "_s + diff + u" = 0"_s;
        out.words = words;
        return out;
    }
    out.symbols = label + u": "_s + out.combination + u" = 0"_s;
    if (total == 0)
        out.words = u"a contrast of the level means (weights sum to 0): "_s + out.combination;
    else
        out.words = u"not a pure comparison: the weights sum to %1, so it mixes the overall level with differences: "_s
                        .arg(rationalToString(total)) + out.combination;
    return out;
}

} // namespace cb
