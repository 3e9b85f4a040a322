// The by-participant data check of a factor measured within participants (core/data:
// readLevelData with a participant column, fitParticipants), against pandas/SciPy
// (tests/python/participant_fit_check.py): one-sample t on the participants' contrast scores,
// Hotelling's T^2 through its F; missing cells; the errors.
#include "core/analysis/Analysis.h"
#include "core/data/DataFit.h"
#include "core/data/DataReader.h"
#include "core/model/Scheme.h"
#include "core/model/SchemeEdits.h"
#include "core/report/FitReport.h"

#include "tests/support/FitTestSupport.h"
#include "tests/support/ProcessRunner.h"
#include "tests/support/WithinFitSupport.h"

#include <QJsonArray>
#include <QJsonDocument>
#include <QTemporaryDir>
#include <QTest>

#include <cmath>
#include <random>

using namespace Qt::StringLiterals;
using namespace cb;
using test::nearRelative;

namespace {

// Generated reaction times: each participant has a speed of their own (so their values go
// together), three cue levels with replicate trials; some participants miss a level.
QByteArray generatedData(int participants, unsigned seed)
{
    std::mt19937 rng(seed);
    std::normal_distribution<double> person(500.0, 60.0), noise(0.0, 25.0);
    const char *levels[] = {"none", "valid", "invalid"};
    const double effect[] = {0.0, -18.0, 12.0};
    QByteArray out = "participant,level,y\n";
    for (int p = 0; p < participants; ++p) {
        const double base = person(rng);
        for (int j = 0; j < 3; ++j) {
            if ((p == 4 && j == 2) || (p == 9 && j == 1))
                continue; // missing cells
            const int trials = 1 + (p + j) % 3;
            for (int t = 0; t < trials; ++t)
                out += "p" + QByteArray::number(p) + ',' + levels[j] + ',' + QByteArray::number(base + effect[j] + noise(rng), 'g', 17) + '\n';
        }
    }
    return out;
}

Result<DataSummary> read(const QByteArray &bytes)
{
    DataReadOptions o;
    o.factorColumn = u"level"_s;
    o.responseColumn = u"y"_s;
    o.participantColumn = u"participant"_s;
    o.blockBytes = 4096; // several blocks
    return readLevelDataFromBytes(bytes, u"rt.csv"_s, o);
}

} // namespace

class TestParticipantFit : public QObject
{
    Q_OBJECT
private slots:
    void agreesWithScipy_data();
    void agreesWithScipy();
    void readerKeepsEachParticipantsCells();
    void errorsNameTheParticipantOrLine_data();
    void errorsNameTheParticipantOrLine();
    void commandLine();
    void studentsSleepData();
    void tooFewParticipantsForHotellingIsSaid();
    void withinFactorWithoutParticipantsIsCautioned();
};

void TestParticipantFit::agreesWithScipy_data()
{
    QTest::addColumn<int>("kind");
    QTest::addColumn<int>("participants");
    QTest::newRow("treatment, 24 participants") << int(SchemeKind::Treatment) << 24;
    QTest::newRow("helmert, 40 participants") << int(SchemeKind::Helmert) << 40;
    QTest::newRow("polynomial, 12 participants") << int(SchemeKind::Polynomial) << 12;
}

void TestParticipantFit::agreesWithScipy()
{
    QFETCH(int, kind);
    QFETCH(int, participants);
    const QByteArray bytes = generatedData(participants, 7u + unsigned(participants));
    QTemporaryDir dir;
    const QString path = dir.filePath(u"rt.csv"_s);
    QVERIFY(test::writeFile(path, bytes));
    const Scheme scheme = test::withinCueScheme(SchemeKind(kind));
    auto data = read(bytes);
    QVERIFY2(data.ok(), qPrintable(data.error()));
    FitOptions options;
    options.adjust = Adjustment::Holm;
    auto fit = fitParticipants(scheme, *data, options);
    QVERIFY2(fit.ok(), qPrintable(fit.error()));
    QCOMPARE(fit->participants, participants);
    QCOMPARE(fit->completeParticipants, participants - 2);
    QCOMPARE(fit->incompleteParticipants, (QStringList{u"p4 (no 'invalid')"_s, u"p9 (no 'valid')"_s}));

    const QJsonObject request{{u"data"_s, path},
                              {u"levels"_s, QJsonArray{u"none"_s, u"valid"_s, u"invalid"_s}},
                              {u"rows"_s, test::hypothesisRowsJson(scheme)},
                              {u"alpha"_s, 0.05}};
    const QJsonObject py = test::runPython(u"participant_fit_check.py"_s, {}, QJsonDocument(request).toJson());
    QVERIFY2(!py.contains(u"error"_s), qPrintable(py[u"error"_s].toString()));
    const QJsonArray coefficients = py[u"coefficients"_s].toArray();
    QCOMPARE(coefficients.size(), qsizetype(fit->coefficients.size()));
    std::vector<double> family;
    for (size_t c = 0; c < fit->coefficients.size(); ++c) {
        const FitCoefficient &mine = fit->coefficients[c];
        const QString differs = test::contrastTestDiffers(mine, coefficients[qsizetype(c)].toObject(), u"participants"_s);
        QVERIFY2(differs.isEmpty(), qPrintable(differs));
        family.push_back(mine.inFamily ? mine.p : std::nan(""));
    }
    // The adjustment is the fit's own, over the contrasts (the intercept is not in the family).
    const std::vector<double> adjusted = adjustPValues(family, Adjustment::Holm);
    for (size_t c = 1; c < fit->coefficients.size(); ++c)
        QCOMPARE(fit->coefficients[c].pAdjusted, adjusted[c]);
    const QJsonObject h = py[u"hotelling"_s].toObject();
    QVERIFY(nearRelative(fit->f, h[u"f"_s].toDouble(), 1e-9));
    QCOMPARE(fit->fDf1, h[u"df1"_s].toDouble());
    QCOMPARE(fit->fDf2, h[u"df2"_s].toDouble());
    QVERIFY(nearRelative(fit->fP, h[u"p"_s].toDouble(), 1e-9));

    // JSON: today's keys, and df, participants and Hotelling's test.
    const QJsonObject json = fitResultToJson(*fit, *data);
    const QJsonObject first = json[u"coefficients"_s].toArray()[1].toObject();
    QCOMPARE(first[u"participants"_s].toInt(), fit->coefficients[1].participants);
    QCOMPARE(first[u"df"_s].toDouble(), fit->coefficients[1].df);
    const QJsonObject omnibus = json[u"omnibus"_s].toObject();
    QCOMPARE(omnibus[u"test"_s].toString(), u"hotelling"_s);
    QCOMPARE(omnibus[u"df1"_s].toDouble(), 2.0);
    QCOMPARE(omnibus[u"df2"_s].toDouble(), double((participants - 2) - 3 + 1)); // complete participants - k + 1
    QVERIFY(nearRelative(omnibus[u"p"_s].toDouble(), h[u"p"_s].toDouble(), 1e-9));
    QCOMPARE(json[u"participants"_s].toObject()[u"incomplete"_s].toArray().size(), 2);
    for (const char16_t *key : {u"levels", u"coefficients", u"sigma", u"df", u"f", u"f_df1", u"f_df2", u"f_p", u"notes"})
        QVERIFY(json.contains(QString::fromUtf16(key)));
}

void TestParticipantFit::readerKeepsEachParticipantsCells()
{
    auto data = read("participant,level,y\na,x,1\na,x,3\nb,x,5\na,z,10\nb,z,20\n");
    QVERIFY2(data.ok(), qPrintable(data.error()));
    QCOMPARE(data->participants, (QStringList{u"a"_s, u"b"_s}));
    QCOMPARE(data->participantCells[0][0].mean, 2.0); // replicates averaged
    QCOMPARE(data->participantCells[0][0].n, 2.0);
    QCOMPARE(data->participantCells[1][1].mean, 20.0);
}

void TestParticipantFit::errorsNameTheParticipantOrLine_data()
{
    QTest::addColumn<QByteArray>("bytes");
    QTest::addColumn<QString>("message");
    QTest::newRow("one level only") << QByteArray("participant,level,y\na,none,1\na,valid,2\na,invalid,3\nb,none,4\nb,none,5\n")
                                    << u"participant 'b' has values at one level only"_s;
    QTest::newRow("missing participant") << QByteArray("participant,level,y\na,none,1\n,valid,2\n")
                                         << u"rt.csv line 3: the participant (column 'participant') is empty"_s;
}

void TestParticipantFit::errorsNameTheParticipantOrLine()
{
    QFETCH(QByteArray, bytes);
    QFETCH(QString, message);
    auto data = read(bytes);
    QString error = data ? QString() : data.error();
    if (data) {
        auto fit = fitParticipants(test::withinCueScheme(SchemeKind::Treatment), *data);
        QVERIFY(!fit.ok());
        error = fit.error();
    }
    QVERIFY2(error.startsWith(message), qPrintable(error));
}

// fit --participant: today's keys, df and participants per coefficient, Hotelling's omnibus.
void TestParticipantFit::commandLine()
{
    QTemporaryDir dir;
    const QString path = dir.filePath(u"rt.csv"_s);
    QVERIFY(test::writeFile(path, generatedData(24, 31u)));
    const QStringList base{u"fit"_s, u"--data"_s, path, u"--factor"_s, u"level"_s, u"--response"_s, u"y"_s,
                           u"--levels"_s, u"none,valid,invalid"_s, u"--scheme"_s, u"treatment"_s, u"--within"_s};
    const test::ProcessRun run = test::runCli(base + QStringList{u"--participant"_s, u"participant"_s, u"--json"_s});
    QVERIFY2(run.exitCode == 0, run.err.constData());
    const QJsonObject o = QJsonDocument::fromJson(run.out).object();
    const QJsonObject valid = o[u"coefficients"_s].toArray()[1].toObject();
    QCOMPARE(valid[u"participants"_s].toInt(), 23); // p9 has no 'valid'
    QCOMPARE(valid[u"df"_s].toDouble(), 22.0);
    QCOMPARE(o[u"omnibus"_s].toObject()[u"test"_s].toString(), u"hotelling"_s);
    QCOMPARE(o[u"omnibus"_s].toObject()[u"participants"_s].toInt(), 22);
    const test::ProcessRun text = test::runCli(base + QStringList{u"--participant"_s, u"participant"_s});
    QVERIFY(text.outText().contains(u"By participant (column 'participant')"_s));
    QVERIFY(text.outText().contains(u"p4 (no 'invalid')"_s));
    // Without --participant the rows are fitted as independent, under a caution, in the text
    // before the figures and in the JSON.
    // (the factor is named after its column, --factor level)
    const QString caution = u"'level' is measured within participants, but the data were read without a participant column"_s;
    QCOMPARE(text.outText().count(caution), 0);
    QCOMPARE(o[u"cautions"_s].toArray().size(), 0);
    const test::ProcessRun rows = test::runCli(base);
    QVERIFY2(rows.exitCode == 0, rows.err.constData());
    const QString rowsText = rows.outText();
    QVERIFY2(rowsText.contains(u"Caution: "_s + caution), qPrintable(rowsText));
    QVERIFY(rowsText.indexOf(caution) < rowsText.indexOf(u"coefficient"_s));
    const QJsonArray cautions = QJsonDocument::fromJson(test::runCli(base + QStringList{u"--json"_s}).out).object()[u"cautions"_s].toArray();
    QCOMPARE(cautions.size(), 1);
    QVERIFY(cautions[0].toString().startsWith(caution));
    const test::ProcessRun wrong = test::runCli(base + QStringList{u"--participant"_s, u"level"_s});
    QCOMPARE(wrong.exitCode, 2);
    QVERIFY2(wrong.errText().contains(u"the participant column ('level') is also the factor"_s), wrong.err.constData());
}


// A published worked example of a within-participant contrast: the paired comparison in Student
// (1908), "The probable error of a mean", Biometrika 6(1), 1-25, of the extra hours of sleep that
// ten patients of Cushny & Peebles (1905) gained under two hypnotics, each patient under both.
// The ten pairs below and Student's printed figures for the differences (mean +1.58 hours, SD 1.17
// with divisor n) are written from memory of that table and its many reprints; the figures that
// follow from them, t = 4.0621 with 9 df, p = 0.002833 and the 95% interval half-width 0.8799, are
// SciPy's (scipy.stats.ttest_rel and t.isf on these pairs, /usr/bin/python3). Here the two drugs
// are a factor measured within patients, coded by treatment coding with the first drug as the
// reference, and the data check by participant tests the column on the patients' differences.
void TestParticipantFit::studentsSleepData()
{
    const double first[] = {0.7, -1.6, -0.2, -1.2, -0.1, 3.4, 3.7, 0.8, 0.0, 2.0};
    const double second[] = {1.9, 0.8, 1.1, 0.1, -0.1, 4.4, 5.5, 1.6, 4.6, 3.4};
    QByteArray csv = "patient,drug,extra\n";
    for (int i = 0; i < 10; ++i) {
        csv += "patient" + QByteArray::number(i + 1) + ",dextro," + QByteArray::number(first[i]) + '\n';
        csv += "patient" + QByteArray::number(i + 1) + ",laevo," + QByteArray::number(second[i]) + '\n';
    }
    DataReadOptions o;
    o.factorColumn = u"drug"_s;
    o.responseColumn = u"extra"_s;
    o.participantColumn = u"patient"_s;
    auto data = readLevelDataFromBytes(csv, u"sleep.csv"_s, o);
    QVERIFY2(data.ok(), qPrintable(data.error()));
    Factor f;
    f.name = u"drug"_s;
    f.levels = {u"dextro"_s, u"laevo"_s};
    f.measure = Measure::Within;
    const Scheme scheme = makeScheme(f, SchemeKind::Treatment).take();
    auto fit = fitParticipants(scheme, *data);
    QVERIFY2(fit.ok(), qPrintable(fit.error()));
    QCOMPARE(fit->participants, 10);
    QCOMPARE(fit->coefficients.size(), size_t(2));
    const FitCoefficient &c = fit->coefficients[1];
    QCOMPARE(c.participants, 10);
    QCOMPARE(c.df, 9.0);
    QVERIFY(nearRelative(c.estimate, 1.58, 1e-12));                              // Student: mean +1.58
    QVERIFY(nearRelative(c.se * std::sqrt(10.0) * std::sqrt(9.0 / 10.0), 1.1668761716651856, 1e-12)); // Student: SD 1.17
    QVERIFY(nearRelative(c.t, 4.062127683382037, 1e-10));
    QVERIFY(nearRelative(c.p, 0.00283289019738427, 1e-8));
    QVERIFY(nearRelative(c.ciHigh - c.estimate, 0.879885763254729, 1e-9));
    // With two levels Hotelling's T^2 is the square of that t.
    QVERIFY(nearRelative(fit->f, 4.062127683382037 * 4.062127683382037, 1e-10));
    QCOMPARE(fit->fDf1, 1.0);
    QCOMPARE(fit->fDf2, 9.0);
}

// A factor measured within participants fitted from rows without a participant column: the fit
// is the independent-groups fit, and says plainly that its SEs ignore the repeated measures. A
// factor between participants, or a fit by participant, has no such caution.
void TestParticipantFit::withinFactorWithoutParticipantsIsCautioned()
{
    DataReadOptions o;
    o.factorColumn = u"level"_s;
    o.responseColumn = u"y"_s;
    auto rows = readLevelDataFromBytes(generatedData(12, 5u), u"rt.csv"_s, o);
    QVERIFY2(rows.ok(), qPrintable(rows.error()));
    const Scheme within = test::withinCueScheme(SchemeKind::Treatment);
    auto fit = fitScheme(within, *rows);
    QVERIFY2(fit.ok(), qPrintable(fit.error()));
    QCOMPARE(fit->cautions.size(), 1);
    QCOMPARE(fit->cautions[0], independentRowsCaution({u"cue"_s}));
    QVERIFY(fit->cautions[0].contains(u"can be wrong in either direction"_s));
    QCOMPARE(independentRowsCaution({u"cue"_s, u"vowel"_s}).left(40), u"'cue' and 'vowel' are measured within pa"_s);
    Scheme between = within;
    between.factor.measure = Measure::Between;
    QVERIFY(fitScheme(between, *rows)->cautions.isEmpty());
    auto byParticipant = read(generatedData(12, 5u));
    QVERIFY(byParticipant.ok());
    QVERIFY(fitParticipants(within, *byParticipant)->cautions.isEmpty());
}

// Two participants for three levels: each contrast is tested, Hotelling's test cannot be (it needs
// as many participants with every level as levels), and the summary says so instead of F(2, 0).
void TestParticipantFit::tooFewParticipantsForHotellingIsSaid()
{
    auto data = read("participant,level,y\np1,none,500\np1,valid,480\np1,invalid,530\np2,none,610\np2,valid,600\np2,invalid,650\n");
    QVERIFY2(data.ok(), qPrintable(data.error()));
    auto fit = fitParticipants(test::withinCueScheme(SchemeKind::Treatment), *data);
    QVERIFY2(fit.ok(), qPrintable(fit.error()));
    QVERIFY(std::isnan(fit->f));
    QCOMPARE(fit->coefficients[1].df, 1.0);
    const QStringList lines = fitSummaryLines(*fit, false);
    QCOMPARE(lines.value(0), u"Hotelling's test of all levels cannot be computed (see the notes); each coefficient is tested on its own"_s);
    QCOMPARE(lines.value(1), u"2 participants, 2 with every level"_s);
    QVERIFY(fit->notes.join(u' ').contains(u"Hotelling's test needs at least as many participants with every level as levels (3)"_s));
}

QTEST_GUILESS_MAIN(TestParticipantFit)
#include "TestParticipantFit.moc"
