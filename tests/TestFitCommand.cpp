// Tests of `contrast-bench-cli fit`, run as a separate process on small files.
#include <QJsonArray>
#include <QJsonDocument>
#include <QJsonObject>
#include "ProcessRunner.h"
#include <QTemporaryDir>
#include <QTest>

#include <cmath>

using namespace Qt::StringLiterals;

namespace {

using Run = cb::test::ProcessRun;

Run runCli(const QStringList &args, const QByteArray &input = {})
{
    return cb::test::runCli(QStringList{u"fit"_s} + args, input);
}

const QString kPlants = QStringLiteral(CB_TEST_DATA "/fit_plant_growth.csv");

QStringList plantArgs(const QString &data = kPlants)
{
    return {u"--data"_s, data, u"--factor"_s, u"group"_s, u"--response"_s, u"weight"_s, u"--levels"_s, u"ctrl,trt1,trt2"_s,
            u"--scheme"_s, u"treatment"_s};
}

QJsonObject parse(const Run &r)
{
    return QJsonDocument::fromJson(r.out).object();
}

} // namespace

class TestFitCommand : public QObject
{
    Q_OBJECT
private slots:
    void fitsPlantGrowthAsJson();
    void readsStandardInput();
    void reportsLeftOutRows();
    void fitsSummaryTable();
    void printsReport();
    void refusesBadInput_data();
    void refusesBadInput();
};

// Dobson (1983), An Introduction to Statistical Modelling, plant-growth data, treatment
// coding; published values written from memory (see TestDataFit).
void TestFitCommand::fitsPlantGrowthAsJson()
{
    const Run r = runCli(plantArgs() + QStringList{u"--json"_s, u"--adjust"_s, u"bonferroni"_s});
    QVERIFY2(r.exitCode == 0, r.err.constData());
    const QJsonObject o = parse(r);
    const QJsonArray levels = o.value(u"levels"_s).toArray();
    QCOMPARE(levels.size(), 3);
    QCOMPARE(levels[2].toObject().value(u"name"_s).toString(), u"trt2"_s);
    QCOMPARE(levels[2].toObject().value(u"n"_s).toInt(), 10);
    QCOMPARE(qRound(levels[2].toObject().value(u"mean"_s).toDouble() * 1000), 5526);
    const QJsonArray c = o.value(u"coefficients"_s).toArray();
    QCOMPARE(c.size(), 3);
    QCOMPARE(qRound(c[0].toObject().value(u"estimate"_s).toDouble() * 1000), 5032);
    QCOMPARE(qRound(c[1].toObject().value(u"estimate"_s).toDouble() * 1000), -371);
    QCOMPARE(qRound(c[2].toObject().value(u"estimate"_s).toDouble() * 1000), 494);
    QCOMPARE(qRound(c[2].toObject().value(u"hypothesis_estimate"_s).toDouble() * 1000), 494);
    QCOMPARE(qRound(c[1].toObject().value(u"se"_s).toDouble() * 10000), 2788);
    // Bonferroni over the two contrasts: 2 x 0.0877 (p of trt2 from the published table).
    QCOMPARE(qRound(c[2].toObject().value(u"p_adjusted"_s).toDouble() * 1000), 175);
    for (const QString &key : {u"t"_s, u"p"_s, u"ci_low"_s, u"ci_high"_s, u"name"_s})
        QVERIFY2(c[1].toObject().contains(key), qPrintable(key));
    QCOMPARE(qRound(o.value(u"sigma"_s).toDouble() * 10000), 6234);
    QCOMPARE(o.value(u"df"_s).toInt(), 27);
    QCOMPARE(qRound(o.value(u"r_squared"_s).toDouble() * 1000), 264);
    QCOMPARE(qRound(o.value(u"f"_s).toDouble() * 1000), 4846);
    QCOMPARE(qRound(o.value(u"f_p"_s).toDouble() * 10000), 159);
    QCOMPARE(o.value(u"skipped_rows"_s).toObject().value(u"count"_s).toInt(), 0);
}

void TestFitCommand::readsStandardInput()
{
    QFile f(kPlants);
    QVERIFY(f.open(QIODevice::ReadOnly));
    const Run r = runCli(plantArgs(u"-"_s) + QStringList{u"--json"_s}, f.readAll());
    QVERIFY2(r.exitCode == 0, r.err.constData());
    const QJsonObject o = parse(r);
    QCOMPARE(qRound(o.value(u"f"_s).toDouble() * 1000), 4846);
    QCOMPARE(o.value(u"data"_s).toObject().value(u"source"_s).toString(), u"standard input"_s);
}

void TestFitCommand::reportsLeftOutRows()
{
    QFile f(kPlants);
    QVERIFY(f.open(QIODevice::ReadOnly));
    QByteArray bytes = f.readAll();
    bytes.replace("trt1,4.17\n", "trt1,\n");
    bytes.replace("trt2,5.29\n", "trt2,5.29 g\n");
    const Run r = runCli(plantArgs(u"-"_s) + QStringList{u"--json"_s}, bytes);
    QVERIFY2(r.exitCode == 0, r.err.constData());
    const QJsonObject skipped = parse(r).value(u"skipped_rows"_s).toObject();
    QCOMPARE(skipped.value(u"count"_s).toInt(), 2);
    const QJsonArray first = skipped.value(u"first"_s).toArray();
    QCOMPARE(first[0].toObject().value(u"line"_s).toInt(), 13);
    QCOMPARE(first[0].toObject().value(u"reason"_s).toString(), u"response (column 'weight') is missing"_s);
    QCOMPARE(first[1].toObject().value(u"line"_s).toInt(), 27);
    QCOMPARE(first[1].toObject().value(u"reason"_s).toString(), u"response (column 'weight') '5.29 g' is not a number"_s);
    QCOMPARE(parse(r).value(u"levels"_s).toArray()[1].toObject().value(u"n"_s).toInt(), 9);
}

void TestFitCommand::fitsSummaryTable()
{
    QTemporaryDir dir;
    const QString path = dir.filePath(u"summary.csv"_s);
    QFile f(path);
    QVERIFY(f.open(QIODevice::WriteOnly));
    f.write("level,n,mean,sd\nctrl,10,5.032,0.5831\ntrt1,10,4.661,0.7937\ntrt2,10,5.526,0.4426\n");
    f.close();
    const Run r = runCli({u"--data"_s, path, u"--summary"_s, u"--levels"_s, u"ctrl,trt1,trt2"_s, u"--scheme"_s,
                          u"treatment"_s, u"--json"_s});
    QVERIFY2(r.exitCode == 0, r.err.constData());
    QCOMPARE(qRound(parse(r).value(u"sigma"_s).toDouble() * 10000), 6234);
    QVERIFY(parse(r).value(u"data"_s).toObject().value(u"summary_table"_s).toBool());
}

void TestFitCommand::printsReport()
{
    const Run r = runCli(plantArgs() + QStringList{u"--adjust"_s, u"holm"_s});
    QVERIFY2(r.exitCode == 0, r.err.constData());
    const QString text = QString::fromUtf8(r.out);
    QVERIFY2(text.contains(u"Residual SD 0.6234 on 27 df; R squared 0.2641"_s), qPrintable(text));
    QVERIFY(text.contains(u"F(2, 27) = 4.846, p = 0.01591; tests that all level means are equal"_s));
    QVERIFY(text.contains(u"p (holm)"_s));
    QVERIFY(r.err.isEmpty());
}

void TestFitCommand::refusesBadInput_data()
{
    QTest::addColumn<QStringList>("args");
    QTest::addColumn<QByteArray>("input");
    QTest::addColumn<QString>("message");
    const QStringList scheme = {u"--levels"_s, u"a,b,c"_s, u"--scheme"_s, u"sum"_s};
    const QStringList cols = {u"--factor"_s, u"g"_s, u"--response"_s, u"y"_s};
    const QByteArray good = "g,y\na,1\na,2\nb,3\nb,5\nc,4\nc,4.5\n";
    QTest::newRow("no data") << (cols + scheme) << QByteArray() << u"--data: no data file given"_s;
    QTest::newRow("missing file") << (QStringList{u"--data"_s, u"/nonexistent/x.csv"_s} + cols + scheme) << QByteArray()
                                  << u"/nonexistent/x.csv: no such file"_s;
    QTest::newRow("no response") << (QStringList{u"--data"_s, u"-"_s, u"--factor"_s, u"g"_s} + scheme) << good
                                 << u"--response: missing; name the data column"_s;
    QTest::newRow("bad adjust") << (QStringList{u"--data"_s, u"-"_s, u"--adjust"_s, u"tukey"_s} + cols + scheme) << good
                                << u"--adjust: 'tukey'; expected none, bonferroni, holm or sidak"_s;
    QTest::newRow("bad alpha") << (QStringList{u"--data"_s, u"-"_s, u"--alpha"_s, u"5"_s} + cols + scheme) << good
                               << u"--alpha: '5'; expected a number between 0 and 1"_s;
    QTest::newRow("bad map") << (QStringList{u"--data"_s, u"-"_s, u"--map"_s, u"x"_s} + cols + scheme) << good
                             << u"--map: level mapping: 'x' should read 'data name=scheme level'"_s;
    QTest::newRow("ragged line") << (QStringList{u"--data"_s, u"-"_s} + cols + scheme) << QByteArray("g,y\na,1\nb\n")
                                 << u"standard input line 3: 1 field; expected 2 as in the header"_s;
    QTest::newRow("unmatched levels") << (QStringList{u"--data"_s, u"-"_s} + cols + scheme)
                                      << QByteArray("g,y\na,1\na,2\nb,3\nd,4\n")
                                      << u"the levels do not match; in the data but not in the scheme: 'd'; in the scheme but not in the data: 'c'"_s;
    QTest::newRow("missing column") << (QStringList{u"--data"_s, u"-"_s, u"--factor"_s, u"grp"_s, u"--response"_s, u"y"_s} + scheme)
                                    << good << u"standard input: no column 'grp' for the factor; the columns are: g, y"_s;
}

void TestFitCommand::refusesBadInput()
{
    QFETCH(QStringList, args);
    QFETCH(QByteArray, input);
    QFETCH(QString, message);
    const Run r = runCli(args, input);
    QCOMPARE(r.exitCode, 2);
    QVERIFY2(r.errText().startsWith(u"contrast-bench-cli fit: "_s + message), r.err.constData());
    QVERIFY(r.out.isEmpty());
}

QTEST_GUILESS_MAIN(TestFitCommand)
#include "TestFitCommand.moc"
