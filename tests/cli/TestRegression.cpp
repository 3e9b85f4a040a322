// Regression tests for what fuzzing (tests/fuzz/, tools/fuzz.sh) found. Each test names the
// target that found the input and what went wrong before the fix.
#include "core/analysis/Analysis.h"
#include "core/report/AnalysisJson.h"
#include "core/report/AnalysisReport.h"
#include "core/export/Export.h"
#include "core/analysis/HypothesisText.h"
#include "core/data/DataReader.h"
#include "core/model/Scheme.h"
#include "core/power/Power.h"
#include "core/files/SchemeFile.h"

#include "tests/fuzz/FuzzChecks.h"
#include "tests/support/ExportedCsv.h"

#include <QJsonArray>
#include <QJsonDocument>
#include <QJsonObject>
#include <QProcess>
#include <QTest>

#include <cmath>

using namespace Qt::StringLiterals;
using namespace cb;

namespace {

const QString kCli = QStringLiteral(CB_BINARY_DIR "/app/contrast-bench-cli");

struct CliRun
{
    int code = -1;
    QByteArray out;
    QByteArray err;
};

CliRun runCli(const QStringList &args)
{
    QProcess p;
    p.start(kCli, args);
    p.waitForFinished(60000);
    return {p.exitStatus() == QProcess::NormalExit ? p.exitCode() : -1, p.readAllStandardOutput(), p.readAllStandardError()};
}

} // namespace

class TestRegression : public QObject
{
    Q_OBJECT

private slots:
    void interceptBesideKColumnsReadsNoSingularValuePastTheEnd_data();
    void interceptBesideKColumnsReadsNoSingularValuePastTheEnd();
    void fuzzInputThroughTheCommandLine();
    void hypothesisCsvOutsideTheWeightRangeIsRefusedClearly();
    void longExactWeightSurvivesSaveAndLoad();
    void wildlyUnequalSizesGiveNoInfiniteHypotheses();
    void exactHypothesisBeyondDoubleRangeIsWrittenInFull();
    void powerWithPlannedSizesFarApartDoesNotOverflow();
    void dataValuesWhoseSquaresOverflowAreRefused();
};

// FuzzCliMatrix: with k coding columns and an intercept for k levels (the indicator coding
// with its intercept left on), the k x (k+1) design has only k singular values; analyze()
// read one past the end of them (heap-buffer-overflow under ASan, a garbage condition
// index without it).
void TestRegression::interceptBesideKColumnsReadsNoSingularValuePastTheEnd_data()
{
    QTest::addColumn<int>("levels");
    QTest::addColumn<bool>("exact");
    for (int k : {2, 3, 7, 45})
        for (bool exact : {true, false})
            QTest::newRow(qPrintable(u"k=%1 %2"_s.arg(k).arg(exact ? u"exact"_s : u"floating"_s))) << k << exact;
}

void TestRegression::interceptBesideKColumnsReadsNoSingularValuePastTheEnd()
{
    QFETCH(int, levels);
    QFETCH(bool, exact);
    Factor f;
    for (int i = 0; i < levels; ++i)
        f.levels << u"l%1"_s.arg(i + 1);
    Scheme s = makeScheme(f, SchemeKind::Indicator).value();
    s.intercept = true;
    if (!exact)
        for (Column &c : s.columns)
            for (Weight &w : c.weights)
                w = Weight::approx(w.value());
    const Analysis a = analyze(s);
    QCOMPARE(a.coefficientCount, levels + 1);
    QCOMPARE(a.rank, levels);
    QVERIFY(!a.fullRank);
    QVERIFY(!a.conditionNumber);
    QCOMPARE(int(a.conditionIndices.size()), levels + 1);
    QVERIFY(std::isinf(a.conditionIndices.back()));
    QCOMPARE(a.dependencies.size(), 1);
    QVERIFY(a.dependencies.front().contains(u"intercept"_s));
    const QString report = analysisReport(s, a);
    QVERIFY2(fuzz::checkNoNonFiniteNumber(report).isEmpty(), qPrintable(report));
}

// The input FuzzCliMatrix saved (crash-e57e1fa6...): two levels "0`" and "'", columns
// (1, 1) and (0, 2) beside the intercept: c1 equals the intercept.
void TestRegression::fuzzInputThroughTheCommandLine()
{
    const CliRun r = runCli({u"analyze"_s, u"--levels"_s, u"0`,'"_s, u"--columns"_s, u"1,1;0,2"_s, u"--json"_s});
    QCOMPARE(r.code, 0);
    const QJsonObject o = QJsonDocument::fromJson(r.out).object();
    QCOMPARE(o.value(u"rank"_s).toInt(), 2);
    QCOMPARE(o.value(u"full_rank"_s).toBool(), false);
    QCOMPARE(o.value(u"dependencies"_s).toArray().first().toString(), u"c1 = intercept"_s);
    QVERIFY(o.value(u"condition_number"_s).isNull());
}

// FuzzExport (seed huge.json): a coding with weights 1e300 has hypothesis weights near
// 1e-300 and below; its CSV is well formed but holds values that the CSV reader, which
// reads weights, does not accept. The refusal names the line, field and range.
void TestRegression::hypothesisCsvOutsideTheWeightRangeIsRefusedClearly()
{
    Scheme s;
    s.factor.levels = {u"a"_s, u"b"_s, u"c"_s};
    s.columns = {{u"c1"_s, {parseWeight(u"1e300"_s).value(), parseWeight(u"-1e300"_s).value(), 0}},
                 {u"c2"_s, {parseWeight(u"3e299"_s).value(), 0, parseWeight(u"-3e299"_s).value()}}};
    const Analysis a = analyze(s);
    QVERIFY(a.fullRank);
    const ExportTable t = hypothesisTable(a).value();
    const QString problem = fuzz::checkAllExports(t);
    QVERIFY2(problem.isEmpty(), qPrintable(problem));
    const QString csv = exportTable(t, ExportFormat::Csv).value();
    auto back = test::readExportedCsv(csv);
    QVERIFY(!back.ok());
    QVERIFY2(back.error().startsWith(u"CSV line 3, field 2 (column 'a'): weight '"_s) && back.error().contains(u"is too small"_s),
             qPrintable(back.error()));
}

// FuzzWeight: a typed decimal of 400 characters (the limit) is an exact fraction whose
// storage text "p/q" has about 800 characters; the scheme file and the exact CSV wrote it,
// and reading them back refused it as too long, so a saved scheme did not load.
void TestRegression::longExactWeightSurvivesSaveAndLoad()
{
    const QString typed = u"."_s + QString(130, u'4') + QString(130, u'9') + QString(139, u'4');
    QCOMPARE(typed.size(), 400);
    const Weight w = parseWeight(typed).value();
    QVERIFY(w.storageString().size() > 700);
    auto back = parseStoredWeight(w.storageString());
    QVERIFY2(back.ok(), qPrintable(back.error()));
    QVERIFY(*back == w);
    // Typed text keeps its limit.
    QVERIFY(parseWeight(w.storageString()).error().contains(u"is too long"_s));

    Scheme s;
    s.factor.levels = {u"a"_s, u"b"_s};
    s.columns = {{u"c1"_s, {w, Weight(-1)}}};
    auto loaded = schemeFromJson(schemeToJson(s), u"saved.json"_s);
    QVERIFY2(loaded.ok(), qPrintable(loaded.error()));
    QVERIFY(loaded->columns[0].weights[0] == w);

    ExportOptions exact;
    exact.exact = true;
    auto csv = test::readExportedCsv(exportTable(codingTable(s).value(), ExportFormat::Csv, exact).value());
    QVERIFY2(csv.ok(), qPrintable(csv.error()));
    QVERIFY(csv->cells[0][0] == w);
}

// FuzzCliMatrix (crash-2b9fb8c7...): an orthonormal polynomial over positions 5, 2, 488888888
// with planned sizes 1e90, 2 and 6. The hypotheses came from the n-weighted pseudo-inverse,
// singular to working precision, and the report showed "b0: inf low + nan mid + inf |".
void TestRegression::wildlyUnequalSizesGiveNoInfiniteHypotheses()
{
    const CliRun r = runCli({u"analyze"_s, u"--levels"_s, u"low,mid,|"_s, u"--n"_s,
                             u"1000000000000000000000000000000000000000000000000200000000000000000000000200000000000000000,2,6"_s,
                             u"--spacing"_s, u"5,2,488888888"_s, u"--scheme"_s, u"polynomial"_s});
    QCOMPARE(r.code, 0);
    const QString report = QString::fromUtf8(r.out);
    QVERIFY2(fuzz::checkNoNonFiniteNumber(report).isEmpty(), qPrintable(report));
    QVERIFY2(report.contains(u"floating-point precision"_s) || report.contains(u"cannot be computed in floating point"_s),
             qPrintable(report));
}

// FuzzCliMatrix (crash-4e677473...): columns (0, -1e300, 1) and (1e-300, 0, 1e-300). The exact
// hypothesis row holds weights near 1e600, beyond the range of a double, and its text was written
// from the doubles: "b2: inf a - 1e+300 b - inf c = 0". Such weights are now written from the
// exact value, and exact weights that round to 0 as doubles are no longer left out.
void TestRegression::exactHypothesisBeyondDoubleRangeIsWrittenInFull()
{
    const CliRun r = runCli({u"analyze"_s, u"--levels"_s, u"a,b,c"_s, u"--columns"_s, u"0e299,-1e300,1;1e-300,0,\r1e-300"_s});
    QCOMPARE(r.code, 0);
    const QString report = QString::fromUtf8(r.out);
    QVERIFY2(fuzz::checkNoNonFiniteNumber(report).isEmpty(), qPrintable(report));
    QVERIFY2(report.contains(u"b2 c2: 1e+600 a - 1e+300 b - 1e+600 c = 0"_s), qPrintable(report));

    // A weight of 1e-400 (0 as a double) still appears in the text.
    const Rational tiny(mpz_class(1), mpz_class("1" + std::string(400, '0')));
    const HypothesisText t = describeHypothesis({Weight::exact(tiny), Weight(-1), Weight(0)}, {u"a"_s, u"b"_s, u"c"_s},
                                                {1, 1, 1}, false, u"b1"_s);
    QCOMPARE(t.symbols, u"b1: 1e-400 a - b = 0"_s);
}

QTEST_GUILESS_MAIN(TestRegression)
// FuzzCliMatrix (power): planned n of 1e100 and 1e10 made allocation ratios of 1e90, and the
// sample-size search turned smallest * 1e90 into a long long (undefined behaviour under UBSan).
// The group sizes now stop at kMaxGroupSize, and the report writes degrees of freedom beyond an
// integer's range as a number (the report cast them to qint64, found by the same fuzz run).
void TestRegression::powerWithPlannedSizesFarApartDoesNotOverflow()
{
    const std::vector<long long> sizes = groupSizesFor(2, {1e100, 1e10});
    QCOMPARE(sizes.size(), size_t(2));
    QCOMPARE(sizes[0], kMaxGroupSize);
    QCOMPARE(sizes[1], 2LL);
    const CliRun r = runCli({u"power"_s, u"--levels"_s, u"a,b"_s, u"--n"_s, u"1e100,1e10"_s, u"--means"_s, u"0,1"_s,
                             u"--scheme"_s, u"treatment"_s, u"--sd"_s, u"1"_s});
    QVERIFY2(r.code == 0 || r.code == 2, qPrintable(QString::fromUtf8(r.err)));
}

// FuzzDataReader (crash-2616aa9b..., CI of 2026-12-03): finite responses far apart, such as
// 1e308 and -1e308, made a level's mean -inf; 1e200 and -1e200 gave inf - inf in the sum of
// squares, clamped to 0, so the level was read with SD 0 and fitted as if exact. Responses and
// means beyond 1e100, SDs beyond 1e100 and weights or n beyond 1e50 are now refused with their
// line (kLargestDataValue, kLargestDataWeight).
void TestRegression::dataValuesWhoseSquaresOverflowAreRefused()
{
    DataReadOptions o;
    o.factorColumn = u"g"_s;
    o.responseColumn = u"y"_s;
    for (const QByteArray &bytes : {QByteArray("g,y\na,1e308\na,-1e308\nb,1\nb,2\n"), QByteArray("g,y\na,1e200\na,-1e200\na,3\nb,1\nb,2\n")}) {
        auto d = readLevelDataFromBytes(bytes, u"big.csv"_s, o);
        QVERIFY2(d.ok(), qPrintable(d.error()));
        QCOMPARE(d->skippedRows, qint64(2));
        QVERIFY(d->skipped[0].message.contains(u"too large"_s));
        for (const LevelStats &l : d->levels)
            QVERIFY(std::isfinite(l.stats.mean) && std::isfinite(l.stats.m2));
    }
    auto s = readSummaryTableFromBytes("level,n,mean,sd\na,3,1,1e200\nb,3,1,1\n", u"big.csv"_s);
    QVERIFY(!s.ok());
    QCOMPARE(s.error(), u"big.csv line 2: sd '1e+200' is too large; expected at most 1e100 (rescale the response)"_s);
}

#include "TestRegression.moc"
