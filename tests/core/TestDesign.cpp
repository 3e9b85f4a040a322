// Crossed and nested factors: Kronecker columns, hypotheses over the cell means,
// simple-effect warnings, term orthogonality, files and errors.
#include "core/model/Design.h"
#include "core/files/StudyFile.h"
#include "core/analysis/DesignAnalysis.h"
#include "core/files/SchemeFile.h"
#include "core/model/Study.h"

#include "tests/support/NumpyReference.h"

#include <random>

#include "tests/support/FindingSupport.h"

#include <QTest>

using namespace Qt::StringLiterals;
using namespace cb;

namespace {

Scheme factorScheme(const QString &name, const QStringList &levels, const std::vector<std::vector<const char16_t *>> &cols)
{
    Scheme s;
    s.factor.name = name;
    s.factor.levels = levels;
    int j = 0;
    for (const auto &c : cols) {
        Column col{u"%1%2"_s.arg(name).arg(++j), {}};
        for (const char16_t *w : c)
            col.weights.push_back(parseWeight(QString::fromUtf16(w)).value());
        s.columns.push_back(col);
    }
    return s;
}

Design twoByTwo(const char16_t *a0, const char16_t *a1, const char16_t *b0, const char16_t *b1)
{
    Design d;
    d.factors.push_back(factorScheme(u"A"_s, {u"a1"_s, u"a2"_s}, {{a0, a1}}));
    d.factors.push_back(factorScheme(u"B"_s, {u"b1"_s, u"b2"_s}, {{b0, b1}}));
    d.terms = Design::fullFactorial(2);
    return d;
}

std::vector<Rational> row(const Analysis &a, int r)
{
    std::vector<Rational> out;
    for (const Weight &w : a.hypotheses[size_t(r)])
        out.push_back(w.rational());
    return out;
}

using test::hasFinding;

} // namespace

class TestDesign : public QObject
{
    Q_OBJECT
private slots:
    void plannedNCountsParticipants();
    void centredTwoByTwo();
    void treatmentTwoByTwoMainEffectIsSimpleEffect();
    void cellsAndColumnNames();
    void mainEffectsOnlyDependsOnSizes();
    void nestedContrasts();
    void termOrthogonality();
    void emptyCellIsReported();
    void fileRoundTripAndErrors_data();
    void fileRoundTripAndErrors();
    void olderSingleFactorFilesStillLoad();
    void interactionReadsAsDifferenceOfDifferences();
    void randomDesignsAgreeWithNumpy();
    void cellsAtAndBeyondTheLimit();
};

void TestDesign::interactionReadsAsDifferenceOfDifferences()
{
    const DesignAnalysis da = analyzeDesign(twoByTwo(u"0", u"1", u"0", u"1"));
    QCOMPARE(da.analysis.hypothesisSymbols[3], u"b3: (a2\u00b7b2 - a1\u00b7b2) - (a2\u00b7b1 - a1\u00b7b1) = 0"_s);
}

void TestDesign::randomDesignsAgreeWithNumpy()
{
    // Random designs (2 or 3 factors, 2 to 5 levels, random standard or custom codings,
    // random cell n, some terms left out) against NumPy's pinv over the cells, to 1e-9.
    std::mt19937 rng(7u);
    std::uniform_int_distribution<int> kDist(2, 5), pct(0, 99), nDist(1, 30), num(-4, 4), den(1, 4);
    const QList<SchemeKind> kinds = standardSchemes();
    std::vector<Scheme> schemes;
    std::vector<Analysis> analyses;
    int leftOut = 0;
    for (int c = 0; c < 80; ++c) {
        Design d;
        const int nf = pct(rng) < 60 ? 2 : 3;
        for (int f = 0; f < nf; ++f) {
            Factor fac;
            fac.name = QString(QChar(u'P' + f));
            const int k = nf == 3 ? std::min(kDist(rng), 4) : kDist(rng);
            for (int i = 0; i < k; ++i)
                fac.levels << u"%1%2"_s.arg(fac.name).arg(i + 1);
            Scheme s;
            if (pct(rng) < 50) {
                SchemeKind kind = kinds[pct(rng) % kinds.size()];
                if (kind == SchemeKind::Indicator)
                    kind = SchemeKind::Sum;
                s = makeScheme(fac, kind).take();
            } else {
                s.factor = fac;
                for (int j = 0; j + 1 < k; ++j) {
                    Column col{u"%1c%2"_s.arg(fac.name).arg(j + 1), {}};
                    for (int i = 0; i < k; ++i)
                        col.weights.push_back(Weight::exact(Rational(num(rng), den(rng))));
                    s.columns.push_back(col);
                }
            }
            d.factors.push_back(s);
        }
        d.terms = Design::fullFactorial(nf);
        if (pct(rng) < 35) {
            d.terms.pop_back(); // leave out the highest interaction
            ++leftOut;
        }
        if (pct(rng) < 70)
            for (int cell = 0; cell < d.cellCount(); ++cell)
                d.cellN.push_back(Rational(nDist(rng)));
        const DesignAnalysis da = analyzeDesign(d);
        QVERIFY2(da.cellScheme.columnCount() > 0, qPrintable(d.validate()));
        schemes.push_back(da.cellScheme);
        analyses.push_back(da.analysis);
    }
    testing::CrossCheckCounts counts;
    QVERIFY(testing::compareWithNumpy(schemes, analyses, counts));
    QVERIFY(leftOut >= 15);
    QVERIFY(counts.partial >= 15);
    qInfo("%d designs with a term left out, %d rank deficient, %d exact", leftOut, counts.deficient, counts.exact);
}

void TestDesign::centredTwoByTwo()
{
    // Schad, Vasishth, Hohenstein & Kliegl (2020): with centred +-1/2 coding on both factors
    // of a balanced 2 x 2 design, the intercept is the mean of the four cells, each main effect
    // the difference of the marginal means, and the interaction the difference of differences.
    // Cells (A-major): a1\u00b7b1, a1\u00b7b2, a2\u00b7b1, a2\u00b7b2.
    const DesignAnalysis da = analyzeDesign(twoByTwo(u"-1/2", u"1/2", u"-1/2", u"1/2"));
    const Analysis &a = da.analysis;
    QVERIFY(a.fullRank);
    QVERIFY(a.exact);
    QCOMPARE(da.cells, (QStringList{u"a1\u00b7b1"_s, u"a1\u00b7b2"_s, u"a2\u00b7b1"_s, u"a2\u00b7b2"_s}));
    const Rational q(1, 4), h(1, 2);
    QVERIFY(row(a, 0) == (std::vector<Rational>{q, q, q, q}));
    QVERIFY(row(a, 1) == (std::vector<Rational>{-h, -h, h, h}));           // A: mean(a2) - mean(a1)
    QVERIFY(row(a, 2) == (std::vector<Rational>{-h, h, -h, h}));           // B: mean(b2) - mean(b1)
    QVERIFY(row(a, 3) == (std::vector<Rational>{Rational(1), Rational(-1), Rational(-1), Rational(1)})); // (a2b2 - a2b1) - (a1b2 - a1b1)
    QCOMPARE(a.hypothesisSymbols[1], u"b1: mean(a2\u00b7b1, a2\u00b7b2) - mean(a1\u00b7b1, a1\u00b7b2) = 0"_s);
    QCOMPARE(da.termNames, (QStringList{u"A"_s, u"B"_s, u"A \u00d7 B"_s}));
    QVERIFY(!hasFinding(a, u"simple effect"_s));
    for (int t = 0; t < 3; ++t)
        for (int u = 0; u < 3; ++u)
            QVERIFY(da.termsOrthogonalInDesign[size_t(t)][size_t(u)]);
}

void TestDesign::treatmentTwoByTwoMainEffectIsSimpleEffect()
{
    // With treatment coding on both factors, the "main effect" of A equals the simple effect
    // of A at B's reference level (Schad et al. 2020): weights only on a1\u00b7b1 and a2\u00b7b1.
    const DesignAnalysis da = analyzeDesign(twoByTwo(u"0", u"1", u"0", u"1"));
    const Analysis &a = da.analysis;
    QVERIFY(row(a, 1) == (std::vector<Rational>{Rational(-1), Rational(0), Rational(1), Rational(0)}));
    QVERIFY(row(a, 0) == (std::vector<Rational>{Rational(1), Rational(0), Rational(0), Rational(0)}));
    QVERIFY(hasFinding(a, u"column 1 ('A1') of A compares cells only at B = b1: it is a simple effect there"_s));
    QVERIFY(hasFinding(a, u"column 2 ('B1') of B compares cells only at A = a1"_s));
}

void TestDesign::cellsAndColumnNames()
{
    Design d;
    d.factors.push_back(factorScheme(u"water"_s, {u"none"_s, u"weekly"_s, u"daily"_s}, {{u"-1", u"1/2", u"1/2"}, {u"0", u"-1/2", u"1/2"}}));
    d.factors.push_back(factorScheme(u"soil"_s, {u"sandy"_s, u"clay"_s}, {{u"1/2", u"-1/2"}}));
    d.terms = Design::fullFactorial(2);
    const DesignAnalysis da = analyzeDesign(d);
    QCOMPARE(da.cells.size(), 6);
    QCOMPARE(da.cells[1], u"none\u00b7clay"_s);
    QCOMPARE(da.cellScheme.columns.size(), size_t(5));
    QCOMPARE(da.cellScheme.columns[3].name, u"water1 \u00d7 soil1"_s);
    QCOMPARE(da.columnTerm, (std::vector<int>{0, 0, 1, 2, 2}));
    // Kronecker product: (-1, 1/2, 1/2) (x) (1/2, -1/2).
    QCOMPARE(da.cellScheme.columns[3].weights[0].rational(), Rational(-1, 2));
    QCOMPARE(da.cellScheme.columns[3].weights[1].rational(), Rational(1, 2));
    QCOMPARE(da.cellScheme.columns[3].weights[5].rational(), Rational(-1, 4));
    // The interaction "daily vs weekly" by soil: (daily·sandy - weekly·sandy) - (daily·clay - weekly·clay).
    const std::vector<Rational> r = row(da.analysis, 5);
    QVERIFY(r == (std::vector<Rational>{Rational(0), Rational(0), Rational(-1), Rational(1), Rational(1), Rational(-1)}));
}

void TestDesign::mainEffectsOnlyDependsOnSizes()
{
    Design d = twoByTwo(u"-1/2", u"1/2", u"-1/2", u"1/2");
    d.terms = {Term{{0}, -1}, Term{{1}, -1}};
    d.cellN = {Rational(10), Rational(20), Rational(30), Rational(5)};
    const DesignAnalysis da = analyzeDesign(d);
    QVERIFY(da.analysis.dependsOnSizes);
    QVERIFY(hasFinding(da.analysis, u"the model leaves out some terms (main effects only), so the hypotheses over the cell means depend on the cell sizes"_s));
    QVERIFY(!da.termsOrthogonalInDesign[0][1]);
}

void TestDesign::nestedContrasts()
{
    // A's contrast within each level of B: C_A (x) e_b. Together with B's main effect this is
    // saturated; each nested column is the simple effect of A at one level of B.
    Design d = twoByTwo(u"-1/2", u"1/2", u"-1/2", u"1/2");
    d.terms = {Term{{1}, -1}, Term{{0}, 1}};
    const DesignAnalysis da = analyzeDesign(d);
    QVERIFY(da.analysis.fullRank);
    QCOMPARE(da.termNames[1], u"A within B"_s);
    QCOMPARE(da.cellScheme.columns[1].name, u"A1 (within b1)"_s);
    QVERIFY(row(da.analysis, 2) == (std::vector<Rational>{Rational(-1), Rational(0), Rational(1), Rational(0)})); // a2\u00b7b1 - a1\u00b7b1
    QVERIFY(row(da.analysis, 3) == (std::vector<Rational>{Rational(0), Rational(-1), Rational(0), Rational(1)})); // a2\u00b7b2 - a1\u00b7b2
    QVERIFY(!hasFinding(da.analysis, u"simple effect"_s)); // nested on purpose: no warning
}

void TestDesign::termOrthogonality()
{
    Design d = twoByTwo(u"-1/2", u"1/2", u"-1/2", u"1/2");
    d.cellN = {Rational(10), Rational(10), Rational(10), Rational(30)};
    const DesignAnalysis da = analyzeDesign(d);
    QVERIFY(!da.termsOrthogonalInDesign[0][1]);
    QVERIFY(hasFinding(da.analysis, u"terms A and B are not orthogonal under the planned cell sizes"_s));
    QVERIFY(!da.analysis.dependsOnSizes); // saturated: the hypotheses stay as designed
}

void TestDesign::emptyCellIsReported()
{
    Design d = twoByTwo(u"-1/2", u"1/2", u"-1/2", u"1/2");
    d.cellN = {Rational(10), Rational(0), Rational(10), Rational(10)};
    const DesignAnalysis da = analyzeDesign(d);
    QCOMPARE(da.emptyCells, QStringList{u"a1\u00b7b2"_s});
    QVERIFY(da.analysis.hypotheses.empty());
    QVERIFY(hasFinding(da.analysis, u"empty cell (planned n = 0): a1\u00b7b2. The chosen terms cannot be estimated"_s));
}

void TestDesign::fileRoundTripAndErrors_data()
{
    QTest::addColumn<QByteArray>("from");
    QTest::addColumn<QByteArray>("to");
    QTest::addColumn<QString>("message");
    QTest::newRow("valid") << QByteArray() << QByteArray() << QString();
    QTest::newRow("unknown factor in a term") << QByteArray("\"A\",\n                    \"B\"") << QByteArray("\"A\", \"C\"")
                                              << u"d.json: field 'design.terms[2].factors[1]': 'C' is not a factor of the design"_s;
    QTest::newRow("mismatched cell sizes") << QByteArray("\"cell_n\": [\n            \"10\",") << QByteArray("\"cell_n\": [")
                                           << u"d.json: design.cell_n: 3 sizes for 4 cells; give one per cell, the first factor varying slowest"_s;
    QTest::newRow("bad weight inside a factor") << QByteArray("\"-1/2\"") << QByteArray("\"x\"")
                                                << u"d.json: field 'design.factors[0].columns[0].weights[0]': weight 'x' is not a number"_s;
    QTest::newRow("one factor") << QByteArray("\"factors\": [") << QByteArray("\"factors\": [], \"x\": [")
                                << u"d.json: field 'design.factors': expected an array of 2 or 3 factors"_s;
    // Wrong JSON types are refused with the key path (issue 21, class 3); a null cell size used
    // to make its cell empty in silence.
    for (const char *wrong : {"null", "true", "[]", "{}"})
        QTest::newRow(qPrintable(u"cell_n[0] is "_s + QString::fromLatin1(wrong)))
            << QByteArray("\"cell_n\": [\n            \"10\",") << QByteArray("\"cell_n\": [") + wrong + ","
            << u"d.json: field 'design.cell_n[0]': expected a planned cell size of 0 or more"_s;
    QTest::newRow("cell_n not an array") << QByteArray("\"cell_n\": [\n            \"10\",") << QByteArray("\"cell_n\": \"10\", \"x\": [")
                                         << u"d.json: field 'design.cell_n': expected an array of planned cell sizes"_s;
    QTest::newRow("term factor a number") << QByteArray("\"A\",\n                    \"B\"") << QByteArray("\"A\", 1")
                                          << u"d.json: field 'design.terms[2].factors[1]': expected a factor name (a string)"_s;
    QTest::newRow("factor's scheme a bool") << QByteArray("\"scheme\": {") << QByteArray("\"scheme\": true, \"x\": {")
                                            << u"d.json: field 'design.factors[0].scheme': expected an object with kind"_s;
    QTest::newRow("notes a number") << QByteArray("\"notes\": \"\"") << QByteArray("\"notes\": 5")
                                    << u"d.json: field 'notes': expected a string"_s;
}

void TestDesign::fileRoundTripAndErrors()
{
    QFETCH(QByteArray, from);
    QFETCH(QByteArray, to);
    QFETCH(QString, message);
    Design d = twoByTwo(u"-1/2", u"1/2", u"-1/2", u"1/2");
    d.cellN = {Rational(10), Rational(12), Rational(9), Rational(11)};
    QByteArray data = designToJson(d);
    QVERIFY(isDesignJson(data));
    if (!from.isEmpty()) {
        QVERIFY2(data.contains(from), data.constData());
        data.replace(data.indexOf(from), from.size(), to);
    }
    auto back = designFromJson(data, u"d.json"_s);
    if (message.isEmpty()) {
        QVERIFY2(back.ok(), qPrintable(back.error()));
        QCOMPARE(back->factors.size(), size_t(2));
        QVERIFY(back->cellN == d.cellN);
        QCOMPARE(back->terms.size(), size_t(3));
        QCOMPARE(termName(*back, back->terms[2]), u"A \u00d7 B"_s);
        QVERIFY(back->factors[1].columns[0].weights[1] == d.factors[1].columns[0].weights[1]);
        // A design is not a single-factor scheme.
        auto single = schemeFromJson(data, u"d.json"_s);
        QVERIFY(!single.ok());
        QCOMPARE(single.error(), u"d.json: this file holds a design of several factors, not a single factor's scheme"_s);
    } else {
        QVERIFY(!back.ok());
        QVERIFY2(back.error().startsWith(message), qPrintable(back.error()));
    }
}

void TestDesign::olderSingleFactorFilesStillLoad()
{
    const QByteArray v1 = R"({"format": "contrast-bench-scheme", "version": 1, "factor": {"levels": ["a", "b"]},
                               "columns": [{"name": "ab", "weights": ["1", "-1"]}]})";
    QVERIFY(!isDesignJson(v1));
    auto s = schemeFromJson(v1, u"old.json"_s);
    QVERIFY2(s.ok(), qPrintable(s.error()));
}

void TestDesign::cellsAtAndBeyondTheLimit()
{
    // core/base/Limits.h: 2 x (kMaxCells / 2) cells are analysed; one more level of the second
    // factor is refused, naming the field and both numbers.
    auto design = [](int second) {
        Design d;
        for (const int k : {2, second}) {
            Factor f;
            f.name = d.factors.empty() ? u"A"_s : u"B"_s;
            for (int i = 0; i < k; ++i)
                f.levels << u"%1%2"_s.arg(f.name).arg(i + 1);
            d.factors.push_back(makeScheme(f, SchemeKind::Sum).take());
        }
        d.terms = Design::fullFactorial(2);
        return d;
    };
    const Design at = design(kMaxCells / 2);
    QCOMPARE(at.validate(), QString());
    const DesignAnalysis da = analyzeDesign(at);
    QVERIFY(da.analysis.fullRank);
    QCOMPARE(da.analysis.levelCount, 2 * (kMaxCells / 2));
    const Design over = design(kMaxCells / 2 + 1);
    QCOMPARE(over.validate(), u"design.factors: %1 cells (the product of the factors' level counts); at most %2 are supported"_s
                                  .arg(2 * (kMaxCells / 2 + 1)).arg(kMaxCells));
    QVERIFY(!analyzeDesign(over).analysis.fullRank);
    // The window's "add a factor" doubles the cells: refused when that passes the limit.
    Study study;
    study.design = at;
    auto added = withFactorAdded(study);
    QVERIFY(!added.ok());
    QCOMPARE(added.error(), u"Not added: the design would have %1 cells; at most %2 are supported."_s
                                .arg(2 * at.cellCount()).arg(kMaxCells));
}

// A factor's planned n in a design counts participants. In the warmup demo 12 and 10 singers
// each sing all three vowels (cells 12, 12, 12 and 10, 10, 10): the between factor's levels hold
// 12 and 10 participants, not 36 and 30 rows, and each vowel all 22 singers.
void TestDesign::plannedNCountsParticipants()
{
    auto study = loadStudy(QStringLiteral(CB_SOURCE_DIR "/resources/demos/warmup.json"));
    QVERIFY2(study.ok(), qPrintable(study.error()));
    const Design &d = study->design;
    QCOMPARE(d.factors.size(), size_t(2));
    QVERIFY(!d.factors[0].factor.isWithin() && d.factors[1].factor.isWithin());
    QCOMPARE(d.factors[0].factor.plannedN, (std::vector<Rational>{Rational(12), Rational(10)}));
    QCOMPARE(d.factors[1].factor.plannedN, (std::vector<Rational>{Rational(22), Rational(22), Rational(22)}));
    // Between participants only, the totals over the cells are the group sizes, as before.
    Study between = *study;
    between.design.factors[1].factor.measure = Measure::Between;
    between = consistent(std::move(between));
    QCOMPARE(between.design.factors[0].factor.plannedN, (std::vector<Rational>{Rational(36), Rational(30)}));
}

QTEST_GUILESS_MAIN(TestDesign)
#include "TestDesign.moc"
