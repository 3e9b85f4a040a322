// Power in participants for a factor measured within participants (core/power/Power.h):
// contrasts on the participants' contrast scores (noncentral t, P - 1 df) and Hotelling's T^2,
// against NumPy/SciPy (tests/python/power_within_check.py), the checks of the correlations,
// and the command line (--within, --correlation, --correlations).
#include "core/power/Power.h"

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
using test::numbersJson;

Q_DECLARE_METATYPE(cb::PowerSettings)

namespace {

Eigen::MatrixXd commonCorrelation(int k, double r)
{
    Eigen::MatrixXd m = Eigen::MatrixXd::Constant(k, k, r);
    m.diagonal().setOnes();
    return m;
}



bool near(double a, double b, double tolerance)
{
    return std::abs(a - b) <= tolerance * std::max(1.0, std::abs(b));
}

PowerSettings withinSettings(std::vector<double> means, double correlation, double participants)
{
    PowerSettings s;
    s.means = std::move(means);
    s.sd = 1.0;
    s.measure = Measure::Within;
    s.correlation = correlation;
    s.n = std::vector<double>(s.means.size(), participants);
    return s;
}

PowerReport mustCompute(const Eigen::MatrixXd &rows, const PowerSettings &s)
{
    auto r = computePower(rows, {}, s);
    if (!r)
        qFatal("computePower failed: %s", qPrintable(r.error()));
    return r.take();
}

} // namespace

class TestPowerWithin : public QObject
{
    Q_OBJECT
private slots:
    void agreesWithScipyOnGeneratedDesigns();
    void betweenGroupsFormulaGivesAVeryDifferentN();
    void pairedComparisonOfTheTextbooks();
    void hotellingNeedsAsManyParticipantsAsLevels();
    void rejectsInput_data();
    void rejectsInput();
    void parseCorrelationMatrix_data();
    void parseCorrelationMatrix();
    void jsonCountsParticipants();
    void commandLine();
    void commandLineRejectsInput_data();
    void commandLineRejectsInput();
};

// Random within designs: 2 to 5 levels, per-level SDs, a common correlation or a random full
// correlation matrix, adjustments and one-sided tests. NumPy builds the covariance, SciPy's nct
// and ncf give the power, and a search of its own (checked at P and P - 1) gives the smallest P.
void TestPowerWithin::agreesWithScipyOnGeneratedDesigns()
{
    std::mt19937 rng(20261202);
    auto uniform = [&](double lo, double hi) { return std::uniform_real_distribution<double>(lo, hi)(rng); };
    auto integer = [&](int lo, int hi) { return std::uniform_int_distribution<int>(lo, hi)(rng); };
    const Adjustment adjustments[] = {Adjustment::None, Adjustment::Bonferroni, Adjustment::Sidak};
    QJsonArray cases;
    std::vector<std::pair<Eigen::MatrixXd, PowerSettings>> inputs;
    std::vector<PowerReport> reports;
    for (int c = 0; c < 24; ++c) {
        const int k = integer(2, 5);
        PowerSettings s;
        s.measure = Measure::Within;
        s.means.resize(size_t(k));
        s.sds.resize(size_t(k));
        for (int i = 0; i < k; ++i) {
            s.means[size_t(i)] = uniform(-1.0, 1.0);
            s.sds[size_t(i)] = uniform(0.5, 2.0);
        }
        Eigen::MatrixXd r;
        if (c % 2 == 0) {
            s.correlation = uniform(-0.8 / (k - 1), 0.9);
            r = commonCorrelation(k, s.correlation);
        } else {
            Eigen::MatrixXd a(k, k + 2);
            for (Eigen::Index i = 0; i < a.size(); ++i)
                a.data()[i] = uniform(-1.0, 1.0) + 0.8; // mostly positive correlations
            Eigen::MatrixXd cov = a * a.transpose();
            const Eigen::VectorXd inv = cov.diagonal().cwiseSqrt().cwiseInverse();
            r = inv.asDiagonal() * cov * inv.asDiagonal();
            r.diagonal().setOnes();
            r = (r + r.transpose()) / 2.0;
            s.correlations = r;
        }
        s.n = std::vector<double>(size_t(k), double(integer(k, 40)));
        s.alpha = c % 3 == 0 ? 0.01 : 0.05;
        s.oneSided = c % 5 == 0;
        s.target = c % 4 == 0 ? 0.9 : 0.8;
        s.adjustment = adjustments[c % 3];
        Eigen::MatrixXd rows = Eigen::MatrixXd::Zero(k - 1, k);
        for (int i = 1; i < k; ++i) { // successive differences, written so the expected estimate is positive
            const double sign = s.means[size_t(i)] >= s.means[size_t(i - 1)] ? 1.0 : -1.0;
            rows(i - 1, i) = sign;
            rows(i - 1, i - 1) = -sign;
        }
        const PowerReport report = mustCompute(rows, s);
        QJsonObject o;
        o[u"rows"_s] = matrixJson(rows);
        o[u"means"_s] = numbersJson(s.means);
        o[u"sds"_s] = numbersJson(s.sds);
        o[u"corr"_s] = matrixJson(r);
        o[u"participants"_s] = s.n.front();
        o[u"alpha"_s] = s.alpha;
        o[u"one_sided"_s] = s.oneSided;
        o[u"adjust"_s] = adjustmentId(s.adjustment);
        o[u"target"_s] = s.target;
        cases.append(o);
        inputs.emplace_back(rows, s);
        reports.push_back(report);
    }
    const QJsonObject answer = test::runPython(u"power_within_check.py"_s, {}, QJsonDocument(QJsonObject{{u"cases"_s, cases}}).toJson());
    QVERIFY2(!answer.contains(u"error"_s), qPrintable(answer[u"error"_s].toString()));
    const QJsonArray results = answer[u"cases"_s].toArray();
    QCOMPARE(results.size(), cases.size());
    for (qsizetype c = 0; c < results.size(); ++c) {
        const QJsonObject py = results[c].toObject();
        const PowerReport &r = reports[size_t(c)];
        const QByteArray whereText = "case " + QByteArray::number(c);
        const char *where = whereText.constData();
        for (size_t j = 0; j < r.contrasts.size(); ++j) {
            const ContrastPower &cp = r.contrasts[j];
            QVERIFY2(near(cp.se, py[u"se"_s][qsizetype(j)].toDouble(), 1e-12), where);
            QCOMPARE(cp.df, py[u"df"_s][qsizetype(j)].toDouble());
            QVERIFY2(near(cp.power, py[u"power"_s][qsizetype(j)].toDouble(), 1e-8), where);
            const QJsonValue searched = py[u"searched"_s][qsizetype(j)];
            QCOMPARE(cp.required.reachable, !searched.isNull());
            if (cp.required.reachable) {
                QCOMPARE(cp.required.total, qint64(searched.toDouble()));
                QCOMPARE(cp.required.perLevel, std::vector<long long>{cp.required.total});
            }
        }
        QVERIFY(r.omnibus.hotelling);
        QCOMPARE(r.omnibus.df1, r.levelCount - 1);
        QCOMPARE(r.omnibus.df2, py[u"omnibus_df2"_s].toDouble());
        QVERIFY2(near(r.omnibus.noncentrality, py[u"omnibus_lambda"_s].toDouble(), 1e-9), where);
        QVERIFY2(near(r.omnibus.power, py[u"omnibus_power"_s].toDouble(), 1e-8), where);
        QCOMPARE(r.omnibus.required.total, qint64(py[u"omnibus_searched"_s].toDouble()));
    }
}

// The same means planned as separate groups: with a correlation of 0.7 a participant's
// difference varies 0.6 times as much as the difference of two independent people
// (2 sigma^2 (1 - r) against 2 sigma^2), so far fewer participants are needed. SciPy gives both
// numbers (power_within_check.py: 21 participants; 64 per group, 128 people, as in Cohen's
// table for d = 0.5).
void TestPowerWithin::betweenGroupsFormulaGivesAVeryDifferentN()
{
    Eigen::MatrixXd rows(1, 2);
    rows << -1, 1;
    const PowerSettings s = withinSettings({0.0, 0.5}, 0.7, 20);
    const PowerReport within = mustCompute(rows, s);
    QCOMPARE(within.contrasts[0].required.total, 21LL);
    QCOMPARE(within.comparedContrast, 0);
    // 64 per group for d = 0.5, two-sided alpha = .05, power .80: Cohen (1988), Statistical Power
    // Analysis for the Behavioral Sciences, 2nd ed., Table 2.4.1 (from memory; SciPy's noncentral t
    // gives power 0.8015 at 64 and 0.7952 at 63).
    QCOMPARE(within.asGroups.perLevel, (std::vector<long long>{64, 64}));
    QCOMPARE(within.asGroups.total, 128LL);
    // The between-groups computation itself, with the same means and SD.
    PowerSettings groups = s;
    groups.measure = Measure::Between;
    groups.correlation = 0.0;
    const PowerReport between = mustCompute(rows, groups);
    QCOMPARE(between.contrasts[0].required.total, 128LL);
    QVERIFY(between.contrasts[0].required.total > 6 * within.contrasts[0].required.total);
    // SE: sqrt(2 (1 - 0.7) / 20) against sqrt(2 / 20).
    QVERIFY(near(within.contrasts[0].se, std::sqrt(0.6 / 20.0), 1e-14));
    QVERIFY(near(between.contrasts[0].se, std::sqrt(2.0 / 20.0), 1e-14));
    const QString why = withinExplanation(within);
    QVERIFY2(why.contains(u"needs 21 participants here"_s) && why.contains(u"64 per group (128 people)"_s), qPrintable(why));
    QVERIFY(withinExplanation(between).isEmpty());
    // The correlation is a guess: its caution comes with every within report.
    QVERIFY(within.cautions.join(u' ').contains(u"correlation between a participant's values"_s));
    QVERIFY(!between.cautions.join(u' ').contains(u"correlation between a participant's values"_s));
}

// The textbook paired comparison: two conditions, SD 1, means 0.5 apart, correlation 0.5, so the
// difference scores have SD 1 and d_z = 0.5. The paired t test then needs 34 participants for
// power .80 at two-sided alpha = .05 (power 0.8078; 33 give 0.7954): the exact figure commonly
// quoted for a paired t with d_z = 0.5 (from memory; Cohen's (1988, ch. 2) approximation through
// his two-sample table gives 33). The powers asserted are SciPy's noncentral t (scipy.stats.nct).
void TestPowerWithin::pairedComparisonOfTheTextbooks()
{
    Eigen::MatrixXd rows(1, 2);
    rows << -1, 1;
    const PowerReport at34 = mustCompute(rows, withinSettings({0.0, 0.5}, 0.5, 34));
    QCOMPARE(at34.contrasts[0].required.total, 34LL);
    QVERIFY(near(at34.contrasts[0].df, 33.0, 1e-15));
    QVERIFY(near(at34.contrasts[0].se, std::sqrt(1.0 / 34.0), 1e-14));
    QVERIFY(std::abs(at34.contrasts[0].power - 0.8078) < 5e-5);
    const PowerReport at33 = mustCompute(rows, withinSettings({0.0, 0.5}, 0.5, 33));
    QVERIFY(std::abs(at33.contrasts[0].power - 0.7954) < 5e-5);
}

void TestPowerWithin::hotellingNeedsAsManyParticipantsAsLevels()
{
    Eigen::MatrixXd rows(2, 3);
    rows << -1, 1, 0, -1, 0, 1;
    const PowerReport r = mustCompute(rows, withinSettings({0.0, 0.5, 0.6}, 0.7, 2));
    QVERIFY(std::isnan(r.omnibus.power));
    QVERIFY(r.omnibus.notes.join(u' ').contains(u"at least as many participants as levels (3)"_s));
    QCOMPARE(r.omnibus.required.total, 18LL); // SciPy: power_within_check.py on the same case
    QVERIFY(r.contrasts[0].required.total >= 2);
}

void TestPowerWithin::rejectsInput_data()
{
    QTest::addColumn<PowerSettings>("settings");
    QTest::addColumn<QString>("field");
    QTest::addColumn<QString>("message");
    const PowerSettings base = withinSettings({0.0, 0.5, 0.6}, 0.5, 20);
    PowerSettings s = base;
    s.correlation = 1.0;
    QTest::newRow("correlation 1") << s << u"correlation"_s
                                   << u"correlation: 1 is not a correlation 3 levels can share; expected a number above -0.5 and below 1"_s;
    s.correlation = -0.5;
    QTest::newRow("correlation too negative") << s << u"correlation"_s << u"correlation: -0.5 is not a correlation 3 levels can share"_s;
    s = base;
    s.correlations = commonCorrelation(3, 0.5);
    s.correlations(0, 2) = 0.4;
    QTest::newRow("not symmetric") << s << u"correlations"_s
                                   << u"correlations, row 1, column 3: 0.4, but row 3, column 1 is 0.5; the matrix must be symmetric"_s;
    s.correlations = commonCorrelation(3, 0.5);
    s.correlations(1, 1) = 0.9;
    QTest::newRow("diagonal") << s << u"correlations"_s
                              << u"correlations, row 2, column 2: 0.9 on the diagonal; a level's correlation with itself is 1"_s;
    s.correlations = commonCorrelation(3, 0.5);
    s.correlations(0, 1) = s.correlations(1, 0) = 1.5;
    QTest::newRow("beyond 1") << s << u"correlations"_s << u"correlations, row 1, column 2: 1.5 is not a correlation; expected a number from -1 to 1"_s;
    // 1 and 2 go together, 2 and 3 go together, but 1 and 3 go opposite ways: impossible.
    s.correlations = commonCorrelation(3, 0.9);
    s.correlations(0, 2) = s.correlations(2, 0) = -0.9;
    QTest::newRow("not positive definite") << s << u"correlations"_s
                                           << u"correlations, row 3: with this row the correlations of the first 3 levels are not positive definite"_s;
    s.correlations = commonCorrelation(2, 0.5);
    QTest::newRow("wrong size") << s << u"correlations"_s << u"correlations: a 2 x 2 matrix for 3 levels; give one row and one column per level"_s;
    s = base;
    s.n = {20, 20, 24};
    QTest::newRow("unequal n") << s << u"n"_s
                               << u"n: within participants the same participants are at every level; give one number of participants, not 20 and 24"_s;
    s = base;
    s.n.clear();
    s.total = 30;
    s.ratios = {1, 1, 2};
    QTest::newRow("ratios") << s << u"ratios"_s << u"ratios: within participants every participant gives a value at every level"_s;
    s = base;
    s.measure = Measure::Between;
    QTest::newRow("correlation between groups") << s << u"correlation"_s
                                                << u"correlation: a correlation is used only when the factor is measured within participants"_s;
}

void TestPowerWithin::rejectsInput()
{
    QFETCH(PowerSettings, settings);
    QFETCH(QString, field);
    QFETCH(QString, message);
    const Problem p = validatePowerSettings(settings, 3);
    QCOMPARE(p.field, field);
    QVERIFY2(p.message.startsWith(message), qPrintable(p.message));
}

void TestPowerWithin::parseCorrelationMatrix_data()
{
    QTest::addColumn<QString>("text");
    QTest::addColumn<int>("size");
    QTest::addColumn<QString>("message");
    QTest::newRow("csv") << u"1,0.5,0.25\n0.5,1,0.5\n0.25,0.5,1\n"_s << 3 << QString();
    QTest::newRow("spaces, tabs and a blank line") << u"1  0.5\n\n0.5\t1"_s << 2 << QString();
    QTest::newRow("fractions") << u"1; 1/2\n1/2; 1"_s << 2 << QString();
    QTest::newRow("ragged") << u"1,0.5\n0.5,1,0"_s << 0 << u"corr.csv, line 2: 3 values, but the first row has 2"_s;
    QTest::newRow("not a number") << u"1,x\nx,1"_s << 0 << u"corr.csv, line 1, item 2: "_s;
    QTest::newRow("not square") << u"1,0.5,0\n0.5,1,0"_s << 0 << u"corr.csv: 2 rows of 3 values; a correlation matrix is square"_s;
    QTest::newRow("empty") << u"\n \n"_s << 0 << u"corr.csv: no values"_s;
}

void TestPowerWithin::parseCorrelationMatrix()
{
    QFETCH(QString, text);
    QFETCH(int, size);
    QFETCH(QString, message);
    const auto m = cb::parseCorrelationMatrix(text, u"corr.csv"_s);
    if (message.isEmpty()) {
        QVERIFY2(m.ok(), qPrintable(m.error()));
        QCOMPARE(int(m->rows()), size);
        QCOMPARE((*m)(0, 1), 0.5);
    } else {
        QVERIFY(!m.ok());
        QVERIFY2(m.error().startsWith(message), qPrintable(m.error()));
    }
}

void TestPowerWithin::jsonCountsParticipants()
{
    Eigen::MatrixXd rows(2, 3);
    rows << -1, 1, 0, -1, 0, 1;
    const QJsonObject o = powerReportToJson(mustCompute(rows, withinSettings({0.0, 0.5, 0.6}, 0.7, 20)));
    QCOMPARE(o[u"measured"_s].toString(), u"within"_s);
    QCOMPARE(o[u"correlation"_s].toDouble(), 0.7);
    const QJsonObject c = o[u"contrasts"_s].toArray()[0].toObject();
    QCOMPARE(c[u"n_required"_s].toDouble(), 21.0); // participants (SciPy, power_within_check.py)
    QCOMPARE(c[u"n_required_total"_s].toDouble(), 21.0);
    QCOMPARE(c[u"df"_s].toDouble(), 19.0);
    QVERIFY(near(c[u"se"_s].toDouble(), std::sqrt(0.6 / 20.0), 1e-14));
    const QJsonObject om = o[u"omnibus"_s].toObject();
    QCOMPARE(om[u"test"_s].toString(), u"hotelling"_s);
    QCOMPARE(om[u"df1"_s].toInt(), 2);
    QCOMPARE(om[u"df2"_s].toDouble(), 18.0);
    QCOMPARE(om[u"n_required"_s].toDouble(), 18.0);
    QVERIFY(near(om[u"noncentrality"_s].toDouble(), 13.777777777777779, 1e-12)); // SciPy/NumPy: 13.77777777777778
}

void TestPowerWithin::commandLine()
{
    const QStringList base{u"power"_s, u"--levels"_s, u"a,b,c"_s, u"--scheme"_s, u"treatment"_s, u"--means"_s, u"0,0.5,0.6"_s,
                           u"--sd"_s, u"1"_s, u"--json"_s};
    const test::ProcessRun run = test::runCli(base + QStringList{u"--within"_s, u"--correlation"_s, u"0.7"_s, u"-n"_s, u"20"_s});
    QVERIFY2(run.exitCode == 0, run.err.constData());
    const QJsonObject o = QJsonDocument::fromJson(run.out).object();
    QCOMPARE(o[u"planned_total"_s].toDouble(), 20.0);
    QCOMPARE(o[u"contrasts"_s].toArray()[0].toObject()[u"n_required"_s].toDouble(), 21.0);
    QCOMPARE(o[u"contrasts"_s].toArray()[1].toObject()[u"n_required"_s].toDouble(), 16.0); // SciPy as above
    QCOMPARE(o[u"omnibus"_s].toObject()[u"test"_s].toString(), u"hotelling"_s);

    // The same correlations as a file give the same answer.
    QTemporaryDir dir;
    const QString path = dir.filePath(u"corr.csv"_s);
    QVERIFY(test::writeFile(path, "1,0.7,0.7\n0.7,1,0.7\n0.7,0.7,1\n"));
    const test::ProcessRun file = test::runCli(base + QStringList{u"--within"_s, u"--correlations"_s, path, u"-n"_s, u"20"_s});
    QVERIFY2(file.exitCode == 0, file.err.constData());
    const QJsonObject f = QJsonDocument::fromJson(file.out).object();
    QCOMPARE(f[u"contrasts"_s], o[u"contrasts"_s]);
    QVERIFY(f[u"correlation"_s].isNull());

    // The report says participants and why the number is small.
    const test::ProcessRun text = test::runCli(QStringList{u"power"_s, u"--levels"_s, u"a,b"_s, u"--scheme"_s, u"treatment"_s,
                                                           u"--means"_s, u"0,0.5"_s, u"--sd"_s, u"1"_s, u"--within"_s,
                                                           u"--correlation"_s, u"0.7"_s, u"-n"_s, u"20"_s});
    QVERIFY2(text.exitCode == 0, text.err.constData());
    QVERIFY(text.outText().contains(u"Participants (each at every level): 20"_s));
    QVERIFY(text.outText().contains(u"21 participants"_s));
    QVERIFY(text.outText().contains(u"64 per group (128 people)"_s));
}

void TestPowerWithin::commandLineRejectsInput_data()
{
    QTest::addColumn<QStringList>("args");
    QTest::addColumn<QString>("message");
    QTest::newRow("no correlation") << QStringList{u"--within"_s, u"-n"_s, u"20"_s}
                                    << u"within participants, give the expected correlation"_s;
    QTest::newRow("correlation between groups") << QStringList{u"--correlation"_s, u"0.5"_s, u"-n"_s, u"20,20,20"_s}
                                                << u"--correlation: a correlation is used only when the factor is measured within"_s;
    QTest::newRow("no participants") << QStringList{u"--within"_s, u"--correlation"_s, u"0.5"_s}
                                     << u"give the number of participants with -n P"_s;
    QTest::newRow("missing file") << QStringList{u"--within"_s, u"--correlations"_s, u"/nonexistent/corr.csv"_s, u"-n"_s, u"20"_s}
                                  << u"--correlations: "_s;
    QTest::newRow("correlation 1") << QStringList{u"--within"_s, u"--correlation"_s, u"1"_s, u"-n"_s, u"20"_s}
                                   << u"--correlation: 1 is not a correlation 3 levels can share"_s;
}

void TestPowerWithin::commandLineRejectsInput()
{
    QFETCH(QStringList, args);
    QFETCH(QString, message);
    const test::ProcessRun run = test::runCli(QStringList{u"power"_s, u"--levels"_s, u"a,b,c"_s, u"--scheme"_s, u"treatment"_s,
                                                          u"--means"_s, u"0,0.5,0.6"_s, u"--sd"_s, u"1"_s}
                                              + args);
    QCOMPARE(run.exitCode, 2);
    QVERIFY2(run.errText().contains(message), run.err.constData());
}

QTEST_GUILESS_MAIN(TestPowerWithin)
#include "TestPowerWithin.moc"
