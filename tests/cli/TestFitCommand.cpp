// Tests of `contrast-bench-cli fit`, run as a separate process on small files.
#include <QJsonArray>
#include <QJsonDocument>
#include <QJsonObject>
#include "tests/support/FitTestSupport.h"
#include "tests/support/ProcessRunner.h"
#include <QTemporaryDir>
#include <QTest>

#include <cmath>
#include <cstring>

using namespace Qt::StringLiterals;

namespace {

using Run = cb::test::ProcessRun;

Run runCli(const QStringList &args, const QByteArray &input = {})
{
    return cb::test::runCli(QStringList{u"fit"_s} + args, input);
}

const QString kThreeGroups = QStringLiteral(CB_TEST_DATA "/fit_three_groups.csv");

QStringList threeGroupArgs(const QString &data = kThreeGroups)
{
    return {u"--data"_s, data, u"--factor"_s, u"group"_s, u"--response"_s, u"y"_s, u"--levels"_s, u"g1,g2,g3"_s,
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
    void fitsPublishedThreeGroupsAsJson();
    void readsStandardInput();
    void reportsLeftOutRows();
    void fitsSummaryTable();
    void printsReport();
    void fitsDesignCells();
    void refusesDesignColumns();
    void refusesBadInput_data();
    void refusesBadInput();
};

// Dobson (1983), An Introduction to Statistical Modelling, plant-growth data, treatment
// coding; published values written from memory (see TestDataFit).
void TestFitCommand::fitsPublishedThreeGroupsAsJson()
{
    const Run r = runCli(threeGroupArgs() + QStringList{u"--json"_s, u"--adjust"_s, u"bonferroni"_s});
    QVERIFY2(r.exitCode == 0, r.err.constData());
    const QJsonObject o = parse(r);
    const QJsonArray levels = o.value(u"levels"_s).toArray();
    QCOMPARE(levels.size(), 3);
    QCOMPARE(levels[2].toObject().value(u"name"_s).toString(), u"g3"_s);
    QCOMPARE(levels[2].toObject().value(u"n"_s).toInt(), 10);
    QCOMPARE(qRound(levels[2].toObject().value(u"mean"_s).toDouble() * 1000), 5526);
    const QJsonArray c = o.value(u"coefficients"_s).toArray();
    QCOMPARE(c.size(), 3);
    QCOMPARE(qRound(c[0].toObject().value(u"estimate"_s).toDouble() * 1000), 5032);
    QCOMPARE(qRound(c[1].toObject().value(u"estimate"_s).toDouble() * 1000), -371);
    QCOMPARE(qRound(c[2].toObject().value(u"estimate"_s).toDouble() * 1000), 494);
    QCOMPARE(qRound(c[2].toObject().value(u"hypothesis_estimate"_s).toDouble() * 1000), 494);
    QCOMPARE(qRound(c[1].toObject().value(u"se"_s).toDouble() * 10000), 2788);
    // Bonferroni over the two contrasts: 2 x 0.0877 (p of g3 from the published table).
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
    QFile f(kThreeGroups);
    QVERIFY(f.open(QIODevice::ReadOnly));
    const Run r = runCli(threeGroupArgs(u"-"_s) + QStringList{u"--json"_s}, f.readAll());
    QVERIFY2(r.exitCode == 0, r.err.constData());
    const QJsonObject o = parse(r);
    QCOMPARE(qRound(o.value(u"f"_s).toDouble() * 1000), 4846);
    QCOMPARE(o.value(u"data"_s).toObject().value(u"source"_s).toString(), u"standard input"_s);
}

void TestFitCommand::reportsLeftOutRows()
{
    QFile f(kThreeGroups);
    QVERIFY(f.open(QIODevice::ReadOnly));
    QByteArray bytes = f.readAll();
    bytes.replace("g2,4.17\n", "g2,\n");
    bytes.replace("g3,5.29\n", "g3,5.29 g\n");
    const Run r = runCli(threeGroupArgs(u"-"_s) + QStringList{u"--json"_s}, bytes);
    QVERIFY2(r.exitCode == 0, r.err.constData());
    const QJsonObject skipped = parse(r).value(u"skipped_rows"_s).toObject();
    QCOMPARE(skipped.value(u"count"_s).toInt(), 2);
    const QJsonArray first = skipped.value(u"first"_s).toArray();
    QCOMPARE(first[0].toObject().value(u"line"_s).toInt(), 13);
    QCOMPARE(first[0].toObject().value(u"reason"_s).toString(), u"response (column 'y') is missing"_s);
    QCOMPARE(first[1].toObject().value(u"line"_s).toInt(), 27);
    QCOMPARE(first[1].toObject().value(u"reason"_s).toString(), u"response (column 'y') '5.29 g' is not a number"_s);
    QCOMPARE(parse(r).value(u"levels"_s).toArray()[1].toObject().value(u"n"_s).toInt(), 9);
}

void TestFitCommand::fitsSummaryTable()
{
    QTemporaryDir dir;
    const QString path = dir.filePath(u"summary.csv"_s);
    QFile f(path);
    QVERIFY(f.open(QIODevice::WriteOnly));
    f.write("level,n,mean,sd\ng1,10,5.032,0.5831\ng2,10,4.661,0.7937\ng3,10,5.526,0.4426\n");
    f.close();
    const Run r = runCli({u"--data"_s, path, u"--summary"_s, u"--levels"_s, u"g1,g2,g3"_s, u"--scheme"_s,
                          u"treatment"_s, u"--json"_s});
    QVERIFY2(r.exitCode == 0, r.err.constData());
    QCOMPARE(qRound(parse(r).value(u"sigma"_s).toDouble() * 10000), 6234);
    QVERIFY(parse(r).value(u"data"_s).toObject().value(u"summary_table"_s).toBool());
}

void TestFitCommand::printsReport()
{
    const Run r = runCli(threeGroupArgs() + QStringList{u"--adjust"_s, u"holm"_s});
    QVERIFY2(r.exitCode == 0, r.err.constData());
    const QString text = QString::fromUtf8(r.out);
    // The question first (Dobson: F(2, 27) = 4.846, p = 0.0159), then the spread within the
    // levels (residual SD 0.6234, 27 df) and the share of variance they explain (R squared 0.2641).
    const QStringList lines = text.split(u'\n');
    const qsizetype first = lines.indexOf(u"Do the level means differ? F(2, 27) = 4.846, p = 0.0159; tests that all level means are equal"_s);
    QVERIFY2(first > 0, qPrintable(text));
    QCOMPARE(lines.value(first + 1), u"Spread within levels: SD 0.6234 (27 df)"_s);
    QCOMPARE(lines.value(first + 2), u"The levels explain 26.4% of the variance (30 observations in 3 levels)"_s);
    QVERIFY(text.contains(u"adjusted p (holm)"_s));
    // The coefficients as the window labels them, the intercept's p under the smallest shown.
    QVERIFY2(text.contains(u"\nb0 intercept "_s), qPrintable(text));
    QVERIFY(text.contains(u"\nb1 g2 vs g1 "_s));
    QVERIFY(text.contains(u"< 0.0001"_s));
    QVERIFY(!text.contains(u"Intercept"_s));
    QVERIFY(r.err.isEmpty());
}

// The hedgerow demo design (3 margins x 2 mowing dates, treatment coding with the interaction)
// fitted to rows with one column per factor. Reference: tests/python/fit_lstsq.py, which reads
// the file with pandas, joins the factor values itself and solves the explicit N-row design with
// NumPy's lstsq; its design rows are written out here by the definition of treatment coding
// (intercept, grass, wildflower, late, grass x late, wildflower x late), not taken from the
// tool. One row has a quoted value, one has spaces around it, one has no mowing date.
void TestFitCommand::fitsDesignCells()
{
    QByteArray csv = "plot,margin,mowing,visits\n";
    const char *margins[] = {"bare", "grass", "wildflower"};
    const char *dates[] = {"early", "late"};
    const int cellN[] = {6, 6, 6, 5, 6, 4};
    int plot = 0;
    for (int c = 0; c < 6; ++c)
        for (int i = 0; i < cellN[c]; ++i) {
            ++plot;
            // Deterministic, uneven values: a cell effect plus a spread that differs by cell.
            const double visits = 20.0 + 3.5 * c - 1.25 * (c % 2) + std::fmod(plot * 7.31, 5.0) * (1 + c % 3);
            QByteArray margin = margins[c / 2], date = dates[c % 2];
            if (plot == 3)
                margin = "\"" + margin + "\"";
            if (plot == 8)
                date = "  " + date + " ";
            csv += QByteArray::number(plot) + ',' + margin + ',' + date + ',' + QByteArray::number(visits, 'g', 17) + '\n';
        }
    csv += "99,grass,,31.5\n";
    QTemporaryDir dir;
    const QString path = dir.filePath(u"plots.csv"_s);
    QVERIFY(cb::test::writeFile(path, csv));
    const QString design = QStringLiteral(CB_SOURCE_DIR "/resources/demos/hedgerow.json");

    const Run r = runCli({u"--file"_s, design, u"--data"_s, path, u"--response"_s, u"visits"_s, u"--json"_s});
    QVERIFY2(r.exitCode == 0, r.err.constData());
    const QJsonObject o = parse(r);
    const QJsonObject skipped = o.value(u"skipped_rows"_s).toObject();
    QCOMPARE(skipped.value(u"count"_s).toInt(), 1);
    QVERIFY(skipped.value(u"first"_s).toArray()[0].toObject().value(u"reason"_s).toString().contains(u"column 'mowing'"_s));

    const QStringList cells = {u"bare\u00b7early"_s, u"bare\u00b7late"_s, u"grass\u00b7early"_s, u"grass\u00b7late"_s, u"wildflower\u00b7early"_s, u"wildflower\u00b7late"_s};
    const QJsonArray X = {QJsonArray{1, 0, 0, 0, 0, 0}, QJsonArray{1, 0, 0, 1, 0, 0}, QJsonArray{1, 1, 0, 0, 0, 0},
                          QJsonArray{1, 1, 0, 1, 1, 0}, QJsonArray{1, 0, 1, 0, 0, 0}, QJsonArray{1, 0, 1, 1, 0, 1}};
    const QJsonObject spec{{u"csv"_s, path},
                           {u"factors"_s, QJsonArray{u"margin"_s, u"mowing"_s}},
                           {u"response"_s, u"visits"_s},
                           {u"weight"_s, QJsonValue()},
                           {u"levels"_s, QJsonArray::fromStringList(cells)},
                           {u"X"_s, X},
                           {u"alpha"_s, 0.05}};
    const QJsonObject ref = cb::test::runPython(u"fit_lstsq.py"_s, {}, QJsonDocument(spec).toJson());
    QVERIFY2(!ref.contains(u"error"_s), qPrintable(ref.value(u"error"_s).toString()));

    const auto near = [](double got, double want) { return std::fabs(got - want) <= 1e-9 * std::max(1.0, std::fabs(want)); };
    const QJsonArray levels = o.value(u"levels"_s).toArray();
    QCOMPARE(levels.size(), 6);
    for (qsizetype j = 0; j < 6; ++j) {
        QCOMPARE(levels[j].toObject().value(u"name"_s).toString(), cells[j]);
        QCOMPARE(levels[j].toObject().value(u"n"_s).toInt(), cellN[j]);
        QVERIFY(near(levels[j].toObject().value(u"mean"_s).toDouble(), ref.value(u"means"_s).toArray()[j].toDouble()));
    }
    const QJsonArray c = o.value(u"coefficients"_s).toArray();
    QCOMPARE(c.size(), 6);
    for (qsizetype i = 0; i < 6; ++i)
        for (const char *key : {"estimate", "se", "t", "p", "ci_low", "ci_high"}) {
            const char *refKey = std::strcmp(key, "estimate") == 0 ? "coefficients" : key;
            const double got = c[i].toObject().value(QLatin1StringView(key)).toDouble();
            const double want = ref.value(QLatin1StringView(refKey)).toArray()[i].toDouble();
            QVERIFY2(near(got, want), qPrintable(u"coefficient %1 %2: %3, NumPy %4"_s.arg(i).arg(QLatin1StringView(key)).arg(got, 0, 'g', 17).arg(want, 0, 'g', 17)));
        }
    QVERIFY(near(o.value(u"sigma"_s).toDouble(), ref.value(u"sigma"_s).toDouble()));
    QCOMPARE(o.value(u"df"_s).toDouble(), ref.value(u"df"_s).toDouble());
    QCOMPARE(o.value(u"df"_s).toInt(), 33 - 6);
    QVERIFY(near(o.value(u"f"_s).toDouble(), ref.value(u"f"_s).toDouble()));
    QVERIFY(near(o.value(u"f_p"_s).toDouble(), ref.value(u"f_p"_s).toDouble()));

    // The same cells as a summary table (n, mean, SD per cell) give the same estimates and SEs.
    QByteArray table = "cell,n,mean,sd\n";
    for (qsizetype j = 0; j < 6; ++j) {
        const QJsonObject l = levels[j].toObject();
        table += cells[j].toUtf8() + ',' + QByteArray::number(l.value(u"n"_s).toInt()) + ','
            + QByteArray::number(l.value(u"mean"_s).toDouble(), 'g', 17) + ',' + QByteArray::number(l.value(u"sd"_s).toDouble(), 'g', 17) + '\n';
    }
    const QString tablePath = dir.filePath(u"cells.csv"_s);
    QVERIFY(cb::test::writeFile(tablePath, table));
    const Run summary = runCli({u"--file"_s, design, u"--data"_s, tablePath, u"--summary"_s, u"--json"_s});
    QVERIFY2(summary.exitCode == 0, summary.err.constData());
    const QJsonArray fromTable = parse(summary).value(u"coefficients"_s).toArray();
    for (qsizetype i = 0; i < 6; ++i)
        for (const char *key : {"estimate", "se"})
            QVERIFY(near(fromTable[i].toObject().value(QLatin1StringView(key)).toDouble(), c[i].toObject().value(QLatin1StringView(key)).toDouble()));

    const Run report = runCli({u"--file"_s, design, u"--data"_s, path, u"--response"_s, u"visits"_s});
    QVERIFY2(report.exitCode == 0, report.err.constData());
    QVERIFY2(QString::fromUtf8(report.out).contains(u"cells from columns 'margin', 'mowing'"_s), report.out.constData());
}

void TestFitCommand::refusesDesignColumns()
{
    QTemporaryDir dir;
    const QString path = dir.filePath(u"plots.csv"_s);
    QVERIFY(cb::test::writeFile(path, "margin,mowing,visits\nbare,early,1\n"));
    const QString design = QStringLiteral(CB_SOURCE_DIR "/resources/demos/hedgerow.json");
    const QStringList base = {u"--file"_s, design, u"--data"_s, path, u"--response"_s, u"visits"_s};
    struct Case
    {
        QStringList extra;
        QString message;
    };
    const Case cases[] = {
        {{u"--factor"_s, u"margin"_s}, u"--factor: given 1 times for a design of 2 factors (margin, mowing)"_s},
        {{u"--factor"_s, u"margin"_s, u"--factor"_s, u"margin"_s}, u"column 'margin' is named for two factors"_s},
        {{u"--factor"_s, u"margin"_s, u"--factor"_s, u"date"_s}, u"no column 'date' for the factor; the columns are: margin, mowing, visits"_s},
        {{u"--factor"_s, u"margin"_s, u"--factor"_s, u"visits"_s}, u"the factor and the response are the same column ('visits')"_s},
    };
    for (const Case &k : cases) {
        const Run r = runCli(base + k.extra);
        QCOMPARE(r.exitCode, 2);
        QVERIFY2(r.errText().contains(k.message), r.err.constData());
    }
    // A one-factor scheme reads one column.
    const Run one = runCli(threeGroupArgs() + QStringList{u"--factor"_s, u"y"_s});
    QCOMPARE(one.exitCode, 2);
    QVERIFY2(one.errText().contains(u"--factor: given 2 times; a one-factor scheme reads one column"_s), one.err.constData());
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
                                      << u"standard input: the levels do not match; in the data but not in the scheme: 'd'; in the scheme but not in the data: 'c'"_s;
    // No response value is a number: the column and the first line, not "the levels do not match".
    QTest::newRow("no numeric response") << (QStringList{u"--data"_s, u"-"_s} + cols + scheme) << QByteArray("g,y\na,x\nb,y\nc,z\n")
                                         << u"standard input: no row could be used; the first left out is line 2: response (column 'y') 'x' is not a number"_s;
    // A million-character field is cut to a readable length with an ellipsis.
    QTest::newRow("huge level") << (QStringList{u"--data"_s, u"-"_s} + cols + scheme)
                                << QByteArray("g,y\na,1\nb,3\nc,4\n") + QByteArray(1000000, 'q') + ",5\n"
                                << u"standard input: the levels do not match; in the data but not in the scheme: '"_s + QString(59, u'q') + u"\u2026'"_s;
    // Responses whose squares overflow are refused instead of giving inf estimates.
    QTest::newRow("huge responses") << (QStringList{u"--data"_s, u"-"_s} + cols + scheme) << QByteArray("g,y\na,1e308\nb,-1e308\nc,1\na,1e308\n")
                                    << u"standard input: the levels do not match; in the scheme but not in the data: 'a', 'b'. Rename them, or map data names to scheme levels, before fitting. 3 rows left out: line 2: response (column 'y') '1e308' is too large; expected a number between -1e100 and 1e100 (rescale the response); line 3"_s;
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
