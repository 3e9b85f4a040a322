// The one number formatter: significant digits, the missing mark, the p-value rule, JSON numbers.
#include "core/base/NumberText.h"

#include <QTest>

#include <cmath>
#include <limits>

using namespace Qt::StringLiterals;
using namespace cb;

class TestNumberText : public QObject
{
    Q_OBJECT
private slots:
    void numbers_data();
    void numbers();
    void pValues_data();
    void pValues();
    void pClauses();
    void jsonNumbers();
};

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kInf = std::numeric_limits<double>::infinity();

void TestNumberText::numbers_data()
{
    QTest::addColumn<double>("value");
    QTest::addColumn<int>("digits");
    QTest::addColumn<QString>("text");
    // As QString::number(v, 'g', digits) writes finite numbers.
    QTest::newRow("4 digits") << 0.62343 << 4 << u"0.6234"_s;
    QTest::newRow("whole") << 27.0 << 10 << u"27"_s;
    QTest::newRow("6 digits") << 5.032 << 6 << u"5.032"_s;
    QTest::newRow("large") << 123456.0 << 4 << u"1.235e+05"_s;
    QTest::newRow("missing") << kNaN << 4 << u"\u2014"_s;
    QTest::newRow("infinite") << kInf << 4 << u"\u221e"_s;
    QTest::newRow("minus infinite") << -kInf << 4 << u"-\u221e"_s;
}

void TestNumberText::numbers()
{
    QFETCH(double, value);
    QFETCH(int, digits);
    QFETCH(QString, text);
    QCOMPARE(numberText(value, digits), text);
    QCOMPARE(numberText(std::optional<double>(value), digits), text);
}

void TestNumberText::pValues_data()
{
    QTest::addColumn<double>("p");
    QTest::addColumn<QString>("text");
    QTest::newRow("four decimals") << 0.015906 << u"0.0159"_s;
    QTest::newRow("one") << 1.0 << u"1.0000"_s;
    QTest::newRow("at the smallest shown") << 1e-4 << u"0.0001"_s;
    QTest::newRow("below the smallest shown") << 9.9e-5 << u"< 0.0001"_s;
    QTest::newRow("far below") << 1e-300 << u"< 0.0001"_s;
    QTest::newRow("zero") << 0.0 << u"< 0.0001"_s;
    QTest::newRow("undefined") << kNaN << u"\u2014"_s;
}

void TestNumberText::pValues()
{
    QFETCH(double, p);
    QFETCH(QString, text);
    QCOMPARE(pValueText(p), text);
}

void TestNumberText::pClauses()
{
    QCOMPARE(pClause(0.015906), u"p = 0.0159"_s);
    QCOMPARE(pClause(1e-20), u"p < 0.0001"_s);
    QCOMPARE(pClause(kNaN), u"p = \u2014"_s);
    QCOMPARE(numberText(std::optional<double>()), kMissingMark.toString());
}

void TestNumberText::jsonNumbers()
{
    QCOMPARE(jsonNumber(2.5), QJsonValue(2.5));
    QVERIFY(jsonNumber(kNaN).isNull());
    QVERIFY(jsonNumber(kInf).isNull());
    QVERIFY(jsonNumber(std::optional<double>()).isNull());
    QCOMPARE(jsonNumber(std::optional<double>(-1.0)), QJsonValue(-1.0));
}

QTEST_GUILESS_MAIN(TestNumberText)
#include "TestNumberText.moc"
