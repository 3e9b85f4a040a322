// Column names that say what the column tests: the naming rule, the user's names and when they
// go out of date, and the flag in scheme and design files (old files without it included).
// The hypothesis rows behind the expected names: tests/python/column_name_hypotheses.py (NumPy).
#include "core/analysis/ColumnNames.h"
#include "core/files/StudyFile.h"
#include "core/analysis/Settled.h"
#include "core/files/SchemeFile.h"
#include "core/model/SchemeEdits.h"
#include "core/model/Study.h"

#include <QJsonArray>
#include <QJsonDocument>
#include <QJsonObject>
#include <QTest>

using namespace Qt::StringLiterals;
using namespace cb;

namespace {

Weight q(long n, long d = 1)
{
    return Weight::exact(Rational(n, d));
}

// A custom scheme over levels A, B, C, D with the given columns (unnamed), intercept on.
Scheme custom(const std::vector<std::vector<Weight>> &columns)
{
    Scheme s;
    s.factor.name = u"group"_s;
    s.factor.levels = {u"A"_s, u"B"_s, u"C"_s, u"D"_s};
    s.kind = SchemeKind::Custom;
    for (const auto &c : columns)
        s.columns.emplace_back(u"placeholder"_s, c);
    return s;
}

QStringList namesOf(const Scheme &s)
{
    QStringList out;
    for (const Column &c : s.columns)
        out << c.name;
    return out;
}

Study loaded(const QByteArray &json)
{
    auto s = studyFromJson(json, u"test.json"_s);
    if (!s)
        qFatal("%s", qPrintable(s.error()));
    return s.take();
}

} // namespace

class TestColumnNames : public QObject
{
    Q_OBJECT

private slots:
    void unnamedColumnsAreNamedAfterTheirHypotheses_data();
    void unnamedColumnsAreNamedAfterTheirHypotheses();
    void withoutAnInterceptAColumnCanTestAMeanItself();
    void aStandardSchemeKeepsTheNamesOfItsDefinition();
    void aWeightedEffectColumnIsNamedAgainstTheWeightedMean();
    void anOrthonormalTrendIsNamedByItsDegree();
    void generatedNamesNeverRepeatAUsersName();
    void aUsersNameIsKeptAndGoesOutOfDateWhenTheHypothesisChanges();
    void useGeneratedNameLetsTheNameFollowAgain();
    void keepingANameRecordsWhatTheColumnTestsNow();
    void settledNamesEveryFactorOfADesign();
    void theFlagAndTheHypothesisItWasNamedForRoundTrip();
    void aStaleGeneratedNameInAFileIsReplacedOnLoading();
    void anOldFileWithoutTheFlagKeepsItsNames();
    void aFlagOfTheWrongTypeIsRefusedWithItsField();
};

void TestColumnNames::unnamedColumnsAreNamedAfterTheirHypotheses_data()
{
    QTest::addColumn<std::vector<std::vector<Weight>>>("columns");
    QTest::addColumn<QStringList>("names");
    // Rows of inv([1 | C]) from tests/python/column_name_hypotheses.py.
    QTest::newRow("issue scenario: (1/4,1/4,-1/2,0), (1/2,-1/2,0,0), (0,0,-1,1)")
        << std::vector<std::vector<Weight>>{{q(1), q(1), q(-1), q(-1)}, {q(1), q(-1), q(0), q(0)}, {q(0), q(0), q(0), q(1)}}
        << QStringList{u"1/2 (A, B vs C)"_s, u"1/2 (A vs B)"_s, u"D vs C"_s};
    QTest::newRow("treatment typed by hand")
        << std::vector<std::vector<Weight>>{{q(0), q(1), q(0), q(0)}, {q(0), q(0), q(1), q(0)}, {q(0), q(0), q(0), q(1)}}
        << QStringList{u"B vs A"_s, u"C vs A"_s, u"D vs A"_s};
    QTest::newRow("sum typed by hand: e_j - 1/4")
        << std::vector<std::vector<Weight>>{{q(1), q(0), q(0), q(-1)}, {q(0), q(1), q(0), q(-1)}, {q(0), q(0), q(1), q(-1)}}
        << QStringList{u"A vs mean"_s, u"B vs mean"_s, u"C vs mean"_s};
    QTest::newRow("Helmert typed by hand")
        << std::vector<std::vector<Weight>>{{q(3, 4), q(-1, 4), q(-1, 4), q(-1, 4)}, {q(0), q(2, 3), q(-1, 3), q(-1, 3)}, {q(0), q(0), q(1, 2), q(-1, 2)}}
        << QStringList{u"A vs later"_s, u"B vs later"_s, u"C vs D"_s};
    QTest::newRow("reverse Helmert typed by hand")
        << std::vector<std::vector<Weight>>{{q(-1, 2), q(1, 2), q(0), q(0)}, {q(-1, 3), q(-1, 3), q(2, 3), q(0)}, {q(-1, 4), q(-1, 4), q(-1, 4), q(3, 4)}}
        << QStringList{u"B vs A"_s, u"C vs earlier"_s, u"D vs earlier"_s};
    QTest::newRow("integer polynomial typed by hand: rows proportional to the trends")
        << std::vector<std::vector<Weight>>{{q(-3), q(-1), q(1), q(3)}, {q(1), q(-1), q(-1), q(1)}, {q(-1), q(3), q(-3), q(1)}}
        << QStringList{u"linear"_s, u"quadratic"_s, u"cubic"_s};
    QTest::newRow("one level against two others: (1/3,-1/6,-1/6,0), (0,1/2,-1/2,0), (-1/3,-1/3,-1/3,1)")
        << std::vector<std::vector<Weight>>{{q(2), q(-1), q(-1), q(0)}, {q(0), q(1), q(-1), q(0)}, {q(0), q(0), q(0), q(1)}}
        << QStringList{u"1/3 (A vs B, C)"_s, u"1/2 (B vs C)"_s, u"D vs earlier"_s};
    QTest::newRow("rank deficient: no hypotheses, neutral names")
        << std::vector<std::vector<Weight>>{{q(1), q(1), q(-1), q(-1)}, {q(0), q(0), q(1), q(0)}, {q(0), q(0), q(0), q(1)}}
        << QStringList{u"column 1"_s, u"column 2"_s, u"column 3"_s};
}

void TestColumnNames::unnamedColumnsAreNamedAfterTheirHypotheses()
{
    QFETCH(std::vector<std::vector<Weight>>, columns);
    QFETCH(QStringList, names);
    const Scheme named = withCurrentNames(custom(columns));
    QCOMPARE(namesOf(named), names);
    // The same through settled(), the pass every study takes.
    QCOMPARE(namesOf(settled(studyOf(custom(columns))).activeScheme()), names);
}

void TestColumnNames::withoutAnInterceptAColumnCanTestAMeanItself()
{
    // Indicator weights without an intercept: each coefficient is a level's mean.
    Scheme s = custom({{q(1), q(0), q(0), q(0)}, {q(0), q(1), q(0), q(0)}, {q(0), q(0), q(1), q(1)}});
    s.intercept = false;
    // The third, least squares under equal n: (0, 0, 1/2, 1/2), the mean of C and D.
    QCOMPARE(namesOf(withCurrentNames(s)), (QStringList{u"A"_s, u"B"_s, u"mean of C, D"_s}));
}

void TestColumnNames::aStandardSchemeKeepsTheNamesOfItsDefinition()
{
    Factor f;
    f.name = u"dose"_s;
    f.levels = {u"none"_s, u"low"_s, u"high"_s};
    const Scheme s = makeScheme(f, SchemeKind::Polynomial).take();
    const Scheme named = withCurrentNames(s);
    QCOMPARE(namesOf(named), (QStringList{u"linear"_s, u"quadratic"_s}));
    QCOMPARE(generatedColumnName(s, analyze(s), 1), u"quadratic"_s);
}

void TestColumnNames::aWeightedEffectColumnIsNamedAgainstTheWeightedMean()
{
    // Weighted-effect weights (n = 10, 20, 30, 40; base D) typed as a custom scheme: each
    // coefficient is a level minus the n-weighted grand mean (Sweeney & Ulveling 1972).
    Scheme s = custom({{q(1), q(0), q(0), q(-1, 4)}, {q(0), q(1), q(0), q(-1, 2)}, {q(0), q(0), q(1), q(-3, 4)}});
    s.factor.plannedN = {Rational(10), Rational(20), Rational(30), Rational(40)};
    QCOMPARE(namesOf(withCurrentNames(s)), (QStringList{u"A vs weighted mean"_s, u"B vs weighted mean"_s, u"C vs weighted mean"_s}));
}

void TestColumnNames::anOrthonormalTrendIsNamedByItsDegree()
{
    Factor f;
    f.name = u"dose"_s;
    f.levels = {u"0"_s, u"1"_s, u"2"_s, u"4"_s, u"8"_s};
    f.spacing = {q(0), q(1), q(2), q(4), q(8)};
    Scheme s = makeScheme(f, SchemeKind::Polynomial).take();
    s.kind = SchemeKind::Custom; // floating weights, unequal spacing, named by the rule
    QCOMPARE(namesOf(withCurrentNames(s)), (QStringList{u"linear"_s, u"quadratic"_s, u"cubic"_s, u"quartic"_s}));
}

void TestColumnNames::generatedNamesNeverRepeatAUsersName()
{
    Scheme s = custom({{q(0), q(1), q(0), q(0)}, {q(0), q(0), q(1), q(0)}, {q(0), q(0), q(0), q(1)}});
    s = edits::withColumnName(s, 0, u"C vs A"_s).take();
    QCOMPARE(namesOf(withCurrentNames(s)), (QStringList{u"C vs A"_s, u"C vs A (2)"_s, u"D vs A"_s}));
}

void TestColumnNames::aUsersNameIsKeptAndGoesOutOfDateWhenTheHypothesisChanges()
{
    Scheme s = withCurrentNames(custom({{q(0), q(1), q(0), q(0)}, {q(0), q(0), q(1), q(0)}, {q(0), q(0), q(0), q(1)}}));
    s = withCurrentNames(edits::withColumnName(s, 1, u"mid dose"_s).take());
    QVERIFY(s.columns[1].named);
    QCOMPARE(s.columns[1].namedFor, (std::vector<Weight>{q(-1), q(0), q(1), q(0)})); // what it tested when named
    QVERIFY(!nameIsStale(s, analyze(s), 1));
    // Typing 1, -1, 0, 0 into column 2 (beside B's and D's indicators): it now tests A minus C
    // (A = b0 + b2, C = b0); the user's name stays.
    s = withCurrentNames(edits::withWeights(s, {{0, 1, q(1)}, {1, 1, q(-1)}, {2, 1, q(0)}}));
    QCOMPARE(s.columns[1].name, u"mid dose"_s);
    const Analysis a = analyze(s);
    QVERIFY(nameIsStale(s, a, 1));
    QVERIFY(!nameIsStale(s, a, 0)); // unnamed columns are never stale: their names follow
    QCOMPARE(generatedColumnName(s, a, 1), u"A vs C"_s);
    // Renaming a level changes no hypothesis; the unnamed columns follow the new name.
    s = withCurrentNames(edits::withLevelName(s, 0, u"control"_s).take());
    QCOMPARE(s.columns[1].name, u"mid dose"_s);
    QCOMPARE(s.columns[2].name, u"D vs C"_s);
}

void TestColumnNames::useGeneratedNameLetsTheNameFollowAgain()
{
    Scheme s = withCurrentNames(custom({{q(0), q(1), q(0), q(0)}, {q(0), q(0), q(1), q(0)}, {q(0), q(0), q(0), q(1)}}));
    s = withCurrentNames(edits::withColumnName(s, 2, u"top"_s).take());
    s = withCurrentNames(edits::withWeights(s, {{0, 2, q(-1)}}));
    QVERIFY(nameIsStale(s, analyze(s), 2));
    s = withCurrentNames(edits::withGeneratedName(s, 2).take());
    QVERIFY(!s.columns[2].named);
    QVERIFY(s.columns[2].namedFor.empty());
    QCOMPARE(s.columns[2].name, generatedColumnName(s, analyze(s), 2));
    QVERIFY(!nameIsStale(s, analyze(s), 2));
}

void TestColumnNames::keepingANameRecordsWhatTheColumnTestsNow()
{
    Scheme s = withCurrentNames(custom({{q(0), q(1), q(0), q(0)}, {q(0), q(0), q(1), q(0)}, {q(0), q(0), q(0), q(1)}}));
    s = withCurrentNames(edits::withColumnName(s, 0, u"first"_s).take());
    s = withCurrentNames(edits::withWeights(s, {{1, 0, q(2)}})); // now 1/2 (B vs A)
    QVERIFY(nameIsStale(s, analyze(s), 0));
    s = withCurrentNames(edits::withNameKept(s, 0).take());
    QCOMPARE(s.columns[0].name, u"first"_s);
    QVERIFY(!nameIsStale(s, analyze(s), 0));
    QVERIFY(!edits::withNameKept(s, 1).ok()); // only a user's name can be kept
}

void TestColumnNames::settledNamesEveryFactorOfADesign()
{
    Study st = studyOf(custom({{q(0), q(1), q(0), q(0)}, {q(0), q(0), q(1), q(0)}, {q(0), q(0), q(0), q(1)}}));
    st = withFactorAdded(st).take();
    st = settled(std::move(st));
    QCOMPARE(namesOf(st.design.factors[0]), (QStringList{u"B vs A"_s, u"C vs A"_s, u"D vs A"_s}));
    QCOMPARE(namesOf(st.design.factors[1]), (QStringList{u"b1 vs b2"_s}));
    // A design file keeps the flags of every factor.
    st.design.factors[0] = edits::withColumnName(st.design.factors[0], 0, u"first"_s).take();
    const Study back = loaded(studyToJson(settled(st)));
    QVERIFY(back.design.factors[0].columns[0].named);
    QVERIFY(!back.design.factors[0].columns[1].named);
    QVERIFY(!back.design.factors[1].columns[0].named);
}

void TestColumnNames::theFlagAndTheHypothesisItWasNamedForRoundTrip()
{
    Scheme s = withCurrentNames(custom({{q(0), q(1), q(0), q(0)}, {q(0), q(0), q(1), q(0)}, {q(0), q(0), q(0), q(1)}}));
    s = withCurrentNames(edits::withColumnName(s, 1, u"mid dose"_s).take());
    s = withCurrentNames(edits::withWeights(s, {{0, 1, q(1)}, {1, 1, q(-1)}, {2, 1, q(0)}}));
    const QJsonObject root = QJsonDocument::fromJson(schemeToJson(s)).object();
    const QJsonArray cols = root.value(u"columns"_s).toArray();
    QCOMPARE(cols[0].toObject().value(u"named"_s), QJsonValue(false));
    QCOMPARE(cols[1].toObject().value(u"named"_s), QJsonValue(true));
    QCOMPARE(cols[1].toObject().value(u"named_for"_s).toArray(), (QJsonArray{u"-1"_s, u"0"_s, u"1"_s, u"0"_s}));
    QVERIFY(!cols[0].toObject().contains(u"named_for"_s));
    const Study back = loaded(schemeToJson(s));
    QCOMPARE(back.activeScheme(), s);
    QVERIFY(nameIsStale(back.activeScheme(), analyze(back.activeScheme()), 1));
}

void TestColumnNames::aStaleGeneratedNameInAFileIsReplacedOnLoading()
{
    // Hand-edited: column 1 says "C vs A" but tests 1/2 (A vs B); the tool names it, so it is renamed.
    QJsonObject root = QJsonDocument::fromJson(schemeToJson(withCurrentNames(
        custom({{q(1), q(1), q(-1), q(-1)}, {q(1), q(-1), q(0), q(0)}, {q(0), q(0), q(0), q(1)}})))).object();
    QJsonArray cols = root.value(u"columns"_s).toArray();
    QJsonObject c1 = cols[1].toObject();
    c1[u"name"_s] = u"C vs A"_s;
    cols[1] = c1;
    root[u"columns"_s] = cols;
    const Study back = loaded(QJsonDocument(root).toJson());
    QCOMPARE(back.activeScheme().columns[1].name, u"1/2 (A vs B)"_s);
}

void TestColumnNames::anOldFileWithoutTheFlagKeepsItsNames()
{
    // Written before the flag existed: every name counts as the user's, recorded for what the
    // column tests when the file is opened (so nothing is marked out of date on opening); an
    // empty name is the tool's to give.
    const QByteArray old = R"({"format": "contrast-bench-scheme", "version": 1,
        "factor": {"name": "g", "levels": ["A", "B", "C", "D"]},
        "scheme": {"kind": "custom"}, "intercept": true,
        "columns": [{"name": "comparison 4", "weights": ["1", "1", "-1", "-1"]},
                    {"name": "C vs A", "weights": ["1", "-1", "0", "0"]},
                    {"name": "", "weights": ["0", "0", "0", "1"]}]})";
    const Study st = loaded(old);
    const Scheme &s = st.activeScheme();
    QCOMPARE(namesOf(s), (QStringList{u"comparison 4"_s, u"C vs A"_s, u"D vs C"_s}));
    QVERIFY(s.columns[0].named && s.columns[1].named && !s.columns[2].named);
    QCOMPARE(s.columns[1].namedFor, (std::vector<Weight>{q(1, 2), q(-1, 2), q(0), q(0)}));
    const Analysis a = analyze(s);
    QVERIFY(!nameIsStale(s, a, 0));
    QVERIFY(!nameIsStale(s, a, 1));
    QCOMPARE(generatedColumnName(s, a, 1), u"1/2 (A vs B)"_s); // what the window offers
}

void TestColumnNames::aFlagOfTheWrongTypeIsRefusedWithItsField()
{
    QJsonObject root = QJsonDocument::fromJson(schemeToJson(withCurrentNames(
        custom({{q(0), q(1), q(0), q(0)}, {q(0), q(0), q(1), q(0)}, {q(0), q(0), q(0), q(1)}})))).object();
    QJsonArray cols = root.value(u"columns"_s).toArray();
    QJsonObject c = cols[2].toObject();
    c[u"named"_s] = u"yes"_s;
    cols[2] = c;
    root[u"columns"_s] = cols;
    auto r = studyFromJson(QJsonDocument(root).toJson(), u"old.json"_s);
    QVERIFY(!r.ok());
    QVERIFY2(r.error().contains(u"old.json: field 'columns[2].named'"_s), qPrintable(r.error()));
    c[u"named"_s] = true;
    c[u"named_for"_s] = QJsonArray{u"1"_s};
    cols[2] = c;
    root[u"columns"_s] = cols;
    r = studyFromJson(QJsonDocument(root).toJson(), u"old.json"_s);
    QVERIFY(!r.ok());
    QVERIFY2(r.error().contains(u"field 'columns[2].named_for'"_s), qPrintable(r.error()));
}

QTEST_MAIN(TestColumnNames)
#include "TestColumnNames.moc"
