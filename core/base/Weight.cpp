#include "core/base/Weight.h"

#include <charconv>
#include <cstdint>
#include <cstring>
#include <cmath>
#include <limits>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

constexpr char16_t kUnicodeMinus = u'\u2212';
constexpr int kMaxWeightTextLength = 400;
constexpr int kMaxExponent = 400; // beyond this the magnitude check fails anyway

QString expectedNumber()
{
    return u"expected a number such as 2, -1/3, 0.25 or 1e-3"_s;
}

// Parses an unsigned decimal "12", "0.25", "1e-3", ".5", "3." exactly.
bool parseDecimal(QStringView s, Rational &out, qsizetype maxLength)
{
    qsizetype i = 0;
    std::string mantissa;
    int fractionDigits = 0;
    bool anyDigit = false;
    while (i < s.size() && s[i].isDigit() && s[i].unicode() < 128) {
        mantissa.push_back(char(s[i].unicode()));
        anyDigit = true;
        ++i;
    }
    if (i < s.size() && s[i] == u'.') {
        ++i;
        while (i < s.size() && s[i].isDigit() && s[i].unicode() < 128) {
            mantissa.push_back(char(s[i].unicode()));
            ++fractionDigits;
            anyDigit = true;
            ++i;
        }
    }
    if (!anyDigit)
        return false;
    long exponent = 0;
    if (i < s.size() && (s[i] == u'e' || s[i] == u'E')) {
        ++i;
        bool negative = false;
        if (i < s.size() && (s[i] == u'+' || s[i] == u'-' || s[i] == kUnicodeMinus)) {
            negative = s[i] != u'+';
            ++i;
        }
        bool expDigit = false;
        while (i < s.size() && s[i].isDigit() && s[i].unicode() < 128) {
            exponent = exponent * 10 + (s[i].unicode() - u'0');
            if (exponent > kMaxExponent * 10)
                exponent = kMaxExponent * 10; // clamp; rejected as out of range later
            expDigit = true;
            ++i;
        }
        if (!expDigit)
            return false;
        if (negative)
            exponent = -exponent;
    }
    if (i != s.size())
        return false;
    const long scale = exponent - fractionDigits;
    const bool zeroMantissa = mantissa.find_first_not_of('0') == std::string::npos;
    if (zeroMantissa) {
        out = 0;
        return true;
    }
    if (scale > kMaxExponent || scale < -kMaxExponent - maxLength) {
        // Far outside the accepted range: return a stand-in that the range check rejects.
        mpz_class big;
        mpz_ui_pow_ui(big.get_mpz_t(), 10, kMaxExponent);
        out = scale > 0 ? Rational(big) : Rational(mpz_class(1), big);
        return true;
    }
    mpz_class m(mantissa, 10);
    mpz_class p;
    mpz_ui_pow_ui(p.get_mpz_t(), 10, static_cast<unsigned long>(scale < 0 ? -scale : scale));
    if (scale >= 0)
        out = Rational(m * p);
    else
        out = Rational(m, p);
    out.canonicalize();
    return true;
}

bool isNonFiniteWord(QStringView s)
{
    const QString lower = s.toString().toLower();
    return lower == u"nan"_s || lower == u"inf"_s || lower == u"infinity"_s
        || lower == u"+inf"_s || lower == u"-inf"_s || lower == u"-infinity"_s
        || lower == u"-nan"_s || s.contains(u'\u221E');
}

Result<Weight> checkRange(QStringView text, double magnitude, bool zero)
{
    if (!zero && (magnitude > kWeightMaxMagnitude || !std::isfinite(magnitude)))
        return Result<Weight>::failure(u"weight %1 is too large: magnitudes up to 1e300 are accepted"_s.arg(quoted(text)));
    if (!zero && magnitude < kWeightMinMagnitude)
        return Result<Weight>::failure(u"weight %1 is too small: non-zero magnitudes down to 1e-300 are accepted"_s.arg(quoted(text)));
    return Result<Weight>(Weight());
}

} // namespace

double nearestDouble(const Rational &q)
{
    const mpz_class &num = q.get_num();
    const mpz_class &den = q.get_den();
    // Both operands exact in a double: IEEE division rounds correctly.
    if (mpz_sizeinbase(num.get_mpz_t(), 2) <= 53 && mpz_sizeinbase(den.get_mpz_t(), 2) <= 53)
        return num.get_d() / den.get_d();
    // Otherwise mpq_get_d truncates; pick the nearer of it and its neighbour away from zero.
    const double t = q.get_d();
    if (!std::isfinite(t))
        return t;
    const double away = std::nextafter(t, q > 0 ? HUGE_VAL : -HUGE_VAL);
    if (!std::isfinite(away))
        return t;
    const Rational dt = abs(q - Rational(t));
    const Rational da = abs(Rational(away) - q);
    if (da < dt)
        return away;
    if (dt < da)
        return t;
    // A tie: the one with an even last bit.
    std::uint64_t bits = 0;
    std::memcpy(&bits, &t, sizeof bits);
    return (bits & 1u) ? away : t;
}

const Rational &Weight::zero()
{
    static const Rational z(0);
    return z;
}

Weight Weight::exact(const Rational &q)
{
    Weight w;
    w.m_exact = true;
    if (q != 0) {
        w.m_q = q;
        w.m_q->canonicalize();
        w.m_d = nearestDouble(*w.m_q);
    }
    return w;
}

bool operator==(const Weight &a, const Weight &b)
{
    if (a.m_exact != b.m_exact)
        return false;
    return a.m_exact ? a.rational() == b.rational() : a.m_d == b.m_d;
}

QString rationalToString(const Rational &q, bool unicodeMinus)
{
    QString s = QString::fromStdString(q.get_str(10));
    if (unicodeMinus && s.startsWith(u'-'))
        s[0] = QChar(kUnicodeMinus);
    return s;
}

QString shortenedInput(QStringView text)
{
    constexpr qsizetype kShown = 60;
    if (text.size() <= kShown)
        return text.toString();
    return text.left(kShown - 1).toString() + u"\u2026"_s;
}

QString quoted(QStringView text)
{
    return u"'"_s + shortenedInput(text) + u"'"_s;
}

QString doubleToString(double x)
{
    if (x == 0.0)
        return u"0"_s;
    char buf[64];
    auto r = std::to_chars(buf, buf + sizeof buf, x);
    return QString::fromLatin1(buf, r.ptr - buf);
}

bool recogniseFraction(double x, long long &numerator, long long &denominator, long maxDenominator)
{
    if (!(std::abs(x) <= 1e12)) // also NaN and infinities
        return false;
    // Whole parts by conversion to an integer (truncation is floor for the non-negative values
    // below; std::floor is a library call without SSE4.1): this runs for every shown weight.
    if (static_cast<double>(static_cast<long long>(x)) == x) {
        numerator = static_cast<long long>(x);
        denominator = 1;
        return true;
    }
    const double tol = 1e-12 * std::max(1.0, std::abs(x));
    // Continued fraction expansion of |x|.
    long long p0 = 0, q0 = 1, p1 = 1, q1 = 0;
    double frac = std::abs(x);
    for (int iter = 0; iter < 40; ++iter) {
        if (!(frac < 1e13))
            break;
        const long long ai = static_cast<long long>(frac);
        const double a = static_cast<double>(ai);
        const long long p2 = ai * p1 + p0;
        const long long q2 = ai * q1 + q0;
        if (q2 > maxDenominator)
            break;
        p0 = p1; q0 = q1; p1 = p2; q1 = q2;
        // |p/q - |x|| <= tol, multiplied through by q (one division less per step).
        if (std::abs(static_cast<double>(p1) - static_cast<double>(q1) * std::abs(x)) <= tol * static_cast<double>(q1)) {
            numerator = x < 0 ? -p1 : p1;
            denominator = q1;
            return true;
        }
        const double rest = frac - a;
        if (rest <= 0)
            break;
        frac = 1.0 / rest;
    }
    return false;
}

std::optional<Rational> recogniseFraction(double x, long maxDenominator)
{
    long long p = 0, q = 1;
    if (!recogniseFraction(x, p, q, maxDenominator))
        return std::nullopt;
    Rational r(static_cast<long>(p), static_cast<unsigned long>(q));
    r.canonicalize();
    return r;
}

QString Weight::storageString() const
{
    if (m_exact)
        return rationalToString(rational());
    return u"~"_s + doubleToString(m_d);
}

int shortDecimal(double magnitude, char *buf)
{
    if (magnitude == 0.0) {
        buf[0] = '0';
        return 1;
    }
    if (magnitude < 1e-4 || magnitude >= 1e6 || !std::isfinite(magnitude))
        return int(std::to_chars(buf, buf + 32, magnitude, std::chars_format::general, 6).ptr - buf);
    // Six decimals, trailing zeros trimmed, written by hand (std::to_chars with a precision is slow).
    // Rounding half away from zero as std::llround does, without the library call: the product
    // is below 1e12, so adding 1/2 is exact or lands on the next whole number anyway.
    const long long scaled = static_cast<long long>(magnitude * 1e6 + 0.5);
    const long long whole = scaled / 1000000;
    const int frac = static_cast<int>(scaled - whole * 1000000);
    int len = static_cast<int>(std::to_chars(buf, buf + 24, whole).ptr - buf);
    if (frac != 0) {
        // Six digits, two at a time from a table, then trailing zeros trimmed.
        static constexpr char kPairs[] = "00010203040506070809101112131415161718192021222324252627282930313233343536373839"
                                         "40414243444546474849505152535455565758596061626364656667686970717273747576777879"
                                         "8081828384858687888990919293949596979899";
        buf[len++] = '.';
        char *d = buf + len;
        std::memcpy(d, kPairs + 2 * (frac / 10000), 2);
        std::memcpy(d + 2, kPairs + 2 * (frac / 100 % 100), 2);
        std::memcpy(d + 4, kPairs + 2 * (frac % 100), 2);
        int width = 6;
        while (d[width - 1] == '0')
            --width;
        len += width;
    }
    return len;
}

int approxDisplayText(double v, char *buf)
{
    // buf[0] is kept for the sign; the text is moved down when there is none.
    char *end = buf + 1;
    bool negative = v < 0;
    long long p = 0, q = 1;
    if (recogniseFraction(v, p, q)) {
        // At most 19 digits each: the numerator ends before buf + 24, the denominator before buf + 48.
        end = std::to_chars(end, buf + 24, p < 0 ? -p : p).ptr;
        if (q != 1) {
            *end++ = '/';
            end = std::to_chars(end, buf + 48, q).ptr;
        }
        negative = p < 0;
    } else {
        end += shortDecimal(std::abs(v), buf + 1);
        negative = negative && !(end - buf == 2 && buf[1] == '0');
    }
    if (negative) {
        buf[0] = '-';
        return int(end - buf);
    }
    std::memmove(buf, buf + 1, size_t(end - buf - 1));
    return int(end - buf - 1);
}

QString Weight::display(bool unicodeMinus) const
{
    if (m_exact)
        return rationalToString(rational(), unicodeMinus);
    // Written into one small buffer: displays are made for every cell and message.
    char buf[kApproxDisplayBuffer];
    const int len = approxDisplayText(m_d, buf);
    QString s = QString::fromLatin1(buf, len);
    if (unicodeMinus && len > 0 && buf[0] == '-')
        s[0] = QChar(kUnicodeMinus);
    return s;
}

namespace {

Result<Weight> parseWeightUpTo(QStringView input, qsizetype maxLength)
{
    const QStringView text = input.trimmed();
    if (text.isEmpty())
        return Result<Weight>::failure(u"empty weight: "_s + expectedNumber());
    if (text.size() > maxLength)
        return Result<Weight>::failure(u"weight %1 is too long (%2 characters; at most %3)"_s
                                           .arg(quoted(text)).arg(text.size()).arg(maxLength));
    QString s = text.toString();
    s.replace(QChar(kUnicodeMinus), u'-');
    s.remove(u' ');

    if (s.startsWith(u'~')) {
        const QString rest = s.mid(1);
        if (isNonFiniteWord(rest))
            return Result<Weight>::failure(u"weight %1 is not a finite number: "_s.arg(quoted(text)) + expectedNumber());
        const QByteArray latin = rest.toLatin1();
        double d = 0.0;
        auto [ptr, ec] = std::from_chars(latin.constData(), latin.constData() + latin.size(), d);
        if (latin.isEmpty() || ec == std::errc::result_out_of_range)
            return Result<Weight>::failure(u"weight %1 is out of range: magnitudes from 1e-300 to 1e300 are accepted"_s.arg(quoted(text)));
        if (ec != std::errc() || ptr != latin.constData() + latin.size())
            return Result<Weight>::failure(u"weight %1 is not a number: "_s.arg(quoted(text)) + expectedNumber());
        auto range = checkRange(text, std::abs(d), d == 0.0);
        if (!range)
            return range;
        return Result<Weight>(Weight::approx(d));
    }

    if (isNonFiniteWord(s))
        return Result<Weight>::failure(u"weight %1 is not a finite number: "_s.arg(quoted(text)) + expectedNumber());

    auto signedDecimal = [maxLength](QStringView part, Rational &out) {
        bool negative = false;
        if (!part.isEmpty() && (part[0] == u'-' || part[0] == u'+')) {
            negative = part[0] == u'-';
            part = part.mid(1);
        }
        if (!parseDecimal(part, out, maxLength))
            return false;
        if (negative)
            out = -out;
        return true;
    };

    Rational value;
    const qsizetype slash = s.indexOf(u'/');
    if (slash >= 0) {
        if (s.indexOf(u'/', slash + 1) >= 0)
            return Result<Weight>::failure(u"weight %1 has more than one '/': "_s.arg(quoted(text)) + expectedNumber());
        Rational num, den;
        if (!signedDecimal(QStringView(s).left(slash), num) || !signedDecimal(QStringView(s).mid(slash + 1), den))
            return Result<Weight>::failure(u"weight %1 is not a number or fraction: "_s.arg(quoted(text)) + expectedNumber());
        if (den == 0)
            return Result<Weight>::failure(u"weight %1 divides by zero: the denominator must not be 0"_s.arg(quoted(text)));
        value = num / den;
    } else if (!signedDecimal(s, value)) {
        return Result<Weight>::failure(u"weight %1 is not a number: "_s.arg(quoted(text)) + expectedNumber());
    }
    value.canonicalize();
    if (value != 0) {
        // Compare magnitudes exactly against the accepted range.
        mpz_class big;
        mpz_ui_pow_ui(big.get_mpz_t(), 10, 300);
        const Rational a = abs(value);
        if (a > Rational(big))
            return Result<Weight>::failure(u"weight %1 is too large: magnitudes up to 1e300 are accepted"_s.arg(quoted(text)));
        if (a < Rational(mpz_class(1), big))
            return Result<Weight>::failure(u"weight %1 is too small: non-zero magnitudes down to 1e-300 are accepted"_s.arg(quoted(text)));
    }
    return Result<Weight>(Weight::exact(value));
}

} // namespace

Result<Weight> parseWeight(QStringView text)
{
    return parseWeightUpTo(text, kMaxWeightTextLength);
}

Result<Weight> parseStoredWeight(QStringView text)
{
    return parseWeightUpTo(text, kMaxStoredWeightLength);
}

} // namespace cb
