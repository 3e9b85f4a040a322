// The command line: analyze and design, JSON keys, exit codes and messages.
#include <QFile>
#include <QJsonArray>
#include <QJsonDocument>
#include <QJsonObject>
#include <QTemporaryDir>

#include "tests/support/ProcessRunner.h"
#include <QTest>

#include <cmath>

using namespace Qt::StringLiterals;

namespace {

using Run = cb::test::ProcessRun;

Run cli(const QStringList &args)
{
    return cb::test::runCli(args);
}

QJsonObject json(const Run &r)
{
    return QJsonDocument::fromJson(r.out).object();
}

} // namespace

class TestCli : public QObject
{
    Q_OBJECT
private slots:
    void analyzeJsonHasEveryKey();
    void analyzeHelmertValues();
    void analyzeRankDeficient();
    void customColumns();
    void designReverse();
    void fileRoundTrip();
    void powerPlansWithTheStudyFilesInputs();
    void badInput_data();
    void badInput();
    void fileFromStandardInput();
    void extremeSpacingGivesFiniteColumns();
    void textReport();
    void versionIsTheProjectVersion();
};

void TestCli::analyzeJsonHasEveryKey()
{
    const Run r = cli({u"analyze"_s, u"--levels"_s, u"a,b,c"_s, u"--scheme"_s, u"sum"_s, u"--json"_s});
    QCOMPARE(r.exitCode, 0);
    const QJsonObject o = json(r);
    for (const char16_t *key : {u"levels", u"coding", u"coding_exact", u"hypotheses", u"hypotheses_exact", u"hypothesis_text", u"rank",
                                u"full_rank", u"column_sums", u"orthogonal", u"orthogonal_in_design", u"condition_number",
                                u"condition_indices", u"vif", u"warnings"})
        QVERIFY2(o.contains(QString::fromUtf16(key)), qPrintable(QString::fromUtf16(key)));
    QCOMPARE(o[u"coding"_s].toArray().size(), 3);
    QCOMPARE(o[u"coding"_s].toArray()[2].toArray()[0].toDouble(), -1.0); // the last level is the base coded -1
    QCOMPARE(o[u"hypotheses_exact"_s].toArray()[1].toArray()[0].toString(), u"2/3"_s);
    QCOMPARE(o[u"hypotheses_exact"_s].toArray()[1].toArray()[1].toString(), u"-1/3"_s);
    QCOMPARE(o[u"rank"_s].toInt(), 3);
    QVERIFY(o[u"full_rank"_s].toBool());
}

void TestCli::analyzeHelmertValues()
{
    const Run r = cli({u"analyze"_s, u"--levels"_s, u"p,q,r,s"_s, u"--scheme"_s, u"helmert"_s, u"--json"_s});
    QCOMPARE(r.exitCode, 0);
    const QJsonObject o = json(r);
    QCOMPARE(o[u"hypothesis_text"_s].toArray()[1].toString(), u"b1: mean(p) - mean(q, r, s) = 0"_s);
    QCOMPARE(o[u"coding_exact"_s].toArray()[0].toArray()[0].toString(), u"3/4"_s);
    QCOMPARE(o[u"condition_number"_s].toDouble(), 1.0);
    QVERIFY(o[u"orthogonal"_s].toArray()[0].toArray()[1].toBool());
}

void TestCli::analyzeRankDeficient()
{
    const Run r = cli({u"analyze"_s, u"--levels"_s, u"a,b,c"_s, u"--columns"_s, u"1,0,0;0,1,0;0,0,1"_s, u"--json"_s});
    QCOMPARE(r.exitCode, 0);
    const QJsonObject o = json(r);
    QCOMPARE(o[u"rank"_s].toInt(), 3);
    QVERIFY(!o[u"full_rank"_s].toBool());
    QVERIFY(o[u"hypotheses"_s].isNull());
    QVERIFY(o[u"condition_number"_s].isNull());
    QCOMPARE(o[u"dependencies"_s].toArray()[0].toString(), u"c3 = intercept - c1 - c2"_s);
    QVERIFY(o[u"warnings"_s].toArray()[0].toString().contains(u"rank 3 of 4"_s));
}

void TestCli::customColumns()
{
    const Run r = cli({u"analyze"_s, u"--levels"_s, u"a,b,c"_s, u"--columns"_s, u"-1, 1/2, 0.5; 0, \u22121, 1"_s, u"--n"_s, u"10,20,30"_s, u"--json"_s});
    QCOMPARE(r.exitCode, 0);
    const QJsonObject o = json(r);
    QCOMPARE(o[u"coding_exact"_s].toArray()[1].toArray()[1].toString(), u"-1"_s);
    QVERIFY(o[u"orthogonal"_s].toArray()[0].toArray()[1].toBool());          // 0 - 1/2 + 1/2 = 0
    QVERIFY(!o[u"orthogonal_in_design"_s].toArray()[0].toArray()[1].toBool()); // not under n = 10, 20, 30
}

void TestCli::designReverse()
{
    const Run r = cli({u"design"_s, u"--levels"_s, u"none,low,high"_s, u"--hypotheses"_s, u"-1,1/2,1/2;0,-1,1"_s, u"--json"_s});
    QCOMPARE(r.exitCode, 0);
    const QJsonObject o = json(r);
    const QJsonArray h = o[u"hypotheses_exact"_s].toArray();
    QCOMPARE(h[1].toArray()[0].toString(), u"-1"_s);
    QCOMPARE(h[1].toArray()[1].toString(), u"1/2"_s);
    QCOMPARE(h[2].toArray()[2].toString(), u"1"_s);
    // The coding that tests them: helmert-like, exact.
    QCOMPARE(o[u"coding_exact"_s].toArray()[0].toArray()[0].toString(), u"-2/3"_s);
}

void TestCli::fileRoundTrip()
{
    QTemporaryDir dir;
    const QString path = dir.filePath(u"s.json"_s);
    QFile f(path);
    QVERIFY(f.open(QIODevice::WriteOnly));
    f.write(R"({"format": "contrast-bench-scheme", "version": 1, "factor": {"name": "x", "levels": ["a", "b", "c"]},
               "scheme": {"kind": "custom"}, "columns": [{"name": "ab", "weights": ["1", "-1", "0"]}]})");
    f.close();
    const Run r = cli({u"analyze"_s, u"--file"_s, path, u"--json"_s});
    QCOMPARE(r.exitCode, 0);
    QVERIFY(json(r)[u"depends_on_sizes"_s].toBool());
    const Run bad = cli({u"analyze"_s, u"--file"_s, path, u"--scheme"_s, u"sum"_s});
    QCOMPARE(bad.exitCode, 2);
    QVERIFY(bad.errText().contains(u"--scheme cannot be combined with --file"_s));
}

// A study file saved with the window's Power tab inputs ("power"): `power --file` plans with them,
// exactly as with the same inputs typed as options; --alpha takes the place of the plan's, and
// an input option beside the plan is refused, naming it.
void TestCli::powerPlansWithTheStudyFilesInputs()
{
    QFile demo(QStringLiteral(CB_SOURCE_DIR "/resources/demos/irrigation.json"));
    QVERIFY(demo.open(QIODevice::ReadOnly));
    QJsonObject root = QJsonDocument::fromJson(demo.readAll()).object();
    QJsonArray levels;
    const QJsonArray names = root[u"factor"_s].toObject()[u"levels"_s].toArray();
    for (qsizetype i = 0; i < names.size(); ++i)
        levels.append(QJsonObject{{u"level"_s, names[i]}, {u"expected"_s, QString::number(10 + 2 * i)}});
    root[u"power"_s] = QJsonObject{{u"levels"_s, levels}, {u"sd"_s, u"4"_s}, {u"adjustment"_s, u"sidak"_s}};
    QTemporaryDir dir;
    const QString path = dir.filePath(u"planned.json"_s);
    QFile f(path);
    QVERIFY(f.open(QIODevice::WriteOnly));
    f.write(QJsonDocument(root).toJson());
    f.close();

    const Run fromPlan = cli({u"power"_s, u"--file"_s, path, u"--json"_s});
    QCOMPARE(fromPlan.exitCode, 0);
    const Run typed = cli({u"power"_s, u"--file"_s, path, u"--means"_s, u"10,12,14,16,18"_s, u"--sd"_s, u"4"_s, u"--adjust"_s,
                           u"sidak"_s, u"--json"_s});
    QCOMPARE(typed.exitCode, 0);
    QCOMPARE(json(fromPlan)[u"contrasts"_s], json(typed)[u"contrasts"_s]);
    QCOMPARE(json(fromPlan)[u"omnibus"_s], json(typed)[u"omnibus"_s]);
    QVERIFY(json(fromPlan)[u"contrasts"_s].toArray().size() == 4);
    QVERIFY(fromPlan.outText().contains(u"the inputs are the study file's"_s));

    const Run alpha = cli({u"power"_s, u"--file"_s, path, u"--alpha"_s, u"0.01"_s, u"--json"_s});
    QCOMPARE(alpha.exitCode, 0);
    QCOMPARE(json(alpha)[u"alpha"_s].toDouble(), 0.01);
    QCOMPARE(json(alpha)[u"adjustment"_s].toString(), u"sidak"_s); // the plan's, not the option's default

    const Run clash = cli({u"power"_s, u"--file"_s, path, u"--sd"_s, u"5"_s});
    QCOMPARE(clash.exitCode, 2);
    QVERIFY2(clash.errText().contains(u"--sd: "_s) && clash.errText().contains(u"planned.json holds the power inputs"_s), qPrintable(clash.errText()));

    root[u"power"_s] = QJsonObject{{u"levels"_s, levels}, {u"sd"_s, u"-4"_s}};
    QVERIFY(f.open(QIODevice::WriteOnly | QIODevice::Truncate));
    f.write(QJsonDocument(root).toJson());
    f.close();
    const Run bad = cli({u"power"_s, u"--file"_s, path});
    QCOMPARE(bad.exitCode, 2);
    QVERIFY2(bad.errText().contains(u"planned.json: field 'power' (the window's Power tab): "_s) && bad.errText().contains(u"sd"_s),
             qPrintable(bad.errText()));
}

void TestCli::badInput_data()
{
    QTest::addColumn<QStringList>("args");
    QTest::addColumn<QString>("message");
    QTest::newRow("no command") << QStringList{} << u"Usage: contrast-bench-cli"_s;
    QTest::newRow("unknown command") << QStringList{u"frobnicate"_s} << u"unknown command 'frobnicate'"_s;
    QTest::newRow("unknown option") << QStringList{u"analyze"_s, u"--levls"_s, u"a,b"_s} << u"Unknown option 'levls'"_s;
    QTest::newRow("neither file nor levels") << QStringList{u"analyze"_s} << u"give either --file or --levels"_s;
    QTest::newRow("one level") << QStringList{u"analyze"_s, u"--levels"_s, u"a"_s, u"--scheme"_s, u"sum"_s} << u"--levels: a factor needs at least 2 levels, got 1"_s;
    QTest::newRow("duplicate level") << QStringList{u"analyze"_s, u"--levels"_s, u"a,b,a"_s, u"--scheme"_s, u"sum"_s} << u"level 3 repeats the name 'a'"_s;
    QTest::newRow("unknown reference") << QStringList{u"analyze"_s, u"--levels"_s, u"a,b"_s, u"--scheme"_s, u"treatment"_s, u"--reference"_s, u"z"_s}
                                       << u"--reference: 'z' is not one of the levels (a, b)"_s;
    QTest::newRow("reference for helmert") << QStringList{u"analyze"_s, u"--levels"_s, u"a,b"_s, u"--scheme"_s, u"helmert"_s, u"--reference"_s, u"a"_s}
                                           << u"--reference: the helmert scheme has no reference level"_s;
    QTest::newRow("bad weight") << QStringList{u"analyze"_s, u"--levels"_s, u"a,b"_s, u"--columns"_s, u"1,abc"_s}
                                << u"--columns: column 1, level 2 ('b'): weight 'abc' is not a number"_s;
    QTest::newRow("short column") << QStringList{u"analyze"_s, u"--levels"_s, u"a,b,c"_s, u"--columns"_s, u"1,-1"_s}
                                  << u"--columns: column 1 has 2 weights for 3 levels; give one per level"_s;
    QTest::newRow("bad n") << QStringList{u"analyze"_s, u"--levels"_s, u"a,b"_s, u"--scheme"_s, u"sum"_s, u"--n"_s, u"5,0"_s}
                           << u"--n, item 2: '0' is not a positive size"_s;
    QTest::newRow("n count") << QStringList{u"analyze"_s, u"--levels"_s, u"a,b"_s, u"--scheme"_s, u"sum"_s, u"--n"_s, u"5"_s}
                             << u"--n: 1 sizes for 2 levels; give one per level"_s;
    QTest::newRow("missing file") << QStringList{u"analyze"_s, u"--file"_s, u"/no/such.json"_s} << u"/no/such.json: no such file"_s;
    QTest::newRow("endless device") << QStringList{u"analyze"_s, u"--file"_s, u"/dev/zero"_s} << u"/dev/zero is a device, not a file"_s;
    QTest::newRow("folder") << QStringList{u"export"_s, u"--format"_s, u"csv"_s, u"--file"_s, u"/tmp"_s} << u"/tmp is a folder; expected a file"_s;
    QTest::newRow("empty stdin") << QStringList{u"power"_s, u"--file"_s, u"-"_s} << u"standard input: the file is empty"_s;
    QTest::newRow("design needs rows") << QStringList{u"design"_s, u"--levels"_s, u"a,b"_s} << u"give --levels and --hypotheses"_s;
    QTest::newRow("design row sum") << QStringList{u"design"_s, u"--levels"_s, u"a,b"_s, u"--hypotheses"_s, u"1,1"_s}
                                    << u"hypotheses: row 1 sums to 2; with an intercept each comparison must sum to 0"_s;
    QTest::newRow("design bad weight") << QStringList{u"design"_s, u"--levels"_s, u"a,b"_s, u"--hypotheses"_s, u"1,1/0"_s}
                                       << u"--hypotheses: row 1, level 2 ('b'): weight '1/0' divides by zero"_s;
}

void TestCli::badInput()
{
    QFETCH(QStringList, args);
    QFETCH(QString, message);
    const Run r = cli(args);
    QCOMPARE(r.exitCode, 2);
    QVERIFY2(r.errText().contains(message), r.err.constData());
}

// Standard input and pipes give their bytes once: a design file through "-" is read once and
// analysed as a design (it used to be opened twice, the second time finding nothing).
void TestCli::fileFromStandardInput()
{
    QFile demo(QString::fromUtf8(CB_SOURCE_DIR) + u"/resources/demos/hedgerow.json"_s);
    QVERIFY(demo.open(QIODevice::ReadOnly));
    const QByteArray bytes = demo.readAll();
    for (const QStringList &command : {QStringList{u"analyze"_s}, QStringList{u"export"_s, u"--format"_s, u"csv"_s}}) {
        const cb::test::ProcessRun r = cb::test::runCli(command + QStringList{u"--file"_s, u"-"_s}, bytes);
        QVERIFY2(r.exitCode == 0, r.err.constData());
        QVERIFY(!r.out.isEmpty());
    }
    const cb::test::ProcessRun a = cb::test::runCli({u"analyze"_s, u"--file"_s, u"-"_s}, bytes);
    QVERIFY(a.outText().startsWith(u"Design: margin"_s));
}

// Positions that span 600 orders of magnitude: the exact trends are normalised as ratios in
// [0, 1], so no column overflows to NaN (issue 21, class 4); export and analyze agree.
void TestCli::extremeSpacingGivesFiniteColumns()
{
    const QStringList scheme = {u"--levels"_s, u"a,b,c,d"_s, u"--scheme"_s, u"polynomial"_s, u"--spacing"_s, u"1e300,-1e300,1e-300,0"_s};
    const Run json = cli(QStringList{u"analyze"_s} + scheme + QStringList{u"--json"_s});
    QCOMPARE(json.exitCode, 0);
    const QJsonArray coding = QJsonDocument::fromJson(json.out).object()[u"coding"_s].toArray();
    QCOMPARE(coding.size(), 4);
    for (const QJsonValue &row : coding)
        for (const QJsonValue &v : row.toArray())
            QVERIFY2(v.isDouble() && std::isfinite(v.toDouble()), json.out.constData());
    // The linear trend: a and b at -1e300 and 1e300 dominate, each 1/sqrt(2) (orthonormal).
    QCOMPARE(coding[0].toArray()[0].toDouble(), -std::sqrt(0.5));
    const Run csv = cli(QStringList{u"export"_s, u"--format"_s, u"csv"_s} + scheme);
    QCOMPARE(csv.exitCode, 0);
    QVERIFY(!csv.outText().contains(u"nan"_s, Qt::CaseInsensitive));
}

void TestCli::textReport()
{
    const Run r = cli({u"analyze"_s, u"--levels"_s, u"none,weekly,twice"_s, u"--scheme"_s, u"treatment"_s});
    QCOMPARE(r.exitCode, 0);
    const QString text = QString::fromUtf8(r.out);
    // Each coefficient as the window's cards label it: "b0 intercept", "b1" and its column's name.
    QVERIFY2(text.contains(u"  b0 intercept: mean(none)\n"_s), qPrintable(text));
    QVERIFY(text.contains(u"  b1 weekly vs none: mean(weekly) - mean(none) = 0\n"_s));
    QVERIFY(text.contains(u"\n  column sum "_s));
    QVERIFY(!text.contains(u"Intercept"_s));
    QVERIFY(text.contains(u"rank 3 of 3 (full rank); exact arithmetic"_s));
}

void TestCli::versionIsTheProjectVersion()
{
    // CB_PROJECT_VERSION is project(... VERSION ...) in the top-level CMakeLists.txt.
    const Run r = cli({u"--version"_s});
    QCOMPARE(r.exitCode, 0);
    QCOMPARE(QString::fromUtf8(r.out).trimmed(), u"contrast-bench-cli "_s + QStringLiteral(CB_PROJECT_VERSION));
}

QTEST_GUILESS_MAIN(TestCli)
#include "TestCli.moc"
