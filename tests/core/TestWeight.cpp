// Tests of the weight parser and of how weights are shown.
#include "core/base/TextBuilder.h"
#include "core/base/Weight.h"

#include <QTest>

#include <cmath>
#include <cstdio>
#include <random>
#include <string>

using namespace Qt::StringLiterals;
using namespace cb;

class TestWeight : public QObject
{
    Q_OBJECT
private slots:
    void parsesExactly_data();
    void parsesExactly();
    void rejects_data();
    void rejects();
    void approximateRoundTrip();
    void recognisesFractions_data();
    void recognisesFractions();
    void displaysApproximate();
    void shortDecimalMatchesPrintf();
    void generalNumberMatchesQt();
};

void TestWeight::parsesExactly_data()
{
    QTest::addColumn<QString>("text");
    QTest::addColumn<QString>("exact");
    QTest::newRow("integer") << u"2"_s << u"2"_s;
    QTest::newRow("fraction") << u"1/3"_s << u"1/3"_s;
    QTest::newRow("negative fraction") << u"-2/3"_s << u"-2/3"_s;
    QTest::newRow("unicode minus") << u"\u22122/3"_s << u"-2/3"_s;
    QTest::newRow("decimal is exact") << u"0.25"_s << u"1/4"_s;
    QTest::newRow("0.1 is exactly 1/10") << u"0.1"_s << u"1/10"_s;
    QTest::newRow("exponent") << u"1e-3"_s << u"1/1000"_s;
    QTest::newRow("exponent upper") << u"2.5E2"_s << u"250"_s;
    QTest::newRow("plus sign") << u"+1/2"_s << u"1/2"_s;
    QTest::newRow("reduces") << u"6/8"_s << u"3/4"_s;
    QTest::newRow("negative denominator") << u"1/-4"_s << u"-1/4"_s;
    QTest::newRow("spaces") << u"  -1 / 2 "_s << u"-1/2"_s;
    QTest::newRow("leading dot") << u".5"_s << u"1/2"_s;
    QTest::newRow("zero") << u"-0"_s << u"0"_s;
    QTest::newRow("decimal fraction") << u"0.5/3"_s << u"1/6"_s;
    QTest::newRow("tiny accepted") << u"1e-300"_s << (u"1/1"_s + QString(300, u'0'));
}

void TestWeight::parsesExactly()
{
    QFETCH(QString, text);
    QFETCH(QString, exact);
    auto w = parseWeight(text);
    QVERIFY2(w.ok(), qPrintable(w.error()));
    QVERIFY(w->isExact());
    QCOMPARE(w->storageString(), exact);
}

void TestWeight::rejects_data()
{
    QTest::addColumn<QString>("text");
    QTest::addColumn<QString>("messagePart");
    QTest::newRow("division by zero") << u"1/0"_s << u"'1/0' divides by zero"_s;
    QTest::newRow("letters") << u"abc"_s << u"'abc' is not a number"_s;
    QTest::newRow("empty") << u""_s << u"empty weight"_s;
    QTest::newRow("blank") << u"   "_s << u"empty weight"_s;
    QTest::newRow("nan") << u"NaN"_s << u"'NaN' is not a finite number"_s;
    QTest::newRow("inf") << u"inf"_s << u"'inf' is not a finite number"_s;
    QTest::newRow("-infinity") << u"-Infinity"_s << u"not a finite number"_s;
    QTest::newRow("overflow") << u"1e400"_s << u"'1e400' is too large"_s;
    QTest::newRow("huge exponent") << u"1e99999999999"_s << u"too large"_s;
    QTest::newRow("underflow") << u"1e-400"_s << u"'1e-400' is too small"_s;
    QTest::newRow("two slashes") << u"1/2/3"_s << u"more than one '/'"_s;
    QTest::newRow("trailing junk") << u"1.5x"_s << u"'1.5x' is not a number"_s;
    QTest::newRow("double dot") << u"1..5"_s << u"is not a number"_s;
    QTest::newRow("bare exponent") << u"1e"_s << u"is not a number"_s;
    QTest::newRow("half fraction") << u"1/"_s << u"is not a number or fraction"_s;
    QTest::newRow("approx nan") << u"~nan"_s << u"not a finite number"_s;
    QTest::newRow("approx junk") << u"~1.2.3"_s << u"is not a number"_s;
    QTest::newRow("approx overflow") << u"~1e999"_s << u"out of range"_s;
    QTest::newRow("too long") << QString(500, u'1') << u"too long"_s;
    QTest::newRow("non-ascii digits") << u"\u0663"_s << u"is not a number"_s;
}

void TestWeight::rejects()
{
    QFETCH(QString, text);
    QFETCH(QString, messagePart);
    auto w = parseWeight(text);
    QVERIFY(!w.ok());
    QVERIFY2(w.error().contains(messagePart), qPrintable(w.error()));
}

void TestWeight::approximateRoundTrip()
{
    const double v = 0.7071067811865476; // 1/sqrt(2), the double nearest
    const Weight w = Weight::approx(v);
    QCOMPARE(w.storageString(), u"~0.7071067811865476"_s);
    auto back = parseWeight(w.storageString());
    QVERIFY(back.ok());
    QVERIFY(!back->isExact());
    QCOMPARE(back->value(), v);
}

void TestWeight::recognisesFractions_data()
{
    QTest::addColumn<double>("value");
    QTest::addColumn<QString>("shown");
    QTest::newRow("1/3") << 1.0 / 3.0 << u"1/3"_s;
    QTest::newRow("-2/3") << -2.0 / 3.0 << u"-2/3"_s;
    QTest::newRow("1/7 after arithmetic") << (0.1 + 0.2 - 0.3 + 1.0 / 7.0) << u"1/7"_s;
    QTest::newRow("3/4") << 0.75 << u"3/4"_s;
    QTest::newRow("irrational") << 0.7071067811865476 << u"0.707107"_s;
    QTest::newRow("tiny irrational") << 1.234e-7 << u"1.234e-07"_s;
}

void TestWeight::recognisesFractions()
{
    QFETCH(double, value);
    QFETCH(QString, shown);
    QCOMPARE(Weight::approx(value).display(), shown);
}

void TestWeight::displaysApproximate()
{
    QCOMPARE(Weight::exact(Rational(-2, 3)).display(true), u"\u22122/3"_s);
    QCOMPARE(Weight::approx(-0.5).display(true), u"\u22121/2"_s);
}

// shortDecimal writes six decimals by hand (it runs for every weight in every hypothesis text);
// the reference is the C library's "%.6f" with trailing zeros trimmed. The hand-written rounding
// forms x * 1e6 in floating point, so only values within rounding of a tie (x * 1e6 within 1e-3
// of a half) may come out one unit different; every other value must match to the character.
void TestWeight::shortDecimalMatchesPrintf()
{
    std::mt19937_64 rng(20261202);
    std::uniform_real_distribution<double> exponent(-4.0, 6.0);
    std::vector<double> values{1e-4, 0.5, 1.0, 0.999999, 0.9999995, 999999.999999, 123456.000001, 0.000123, 2.5e-6 + 1e-4};
    for (int i = 0; i < 20000; ++i)
        values.push_back(std::pow(10.0, exponent(rng)));
    int nearTies = 0;
    for (double v : values) {
        char ours[40];
        const std::string mine(ours, size_t(shortDecimal(v, ours)));
        char ref[64];
        std::snprintf(ref, sizeof ref, "%.6f", v);
        std::string expected(ref);
        expected.erase(expected.find_last_not_of('0') + 1);
        if (expected.back() == '.')
            expected.pop_back();
        if (mine == expected)
            continue;
        const long double scaled = static_cast<long double>(v) * 1e6L;
        const long double fromHalf = std::abs(scaled - std::floor(scaled) - 0.5L);
        QVERIFY2(fromHalf < 1e-3L, qPrintable(u"%1: %2, expected %3"_s.arg(v, 0, 'g', 17).arg(QString::fromStdString(mine), QString::fromStdString(expected))));
        ++nearTies;
    }
    QVERIFY(nearTies < 20);
}

// Findings write VIFs and condition numbers through TextBuilder::appendGeneral (std::to_chars);
// they must read exactly as QString::number(v, 'g', precision) wrote them before.
void TestWeight::generalNumberMatchesQt()
{
    std::mt19937_64 rng(7);
    std::uniform_real_distribution<double> exponent(-12.0, 15.0);
    std::vector<double> values{5.0, 10.0, 10.04999, 12345.5, 1e6, 0.0001, 99995.0, 1.0 / 3.0};
    for (int i = 0; i < 5000; ++i)
        values.push_back(std::pow(10.0, exponent(rng)));
    for (double v : values)
        for (int precision : {2, 4, 6}) {
            TextBuilder t;
            t.appendGeneral(v, precision);
            QCOMPARE(t.toString(), QString::number(v, 'g', precision));
        }
}

QTEST_GUILESS_MAIN(TestWeight)
#include "TestWeight.moc"
