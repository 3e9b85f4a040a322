// What a coding implies: texts, diagnostics with closed-form values, findings, the reverse direction.
#include "core/analysis/Analysis.h"
#include "core/analysis/HypothesisText.h"
#include "core/model/Scheme.h"

#include "tests/support/FindingSupport.h"

#include <QTest>

#include <cmath>

using namespace Qt::StringLiterals;
using namespace cb;

namespace {

Factor irrigation(std::vector<Rational> n = {})
{
    Factor f;
    f.name = u"irrigation"_s;
    f.levels = QStringList{u"none"_s, u"weekly"_s, u"twice"_s, u"daily"_s};
    f.plannedN = std::move(n);
    return f;
}

std::vector<Weight> row(std::initializer_list<const char16_t *> items)
{
    std::vector<Weight> out;
    for (const char16_t *t : items)
        out.push_back(parseWeight(QString::fromUtf16(t)).value());
    return out;
}

Scheme custom(const Factor &f, std::vector<std::vector<Weight>> cols, bool intercept = true)
{
    Scheme s;
    s.factor = f;
    s.intercept = intercept;
    int j = 0;
    for (auto &c : cols)
        s.columns.push_back(Column{u"c%1"_s.arg(++j), std::move(c)});
    return s;
}

using test::hasFinding;

} // namespace

class TestAnalysis : public QObject
{
    Q_OBJECT
private slots:
    void hypothesisTexts_data();
    void hypothesisTexts();
    void interceptMeanings();
    void recogniserOrder_data();
    void recogniserOrder();
    void treatmentTwoLevelConditionNumber();
    void treatmentVifIsFourThirds();
    void orthogonalAsWrittenButNotUnderN();
    void partialSetDependsOnSizes();
    void findingsGiveReasons();
    void zeroColumnIsExplained();
    void exactLimitIsReported();
    void reverseDirection();
    void reverseDirectionErrors_data();
    void reverseDirectionErrors();
};

void TestAnalysis::hypothesisTexts_data()
{
    QTest::addColumn<QStringList>("weights");
    QTest::addColumn<QString>("symbols");
    QTest::addColumn<QString>("words");
    QTest::addColumn<QString>("combination");
    QTest::newRow("two against one") << QStringList{u"-1"_s, u"1/2"_s, u"1/2"_s, u"0"_s}
                                     << u"b2: mean(weekly, twice) - mean(none) = 0"_s
                                     << u"the average of weekly and twice minus none"_s
                                     << u"(weekly + twice)/2 - none"_s;
    QTest::newRow("unequal weights") << QStringList{u"-1"_s, u"2/3"_s, u"1/3"_s, u"0"_s}
                                     << u"b2: (2 weekly + twice)/3 - none = 0"_s
                                     << u"a contrast of the level means (weights sum to 0): (2 weekly + twice)/3 - none"_s
                                     << u"(2 weekly + twice)/3 - none"_s;
    QTest::newRow("scaled difference") << QStringList{u"-2"_s, u"2"_s, u"0"_s, u"0"_s}
                                       << u"b2: 2 * (mean(weekly) - mean(none)) = 0"_s
                                       << u"2 times the difference: weekly minus none"_s
                                       << u"2 weekly - 2 none"_s;
    QTest::newRow("three against one") << QStringList{u"-1/3"_s, u"-1/3"_s, u"-1/3"_s, u"1"_s}
                                       << u"b2: mean(daily) - mean(none, weekly, twice) = 0"_s
                                       << u"daily minus the average of none, weekly and twice"_s
                                       << u"daily - (none + weekly + twice)/3"_s;
    QTest::newRow("not a comparison") << QStringList{u"1/3"_s, u"0"_s, u"0"_s, u"0"_s}
                                      << u"b2: none/3 = 0"_s
                                      << u"not a pure comparison: the weights sum to 1/3, so it mixes the overall level with differences: none/3"_s
                                      << u"none/3"_s;
    QTest::newRow("level minus grand mean (sum coding)") << QStringList{u"-1/4"_s, u"3/4"_s, u"-1/4"_s, u"-1/4"_s}
                                                         << u"b2: mean(weekly) - grand mean = 0"_s
                                                         << u"weekly minus the unweighted mean of all 4 level means"_s
                                                         << u"3 weekly/4 - (none + twice + daily)/4"_s;
    QTest::newRow("all zero") << QStringList{u"0"_s, u"0"_s, u"0"_s, u"0"_s} << u"b2: 0 = 0"_s << u"nothing: every weight is 0"_s << u"0"_s;
    QTest::newRow("irrational") << QStringList{u"~-0.7071067811865476"_s, u"0"_s, u"0"_s, u"~0.7071067811865476"_s}
                                << u"b2: -0.707107 none + 0.707107 daily = 0"_s
                                << u"a weighted combination of the level means (weights not simple fractions): -0.707107 none + 0.707107 daily"_s
                                << u"-0.707107 none + 0.707107 daily"_s;
    QTest::newRow("floating but simple") << QStringList{u"~-0.5"_s, u"~-0.5"_s, u"~0.5"_s, u"~0.5"_s}
                                         << u"b2: mean(twice, daily) - mean(none, weekly) = 0"_s
                                         << u"the average of twice and daily minus the average of none and weekly"_s
                                         << u"(twice + daily)/2 - (none + weekly)/2"_s;
}

void TestAnalysis::hypothesisTexts()
{
    QFETCH(QStringList, weights);
    QFETCH(QString, symbols);
    QFETCH(QString, words);
    QFETCH(QString, combination);
    std::vector<Weight> r;
    for (const QString &w : weights)
        r.push_back(parseWeight(w).value());
    const HypothesisText t = describeHypothesis(r, irrigation().levels, irrigation().sizes(), false, u"b2"_s);
    QCOMPARE(t.symbols, symbols);
    QCOMPARE(t.words, words);
    QCOMPARE(t.combination, combination);
}

void TestAnalysis::interceptMeanings()
{
    const Factor f = irrigation({Rational(10), Rational(20), Rational(30), Rational(40)});
    auto treat = analyze(makeScheme(f, SchemeKind::Treatment).take());
    QCOMPARE(treat.hypothesisWords[0], u"the mean of none"_s);
    QCOMPARE(treat.hypothesisSymbols[0], u"b0: mean(none)"_s);
    auto sum = analyze(makeScheme(f, SchemeKind::Sum).take());
    QCOMPARE(sum.hypothesisWords[0], u"the unweighted mean of the 4 level means"_s);
    auto wec = analyze(makeScheme(f, SchemeKind::WeightedEffect).take());
    QCOMPARE(wec.hypothesisWords[0], u"the mean of the level means weighted by the planned n (the overall mean of all observations)"_s);
    QCOMPARE(wec.hypothesisCombinations[0], u"(none + 2 weekly + 3 twice + 4 daily)/10"_s);
    QCOMPARE(wec.hypothesisSymbols[1], u"b1: mean(none) - weighted grand mean = 0"_s);
    QCOMPARE(wec.hypothesisWords[1], u"none minus the mean of all 4 levels weighted by the planned n"_s);
}

// describeHypothesis tries its recognisers in order; these rows fit two of them, and the
// first in the list speaks. (Every row also fits the general combination, tried last.)
void TestAnalysis::recogniserOrder_data()
{
    QTest::addColumn<QStringList>("weights");
    QTest::addColumn<QStringList>("sizes");
    QTest::addColumn<bool>("isIntercept");
    QTest::addColumn<QString>("words");
    // Also a scaled difference of averages: "2/3 times the difference: a minus the average of b and c".
    QTest::newRow("level minus grand mean before difference, k = 3")
        << QStringList{u"2/3"_s, u"-1/3"_s, u"-1/3"_s} << QStringList{u"1"_s, u"1"_s, u"1"_s} << false
        << u"a minus the unweighted mean of all 3 level means"_s;
    // Also "1/2 times the difference: a minus b".
    QTest::newRow("level minus grand mean before difference, k = 2")
        << QStringList{u"1/2"_s, u"-1/2"_s} << QStringList{u"1"_s, u"1"_s} << false
        << u"a minus the unweighted mean of all 2 level means"_s;
    // e_a - n/N with n = (1, 3); also "3/4 times the difference: a minus b".
    QTest::newRow("level minus weighted grand mean before difference")
        << QStringList{u"3/4"_s, u"-3/4"_s} << QStringList{u"1"_s, u"3"_s} << false
        << u"a minus the mean of all 2 levels weighted by the planned n"_s;
    // Also the unweighted mean of the one level.
    QTest::newRow("one level's mean before the unweighted mean")
        << QStringList{u"1"_s} << QStringList{u"1"_s} << true << u"the mean of a"_s;
    // Also the shares n/N of n = (3, 0, 0).
    QTest::newRow("one level's mean before the size-weighted mean")
        << QStringList{u"1"_s, u"0"_s, u"0"_s} << QStringList{u"3"_s, u"0"_s, u"0"_s} << true << u"the mean of a"_s;
    // Also a weighted average of the level means (the intercept's last recogniser).
    QTest::newRow("unweighted mean before weighted average")
        << QStringList{u"1/2"_s, u"1/2"_s} << QStringList{u"1"_s, u"2"_s} << true
        << u"the unweighted mean of the 2 level means"_s;
}

void TestAnalysis::recogniserOrder()
{
    QFETCH(QStringList, weights);
    QFETCH(QStringList, sizes);
    QFETCH(bool, isIntercept);
    QFETCH(QString, words);
    const QStringList levels = QStringList{u"a"_s, u"b"_s, u"c"_s}.mid(0, weights.size());
    std::vector<Weight> r;
    std::vector<Rational> n;
    for (qsizetype i = 0; i < weights.size(); ++i) {
        r.push_back(parseWeight(weights[i]).value());
        n.push_back(parseWeight(sizes[i]).value().rational());
    }
    QCOMPARE(describeHypothesis(r, levels, n, isIntercept, u"b1"_s).words, words);
}

void TestAnalysis::treatmentTwoLevelConditionNumber()
{
    // X = [1 0; 1 1] with unit-length columns: the Gram matrix [[1, 1/sqrt2], [1/sqrt2, 1]] has
    // eigenvalues 1 +- 1/sqrt2, so the condition number is sqrt((1 + 1/sqrt2)/(1 - 1/sqrt2)) = 1 + sqrt2
    // (closed form, worked by hand).
    Factor f;
    f.levels = QStringList{u"a"_s, u"b"_s};
    const Analysis a = analyze(makeScheme(f, SchemeKind::Treatment).take());
    QVERIFY(a.conditionNumber);
    QVERIFY(std::abs(*a.conditionNumber - (1.0 + std::sqrt(2.0))) < 1e-14);
    QCOMPARE(a.conditionIndices.size(), size_t(2));
    QCOMPARE(a.conditionIndices[0], 1.0);
}

void TestAnalysis::treatmentVifIsFourThirds()
{
    // Treatment coding, k = 3, equal n: the two dummies have variance 2/9 and covariance -1/9,
    // correlation -1/2, so VIF = 1/(1 - 1/4) = 4/3 (worked by hand).
    Factor f;
    f.levels = QStringList{u"a"_s, u"b"_s, u"c"_s};
    const Analysis a = analyze(makeScheme(f, SchemeKind::Treatment).take());
    QVERIFY(std::abs(*a.vif[0] - 4.0 / 3.0) < 1e-14);
    QVERIFY(std::abs(*a.vif[1] - 4.0 / 3.0) < 1e-14);
    QVERIFY(std::abs(a.correlation(0, 1) + 0.5) < 1e-15);
    // Orthogonal as written (e_b . e_c = 0) but not in the design (centred cross-product -1/3 per unit n).
    QVERIFY(a.orthogonal(0, 1));
    QVERIFY(!a.orthogonalInDesign(0, 1));
    QCOMPARE(a.designCrossProducts(0, 1).display(), u"-1/3"_s);
}

void TestAnalysis::orthogonalAsWrittenButNotUnderN()
{
    // Helmert columns are orthogonal as written; with unequal n the centred, n-weighted
    // cross-product of columns 1 and 2 is sum n c1 c2 - (sum n c1)(sum n c2)/N.
    // For n = (10, 20, 30, 40) and Helmert c1 = (3/4, -1/4, -1/4, -1/4), c2 = (0, 2/3, -1/3, -1/3):
    // sum n c1 c2 = 20(-1/6) + 30(1/12) + 40(1/12) = 5/2; sum n c1 = 7.5 - 22.5 = -15;
    // sum n c2 = 40/3 - 10 - 40/3 = -10; so 5/2 - 150/100 = 1 (worked by hand).
    const Factor f = irrigation({Rational(10), Rational(20), Rational(30), Rational(40)});
    const Analysis a = analyze(makeScheme(f, SchemeKind::Helmert).take());
    QVERIFY(a.orthogonal(0, 1));
    QVERIFY(!a.orthogonalInDesign(0, 1));
    QCOMPARE(a.designCrossProducts(0, 1).display(), u"1"_s);
    QVERIFY(hasFinding(a, u"not orthogonal under the planned n"_s));
    // Equal n: orthogonal both ways, condition number 1 in the centred columns but not with the intercept scaled...
    const Analysis eq = analyze(makeScheme(irrigation(), SchemeKind::Helmert).take());
    QVERIFY(eq.orthogonalInDesign(0, 1));
    QVERIFY(std::abs(*eq.conditionNumber - 1.0) < 1e-14); // sum-zero orthogonal columns are orthogonal to the intercept too
}

void TestAnalysis::partialSetDependsOnSizes()
{
    // One column (linear trend -3,-1,1,3) with an intercept, n = (1,1,1,1):
    // b1 = sum c_i mean_i / sum c_i^2 = (-3, -1, 1, 3)/20 (least squares, worked by hand).
    Scheme s = custom(irrigation(), {row({u"-3", u"-1", u"1", u"3"})});
    const Analysis a = analyze(s);
    QVERIFY(a.dependsOnSizes);
    QVERIFY(a.fullRank);
    QCOMPARE(a.hypotheses[1][0].display(), u"-3/20"_s);
    QCOMPARE(a.hypotheses[1][3].display(), u"3/20"_s);
    QCOMPARE(a.hypotheses[0][0].display(), u"1/4"_s);
    QVERIFY(hasFinding(a, u"depends on the group sizes"_s));
}

void TestAnalysis::findingsGiveReasons()
{
    Scheme s = custom(irrigation(), {row({u"1", u"0", u"0", u"-1"}), row({u"0", u"1", u"1/3", u"0"}), row({u"1", u"0", u"0", u"-1"})});
    const Analysis a = analyze(s);
    QVERIFY(hasFinding(a, u"columns 1 and 3 are identical"_s));
    QVERIFY(hasFinding(a, u"column 2 ('c2') sums to 4/3, not 0"_s));
    QVERIFY(!a.fullRank);
    QCOMPARE(a.dependencies, QStringList{u"c3 = c1"_s});
}

void TestAnalysis::zeroColumnIsExplained()
{
    Scheme s = custom(irrigation(), {row({u"1", u"-1", u"0", u"0"}), row({u"0", u"0", u"0", u"0"})});
    const Analysis a = analyze(s);
    QVERIFY(!a.fullRank);
    QCOMPARE(a.dependencies, QStringList{u"c2 = 0"_s});
    QVERIFY(!a.conditionNumber);
    QVERIFY(!a.vif[1]);
    QVERIFY(hasFinding(a, u"column 2 ('c2') is constant across the levels"_s));
}

void TestAnalysis::exactLimitIsReported()
{
    Factor f;
    for (int i = 0; i < kExactLevelLimit + 1; ++i)
        f.levels << u"x%1"_s.arg(i);
    const Analysis a = analyze(makeScheme(f, SchemeKind::Helmert).take());
    QVERIFY(!a.exact);
    QVERIFY(hasFinding(a, u"41 levels is above the exact-arithmetic limit of 40"_s));
    // Fractions are still recognised from the doubles.
    QCOMPARE(a.hypothesisSymbols[1], u"b1: mean(x0) - mean(x1, x2, x3, x4, x5, x6, x7, x8, x9, x10, x11, x12, x13, x14, x15, x16, x17, x18, x19, "
                                     "x20, x21, x22, x23, x24, x25, x26, x27, x28, x29, x30, x31, x32, x33, x34, x35, x36, x37, x38, x39, x40) = 0"_s);
}

void TestAnalysis::reverseDirection()
{
    // Two planned comparisons plus one more: any irrigation vs none, daily vs weekly, twice vs the rest.
    const Factor f = irrigation();
    std::vector<std::vector<Weight>> rows{row({u"-1", u"1/3", u"1/3", u"1/3"}), row({u"0", u"-1", u"0", u"1"}),
                                          row({u"0", u"-1/2", u"1", u"-1/2"})};
    auto cols = codingFromHypotheses(f, rows, true);
    QVERIFY2(cols.ok(), qPrintable(cols.error()));
    Scheme s;
    s.factor = f;
    s.columns = cols.take();
    const Analysis a = analyze(s);
    QVERIFY(a.exact);
    for (size_t r = 0; r < rows.size(); ++r)
        for (int i = 0; i < 4; ++i)
            QVERIFY(a.hypotheses[r + 1][size_t(i)] == rows[r][size_t(i)]);
    QCOMPARE(a.hypothesisWords[0], u"the unweighted mean of the 4 level means"_s);
    QCOMPARE(a.hypothesisSymbols[1], u"b1: mean(weekly, twice, daily) - mean(none) = 0"_s);
}

void TestAnalysis::reverseDirectionErrors_data()
{
    QTest::addColumn<QList<QStringList>>("rows");
    QTest::addColumn<bool>("intercept");
    QTest::addColumn<QString>("message");
    QTest::newRow("row does not sum to 0") << QList<QStringList>{{u"1"_s, u"0"_s, u"0"_s, u"0"_s}} << true
                                           << u"hypotheses: row 1 sums to 1; with an intercept each comparison must sum to 0 (or turn the intercept off)"_s;
    QTest::newRow("dependent rows") << QList<QStringList>{{u"1"_s, u"-1"_s, u"0"_s, u"0"_s}, {u"2"_s, u"-2"_s, u"0"_s, u"0"_s}} << true
                                    << u"hypotheses: the rows are linearly dependent, so no coding can test them all"_s;
    QTest::newRow("too many rows") << QList<QStringList>{{u"1"_s, u"-1"_s, u"0"_s, u"0"_s}, {u"1"_s, u"0"_s, u"-1"_s, u"0"_s},
                                                         {u"1"_s, u"0"_s, u"0"_s, u"-1"_s}, {u"0"_s, u"1"_s, u"-1"_s, u"0"_s}} << true
                                   << u"hypotheses: 4 rows for 4 levels; at most 3 can be tested beside the intercept"_s;
    QTest::newRow("wrong length") << QList<QStringList>{{u"1"_s, u"-1"_s}} << false
                                  << u"hypotheses: row 1 has 2 weights for 4 levels; give one per level"_s;
}

void TestAnalysis::reverseDirectionErrors()
{
    QFETCH(QList<QStringList>, rows);
    QFETCH(bool, intercept);
    QFETCH(QString, message);
    std::vector<std::vector<Weight>> r;
    for (const QStringList &l : rows) {
        std::vector<Weight> w;
        for (const QString &t : l)
            w.push_back(parseWeight(t).value());
        r.push_back(w);
    }
    auto cols = codingFromHypotheses(irrigation(), r, intercept);
    QVERIFY(!cols.ok());
    QCOMPARE(cols.error(), message);
}

QTEST_GUILESS_MAIN(TestAnalysis)
#include "TestAnalysis.moc"
