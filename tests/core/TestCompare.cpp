// Two codings side by side (core/analysis/Compare.h): the classification of each coefficient
// (same, rescaled, different) on cases derived by hand in the comments, and the wording for the
// four pairs people ask about most.
#include "core/analysis/Compare.h"
#include "core/model/Scheme.h"

#include <QTest>

#include <cmath>

using namespace Qt::StringLiterals;
using namespace cb;

namespace {

Factor factorOf(const QStringList &levels, std::vector<Rational> n = {}, std::vector<Weight> spacing = {})
{
    Factor f;
    f.name = u"f"_s;
    f.levels = levels;
    f.plannedN = std::move(n);
    f.spacing = std::move(spacing);
    return f;
}

Scheme schemeOf(const Factor &f, SchemeKind kind, int reference = -1, PolynomialForm form = PolynomialForm::Orthonormal)
{
    SchemeOptions o;
    o.reference = reference;
    o.polynomialForm = form;
    auto s = makeScheme(f, kind, o);
    if (!s)
        qFatal("makeScheme failed: %s", qPrintable(s.error()));
    return s.take();
}

CodingComparison compare(const Scheme &a, const Scheme &b)
{
    auto c = compareCodings(a, b);
    if (!c)
        qFatal("compareCodings failed: %s", qPrintable(c.error()));
    return c.take();
}

const QStringList kAbc{u"a"_s, u"b"_s, u"c"_s};
const QStringList kAb{u"a"_s, u"b"_s};

// One letter per coefficient: S same, R rescaled, D different, U unavailable.
QString kinds(const CodingComparison &c)
{
    QString out;
    for (const ComparedCoefficient &cc : c.coefficients)
        out += cc.relation.kind == Correspondence::Same ? u'S' : cc.relation.kind == Correspondence::Rescaled ? u'R'
             : cc.relation.kind == Correspondence::Different ? u'D' : u'U';
    return out;
}

} // namespace

class TestCompare : public QObject
{
    Q_OBJECT

private slots:
    void relateRowsExactly_data()
    {
        QTest::addColumn<QString>("left");
        QTest::addColumn<QString>("right");
        QTest::addColumn<int>("kind");
        QTest::addColumn<QString>("factor");
        QTest::newRow("identical") << u"-1,1,0"_s << u"-1,1,0"_s << int(Correspondence::Same) << u"1"_s;
        QTest::newRow("half, sign flipped") << u"-1,1,0"_s << u"1/2,-1/2,0"_s << int(Correspondence::Rescaled) << u"-1/2"_s;
        QTest::newRow("thirds") << u"2/3,-1/3,-1/3"_s << u"1,-1/2,-1/2"_s << int(Correspondence::Rescaled) << u"3/2"_s;
        QTest::newRow("not proportional") << u"-1,1,0"_s << u"-1,0,1"_s << int(Correspondence::Different) << QString();
        QTest::newRow("zero against a row") << u"0,0,0"_s << u"-1,0,1"_s << int(Correspondence::Different) << QString();
        QTest::newRow("a row against zero") << u"-1,0,1"_s << u"0,0,0"_s << int(Correspondence::Different) << QString();
    }
    void relateRowsExactly()
    {
        QFETCH(QString, left);
        QFETCH(QString, right);
        QFETCH(int, kind);
        QFETCH(QString, factor);
        auto row = [](const QString &t) {
            std::vector<Weight> r;
            for (const QString &x : t.split(u','))
                r.push_back(*parseWeight(x));
            return r;
        };
        const RowRelation rel = relateRows(row(left), row(right));
        QCOMPARE(int(rel.kind), kind);
        QCOMPARE(rel.factor ? rel.factor->display() : QString(), factor);
        if (rel.factor)
            QVERIFY(rel.factor->isExact());
    }

    // Treatment (reference a) and simple (reference a), k = 3. Treatment's intercept is mean(a);
    // simple's is (a + b + c)/3 (its columns are indicator minus 1/3, so they sum to 0). Both
    // slopes are b - a and c - a. So: intercept different, b1 and b2 the same.
    void treatmentAgainstSimpleKeepsTheSlopes()
    {
        const Factor f = factorOf(kAbc);
        const CodingComparison c = compare(schemeOf(f, SchemeKind::Treatment, 0), schemeOf(f, SchemeKind::Simple, 0));
        QCOMPARE(kinds(c), u"DSS"_s);
        QCOMPARE(c.coefficients[1].relation.factor->display(), u"1"_s);
    }

    // k = 2, treatment with reference a against sum with base b (coded a: 1, b: -1).
    // Treatment: b1 = b - a. Sum: X = [1 1; 1 -1], X^-1 = [1/2 1/2; 1/2 -1/2], so
    // b1 = (a - b)/2 = -1/2 (b - a): rescaled by -1/2. Intercepts a and (a + b)/2 differ.
    void treatmentAgainstSumWithTwoLevelsIsRescaled()
    {
        const Factor f = factorOf(kAb);
        const CodingComparison c = compare(schemeOf(f, SchemeKind::Treatment, 0), schemeOf(f, SchemeKind::Sum, 1));
        QCOMPARE(kinds(c), u"DR"_s);
        QCOMPARE(c.coefficients[1].relation.factor->display(), u"-1/2"_s);
        QCOMPARE(c.coefficients[1].verdict,
                 u"Rescaled: the second estimates \u22121/2 \u00d7 the first (a minus the unweighted mean of all 2 level means). "
                 "The null hypothesis and its t and p are the same; the estimate and its standard error are multiplied by \u22121/2."_s);
    }

    // k = 3, treatment (reference a) against sum (base c). Treatment: b0 = a, b1 = b - a,
    // b2 = c - a. Sum: b0 = (a + b + c)/3, b1 = a - (a + b + c)/3 = (2a - b - c)/3,
    // b2 = (-a + 2b - c)/3. No pair is proportional (b - a has weight 0 on c, (2a - b - c)/3
    // does not; c - a against (-a + 2b - c)/3: 0 on b against 2/3). All different.
    void treatmentAgainstSum()
    {
        const Factor f = factorOf(kAbc);
        const CodingComparison c = compare(schemeOf(f, SchemeKind::Treatment, 0), schemeOf(f, SchemeKind::Sum, 2));
        QCOMPARE(kinds(c), u"DDD"_s);
        QCOMPARE(c.interceptLeft, u"the mean of a"_s);
        QCOMPARE(c.interceptRight, u"the unweighted mean of the 3 level means"_s);
        QCOMPARE(c.summary.value(0), u"The intercept changes meaning: under Treatment (dummy), reference a it is the mean of a; "
                                     "under Sum (effect, deviation), base level c it is the unweighted mean of the 3 level means."_s);
        QCOMPARE(c.summary.value(1), u"Of the other coefficients, 0 test the same hypothesis, 0 a rescaled one and 2 something different."_s);
        QCOMPARE(c.coefficients[1].verdict,
                 u"Different: the first estimates b minus a; the second estimates a minus the unweighted mean of all 3 level means."_s);
    }

    // Sum against weighted effect (base c), n = 10, 20, 30. Weighted effect: b0 is the n-weighted
    // mean (10a + 20b + 30c)/60 = (a + 2b + 3c)/6, b1 = a - (a + 2b + 3c)/6, b2 = b - (a + 2b + 3c)/6.
    // Sum: b0 = (a + b + c)/3, b1 = a - (a + b + c)/3. Not proportional: all different. With equal
    // n the weighted mean is the unweighted one, and all three are the same.
    void sumAgainstWeightedEffect()
    {
        const Factor unequal = factorOf(kAbc, {10, 20, 30});
        const CodingComparison c = compare(schemeOf(unequal, SchemeKind::Sum, 2), schemeOf(unequal, SchemeKind::WeightedEffect, 2));
        QCOMPARE(kinds(c), u"DDD"_s);
        QCOMPARE(c.summary.value(0),
                 u"The intercept changes meaning: under Sum (effect, deviation), base level c it is the unweighted mean of the 3 level means; "
                 "under Weighted effect, base level c it is the mean of the level means weighted by the planned n (the overall mean of all observations)."_s);
        QCOMPARE(c.coefficients[1].verdict,
                 u"Different: the first estimates a minus the unweighted mean of all 3 level means; "
                 "the second estimates a minus the mean of all 3 levels weighted by the planned n."_s);

        const Factor equal = factorOf(kAbc);
        const CodingComparison e = compare(schemeOf(equal, SchemeKind::Sum, 2), schemeOf(equal, SchemeKind::WeightedEffect, 2));
        QCOMPARE(kinds(e), u"SSS"_s);
        QCOMPARE(e.summary.value(0), u"The intercept keeps its meaning: under both codings it is the unweighted mean of the 3 level means."_s);
        QCOMPARE(e.summary.value(2), u"The design health is the same under both."_s);
    }

    // Helmert against reverse Helmert. k = 2: Helmert b1 = a - b, reverse b1 = b - a: rescaled
    // by -1. k = 3: Helmert b1 = a - (b + c)/2, b2 = b - c; reverse b1 = b - a,
    // b2 = c - (a + b)/2. None proportional; both intercepts are the unweighted mean.
    void helmertAgainstReverseHelmert()
    {
        const Factor two = factorOf(kAb);
        const CodingComparison c2 = compare(schemeOf(two, SchemeKind::Helmert), schemeOf(two, SchemeKind::ReverseHelmert));
        QCOMPARE(kinds(c2), u"SR"_s);
        QCOMPARE(c2.coefficients[1].relation.factor->display(), u"-1"_s);

        const Factor three = factorOf(kAbc);
        const CodingComparison c3 = compare(schemeOf(three, SchemeKind::Helmert), schemeOf(three, SchemeKind::ReverseHelmert));
        QCOMPARE(kinds(c3), u"SDD"_s);
        QCOMPARE(c3.summary.value(0), u"The intercept keeps its meaning: under both codings it is the unweighted mean of the 3 level means."_s);
        QCOMPARE(c3.coefficients[2].verdict, u"Different: the first estimates b minus c; the second estimates c minus the average of a and b."_s);
        QCOMPARE(c3.summary.value(2), u"The design health is the same under both."_s);
    }

    // Polynomial trends (integer form) at equal spacing 1, 2, 3 and at the actual positions
    // 0, 1, 3. Equal: linear column (-1, 0, 1), quadratic (1, -2, 1); orthogonal columns with
    // an intercept give rows c / (c.c): (-1, 0, 1)/2 and (1, -2, 1)/6. Actual: x - mean(x) =
    // (-4, -1, 5)/3, integer (-4, -1, 5), row (-4, -1, 5)/42; quadratic orthogonal to 1 and to
    // it: u + v + w = 0 and -4u - v + 5w = 0 give (2, -3, 1), row (2, -3, 1)/14. Both trends
    // differ; both intercepts are the unweighted mean (the columns sum to 0).
    void polynomialEqualAgainstActualSpacing()
    {
        const Factor equal = factorOf(kAbc);
        const Factor actual = factorOf(kAbc, {}, {Weight(0), Weight(1), Weight(3)});
        const CodingComparison c = compare(schemeOf(equal, SchemeKind::Polynomial, -1, PolynomialForm::Integer),
                                           schemeOf(actual, SchemeKind::Polynomial, -1, PolynomialForm::Integer));
        QCOMPARE(kinds(c), u"SDD"_s);
        QCOMPARE(c.rightTitle, u"Orthogonal polynomial, spacing 0, 1, 3"_s);
        QCOMPARE(c.leftTitle, u"Orthogonal polynomial, equal spacing"_s);
        QVERIFY2(c.coefficients[1].verdict.startsWith(u"Different: the first estimates "_s), qPrintable(c.coefficients[1].verdict));
        QCOMPARE(c.right.hypotheses[1][0].display(), u"-2/21"_s); // -4/42
        QCOMPARE(c.right.hypotheses[2][1].display(), u"-3/14"_s);
    }

    // Orthonormal against integer trends at equal spacing, k = 3: rows (-1, 0, 1)/sqrt 2 and
    // (-1, 0, 1)/2, so the second is sqrt(2)/2 = 0.7071 times the first; quadratic rows
    // (1, -2, 1)/sqrt 6 and (1, -2, 1)/6: factor sqrt(6)/6 = 0.4082. Floating rows, compared
    // within 1e-9 of the largest weight.
    void orthonormalAgainstIntegerTrendsIsRescaled()
    {
        const Factor f = factorOf(kAbc);
        const CodingComparison c = compare(schemeOf(f, SchemeKind::Polynomial), schemeOf(f, SchemeKind::Polynomial, -1, PolynomialForm::Integer));
        QCOMPARE(kinds(c), u"SRR"_s);
        QVERIFY(std::abs(c.coefficients[1].relation.factor->value() - std::sqrt(2.0) / 2) < 1e-12);
        QVERIFY(std::abs(c.coefficients[2].relation.factor->value() - std::sqrt(6.0) / 6) < 1e-12);
    }

    // Treatment (reference a) against the same columns in the other order (custom: indicator of
    // c, then of b): the second's b1 is c - a, its b2 is b - a. The first's b1 (b - a) differs
    // from the second's b1, and the comparison names the second's b2 as testing it.
    void aHypothesisInAnotherPlaceIsNamed()
    {
        const Factor f = factorOf(kAbc);
        Scheme swapped = schemeOf(f, SchemeKind::Treatment, 0);
        std::swap(swapped.columns[0], swapped.columns[1]);
        swapped.kind = SchemeKind::Custom;
        const CodingComparison c = compare(schemeOf(f, SchemeKind::Treatment, 0), swapped);
        QCOMPARE(kinds(c), u"SDD"_s);
        QCOMPARE(c.coefficients[1].alsoRight, 2);
        QCOMPARE(int(c.coefficients[1].alsoRelation.kind), int(Correspondence::Same));
        QVERIFY2(c.coefficients[1].verdict.endsWith(u"The second coding's b2 b vs a tests the same hypothesis."_s),
                 qPrintable(c.coefficients[1].verdict));
    }

    // Without an intercept on one side: the intercept has no counterpart.
    void anInterceptOnOneSideOnly()
    {
        const Factor f = factorOf(kAbc);
        Scheme none = schemeOf(f, SchemeKind::Indicator);
        const CodingComparison c = compare(schemeOf(f, SchemeKind::Treatment, 0), none);
        QCOMPARE(c.coefficients.front().left, 0);
        QCOMPARE(c.coefficients.front().right, -1);
        QCOMPARE(c.summary.value(0), u"Only Treatment (dummy), reference a has an intercept."_s);
    }

    // Treatment against sum, k = 3, equal n: the health rows that differ. Under equal n the
    // centred indicators of b and c correlate -1/2, and sum's columns (1, 0, -1), (0, 1, -1)
    // correlate 1/2: neither pair is orthogonal, and every VIF is 1/(1 - 1/4) = 4/3. The
    // condition numbers of the unit-length [1 | C] differ: NumPy (numpy.linalg.svd) gives
    // 3.146 for treatment and 1.732 for sum.
    void healthDifferencesAreFlagged()
    {
        const Factor f = factorOf(kAbc);
        const CodingComparison c = compare(schemeOf(f, SchemeKind::Treatment, 0), schemeOf(f, SchemeKind::Sum, 2));
        auto row = [&](const QString &what) {
            for (const HealthDifference &h : c.health)
                if (h.what == what)
                    return h;
            return HealthDifference{};
        };
        QCOMPARE(row(u"rank"_s).differs, false);
        QCOMPARE(row(u"column pairs orthogonal under the planned n"_s).left, u"0 of 1"_s);
        QCOMPARE(row(u"column pairs orthogonal under the planned n"_s).right, u"0 of 1"_s);
        QCOMPARE(row(u"condition number"_s).left, u"3.146"_s);
        QCOMPARE(row(u"condition number"_s).right, u"1.732"_s);
        QCOMPARE(row(u"VIF per column"_s).left, u"1.333, 1.333"_s);
        QCOMPARE(row(u"VIF per column"_s).right, u"1.333, 1.333"_s);
    }

    void differentLevelsAreRefused()
    {
        const auto c = compareCodings(schemeOf(factorOf(kAbc), SchemeKind::Treatment), schemeOf(factorOf(kAb), SchemeKind::Treatment));
        QVERIFY(!c);
        QVERIFY2(c.error().contains(u"same levels"_s), qPrintable(c.error()));
    }
};

QTEST_GUILESS_MAIN(TestCompare)
#include "TestCompare.moc"
