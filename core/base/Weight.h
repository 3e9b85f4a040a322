#pragma once

#include "core/base/Result.h"

#include <QString>
#include <QStringView>

#include <gmpxx.h>

#include <memory>
#include <optional>
#include <vector>

namespace cb {

using Rational = mpq_class;

// An optional Rational behind one pointer (8 bytes instead of std::optional's 40): analyses
// hold m x m tables of weights, most of them approximate or zero. Copies are deep.
class RationalSlot
{
public:
    RationalSlot() = default;
    RationalSlot(const RationalSlot &o) : m_p(o.m_p ? std::make_unique<Rational>(*o.m_p) : nullptr) {}
    RationalSlot(RationalSlot &&) noexcept = default;
    RationalSlot &operator=(const RationalSlot &o)
    {
        if (this != &o)
            m_p = o.m_p ? std::make_unique<Rational>(*o.m_p) : nullptr;
        return *this;
    }
    RationalSlot &operator=(RationalSlot &&) noexcept = default;
    RationalSlot &operator=(const Rational &q)
    {
        m_p = std::make_unique<Rational>(q);
        return *this;
    }
    explicit operator bool() const { return bool(m_p); }
    Rational &operator*() const { return *m_p; }
    Rational *operator->() const { return m_p.get(); }

private:
    std::unique_ptr<Rational> m_p;
};

// One coding weight: an exact rational when it was typed or derived exactly,
// otherwise a double (for example an orthonormal polynomial coefficient).
class Weight
{
public:
    Weight() = default;
    Weight(int v) : m_d(v)
    {
        if (v != 0)
            m_q = Rational(v);
    }
    static Weight exact(const Rational &q);
    static Weight approx(double d)
    {
        Weight w;
        w.m_exact = false;
        w.m_d = d;
        return w;
    }

    bool isExact() const { return m_exact; }
    // Only meaningful when isExact().
    const Rational &rational() const { return m_q ? *m_q : zero(); }
    double value() const { return m_d; }
    bool isZero() const { return m_d == 0.0 && (!m_exact || !m_q || *m_q == 0); }

    // Text that parses back to the same weight: "-2/3", "0", "~0.7071067811865476".
    QString storageString() const;
    // Text for people: an exact fraction ("−2/3" with a true minus sign when
    // unicodeMinus), a double recognised as a simple fraction, or a short decimal.
    QString display(bool unicodeMinus = false) const;

    friend bool operator==(const Weight &a, const Weight &b);

private:
    static const Rational &zero();
    RationalSlot m_q; // empty for exact zero and for approximate weights (no allocation)
    double m_d = 0.0;
    bool m_exact = true;
};

// Largest magnitude accepted for a weight, and the smallest non-zero one.
inline constexpr double kWeightMaxMagnitude = 1e300;
inline constexpr double kWeightMinMagnitude = 1e-300;

// Parses "1/3", "-2/3", "0.25", "2", "1e-3", "−1" (Unicode minus), "+1/2".
// Decimals become exact decimal fractions. A leading "~" marks an approximate
// (floating) value, as written by storageString(). Errors quote the text and
// say what is expected.
Result<Weight> parseWeight(QStringView text);

// The same for text that storageString() wrote (scheme files, exact CSV): an exact weight
// derived by the program can need far more than a typed one's 400 characters, so the
// length limit is kMaxStoredWeightLength instead.
inline constexpr qsizetype kMaxStoredWeightLength = 1 << 24;
Result<Weight> parseStoredWeight(QStringView text);

// The double nearest to q (ties to even); GMP's own conversion truncates.
double nearestDouble(const Rational &q);

// Exact rational as text: "-2/3", "5", "0". unicodeMinus uses U+2212.
QString rationalToString(const Rational &q, bool unicodeMinus = false);

// The simple fraction p/q (q <= maxDenominator) within rounding of x, if any.
// "Within rounding" means |x - p/q| <= 1e-12 * max(1, |x|).
std::optional<Rational> recogniseFraction(double x, long maxDenominator = 1000);
// The same without allocating: numerator/denominator in lowest terms, denominator > 0.
bool recogniseFraction(double x, long long &numerator, long long &denominator, long maxDenominator = 1000);

// A magnitude for people: six decimals with trailing zeros trimmed, or six significant digits
// below 1e-4 and from 1e6 on. Writes at most 32 characters into buf; returns the length.
int shortDecimal(double magnitude, char *buf);

// An inexact weight's text for people, as Weight::display() writes it with an ASCII minus:
// a recognised simple fraction or a short decimal. buf holds kApproxDisplayBuffer characters;
// returns the length. For texts that are assembled in one buffer (findings, reports).
inline constexpr int kApproxDisplayBuffer = 64;
int approxDisplayText(double v, char *buf);

// Input text as messages show it: at most 60 characters, longer text cut with an ellipsis, so
// that a field of a million characters gives a readable message. quoted() adds single quotes.
QString shortenedInput(QStringView text);
QString quoted(QStringView text);

// Shortest decimal text that reads back to the same double.
QString doubleToString(double x);

} // namespace cb
