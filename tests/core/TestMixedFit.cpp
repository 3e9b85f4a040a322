// The by-participant check of mixed designs (core/data/MixedFit.h): for each within row the
// between coding fitted on the participants' scores, against pandas/NumPy/SciPy
// (tests/python/mixed_fit_check.py: participant-level least squares), the multivariate tests
// against statsmodels' MANOVA (tests/python/mixed_multivariate_check.py), the refusals (a participant
// in two groups, with its lines), and the command line (fit --participant on a design).
#include "core/data/DataReader.h"
#include "core/data/MixedFit.h"
#include "core/files/StudyFile.h"
#include "core/model/Design.h"
#include "core/power/MixedPower.h"

#include "tests/support/FitTestSupport.h"
#include "tests/support/ProcessRunner.h"

#include <QJsonArray>
#include <QJsonDocument>
#include <QJsonObject>
#include <QTemporaryDir>
#include <QTest>

#include <cmath>
#include <random>

using namespace Qt::StringLiterals;
using namespace cb;
using test::matrixJson;

namespace {

Scheme factorOf(const QString &name, int k, Measure measure, SchemeKind kind)
{
    Factor f;
    f.name = name;
    for (int i = 0; i < k; ++i)
        f.levels << u"%1%2"_s.arg(name.toLower()).arg(i + 1);
    f.measure = measure;
    return makeScheme(f, kind).take();
}

Result<DataSummary> read(const QByteArray &bytes, const Design &d)
{
    DataReadOptions o;
    o.factorColumn = d.factors.front().factor.name;
    for (size_t f = 1; f < d.factors.size(); ++f)
        o.moreFactorColumns << d.factors[f].factor.name;
    o.responseColumn = u"y"_s;
    o.participantColumn = u"participant"_s;
    o.blockBytes = 4096;
    return readLevelDataFromBytes(bytes, u"mixed.csv"_s, o);
}

bool near(double a, double b, double tolerance)
{
    return std::abs(a - b) <= tolerance * std::max(1.0, std::abs(b));
}

const QString kDemo = QStringLiteral(CB_SOURCE_DIR "/resources/demos/warmup.json");

} // namespace

class TestMixedFit : public QObject
{
    Q_OBJECT
private slots:
    void agreesWithParticipantLevelLeastSquares();
    void participantInTwoGroupsIsRefusedWithItsLines();
    void participantWithOneWithinCellIsRefused();
    void commandLineOnTheWarmupDemo();
};

void TestMixedFit::agreesWithParticipantLevelLeastSquares()
{
    std::mt19937 rng(1612);
    auto uniform = [&](double lo, double hi) { return std::uniform_real_distribution<double>(lo, hi)(rng); };
    auto normal = [&](double sd) { return std::normal_distribution<double>(0.0, sd)(rng); };
    auto integer = [&](int lo, int hi) { return std::uniform_int_distribution<int>(lo, hi)(rng); };
    const SchemeKind kinds[] = {SchemeKind::Treatment, SchemeKind::Sum, SchemeKind::Helmert, SchemeKind::Simple, SchemeKind::Polynomial};
    QTemporaryDir dir;
    int compared = 0;
    int comparedTests = 0;
    for (int c = 0; c < 12; ++c) {
        // 1 between x 1 within, 2 between x 1 within, 1 between x 2 within, 2 within (no between).
        const int shape = c % 4;
        std::vector<Measure> measures = shape == 0   ? std::vector{Measure::Between, Measure::Within}
                                        : shape == 1 ? std::vector{Measure::Between, Measure::Between, Measure::Within}
                                        : shape == 2 ? std::vector{Measure::Between, Measure::Within, Measure::Within}
                                                     : std::vector{Measure::Within, Measure::Within};
        if (c % 3 == 0)
            std::reverse(measures.begin(), measures.end());
        Design d;
        for (size_t f = 0; f < measures.size(); ++f)
            d.factors.push_back(factorOf(QString(QChar(u'A' + int(f))), measures.size() == 3 ? 2 : integer(2, 3), measures[f],
                                         kinds[integer(0, 4)]));
        d.terms = Design::fullFactorial(int(measures.size()));
        const MixedLayout layout = mixedLayout(d);
        const QStringList cellNames = d.cellNames();

        // Participants in groups, each with a random level, cell effects, replicates, a few missing cells.
        QByteArray csv = "participant";
        for (const Scheme &f : d.factors)
            csv += ',' + f.factor.name.toUtf8();
        csv += ",group,within,y\n";
        std::vector<double> cellEffect;
        for (int cell = 0; cell < d.cellCount(); ++cell)
            cellEffect.push_back(uniform(-2.0, 2.0));
        int id = 0;
        for (int g = 0; g < layout.groups(); ++g) {
            const int n = integer(5, 11);
            for (int i = 0; i < n; ++i, ++id) {
                const double level = normal(3.0);
                for (int cell = 0; cell < d.cellCount(); ++cell) {
                    if (layout.groupOf[size_t(cell)] != g || (i == 0 && layout.withinOf[size_t(cell)] == 1 && layout.withinCells() >= 3 && c % 2 == 0))
                        continue; // the group's first participant lacks the second within cell in every other case
                    const std::vector<int> lv = cellLevels(d, cell);
                    for (int rep = integer(1, 3); rep > 0; --rep) {
                        csv += u"p%1"_s.arg(id).toUtf8();
                        for (size_t f = 0; f < d.factors.size(); ++f)
                            csv += ',' + d.factors[f].factor.levels[lv[f]].toUtf8();
                        csv += ',' + layout.groupNames[layout.groupOf[size_t(cell)]].toUtf8() + ','
                               + layout.withinNames[layout.withinOf[size_t(cell)]].toUtf8() + ','
                               + QByteArray::number(10.0 + cellEffect[size_t(cell)] + level + normal(1.5), 'g', 17) + '\n';
                    }
                }
            }
        }
        auto data = read(csv, d);
        QVERIFY2(bool(data), qPrintable(data.error()));
        auto fit = fitMixedParticipants(d, *data);
        QVERIFY2(bool(fit), qPrintable(fit.error()));
        const QString path = dir.filePath(u"case%1.csv"_s.arg(c));
        QVERIFY(test::writeFile(path, csv));
        QJsonArray rows;
        for (const MixedFitRow &r : fit->rows)
            rows.append(test::numbersJson(r.weights));
        const QJsonObject request{{u"data"_s, path},
                                  {u"groups"_s, QJsonArray::fromStringList(layout.groupNames)},
                                  {u"within_cells"_s, QJsonArray::fromStringList(layout.withinNames)},
                                  {u"x"_s, matrixJson(fit->betweenDesign)},
                                  {u"rows"_s, rows},
                                  {u"alpha"_s, 0.05}};
        const QJsonObject answer = test::runPython(u"mixed_fit_check.py"_s, {}, QJsonDocument(request).toJson());
        QVERIFY2(!answer.contains(u"error"_s), qPrintable(answer[u"error"_s].toString()));
        const QJsonArray pyRows = answer[u"rows"_s].toArray();
        QCOMPARE(size_t(pyRows.size()), fit->rows.size());
        QCOMPARE(int(fit->rows.size()), layout.withinCells()); // the average and w - 1 within columns
        for (size_t r = 0; r < fit->rows.size(); ++r) {
            const MixedFitRow &row = fit->rows[r];
            const QJsonObject py = pyRows[qsizetype(r)].toObject();
            QCOMPARE(row.participants, py[u"participants"_s].toInt());
            const QJsonArray coefficients = py[u"coefficients"_s].toArray();
            QCOMPARE(size_t(coefficients.size()), row.fit.coefficients.size());
            for (size_t j = 0; j < row.fit.coefficients.size(); ++j) {
                const FitCoefficient &cf = row.fit.coefficients[j];
                const QJsonObject e = coefficients[qsizetype(j)].toObject();
                const QString where = u"case %1, row %2, coefficient %3"_s.arg(c).arg(r).arg(j);
                for (const auto &[mine, key] : {std::pair{cf.estimate, u"estimate"_s}, {cf.se, u"se"_s}, {cf.t, u"t"_s},
                                                {cf.ciLow, u"ci_low"_s}, {cf.ciHigh, u"ci_high"_s}})
                    QVERIFY2(near(mine, e[key].toDouble(), 1e-9), qPrintable(where + u" "_s + key));
                QVERIFY2(near(cf.p, e[u"p"_s].toDouble(), 1e-8), qPrintable(where + u" p"_s));
                QCOMPARE(cf.df, e[u"df"_s].toDouble());
                QCOMPARE(cf.participants, row.participants);
                ++compared;
            }
        }
        // The flattened list holds every row's coefficients, each with df and participants.
        size_t total = 0;
        for (const MixedFitRow &r : fit->rows)
            total += r.fit.coefficients.size();
        QCOMPARE(fit->overall.coefficients.size(), total);
        QVERIFY(fit->overall.byParticipant);

        // The multivariate tests against statsmodels' MANOVA on the same participants.
        QJsonArray tests;
        for (const MixedTest &t : fit->tests)
            tests.append(QJsonObject{{u"name"_s, t.name}, {u"l"_s, matrixJson(t.contrast)}, {u"m"_s, matrixJson(t.transform)}});
        const QJsonObject manovaRequest{{u"data"_s, path},
                                        {u"groups"_s, QJsonArray::fromStringList(layout.groupNames)},
                                        {u"within_cells"_s, QJsonArray::fromStringList(layout.withinNames)},
                                        {u"x"_s, matrixJson(fit->betweenDesign)},
                                        {u"tests"_s, tests}};
        const QJsonObject manova = test::runPython(u"mixed_multivariate_check.py"_s, {}, QJsonDocument(manovaRequest).toJson());
        QVERIFY2(!manova.contains(u"error"_s), qPrintable(manova[u"error"_s].toString()));
        const QJsonArray pyTests = manova[u"tests"_s].toArray();
        QCOMPARE(size_t(pyTests.size()), fit->tests.size());
        // All within cells; each within term when there are several; each between term, alone and with each within term.
        const int withinTerms = int(std::count(measures.begin(), measures.end(), Measure::Within));
        const int betweenFactors = int(measures.size()) - withinTerms;
        const int withinTermCount = withinTerms == 2 ? 3 : 1;
        const int betweenTermCount = betweenFactors == 2 ? 3 : betweenFactors;
        QCOMPARE(int(fit->tests.size()), 1 + (withinTermCount > 1 ? withinTermCount : 0) + betweenTermCount * (1 + withinTermCount));
        for (size_t i = 0; i < fit->tests.size(); ++i) {
            const MixedTest &t = fit->tests[i];
            const QJsonObject e = pyTests[qsizetype(i)].toObject();
            const QString where = u"case %1, test %2"_s.arg(c).arg(t.name);
            QVERIFY2(t.refusal.isEmpty(), qPrintable(where + u": "_s + t.refusal));
            QCOMPARE(t.participants, manova[u"participants"_s].toInt());
            for (const auto &[mine, key] : {std::pair{t.test.wilks, u"wilks"_s}, {t.test.f, u"f"_s}, {t.test.df1, u"df1"_s}, {t.test.df2, u"df2"_s}})
                QVERIFY2(near(mine, e[key].toDouble(), 1e-9), qPrintable(where + u" "_s + key + u": "_s + QString::number(mine, 'g', 17)
                                                                        + u" vs "_s + QString::number(e[key].toDouble(), 'g', 17)));
            QVERIFY2(near(t.test.p, e[u"p"_s].toDouble(), 1e-8), qPrintable(where + u" p"_s));
            ++comparedTests;
        }
        // The omnibus of the fit is the first test, Hotelling's T^2 (exact: one row of L).
        QCOMPARE(fit->overall.f, fit->tests.front().test.f);
        QCOMPARE(fit->overall.fDf1, double(layout.withinCells() - 1));
        QVERIFY(fit->tests.front().test.exact);
    }
    QVERIFY(compared > 60);
    QVERIFY(comparedTests > 40);
}

void TestMixedFit::participantInTwoGroupsIsRefusedWithItsLines()
{
    auto study = loadStudy(kDemo);
    QVERIFY(bool(study));
    const QByteArray csv = "participant,routine,vowel,y\n"
                           "s1,humming,ah,1\ns1,humming,ee,2\ns1,humming,oo,3\n"
                           "s2,lip trills,ah,1\ns2,lip trills,ee,2\ns2,lip trills,oo,3\n"
                           "s3,humming,ah,1\ns3,humming,ee,2\ns3,humming,oo,3\n"
                           "s1,lip trills,ah,4\n"
                           "s4,lip trills,ah,1\ns4,lip trills,ee,2\ns4,lip trills,oo,3\n";
    auto data = read(csv, study->design);
    QVERIFY2(bool(data), qPrintable(data.error()));
    auto fit = fitMixedParticipants(study->design, *data);
    QVERIFY(!fit);
    QVERIFY2(fit.error().contains(u"participant 's1' has rows in two between groups, 'humming' (line 2) and 'lip trills' (line 11)"_s),
             qPrintable(fit.error()));
}

void TestMixedFit::participantWithOneWithinCellIsRefused()
{
    auto study = loadStudy(kDemo);
    QVERIFY(bool(study));
    const QByteArray csv = "participant,routine,vowel,y\n"
                           "s1,humming,ah,1\ns1,humming,ee,2\ns1,humming,oo,3\n"
                           "s2,lip trills,ah,1\ns2,lip trills,ee,2\ns2,lip trills,oo,3\n"
                           "s3,humming,ah,1\n";
    auto data = read(csv, study->design);
    QVERIFY(bool(data));
    auto fit = fitMixedParticipants(study->design, *data);
    QVERIFY(!fit);
    QVERIFY2(fit.error().contains(u"participant 's3' has values in one within cell only"_s), qPrintable(fit.error()));
}

void TestMixedFit::commandLineOnTheWarmupDemo()
{
    QTemporaryDir dir;
    const QString path = dir.filePath(u"warmup.csv"_s);
    QByteArray csv = "singer,routine,vowel,cents\n";
    std::mt19937 rng(7);
    std::normal_distribution<double> noise(0.0, 3.0);
    for (int s = 0; s < 22; ++s)
        for (const char *vowel : {"ah", "ee", "oo"})
            csv += "s" + QByteArray::number(s) + (s < 12 ? ",humming," : ",lip trills,") + vowel + ','
                   + QByteArray::number(10.0 + noise(rng), 'g', 12) + '\n';
    QVERIFY(test::writeFile(path, csv));
    const QStringList args{u"fit"_s, u"--file"_s, kDemo, u"--data"_s, path, u"--response"_s, u"cents"_s, u"--participant"_s, u"singer"_s};
    const test::ProcessRun run = test::runCli(args + QStringList{u"--json"_s});
    QVERIFY2(run.exitCode == 0, run.err.constData());
    const QJsonObject o = QJsonDocument::fromJson(run.out).object();
    const QJsonObject omnibus = o[u"omnibus"_s].toObject();
    QCOMPARE(omnibus[u"test"_s].toString(), u"hotelling"_s);
    QCOMPARE(omnibus[u"df1"_s].toDouble(), 2.0); // three vowels
    QCOMPARE(omnibus[u"df2"_s].toDouble(), 19.0); // 22 participants in 2 groups: 20 - 2 + 1
    const QJsonArray tests = omnibus[u"tests"_s].toArray();
    QCOMPARE(tests.size(), 3); // vowels, routine, routine x vowels
    QCOMPARE(tests[2].toObject()[u"name"_s].toString(), u"routine \u00d7 vowel"_s);
    QCOMPARE(o[u"participants"_s].toObject()[u"count"_s].toInt(), 22);
    QCOMPARE(o[u"within_rows"_s].toArray().size(), 3);
    QCOMPARE(o[u"within_rows"_s].toArray()[1].toObject()[u"name"_s].toString(), u"ee vs ah"_s);
    const QJsonArray coefficients = o[u"coefficients"_s].toArray();
    QCOMPARE(coefficients.size(), 6);
    QCOMPARE(coefficients[3].toObject()[u"name"_s].toString(), u"lip trills vs humming \u00d7 ee vs ah"_s);
    QCOMPARE(coefficients[3].toObject()[u"df"_s].toDouble(), 20.0);
    QCOMPARE(coefficients[3].toObject()[u"participants"_s].toInt(), 22);

    const test::ProcessRun text = test::runCli(args);
    QVERIFY2(text.exitCode == 0, text.err.constData());
    QVERIFY(text.outText().contains(u"22 participants in 2 groups (humming, lip trills)"_s));

    QVERIFY(test::writeFile(path, csv + "s0,lip trills,ah,3\n"));
    const test::ProcessRun twice = test::runCli(args);
    QCOMPARE(twice.exitCode, 2);
    QVERIFY2(twice.errText().contains(u"participant 's0' has rows in two between groups"_s), twice.err.constData());
    QVERIFY(twice.errText().contains(u"(line 68)"_s));
}

QTEST_GUILESS_MAIN(TestMixedFit)
#include "TestMixedFit.moc"
