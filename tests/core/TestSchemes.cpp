// Each standard scheme is checked by what its coefficients mean: the exact
// hypothesis rows (intercept first) implied by its coding.
#include "core/analysis/Analysis.h"
#include "core/model/Scheme.h"

#include <QTest>

using namespace Qt::StringLiterals;
using namespace cb;

namespace {

Factor factorOf(int k, std::vector<Rational> n = {})
{
    Factor f;
    f.name = u"f"_s;
    for (int i = 0; i < k; ++i)
        f.levels << u"L%1"_s.arg(i + 1);
    f.plannedN = std::move(n);
    return f;
}

using Row = std::vector<Rational>;

Row unit(int k, int i)
{
    Row r(size_t(k), Rational(0));
    r[size_t(i)] = 1;
    return r;
}

Row constant(int k, const Rational &v) { return Row(size_t(k), v); }

Row minus(Row a, const Row &b)
{
    for (size_t i = 0; i < a.size(); ++i)
        a[i] -= b[i];
    return a;
}

// Mean of levels [from, to) as weights.
Row meanOf(int k, int from, int to)
{
    Row r(size_t(k), Rational(0));
    for (int i = from; i < to; ++i)
        r[size_t(i)] = Rational(1, to - from);
    return r;
}

QString show(const Row &r)
{
    QStringList s;
    for (const Rational &v : r)
        s << rationalToString(v);
    return s.join(u", "_s);
}

void expectRows(const Analysis &a, const std::vector<Row> &want)
{
    QVERIFY2(a.fullRank, "expected a full-rank design");
    QVERIFY(a.exact);
    QCOMPARE(a.hypotheses.size(), want.size());
    for (size_t r = 0; r < want.size(); ++r) {
        Row got;
        for (const Weight &w : a.hypotheses[r]) {
            QVERIFY(w.isExact());
            got.push_back(w.rational());
        }
        QVERIFY2(got == want[r], qPrintable(u"row %1: got [%2], want [%3]"_s.arg(r).arg(show(got), show(want[r]))));
    }
}

Analysis analyzeKind(const Factor &f, SchemeKind kind, SchemeOptions opt = {})
{
    auto s = makeScheme(f, kind, opt);
    if (!s)
        qFatal("%s", qPrintable(s.error()));
    return analyze(*s);
}

} // namespace

class TestSchemes : public QObject
{
    Q_OBJECT
private slots:
    void levelCounts_data();
    void treatment_data() { levelCounts_data(); }
    void treatment();
    void sum_data() { levelCounts_data(); }
    void sum();
    void weightedEffect();
    void simple_data() { levelCounts_data(); }
    void simple();
    void helmert_data() { levelCounts_data(); }
    void helmert();
    void reverseHelmert_data() { levelCounts_data(); }
    void reverseHelmert();
    void successive_data() { levelCounts_data(); }
    void successive();
    void indicatorWithoutInterceptIsCellMeans();
    void indicatorWithInterceptIsRankDeficient();
    void polynomialIntegerMatchesPublishedTables_data();
    void polynomialIntegerMatchesPublishedTables();
    void polynomialOrthonormal();
    void contrastRules_data();
    void contrastRules();
    void roundTripCodingHypothesesCoding_data() { levelCounts_data(); }
    void roundTripCodingHypothesesCoding();
    void referenceOutOfRange();
    void largeFactorsWork();
    void levelsBeyondTheLimitAreRefused();
};

void TestSchemes::levelCounts_data()
{
    QTest::addColumn<int>("k");
    QTest::addColumn<int>("ref");
    QTest::newRow("k=2") << 2 << 0;
    QTest::newRow("k=3 ref 2") << 3 << 1;
    QTest::newRow("k=4 ref last") << 4 << 3;
    QTest::newRow("k=5") << 5 << 2;
    QTest::newRow("k=8") << 8 << 0;
}

void TestSchemes::treatment()
{
    QFETCH(int, k);
    QFETCH(int, ref);
    // Intercept = mean of the reference; coefficient j = mean_j - mean_ref.
    std::vector<Row> want{unit(k, ref)};
    for (int j = 0; j < k; ++j)
        if (j != ref)
            want.push_back(minus(unit(k, j), unit(k, ref)));
    expectRows(analyzeKind(factorOf(k), SchemeKind::Treatment, {ref}), want);
}

void TestSchemes::sum()
{
    QFETCH(int, k);
    QFETCH(int, ref);
    // Intercept = unweighted mean of level means; coefficient j = mean_j - that mean.
    const Row grand = constant(k, Rational(1, k));
    std::vector<Row> want{grand};
    for (int j = 0; j < k; ++j)
        if (j != ref)
            want.push_back(minus(unit(k, j), grand));
    // Unequal planned n must not change the sum coding's meaning (saturated model).
    expectRows(analyzeKind(factorOf(k), SchemeKind::Sum, {ref}), want);
    std::vector<Rational> n;
    for (int i = 0; i < k; ++i)
        n.push_back(Rational(3 + 5 * i));
    expectRows(analyzeKind(factorOf(k, n), SchemeKind::Sum, {ref}), want);
}

void TestSchemes::weightedEffect()
{
    // Sweeney & Ulveling (1972); te Grotenhuis et al. (2017): intercept = n-weighted mean,
    // coefficient j = mean_j - weighted mean.
    const std::vector<Rational> n{Rational(40), Rational(10), Rational(25), Rational(5)};
    const int k = 4;
    Row weighted;
    for (const Rational &v : n)
        weighted.push_back(v / 80);
    for (int ref = 0; ref < k; ++ref) {
        std::vector<Row> want{weighted};
        for (int j = 0; j < k; ++j)
            if (j != ref)
                want.push_back(minus(unit(k, j), weighted));
        expectRows(analyzeKind(factorOf(k, n), SchemeKind::WeightedEffect, {ref}), want);
    }
    // With these sizes sum and weighted-effect intercepts differ.
    const Analysis s = analyzeKind(factorOf(k, n), SchemeKind::Sum);
    const Analysis w = analyzeKind(factorOf(k, n), SchemeKind::WeightedEffect);
    QVERIFY(!(s.hypotheses[0] == w.hypotheses[0]));
    QCOMPARE(w.hypothesisWords[0], u"the mean of the level means weighted by the planned n (the overall mean of all observations)"_s);
}

void TestSchemes::simple()
{
    QFETCH(int, k);
    QFETCH(int, ref);
    std::vector<Row> want{constant(k, Rational(1, k))};
    for (int j = 0; j < k; ++j)
        if (j != ref)
            want.push_back(minus(unit(k, j), unit(k, ref)));
    expectRows(analyzeKind(factorOf(k), SchemeKind::Simple, {ref}), want);
}

void TestSchemes::helmert()
{
    QFETCH(int, k);
    std::vector<Row> want{constant(k, Rational(1, k))};
    for (int i = 0; i + 1 < k; ++i)
        want.push_back(minus(unit(k, i), meanOf(k, i + 1, k)));
    expectRows(analyzeKind(factorOf(k), SchemeKind::Helmert), want);
}

void TestSchemes::reverseHelmert()
{
    QFETCH(int, k);
    std::vector<Row> want{constant(k, Rational(1, k))};
    for (int i = 1; i < k; ++i)
        want.push_back(minus(unit(k, i), meanOf(k, 0, i)));
    expectRows(analyzeKind(factorOf(k), SchemeKind::ReverseHelmert), want);
}

void TestSchemes::successive()
{
    QFETCH(int, k);
    std::vector<Row> want{constant(k, Rational(1, k))};
    for (int i = 0; i + 1 < k; ++i)
        want.push_back(minus(unit(k, i + 1), unit(k, i)));
    expectRows(analyzeKind(factorOf(k), SchemeKind::Successive), want);
}

void TestSchemes::indicatorWithoutInterceptIsCellMeans()
{
    std::vector<Row> want;
    for (int i = 0; i < 4; ++i)
        want.push_back(unit(4, i));
    const Analysis a = analyzeKind(factorOf(4), SchemeKind::Indicator);
    QVERIFY(!a.intercept);
    expectRows(a, want);
    QCOMPARE(a.hypothesisSymbols[0], u"b1: mean(L1) = 0"_s);
}

void TestSchemes::indicatorWithInterceptIsRankDeficient()
{
    auto s = makeScheme(factorOf(3), SchemeKind::Indicator);
    QVERIFY(s.ok());
    s->intercept = true;
    const Analysis a = analyze(*s);
    QCOMPARE(a.rank, 3);
    QCOMPARE(a.coefficientCount, 4);
    QVERIFY(!a.fullRank);
    QVERIFY(a.hypotheses.empty());
    QCOMPARE(a.dependencies, QStringList{u"L3 = intercept - L1 - L2"_s});
    bool named = false;
    for (const Finding &f : a.findings)
        named = named || (f.severity == Finding::Severity::Problem && f.message.contains(u"rank 3 of 4"_s) && f.message.contains(u"L3 = intercept - L1 - L2"_s));
    QVERIFY(named);
    QVERIFY(!a.conditionNumber.has_value());
}

void TestSchemes::polynomialIntegerMatchesPublishedTables_data()
{
    // Fisher & Yates, Statistical Tables for Biological, Agricultural and Medical Research,
    // table of orthogonal polynomials (equally spaced levels). Values written here from memory
    // of the table; each row is also checked for orthogonality below, and the test compares
    // up to scale (the table's rows are the smallest integers, last entry positive).
    QTest::addColumn<int>("k");
    QTest::addColumn<QList<QList<int>>>("table");
    QTest::newRow("k=3") << 3 << QList<QList<int>>{{-1, 0, 1}, {1, -2, 1}};
    QTest::newRow("k=4") << 4 << QList<QList<int>>{{-3, -1, 1, 3}, {1, -1, -1, 1}, {-1, 3, -3, 1}};
    QTest::newRow("k=5") << 5 << QList<QList<int>>{{-2, -1, 0, 1, 2}, {2, -1, -2, -1, 2}, {-1, 2, 0, -2, 1}, {1, -4, 6, -4, 1}};
    QTest::newRow("k=6") << 6 << QList<QList<int>>{{-5, -3, -1, 1, 3, 5}, {5, -1, -4, -4, -1, 5}, {-5, 7, 4, -4, -7, 5},
                                                   {1, -3, 2, 2, -3, 1}, {-1, 5, -10, 10, -5, 1}};
    QTest::newRow("k=7") << 7 << QList<QList<int>>{{-3, -2, -1, 0, 1, 2, 3}, {5, 0, -3, -4, -3, 0, 5}, {-1, 1, 1, 0, -1, -1, 1},
                                                   {3, -7, 1, 6, 1, -7, 3}, {-1, 4, -5, 0, 5, -4, 1}, {1, -6, 15, -20, 15, -6, 1}};
}

void TestSchemes::polynomialIntegerMatchesPublishedTables()
{
    QFETCH(int, k);
    QFETCH(QList<QList<int>>, table);
    SchemeOptions opt;
    opt.polynomialForm = PolynomialForm::Integer;
    auto cols = standardColumns(factorOf(k), SchemeKind::Polynomial, opt);
    QVERIFY2(cols.ok(), qPrintable(cols.error()));
    QCOMPARE(int(cols->size()), k - 1);
    for (int d = 0; d < k - 1; ++d)
        for (int i = 0; i < k; ++i) {
            const Weight &w = (*cols)[size_t(d)].weights[size_t(i)];
            QVERIFY(w.isExact());
            QCOMPARE(w.rational(), Rational(table[d][i]));
        }
    // Orthonormal form: the same directions scaled to unit length (up to scale).
    auto ortho = standardColumns(factorOf(k), SchemeKind::Polynomial);
    QVERIFY(ortho.ok());
    for (int d = 0; d < k - 1; ++d) {
        double norm = 0;
        for (int v : table[d])
            norm += double(v) * v;
        norm = std::sqrt(norm);
        for (int i = 0; i < k; ++i)
            QVERIFY(std::abs((*ortho)[size_t(d)].weights[size_t(i)].value() - table[d][i] / norm) < 1e-15);
    }
}

void TestSchemes::polynomialOrthonormal()
{
    // Orthonormal columns: cross-products 0 and condition number 1 for equal n.
    const Analysis a = analyzeKind(factorOf(6), SchemeKind::Polynomial);
    QVERIFY(!a.exact);
    QVERIFY(a.fullRank);
    for (int i = 0; i < 5; ++i) {
        QVERIFY(a.sumsToZero[size_t(i)]);
        for (int j = 0; j < 5; ++j)
            QVERIFY(a.orthogonal(i, j) || i == j);
    }
    QVERIFY(a.conditionNumber);
    QVERIFY(std::abs(*a.conditionNumber - 1.0) < 1e-12);
    QCOMPARE(a.columnNames[0], u"linear"_s);
    QCOMPARE(a.columnNames[1], u"quadratic"_s);
}

void TestSchemes::contrastRules_data()
{
    // The two rules usually checked for contrast codes (common practice): each column
    // sums to zero, and each pair has zero cross-product.
    QTest::addColumn<int>("kind");
    QTest::addColumn<bool>("sumsToZero");
    QTest::addColumn<bool>("orthogonal");
    QTest::newRow("helmert") << int(SchemeKind::Helmert) << true << true;
    QTest::newRow("reverse-helmert") << int(SchemeKind::ReverseHelmert) << true << true;
    QTest::newRow("polynomial") << int(SchemeKind::Polynomial) << true << true;
    QTest::newRow("treatment") << int(SchemeKind::Treatment) << false << true; // e_j . e_l = 0, but sums are 1
    QTest::newRow("sum") << int(SchemeKind::Sum) << true << false;
    QTest::newRow("successive") << int(SchemeKind::Successive) << true << false;
    QTest::newRow("simple") << int(SchemeKind::Simple) << true << false;
}

void TestSchemes::contrastRules()
{
    QFETCH(int, kind);
    QFETCH(bool, sumsToZero);
    QFETCH(bool, orthogonal);
    const Analysis a = analyzeKind(factorOf(5), SchemeKind(kind));
    bool allZero = true, allOrth = true;
    for (int i = 0; i < a.columnCount; ++i) {
        allZero = allZero && a.sumsToZero[size_t(i)];
        for (int j = 0; j < a.columnCount; ++j)
            if (i != j)
                allOrth = allOrth && a.orthogonal(i, j);
    }
    QCOMPARE(allZero, sumsToZero);
    QCOMPARE(allOrth, orthogonal);
}

void TestSchemes::roundTripCodingHypothesesCoding()
{
    // Coding -> hypotheses -> coding reproduces rational input exactly.
    QFETCH(int, k);
    QFETCH(int, ref);
    for (SchemeKind kind : {SchemeKind::Treatment, SchemeKind::Sum, SchemeKind::Helmert, SchemeKind::Successive, SchemeKind::Simple}) {
        auto s = makeScheme(factorOf(k), kind, {schemeUsesReference(kind) ? ref : -1});
        QVERIFY(s.ok());
        const Analysis a = analyze(*s);
        std::vector<std::vector<Weight>> rows(a.hypotheses.begin() + 1, a.hypotheses.end());
        auto back = codingFromHypotheses(s->factor, rows, true, a.hypotheses[0]);
        QVERIFY2(back.ok(), qPrintable(back.error()));
        QCOMPARE(back->size(), s->columns.size());
        for (size_t j = 0; j < back->size(); ++j)
            for (int i = 0; i < k; ++i)
                QVERIFY((*back)[j].weights[size_t(i)] == s->columns[j].weights[size_t(i)]);
    }
}

void TestSchemes::referenceOutOfRange()
{
    auto cols = standardColumns(factorOf(3), SchemeKind::Treatment, {5});
    QVERIFY(!cols.ok());
    QCOMPARE(cols.error(), u"reference: level 6 does not exist; the factor has 3 levels"_s);
    auto custom = standardColumns(factorOf(3), SchemeKind::Custom);
    QVERIFY(!custom.ok());
}

void TestSchemes::largeFactorsWork()
{
    // k at the stated limit on the floating path: treatment hypotheses are still e_j - e_ref to rounding.
    const Analysis a = analyzeKind(factorOf(kMaxLevels), SchemeKind::Treatment);
    QVERIFY(!a.exact);
    QVERIFY(a.fullRank);
    QCOMPARE(a.hypotheses.size(), size_t(kMaxLevels));
    QCOMPARE(a.hypothesisSymbols[7], u"b7: mean(L8) - mean(L1) = 0"_s);
    const Analysis p = analyzeKind(factorOf(kMaxLevels), SchemeKind::Polynomial);
    QVERIFY(p.fullRank);
    QVERIFY(p.conditionNumber);
    QVERIFY(std::abs(*p.conditionNumber - 1.0) < 1e-8);
}

void TestSchemes::levelsBeyondTheLimitAreRefused()
{
    // One level past core/base/Limits.h: the factor names its field and the limit.
    QVERIFY(factorOf(kMaxLevels).problem().message.isEmpty());
    const Problem over = factorOf(kMaxLevels + 1).problem();
    QCOMPARE(over.field, u"levels"_s);
    QCOMPARE(over.message, u"at most %1 levels are supported, got %2"_s.arg(kMaxLevels).arg(kMaxLevels + 1));
    // A standard scheme cannot be made for it either.
    QVERIFY(!makeScheme(factorOf(kMaxLevels + 1), SchemeKind::Treatment).ok());
}

QTEST_GUILESS_MAIN(TestSchemes)
#include "TestSchemes.moc"
