// Tests of power and sample size for planned contrasts (core/Power.h), against
// Cohen's (1988) tables, SciPy (tests/python/power_check.py) and the defining properties.
#include "core/analysis/Analysis.h"
#include "core/files/StudyFile.h"
#include "core/model/Design.h"
#include "core/power/Power.h"
#include "core/model/Scheme.h"
#include "core/files/SchemeFile.h"

#include <QJsonArray>
#include <QJsonDocument>
#include <QProcess>
#include <QRegularExpression>

#include "tests/support/ProcessRunner.h"
#include <QTemporaryDir>
#include <QTest>

#include <algorithm>
#include <cmath>
#include <functional>
#include <numeric>
#include <random>

using namespace Qt::StringLiterals;
using namespace cb;

namespace {

Eigen::MatrixXd rowsOf(std::initializer_list<std::initializer_list<double>> rows)
{
    Eigen::MatrixXd m(Eigen::Index(rows.size()), Eigen::Index(rows.begin()->size()));
    Eigen::Index r = 0;
    for (const auto &row : rows) {
        Eigen::Index c = 0;
        for (double v : row)
            m(r, c++) = v;
        ++r;
    }
    return m;
}

// Four levels, a linear rise of half an SD per step, 20 per level.
PowerSettings fourLevels()
{
    PowerSettings s;
    s.means = {0.0, 0.5, 1.0, 1.5};
    s.sd = 1.0;
    s.n = {20, 20, 20, 20};
    return s;
}

// fourLevels() with other means, optionally per-level SDs (Welch) and ratios with a total.
PowerSettings variant(const std::vector<double> &means, bool welch, const std::vector<double> &ratios, double total)
{
    PowerSettings s = fourLevels();
    s.means = means;
    if (welch)
        s.sds = {1.0, 2.0, 0.5, 1.5};
    if (!ratios.empty()) {
        s.n.clear();
        s.ratios = ratios;
        s.total = total;
    }
    return s;
}

// Treatment-style contrasts of levels 2..4 against level 1.
Eigen::MatrixXd againstFirst()
{
    return rowsOf({{-1, 1, 0, 0}, {-1, 0, 1, 0}, {-1, 0, 0, 1}});
}

PowerReport mustCompute(const Eigen::MatrixXd &rows, const PowerSettings &s)
{
    auto r = computePower(rows, {}, s);
    if (!r)
        qFatal("computePower failed: %s", qPrintable(r.error()));
    return r.take();
}

QJsonArray toJson(const std::vector<double> &v)
{
    QJsonArray a;
    for (double x : v)
        a.append(x);
    return a;
}

QJsonValue sizesJson(const SampleSize &s)
{
    if (!s.reachable)
        return QJsonValue::Null;
    QJsonArray a;
    for (long long v : s.perLevel)
        a.append(double(v));
    return a;
}

// One case for tests/python/power_check.py.
QJsonObject scipyCase(const Eigen::MatrixXd &rows, const PowerSettings &s, const PowerReport &report, bool searchEqual = false)
{
    QJsonObject c;
    QJsonArray rowArray;
    for (Eigen::Index r = 0; r < rows.rows(); ++r) {
        QJsonArray row;
        for (Eigen::Index j = 0; j < rows.cols(); ++j)
            row.append(rows(r, j));
        rowArray.append(row);
    }
    c[u"rows"_s] = rowArray;
    c[u"means"_s] = toJson(s.means);
    c[u"sd"_s] = s.sd;
    if (s.perLevelSds())
        c[u"sds"_s] = toJson(s.sds);
    c[u"n"_s] = toJson(report.plannedN);
    c[u"ratios"_s] = toJson(allocationRatios(s, report.levelCount));
    c[u"alpha"_s] = s.alpha;
    c[u"one_sided"_s] = s.oneSided;
    c[u"adjust"_s] = adjustmentId(s.adjustment);
    c[u"target"_s] = s.target;
    QJsonArray required;
    for (const ContrastPower &cp : report.contrasts)
        required.append(sizesJson(cp.required));
    c[u"required"_s] = required;
    c[u"omnibus_required"_s] = sizesJson(report.omnibus.required);
    c[u"search_equal"_s] = searchEqual;
    return c;
}

// Runs tests/python/power_check.py with CB_PYTHON (NumPy/SciPy) on the cases.
QJsonArray runScipy(const QJsonArray &cases)
{
    QProcess p;
    p.start(QString::fromUtf8(CB_PYTHON), {QString::fromUtf8(CB_SOURCE_DIR) + u"/tests/python/power_check.py"_s});
    if (!p.waitForStarted(30000))
        qFatal("could not start %s", CB_PYTHON);
    p.write(QJsonDocument(QJsonObject{{u"cases"_s, cases}}).toJson(QJsonDocument::Compact));
    p.closeWriteChannel();
    if (!p.waitForFinished(600000) || p.exitCode() != 0)
        qFatal("power_check.py failed: %s", p.readAllStandardError().constData());
    return QJsonDocument::fromJson(p.readAllStandardOutput()).object()[u"cases"_s].toArray();
}

} // namespace

class TestPower : public QObject
{
    Q_OBJECT
private slots:
    void cohenTwoSampleT_data();
    void cohenTwoSampleT();
    void cohenOneWayAnova_data();
    void cohenOneWayAnova();
    void cohenExactValuesMatchScipySearch();
    void agreesWithScipyOnRandomDesigns();
    void powerGrowsWithN_data();
    void powerGrowsWithN();
    void powerGrowsWithEstimate_data();
    void powerGrowsWithEstimate();
    void zeroEstimateGivesAlpha_data();
    void zeroEstimateGivesAlpha();
    void requiredNIsTheSmallest_data();
    void requiredNIsTheSmallest();
    void adjustedAlpha();
    void effectSizeIsStandardizedContrast();
    void welchDegreesOfFreedom();
    void omnibusWithPerLevelSdsUsesPooledSd();
    void allocationRatiosScaleGroups();
    void plannedSizesFromRatios();
    void notesExplainSpecialCases();
    void unreachableTargetIsReported();
    void rejectsInput_data();
    void rejectsInput();
    void messagesCanNameCommandLineArguments();
    void powerCurveRejectsInput();
    void parseNumberList_data();
    void parseNumberList();
    void meansFromDifferences();
    void contrastRowsOfAnalysis();
    void jsonHasTheIssueKeys();
    void cautionsAreProvided();
    void commandLineJson();
    void commandLineReport();
    void commandLineReadsSchemeFile();
    void commandLineReadsDesignFile();
    void commandLineRejectsInput_data();
    void commandLineRejectsInput();
    void libraryErrorsBecomeUnreliableResults_data();
    void libraryErrorsBecomeUnreliableResults();
    void commandLineSurvivesLibraryErrors();
};

// Cohen (1988), Statistical Power Analysis for the Behavioral Sciences, 2nd ed.,
// Table 2.4.1 (two-sample t, two-tailed alpha = .05, power .80): n per group
// 393, 64 and 26 for d = .2, .5 and .8 (from memory of the table). Cohen's tables come
// from approximations; the exact noncentral t needs 394 for d = .2, one more than the
// table (SciPy agrees: cohenExactValuesMatchScipySearch). The exact values are asserted.
void TestPower::cohenTwoSampleT_data()
{
    QTest::addColumn<double>("d");
    QTest::addColumn<int>("cohen");
    QTest::addColumn<int>("exact");
    QTest::newRow("d = .2") << 0.2 << 393 << 394;
    QTest::newRow("d = .5") << 0.5 << 64 << 64;
    QTest::newRow("d = .8") << 0.8 << 26 << 26;
}

void TestPower::cohenTwoSampleT()
{
    QFETCH(double, d);
    QFETCH(int, cohen);
    QFETCH(int, exact);
    PowerSettings s;
    s.means = {d, 0.0};
    s.n = {10, 10};
    const PowerReport r = mustCompute(rowsOf({{1, -1}}), s);
    const ContrastPower &c = r.contrasts[0];
    QVERIFY(c.required.reachable);
    QCOMPARE(c.required.perLevel, (std::vector<long long>{exact, exact}));
    QVERIFY(std::abs(exact - cohen) <= 1);
    QCOMPARE(c.required.total, 2LL * exact);
    QVERIFY(c.required.power >= 0.8);
    QCOMPARE(c.effectSize, d);
    // The two-group omnibus F-test is the two-sided t-test: same n.
    QCOMPARE(r.omnibus.required.perLevel, c.required.perLevel);
}

// Cohen (1988), Table 8.4.4 (one-way ANOVA, alpha = .05, power .80, f = .25):
// n per group 52 for k = 3 and 45 for k = 4 (from memory of the table). The exact
// noncentral F needs 53 for k = 3, one more than the table; 45 for k = 4.
void TestPower::cohenOneWayAnova_data()
{
    QTest::addColumn<std::vector<double>>("means");
    QTest::addColumn<int>("cohen");
    QTest::addColumn<int>("exact");
    const double a = std::sqrt(3.0 / 32.0); // f^2 = (2 a^2 / 3) = 1/16
    QTest::newRow("k = 3") << std::vector<double>{-a, 0.0, a} << 52 << 53;
    QTest::newRow("k = 4") << std::vector<double>{-0.25, -0.25, 0.25, 0.25} << 45 << 45;
}

void TestPower::cohenOneWayAnova()
{
    QFETCH(std::vector<double>, means);
    QFETCH(int, cohen);
    QFETCH(int, exact);
    PowerSettings s;
    s.means = means;
    s.n = std::vector<double>(means.size(), 10.0);
    Eigen::MatrixXd rows = Eigen::MatrixXd::Zero(1, Eigen::Index(means.size()));
    rows(0, 0) = -1;
    rows(0, rows.cols() - 1) = 1;
    const PowerReport r = mustCompute(rows, s);
    QVERIFY(std::abs(r.omnibus.effectSize - 0.25) < 1e-12);
    QVERIFY(r.omnibus.required.reachable);
    QCOMPARE(r.omnibus.required.perLevel, std::vector<long long>(means.size(), exact));
    QVERIFY(std::abs(exact - cohen) <= 1);
}

// SciPy (scipy.stats.nct, ncf, t, f), stepping n upwards one by one, finds the same
// smallest n per group for Cohen's cases.
void TestPower::cohenExactValuesMatchScipySearch()
{
    QJsonArray cases;
    std::vector<long long> ours;
    for (double d : {0.2, 0.5, 0.8}) {
        PowerSettings s;
        s.means = {d, 0.0};
        s.n = {10, 10};
        const Eigen::MatrixXd rows = rowsOf({{1, -1}});
        const PowerReport r = mustCompute(rows, s);
        cases.append(scipyCase(rows, s, r, true));
        ours.push_back(r.contrasts[0].required.perLevel[0]);
    }
    const double a = std::sqrt(3.0 / 32.0);
    for (const std::vector<double> &means : {std::vector<double>{-a, 0.0, a}, std::vector<double>{-0.25, -0.25, 0.25, 0.25}}) {
        PowerSettings s;
        s.means = means;
        s.n = std::vector<double>(means.size(), 10.0);
        Eigen::MatrixXd rows = Eigen::MatrixXd::Zero(1, Eigen::Index(means.size()));
        rows(0, 0) = -1;
        rows(0, rows.cols() - 1) = 1;
        const PowerReport r = mustCompute(rows, s);
        cases.append(scipyCase(rows, s, r, true));
        ours.push_back(r.omnibus.required.perLevel[0]);
    }
    const QJsonArray results = runScipy(cases);
    QCOMPARE(results.size(), 5);
    for (int i = 0; i < 3; ++i)
        QCOMPARE(results[i].toObject()[u"searched"_s].toArray()[0].toInteger(), ours[size_t(i)]);
    for (int i = 3; i < 5; ++i)
        QCOMPARE(results[i].toObject()[u"omnibus_searched"_s].toInteger(), ours[size_t(i)]);
    QCOMPARE(ours, (std::vector<long long>{394, 64, 26, 53, 45}));
}

// SciPy (scipy.stats.nct, ncf, t, f) on 120 random designs: every contrast's power and
// the omnibus power agree to 1e-6; the contrast power also agrees with a numerical
// integral over the chi-square variable (scipy.integrate.quad, no noncentral t code);
// the power at the required sizes reaches the target and one step smaller does not.
void TestPower::agreesWithScipyOnRandomDesigns()
{
    std::mt19937 rng(20261201);
    auto uniform = [&](double lo, double hi) { return std::uniform_real_distribution<double>(lo, hi)(rng); };
    auto integer = [&](int lo, int hi) { return std::uniform_int_distribution<int>(lo, hi)(rng); };
    const double alphas[] = {0.01, 0.05, 0.1};
    const double targets[] = {0.7, 0.8, 0.9};
    const double ratioChoices[] = {1.0, 1.5, 2.0, 3.0};

    QJsonArray cases;
    std::vector<PowerReport> reports;
    const int kCases = 120;
    for (int i = 0; i < kCases; ++i) {
        const int k = integer(2, 8);
        const int m = integer(1, std::min(4, k));
        Eigen::MatrixXd rows(m, k);
        for (int r = 0; r < m; ++r) {
            do {
                for (int j = 0; j < k; ++j)
                    rows(r, j) = integer(-3, 3);
                if (integer(0, 9) > 0) // mostly contrasts (sum 0), sometimes not
                    rows.row(r).array() -= rows.row(r).mean();
            } while ((rows.row(r).array().abs() < 1e-12).all());
        }
        PowerSettings s;
        s.means.resize(size_t(k));
        for (double &v : s.means)
            v = uniform(-1.5, 1.5);
        s.sd = uniform(0.5, 2.0);
        if (integer(0, 9) < 3) {
            s.sds.resize(size_t(k));
            for (double &v : s.sds)
                v = uniform(0.3, 3.0);
        }
        const int sizes = integer(0, 3);
        if (sizes <= 1) {
            s.n.resize(size_t(k));
            for (double &v : s.n)
                v = integer(2, 40);
        } else {
            if (sizes == 2) {
                s.ratios.resize(size_t(k));
                for (double &v : s.ratios)
                    v = ratioChoices[integer(0, 3)];
            }
            const std::vector<double> r = allocationRatios(s, k);
            const double least = 2.0 * std::accumulate(r.begin(), r.end(), 0.0) / *std::min_element(r.begin(), r.end());
            s.total = std::ceil(least) + integer(0, 150);
        }
        s.alpha = alphas[integer(0, 2)];
        s.oneSided = integer(0, 9) < 3;
        const Adjustment forPower[] = {Adjustment::None, Adjustment::Bonferroni, Adjustment::Sidak};
        s.adjustment = forPower[integer(0, 2)];
        s.target = targets[integer(0, 2)];
        auto r = computePower(rows, {}, s);
        QVERIFY2(r.ok(), qPrintable(r.error()));
        cases.append(scipyCase(rows, s, *r));
        reports.push_back(r.take());
    }

    const QJsonArray results = runScipy(cases);
    QCOMPARE(results.size(), kCases);
    int compared = 0;
    int searched = 0;
    double worst = 0.0;
    for (int i = 0; i < kCases; ++i) {
        const QJsonObject res = results[i].toObject();
        const PowerReport &rep = reports[size_t(i)];
        const QJsonArray power = res[u"power"_s].toArray();
        const QJsonArray integral = res[u"power_integral"_s].toArray();
        const QJsonArray atRequired = res[u"at_required"_s].toArray();
        const QJsonArray belowRequired = res[u"below_required"_s].toArray();
        for (size_t c = 0; c < rep.contrasts.size(); ++c) {
            const ContrastPower &cp = rep.contrasts[c];
            const double diff = std::abs(cp.power - power[qsizetype(c)].toDouble());
            worst = std::max(worst, diff);
            QVERIFY2(diff < 1e-6, qPrintable(u"case %1 contrast %2: %3 vs SciPy %4"_s.arg(i).arg(c).arg(cp.power).arg(power[qsizetype(c)].toDouble())));
            QVERIFY2(std::abs(cp.power - integral[qsizetype(c)].toDouble()) < 1e-6,
                     qPrintable(u"case %1 contrast %2: %3 vs integral %4"_s.arg(i).arg(c).arg(cp.power).arg(integral[qsizetype(c)].toDouble())));
            ++compared;
            if (cp.required.reachable) {
                QVERIFY(atRequired[qsizetype(c)].toDouble() >= rep.target);
                if (!belowRequired[qsizetype(c)].isNull())
                    QVERIFY(belowRequired[qsizetype(c)].toDouble() < rep.target);
                ++searched;
            }
        }
        const double omnibusDiff = std::abs(rep.omnibus.power - res[u"omnibus"_s].toDouble());
        worst = std::max(worst, omnibusDiff);
        QVERIFY2(omnibusDiff < 1e-6, qPrintable(u"case %1 omnibus: %2 vs SciPy %3"_s.arg(i).arg(rep.omnibus.power).arg(res[u"omnibus"_s].toDouble())));
        ++compared;
        if (rep.omnibus.required.reachable) {
            QVERIFY(res[u"omnibus_at_required"_s].toDouble() >= rep.target);
            if (!res[u"omnibus_below_required"_s].isNull())
                QVERIFY(res[u"omnibus_below_required"_s].toDouble() < rep.target);
            ++searched;
        }
    }
    QVERIFY(compared >= 200);
    QVERIFY(searched >= 150);
    qInfo("%d powers compared with SciPy, largest difference %.3g; %d required sizes checked", compared, worst, searched);
}

void TestPower::powerGrowsWithN_data()
{
    QTest::addColumn<bool>("welch");
    QTest::addColumn<bool>("oneSided");
    QTest::addColumn<bool>("ratios");
    QTest::newRow("common SD, two-sided") << false << false << false;
    QTest::newRow("common SD, one-sided") << false << true << false;
    QTest::newRow("per-level SDs (Welch)") << true << false << false;
    QTest::newRow("ratios 1:2:2:3") << false << false << true;
}

void TestPower::powerGrowsWithN()
{
    QFETCH(bool, welch);
    QFETCH(bool, oneSided);
    QFETCH(bool, ratios);
    PowerSettings s = variant({0.0, 0.2, 0.3, 0.45}, welch, ratios ? std::vector<double>{1, 2, 2, 3} : std::vector<double>{}, 80);
    s.oneSided = oneSided;
    const Eigen::MatrixXd rows = againstFirst();
    const std::vector<long long> sizes = powerCurveSizes(400, 80);
    for (int c = -1; c < rows.rows(); ++c) {
        auto curve = powerCurve(rows, c, s, sizes);
        QVERIFY2(curve.ok(), qPrintable(curve.error()));
        for (size_t i = 1; i < curve->size(); ++i) {
            const double before = (*curve)[i - 1];
            const double now = (*curve)[i];
            // Strictly higher until the power is 1 to within rounding.
            QVERIFY2(now > before || (now == before && now > 1.0 - 1e-12),
                     qPrintable(u"contrast %1 at size %2: %3 after %4"_s.arg(c).arg(sizes[i]).arg(now).arg(before)));
        }
    }
}

void TestPower::powerGrowsWithEstimate_data()
{
    QTest::addColumn<bool>("oneSided");
    QTest::addColumn<double>("sign");
    QTest::newRow("two-sided, positive") << false << 1.0;
    QTest::newRow("two-sided, negative") << false << -1.0;
    QTest::newRow("one-sided, positive") << true << 1.0;
}

void TestPower::powerGrowsWithEstimate()
{
    QFETCH(bool, oneSided);
    QFETCH(double, sign);
    double last = 0.0;
    for (double psi = 0.0; psi <= 1.5; psi += 0.05) {
        PowerSettings s = fourLevels();
        s.oneSided = oneSided;
        s.means = {0.0, sign * psi, 0.0, 0.0};
        const PowerReport r = mustCompute(againstFirst(), s);
        const double p = r.contrasts[0].power;
        if (psi > 0.0)
            QVERIFY2(p > last, qPrintable(u"psi %1: %2 after %3"_s.arg(psi).arg(p).arg(last)));
        last = p;
    }
    QVERIFY(last > 0.95);
}

void TestPower::zeroEstimateGivesAlpha_data()
{
    QTest::addColumn<bool>("oneSided");
    QTest::addColumn<bool>("welch");
    QTest::addColumn<int>("adjustment");
    QTest::newRow("two-sided") << false << false << int(Adjustment::None);
    QTest::newRow("one-sided") << true << false << int(Adjustment::None);
    QTest::newRow("Welch") << false << true << int(Adjustment::None);
    QTest::newRow("Bonferroni") << false << false << int(Adjustment::Bonferroni);
    QTest::newRow("Sidak, one-sided") << true << false << int(Adjustment::Sidak);
}

void TestPower::zeroEstimateGivesAlpha()
{
    QFETCH(bool, oneSided);
    QFETCH(bool, welch);
    QFETCH(int, adjustment);
    PowerSettings s = fourLevels();
    s.means = {1.0, 1.0, 2.0, 3.0}; // contrast 1 (level 2 - level 1) expects 0
    s.oneSided = oneSided;
    s.adjustment = Adjustment(adjustment);
    if (welch)
        s.sds = {1.0, 3.0, 1.0, 1.0};
    const PowerReport r = mustCompute(againstFirst(), s);
    const ContrastPower &c = r.contrasts[0];
    QVERIFY(c.zeroEstimate);
    QCOMPARE(c.estimate, 0.0);
    QCOMPARE(c.noncentrality, 0.0);
    QVERIFY(std::abs(c.power - r.perTestAlpha) < 1e-12);
    QVERIFY(!c.required.reachable);
    QVERIFY(c.notes.join(u'\n').contains(u"the expected estimate is 0: power equals alpha"_s));
    // The noncentral t itself at delta = 0 gives alpha too.
    QVERIFY(std::abs(tTestPower(0.0, 17.5, 0.05, oneSided) - 0.05) < 1e-12);
    // And the omnibus test with all means equal.
    s.means = {2.0, 2.0, 2.0, 2.0};
    const PowerReport flat = mustCompute(againstFirst(), s);
    QVERIFY(std::abs(flat.omnibus.power - 0.05) < 1e-12);
    QCOMPARE(flat.omnibus.noncentrality, 0.0);
}

void TestPower::requiredNIsTheSmallest_data()
{
    QTest::addColumn<bool>("welch");
    QTest::addColumn<bool>("ratios");
    QTest::addColumn<double>("target");
    QTest::newRow("equal n, .8") << false << false << 0.8;
    QTest::newRow("equal n, .95") << false << false << 0.95;
    QTest::newRow("Welch, .9") << true << false << 0.9;
    QTest::newRow("ratios, .8") << false << true << 0.8;
}

void TestPower::requiredNIsTheSmallest()
{
    QFETCH(bool, welch);
    QFETCH(bool, ratios);
    QFETCH(double, target);
    PowerSettings s = variant({0.0, 0.3, 0.5, 0.9}, welch, ratios ? std::vector<double>{1, 1.5, 2, 1} : std::vector<double>{}, 60);
    s.target = target;
    const Eigen::MatrixXd rows = againstFirst();
    const PowerReport r = mustCompute(rows, s);
    for (int c = -1; c < rows.rows(); ++c) {
        const SampleSize &req = c < 0 ? r.omnibus.required : r.contrasts[size_t(c)].required;
        QVERIFY(req.reachable);
        const long long t = *std::min_element(req.perLevel.begin(), req.perLevel.end());
        QCOMPARE(req.perLevel, groupSizesFor(t, allocationRatios(s, 4)));
        // Every smaller search size falls short; the found one meets the target.
        std::vector<long long> sizes;
        for (long long v = 2; v <= t; ++v)
            sizes.push_back(v);
        auto curve = powerCurve(rows, c, s, sizes);
        QVERIFY(curve.ok());
        QVERIFY(curve->back() >= target);
        QCOMPARE(curve->back(), req.power);
        for (size_t i = 0; i + 1 < curve->size(); ++i)
            QVERIFY((*curve)[i] < target);
    }
}

// Per-test alpha: Bonferroni alpha/m; Sidak 1 - (1 - alpha)^(1/m) (Sidak 1967).
// 1 - 0.95^(1/3) = 0.016952427508441503 (SciPy/NumPy: 1 - 0.95 ** (1/3)).
void TestPower::adjustedAlpha()
{
    QCOMPARE(perTestAlpha(0.05, Adjustment::None, 3), 0.05);
    QVERIFY(std::abs(perTestAlpha(0.05, Adjustment::Bonferroni, 3) - 0.05 / 3) < 1e-17);
    QVERIFY(std::abs(perTestAlpha(0.05, Adjustment::Sidak, 3) - 0.016952427508441503) < 1e-17);
    QCOMPARE(perTestAlpha(0.05, Adjustment::Sidak, 1), 0.05);
    PowerSettings s = fourLevels();
    s.adjustment = Adjustment::Bonferroni;
    const PowerReport adjusted = mustCompute(againstFirst(), s);
    s.adjustment = Adjustment::None;
    const PowerReport plain = mustCompute(againstFirst(), s);
    QVERIFY(std::abs(adjusted.perTestAlpha - 0.05 / 3) < 1e-17);
    QCOMPARE(adjusted.contrasts[2].alpha, adjusted.perTestAlpha);
    QVERIFY(adjusted.contrasts[2].power < plain.contrasts[2].power);
    QVERIFY(adjusted.contrasts[2].required.total > plain.contrasts[2].required.total);
    // The omnibus test is one test: never adjusted.
    QCOMPARE(adjusted.omnibus.power, plain.omnibus.power);
}

// The standardized contrast of Kline (2013), Beyond Significance Testing, 2nd ed., ch. 7
// (from memory): psi / sigma with weights whose positive and negative parts each sum to 1;
// for two groups this is Cohen's d.
void TestPower::effectSizeIsStandardizedContrast()
{
    PowerSettings s;
    s.means = {3.0, 1.0, 2.0};
    s.sd = 2.0;
    s.n = {10, 10, 10};
    const PowerReport r = mustCompute(rowsOf({{2, -1, -1}, {1, -1, 0}, {0.5, -0.5, 0}}), s);
    // psi = 6 - 1 - 2 = 3; scaled to a standard set: 3 / 2 = 1.5, over sigma 2: 0.75.
    QCOMPARE(r.contrasts[0].estimate, 3.0);
    QCOMPARE(r.contrasts[0].effectSize, 0.75);
    // se = 2 * sqrt((4 + 1 + 1) / 10), noncentrality = psi / se, df = N - k = 27.
    QVERIFY(std::abs(r.contrasts[0].se - 2.0 * std::sqrt(0.6)) < 1e-15);
    QVERIFY(std::abs(r.contrasts[0].noncentrality - 3.0 / (2.0 * std::sqrt(0.6))) < 1e-14);
    QCOMPARE(r.contrasts[0].df, 27.0);
    // Cohen's d for a pair, and the same for a rescaled row; power does not depend on the scale.
    QCOMPARE(r.contrasts[1].effectSize, 1.0);
    QCOMPARE(r.contrasts[2].effectSize, 1.0);
    QVERIFY(std::abs(r.contrasts[1].power - r.contrasts[2].power) < 1e-15);
    QCOMPARE(r.contrasts[1].required.perLevel, r.contrasts[2].required.perLevel);
}

// Welch (1947) / Satterthwaite (1946): df = (sum a_i)^2 / sum a_i^2 / (n_i - 1), a_i = h_i^2 s_i^2 / n_i.
// Two groups, s = 1 and 2, n = 10 and 20: a = 0.1 and 0.2, df = 0.09 / (0.01/9 + 0.04/19)
// = 27.98... (by hand: 0.09 / 0.0032163742690058 = 27.98181818...).
void TestPower::welchDegreesOfFreedom()
{
    PowerSettings s;
    s.means = {1.0, 0.0};
    s.sds = {1.0, 2.0};
    s.n = {10, 20};
    const PowerReport r = mustCompute(rowsOf({{1, -1}}), s);
    QVERIFY(r.welch);
    QVERIFY(r.contrasts[0].welch);
    QVERIFY(std::abs(r.contrasts[0].df - 0.09 / (0.01 / 9.0 + 0.04 / 19.0)) < 1e-12);
    QVERIFY(std::abs(r.contrasts[0].df - 27.981818181818) < 1e-9);
    QVERIFY(std::abs(r.contrasts[0].se - std::sqrt(0.3)) < 1e-15);
    QVERIFY(r.notes.join(u'\n').contains(u"Welch\u2013Satterthwaite degrees of freedom"_s));
}

void TestPower::omnibusWithPerLevelSdsUsesPooledSd()
{
    PowerSettings s;
    s.means = {0.0, 1.0, 2.0};
    s.sds = {1.0, 2.0, 3.0};
    s.n = {11, 21, 31};
    const PowerReport r = mustCompute(rowsOf({{-1, 0, 1}}), s);
    // Pooled variance: (10 + 80 + 270) / 60 = 6.
    QVERIFY(std::abs(r.omnibus.sd - std::sqrt(6.0)) < 1e-14);
    QVERIFY(r.omnibus.pooledFromLevelSds);
    QCOMPARE(r.omnibus.df2, 60.0);
    // lambda = sum n (mu - mu_w)^2 / 6 with mu_w = (21 + 62) / 63.
    const double w = 83.0 / 63.0;
    const double lambda = (11 * w * w + 21 * (1 - w) * (1 - w) + 31 * (2 - w) * (2 - w)) / 6.0;
    QVERIFY(std::abs(r.omnibus.noncentrality - lambda) < 1e-12);
    QVERIFY(r.omnibus.notes.join(u'\n').contains(u"pooled SD"_s));
}

void TestPower::allocationRatiosScaleGroups()
{
    QCOMPARE(groupSizesFor(10, {1, 2, 3}), (std::vector<long long>{10, 20, 30}));
    QCOMPARE(groupSizesFor(3, {1, 1.5, 1}), (std::vector<long long>{3, 5, 3}));   // 4.5 rounds up
    QCOMPARE(groupSizesFor(3, {1.0 / 3.0, 1}), (std::vector<long long>{3, 9})); // no spurious 10
    QCOMPARE(groupSizesFor(7, {2, 2}), (std::vector<long long>{7, 7}));
    PowerSettings s = fourLevels();
    s.n = {10, 20, 20, 30};
    QCOMPARE(allocationRatios(s, 4), s.n); // planned sizes give the proportions
    s.n.clear();
    s.total = 40;
    QCOMPARE(allocationRatios(s, 4), (std::vector<double>{1, 1, 1, 1}));
    s.ratios = {1, 2, 2, 1};
    QCOMPARE(allocationRatios(s, 4), s.ratios);
    const PowerReport r = mustCompute(againstFirst(), s);
    for (const ContrastPower &c : r.contrasts) {
        const auto &n = c.required.perLevel;
        QCOMPARE(n[1], n[2]);
        QVERIFY(n[1] >= 2 * n[0]);
        QVERIFY(n[1] <= 2 * n[0] + 1);
    }
}

void TestPower::plannedSizesFromRatios()
{
    PowerSettings s = fourLevels();
    s.n.clear();
    s.ratios = {1, 1, 2, 4};
    s.total = 80;
    QCOMPARE(plannedSizes(s, 4), (std::vector<double>{10, 10, 20, 40}));
    const PowerReport r = mustCompute(againstFirst(), s);
    QCOMPARE(r.plannedTotal, 80.0);
    QCOMPARE(r.contrasts[0].df, 76.0);
    QVERIFY(!r.notes.join(u'\n').contains(u"not whole numbers"_s));
    s.total = 81;
    QVERIFY(mustCompute(againstFirst(), s).notes.join(u'\n').contains(u"not whole numbers"_s));
    s.ratios.clear(); // total alone: equal groups
    s.total = 40;
    QCOMPARE(plannedSizes(s, 4), (std::vector<double>{10, 10, 10, 10}));
}

void TestPower::notesExplainSpecialCases()
{
    PowerSettings s = fourLevels();
    s.means = {1.0, 0.0, 1.5, 2.5};
    s.oneSided = true;
    const PowerReport r = mustCompute(againstFirst(), s);
    QVERIFY(r.contrasts[0].estimate < 0);
    QVERIFY(r.contrasts[0].power < s.alpha);
    QVERIFY(r.contrasts[0].notes.join(u'\n').contains(u"the one-sided test looks for a positive one"_s));
    QVERIFY(!r.contrasts[0].required.reachable);
    QCOMPARE(r.contrasts[0].notes.size(), 1);
    QVERIFY(r.notes.join(u'\n').contains(u"one-sided tests look for a positive estimate"_s));
    QVERIFY(r.notes.join(u'\n').contains(u"3 contrasts are tested without adjustment"_s));
    QVERIFY(r.notes.join(u'\n').contains(u"Holm's step-down procedure"_s));

    // A linear trend over four equally spaced means: the linear contrast puts all the
    // differences into one degree of freedom and needs fewer than the 3-df omnibus test.
    PowerSettings trend = fourLevels();
    trend.means = {0.0, 0.2, 0.4, 0.6};
    const PowerReport linear = mustCompute(rowsOf({{-3, -1, 1, 3}, {1, -1, -1, 1}}), trend);
    QVERIFY(linear.contrasts[0].fewerThanOmnibus);
    QVERIFY(linear.contrasts[0].required.total < linear.omnibus.required.total);
    QVERIFY(linear.contrasts[0].notes.join(u'\n').contains(u"fewer than the omnibus F-test needs"_s));
    QVERIFY(!linear.contrasts[1].fewerThanOmnibus); // no quadratic component: estimate 0

    s.means = {2.0, 2.0, 2.0, 2.0};
    s.oneSided = false;
    const PowerReport flat = mustCompute(againstFirst(), s);
    QVERIFY(flat.notes.join(u'\n').contains(u"all expected means are equal"_s));
    QVERIFY(flat.omnibus.notes.join(u'\n').contains(u"power equals alpha at every n"_s));
    QVERIFY(!flat.omnibus.required.reachable);

    // A row that does not sum to 0 tests a level of the means.
    const PowerReport level = mustCompute(rowsOf({{1, 0, 0, 0}}), fourLevels());
    QVERIFY(level.contrasts[0].notes.join(u'\n').contains(u"its weights sum to 1, not 0"_s));
}

void TestPower::unreachableTargetIsReported()
{
    PowerSettings s = fourLevels();
    s.means = {0.0, 1e-5, 0.0, 0.0};
    const PowerReport r = mustCompute(againstFirst(), s);
    const ContrastPower &c = r.contrasts[0];
    QVERIFY(!c.zeroEstimate);
    QVERIFY(!c.required.reachable);
    QVERIFY(c.required.perLevel.empty());
    QVERIFY(c.required.power < 0.8);
    QVERIFY2(c.notes.join(u'\n').contains(u"is not reached with up to 10000000 in the smallest group"_s), qPrintable(c.notes.join(u'\n')));
}

namespace {

struct BadInput
{
    const char *name;
    std::function<void(PowerSettings &, Eigen::MatrixXd &)> change;
    QString message;
};

const std::vector<BadInput> &badInputs()
{
    static const std::vector<BadInput> cases = {
        {"means count", [](PowerSettings &s, Eigen::MatrixXd &) { s.means.pop_back(); },
         u"means: 3 values for 4 levels; give one per level"_s},
        {"means not finite", [](PowerSettings &s, Eigen::MatrixXd &) { s.means[1] = std::nan(""); },
         u"means, item 2: not a finite number"_s},
        {"sd zero", [](PowerSettings &s, Eigen::MatrixXd &) { s.sd = 0; },
         u"sd: 0 is not a positive standard deviation; the SD must be above 0"_s},
        {"sd negative", [](PowerSettings &s, Eigen::MatrixXd &) { s.sd = -1.5; },
         u"sd: -1.5 is not a positive standard deviation; the SD must be above 0"_s},
        {"sds count", [](PowerSettings &s, Eigen::MatrixXd &) { s.sds = {1, 2}; },
         u"sds: 2 values for 4 levels; give one per level"_s},
        {"sds zero", [](PowerSettings &s, Eigen::MatrixXd &) { s.sds = {1, 2, 0, 1}; },
         u"sds, item 3: 0 is not a positive standard deviation; it must be above 0"_s},
        {"n count", [](PowerSettings &s, Eigen::MatrixXd &) { s.n.push_back(5); },
         u"n: 5 values for 4 levels; give one per level"_s},
        {"n below 2", [](PowerSettings &s, Eigen::MatrixXd &) { s.n[1] = 1; },
         u"n, item 2: 1 per level is too few; every level needs at least 2"_s},
        {"n negative", [](PowerSettings &s, Eigen::MatrixXd &) { s.n[0] = -3; },
         u"n, item 1: -3 is not a positive group size; it must be above 0"_s},
        {"n and ratios", [](PowerSettings &s, Eigen::MatrixXd &) { s.ratios = {1, 1, 1, 1}; },
         u"n and ratios: give planned sizes per level, or ratios with a total, not both"_s},
        {"ratios count", [](PowerSettings &s, Eigen::MatrixXd &) { s.n.clear(); s.total = 40; s.ratios = {1, 2, 3}; },
         u"ratios: 3 values for 4 levels; give one per level"_s},
        {"ratio zero", [](PowerSettings &s, Eigen::MatrixXd &) { s.n.clear(); s.total = 40; s.ratios = {0, 1, 1, 1}; },
         u"ratios, item 1: 0 is not a positive ratio; it must be above 0"_s},
        {"no total", [](PowerSettings &s, Eigen::MatrixXd &) { s.n.clear(); s.ratios = {1, 1, 1, 1}; },
         u"total: give the total N (above 0) with the ratios, or planned sizes per level"_s},
        {"total too small", [](PowerSettings &s, Eigen::MatrixXd &) { s.n.clear(); s.total = 10; s.ratios = {1, 1, 1, 3}; },
         u"total: 10 leaves level 1 with 1.667; every level needs at least 2"_s},
        {"alpha zero", [](PowerSettings &s, Eigen::MatrixXd &) { s.alpha = 0; },
         u"alpha: 0 is not between 0 and 1 (both excluded)"_s},
        {"alpha above 1", [](PowerSettings &s, Eigen::MatrixXd &) { s.alpha = 1.5; },
         u"alpha: 1.5 is not between 0 and 1 (both excluded)"_s},
        {"target 1", [](PowerSettings &s, Eigen::MatrixXd &) { s.target = 1; },
         u"target: 1 is not between 0 and 1 (both excluded)"_s},
        {"target at alpha", [](PowerSettings &s, Eigen::MatrixXd &) { s.target = 0.05; },
         u"target: 0.05 is not above alpha (0.05); a target power must exceed alpha"_s},
        {"one level", [](PowerSettings &s, Eigen::MatrixXd &rows) { rows = rowsOf({{1}}); s.means = {1}; },
         u"levels: power needs at least 2 levels, got 1"_s},
        {"zero row", [](PowerSettings &, Eigen::MatrixXd &rows) { rows.row(1).setZero(); },
         u"contrast 2: every weight is 0, so it tests nothing"_s},
        {"weight not finite", [](PowerSettings &, Eigen::MatrixXd &rows) { rows(0, 3) = INFINITY; },
         u"contrast 1: a weight is not a finite number"_s},
    };
    return cases;
}

} // namespace

void TestPower::rejectsInput_data()
{
    QTest::addColumn<int>("index");
    for (size_t i = 0; i < badInputs().size(); ++i)
        QTest::newRow(badInputs()[i].name) << int(i);
}

void TestPower::rejectsInput()
{
    QFETCH(int, index);
    const BadInput &bad = badInputs()[size_t(index)];
    PowerSettings s = fourLevels();
    Eigen::MatrixXd rows = againstFirst();
    bad.change(s, rows);
    const auto r = computePower(rows, {}, s);
    QVERIFY(!r.ok());
    QCOMPARE(r.error(), bad.message);
    const auto curve = powerCurve(rows, 0, s, {10});
    QVERIFY(!curve.ok());
    QCOMPARE(curve.error(), bad.message);
}

void TestPower::messagesCanNameCommandLineArguments()
{
    PowerSettings s = fourLevels();
    s.means.pop_back();
    QCOMPARE(validatePowerSettings(s, 4, u"--"_s).message, u"--means: 3 values for 4 levels; give one per level"_s);
    QCOMPARE(validatePowerSettings(s, 4, u"--"_s).field, u"means"_s);
    s = fourLevels();
    s.ratios = {1, 1, 1, 1};
    QCOMPARE(validatePowerSettings(s, 4, u"--"_s).message, u"--n and --ratios: give planned sizes per level, or ratios with a total, not both"_s);
    QCOMPARE(validatePowerSettings(s, 4, u"--"_s).field, u"n"_s);
    QVERIFY(validatePowerSettings(fourLevels(), 4).isEmpty());
}

void TestPower::powerCurveRejectsInput()
{
    const auto badIndex = powerCurve(againstFirst(), 3, fourLevels(), {10});
    QVERIFY(!badIndex.ok());
    QCOMPARE(badIndex.error(), u"contrast: 3 is not a contrast index; expected -1 (omnibus) to 2"_s);
    const auto badSize = powerCurve(againstFirst(), 0, fourLevels(), {10, 1});
    QVERIFY(!badSize.ok());
    QCOMPARE(badSize.error(), u"sizes, item 2: 1 per level is too few; every level needs at least 2"_s);
    const std::vector<long long> sizes = powerCurveSizes(100, 50);
    QCOMPARE(sizes.front(), 2LL);
    QCOMPARE(sizes.back(), 100LL);
    QCOMPARE(sizes.size(), size_t(50));
    QCOMPARE(powerCurveSizes(5, 60), (std::vector<long long>{2, 3, 4, 5}));
    // The curve at the planned size is the planned power.
    auto curve = powerCurve(againstFirst(), 1, fourLevels(), {20});
    QVERIFY(curve.ok());
    QCOMPARE(curve->front(), mustCompute(againstFirst(), fourLevels()).contrasts[1].power);
}

void TestPower::parseNumberList_data()
{
    QTest::addColumn<QString>("text");
    QTest::addColumn<std::vector<double>>("values");
    QTest::addColumn<QString>("message");
    QTest::newRow("plain") << u"1, 2.5,-3"_s << std::vector<double>{1, 2.5, -3} << QString();
    QTest::newRow("fractions") << u"1/4,1/2"_s << std::vector<double>{0.25, 0.5} << QString();
    QTest::newRow("empty") << u" "_s << std::vector<double>{} << u"--means: no values; expected numbers separated by commas"_s;
    QTest::newRow("letters") << u"1,abc"_s << std::vector<double>{} << u"--means, item 2: weight 'abc' is not a number"_s;
    QTest::newRow("missing item") << u"1,,2"_s << std::vector<double>{} << u"--means, item 2: empty weight"_s;
}

void TestPower::parseNumberList()
{
    QFETCH(QString, text);
    QFETCH(std::vector<double>, values);
    QFETCH(QString, message);
    const auto r = cb::parseNumberList(text, u"--means"_s);
    if (message.isEmpty()) {
        QVERIFY2(r.ok(), qPrintable(r.error()));
        QCOMPARE(*r, values);
    } else {
        QVERIFY(!r.ok());
        QVERIFY2(r.error().startsWith(message), qPrintable(r.error()));
    }
}

void TestPower::meansFromDifferences()
{
    QCOMPARE(cb::meansFromDifferences({0.5, 1.0}, 0), (std::vector<double>{0.0, 0.5, 1.0}));
    QCOMPARE(cb::meansFromDifferences({0.5, 1.0}, 2), (std::vector<double>{0.5, 1.0, 0.0}));
    QCOMPARE(cb::meansFromDifferences({0.5, 1.0}, 1), (std::vector<double>{0.5, 0.0, 1.0}));
}

void TestPower::contrastRowsOfAnalysis()
{
    Factor f;
    f.name = u"dose"_s;
    f.levels = {u"none"_s, u"low"_s, u"high"_s};
    const auto scheme = makeScheme(f, SchemeKind::Treatment);
    QVERIFY2(scheme.ok(), qPrintable(scheme.error()));
    const Analysis a = analyze(*scheme);
    const auto rows = contrastRowsOf(a);
    QVERIFY2(rows.ok(), qPrintable(rows.error()));
    // Treatment coding against "none": each coefficient is a level minus the reference.
    QCOMPARE(rows->rows.rows(), Eigen::Index(2));
    QVERIFY(rows->rows.isApprox(rowsOf({{-1, 1, 0}, {-1, 0, 1}})));
    QCOMPARE(rows->names, a.columnNames);

    Analysis deficient;
    deficient.rank = 2;
    deficient.coefficientCount = 3;
    const auto none = contrastRowsOf(deficient);
    QVERIFY(!none.ok());
    QVERIFY(none.error().startsWith(u"scheme: the coding is rank deficient (rank 2 of 3 coefficients)"_s));
}

void TestPower::jsonHasTheIssueKeys()
{
    PowerSettings s = fourLevels();
    const PowerReport r = mustCompute(againstFirst(), s);
    const QJsonObject o = powerReportToJson(r);
    const QJsonArray contrasts = o[u"contrasts"_s].toArray();
    QCOMPARE(contrasts.size(), 3);
    for (const QString &key : {u"name"_s, u"estimate"_s, u"se"_s, u"effect_size"_s, u"noncentrality"_s, u"df"_s,
                               u"power"_s, u"n_required"_s, u"n_required_total"_s})
        QVERIFY2(contrasts[0].toObject().contains(key), qPrintable(key));
    const QJsonObject c0 = contrasts[0].toObject();
    QCOMPARE(c0[u"estimate"_s].toDouble(), 0.5);
    QCOMPARE(c0[u"power"_s].toDouble(), r.contrasts[0].power);
    QCOMPARE(c0[u"n_required"_s].toArray().size(), 4);
    QCOMPARE(c0[u"n_required"_s].toArray()[0].toInteger(), r.contrasts[0].required.perLevel[0]);
    const QJsonObject omnibus = o[u"omnibus"_s].toObject();
    for (const QString &key : {u"df1"_s, u"df2"_s, u"effect_size"_s, u"noncentrality"_s, u"power"_s, u"n_required"_s})
        QVERIFY2(omnibus.contains(key), qPrintable(key));
    QCOMPARE(omnibus[u"df1"_s].toInt(), 3);
    QCOMPARE(o[u"adjustment"_s].toString(), u"none"_s);
    QCOMPARE(o[u"cautions"_s].toArray().size(), r.cautions.size());

    s.means = {1, 1, 1, 1};
    const QJsonObject flat = powerReportToJson(mustCompute(againstFirst(), s));
    QVERIFY(flat[u"contrasts"_s].toArray()[0].toObject()[u"n_required"_s].isNull());
    QVERIFY(flat[u"omnibus"_s].toObject()[u"n_required"_s].isNull());
}

void TestPower::cautionsAreProvided()
{
    const QStringList c = powerCautions();
    QCOMPARE(c.size(), 4);
    QVERIFY(c.join(u'\n').contains(u"expected means and SDs"_s));
    QVERIFY(c.join(u'\n').contains(u"before the data are seen"_s));
    QVERIFY(c.join(u'\n').contains(u"adjustment"_s));
    QVERIFY(c.join(u'\n').contains(u"statistician's review"_s));
    QCOMPARE(mustCompute(againstFirst(), fourLevels()).cautions, c);
    QVERIFY(adjustmentFromId(u"Sidak"_s) == Adjustment::Sidak);
    QVERIFY(adjustmentFromId(u" holm "_s) == Adjustment::Holm);
    QVERIFY(!adjustsPower(Adjustment::Holm)); // Holm needs observed p-values: power refuses it
    QCOMPARE(adjustmentTitle(Adjustment::Sidak), u"\u0160id\u00e1k"_s);
}

namespace {

struct CliRun
{
    int exitCode = -1;
    QString out;
    QString err;
};

// Runs the built contrast-bench-cli with "power" and the arguments.
CliRun runCli(const QStringList &args)
{
    const cb::test::ProcessRun r = cb::test::runCli(QStringList{u"power"_s} + args);
    if (!r.started)
        qFatal("could not run contrast-bench-cli in %s/app", CB_BINARY_DIR);
    return {r.exitCode, r.outText(), r.errText()};
}

const QStringList kCliCase = {u"--levels"_s, u"control,low,high"_s, u"--scheme"_s, u"treatment"_s, u"--means"_s,
                              u"0,0.5,0.8"_s, u"--sd"_s, u"1"_s, u"--n"_s, u"20,20,20"_s, u"--adjust"_s, u"sidak"_s};

} // namespace

// The command line gives the same figures as computePower on the treatment rows
// (level minus control), which the SciPy comparisons above check.
void TestPower::commandLineJson()
{
    const CliRun run = runCli(kCliCase + QStringList{u"--json"_s});
    QVERIFY2(run.exitCode == 0, qPrintable(run.err));
    QJsonParseError error;
    const QJsonObject o = QJsonDocument::fromJson(run.out.toUtf8(), &error).object();
    QVERIFY2(error.error == QJsonParseError::NoError, qPrintable(error.errorString()));

    PowerSettings s;
    s.means = {0.0, 0.5, 0.8};
    s.n = {20, 20, 20};
    s.adjustment = Adjustment::Sidak;
    const PowerReport r = mustCompute(rowsOf({{-1, 1, 0}, {-1, 0, 1}}), s);
    const QJsonArray contrasts = o[u"contrasts"_s].toArray();
    QCOMPARE(contrasts.size(), 2);
    for (int c = 0; c < 2; ++c) {
        const QJsonObject j = contrasts[c].toObject();
        const ContrastPower &cp = r.contrasts[size_t(c)];
        QCOMPARE(j[u"estimate"_s].toDouble(), cp.estimate);
        QCOMPARE(j[u"se"_s].toDouble(), cp.se);
        QCOMPARE(j[u"effect_size"_s].toDouble(), cp.effectSize);
        QCOMPARE(j[u"noncentrality"_s].toDouble(), cp.noncentrality);
        QCOMPARE(j[u"df"_s].toDouble(), 57.0);
        QCOMPARE(j[u"power"_s].toDouble(), cp.power);
        QCOMPARE(j[u"n_required"_s].toArray().size(), 3);
        QCOMPARE(j[u"n_required"_s].toArray()[1].toInteger(), cp.required.perLevel[1]);
        QCOMPARE(j[u"n_required_total"_s].toInteger(), cp.required.total);
    }
    QCOMPARE(o[u"alpha_per_test"_s].toDouble(), 1.0 - std::pow(0.95, 0.5));
    const QJsonObject omnibus = o[u"omnibus"_s].toObject();
    QCOMPARE(omnibus[u"power"_s].toDouble(), r.omnibus.power);
    QCOMPARE(omnibus[u"df2"_s].toDouble(), 57.0);
    QCOMPARE(omnibus[u"n_required_total"_s].toInteger(), r.omnibus.required.total);
    QCOMPARE(o[u"scheme"_s].toString(), u"treatment"_s);
}

void TestPower::commandLineReport()
{
    const CliRun run = runCli(kCliCase);
    QVERIFY2(run.exitCode == 0, qPrintable(run.err));
    QVERIFY(run.out.contains(u"Omnibus F-test (df 2 and 57"_s));
    QVERIFY(run.out.contains(u"Planned n: 20, 20, 20 (N = 60)"_s));
    QVERIFY(run.out.contains(u"Cautions:"_s));
    QVERIFY(run.out.contains(u"Holm's step-down procedure"_s));
}

// A scheme file with planned sizes 10, 20, 30: the command line plans with them
// (df = 60 - 3), and refuses a --total beside them.
void TestPower::commandLineReadsSchemeFile()
{
    Factor f;
    f.name = u"dose"_s;
    f.levels = {u"none"_s, u"low"_s, u"high"_s};
    f.plannedN = {10, 20, 30};
    const auto scheme = makeScheme(f, SchemeKind::Helmert);
    QVERIFY2(scheme.ok(), qPrintable(scheme.error()));
    QTemporaryDir dir;
    const QString path = dir.filePath(u"dose.json"_s);
    QCOMPARE(saveScheme(*scheme, path), QString());

    const QStringList args = {u"--file"_s, path, u"--means"_s, u"0,0.4,0.9"_s, u"--sd"_s, u"1.2"_s};
    const CliRun run = runCli(args + QStringList{u"--json"_s});
    QVERIFY2(run.exitCode == 0, qPrintable(run.err));
    const QJsonObject o = QJsonDocument::fromJson(run.out.toUtf8()).object();
    QCOMPARE(o[u"planned_total"_s].toDouble(), 60.0);
    const QJsonArray contrasts = o[u"contrasts"_s].toArray();
    QCOMPARE(contrasts.size(), 2);
    QCOMPARE(contrasts[0].toObject()[u"df"_s].toDouble(), 57.0);

    PowerSettings s;
    s.means = {0.0, 0.4, 0.9};
    s.sd = 1.2;
    s.n = {10, 20, 30};
    const auto rows = contrastRowsOf(analyze(*scheme));
    QVERIFY(rows.ok());
    const auto r = computePower(rows->rows, rows->names, s);
    QVERIFY(r.ok());
    for (int c = 0; c < 2; ++c) {
        QCOMPARE(contrasts[c].toObject()[u"name"_s].toString(), r->contrasts[size_t(c)].name);
        QCOMPARE(contrasts[c].toObject()[u"power"_s].toDouble(), r->contrasts[size_t(c)].power);
        // Sizes keep the planned proportions 1 : 2 : 3.
        const QJsonArray n = contrasts[c].toObject()[u"n_required"_s].toArray();
        QCOMPARE(n[1].toInteger(), 2 * n[0].toInteger());
        QCOMPARE(n[2].toInteger(), 3 * n[0].toInteger());
    }

    const CliRun clash = runCli(args + QStringList{u"--total"_s, u"90"_s});
    QCOMPARE(clash.exitCode, 2);
    QVERIFY2(clash.err.contains(u"--total: the planned sizes are already given (--n or the scheme file)"_s), qPrintable(clash.err));
}

// A balanced 2 x 2 design with centred +-1/2 coding on both factors: power per design column over
// the four cells. Reference values from SciPy (scipy.stats.nct, df = 40 - 4 = 36, two-sided alpha .05):
// main effect of A, psi = 1, SE = sqrt(1/10): 0.8679842825949;
// interaction (difference of differences), psi = 1, SE = sqrt(4/10): 0.3371329261052971.
void TestPower::commandLineReadsDesignFile()
{
    const auto factor = [](const QString &name, const QStringList &levels, const QString &column) {
        Scheme s;
        s.kind = SchemeKind::Custom;
        s.factor.name = name;
        s.factor.levels = levels;
        s.columns.push_back(Column{column, {Weight::exact(Rational(-1, 2)), Weight::exact(Rational(1, 2))}});
        return s;
    };
    Design d;
    d.factors = {factor(u"A"_s, {u"a1"_s, u"a2"_s}, u"a2 vs a1"_s), factor(u"B"_s, {u"b1"_s, u"b2"_s}, u"b2 vs b1"_s)};
    d.terms = Design::fullFactorial(2);
    d.cellN = {10, 10, 10, 10};
    QTemporaryDir dir;
    const QString path = dir.filePath(u"design.json"_s);
    QFile f(path);
    QVERIFY(f.open(QIODevice::WriteOnly));
    f.write(designToJson(d));
    f.close();

    // Cells a1:b1, a1:b2, a2:b1, a2:b2.
    const CliRun run = runCli({u"--file"_s, path, u"--means"_s, u"0,0.5,0.5,2"_s, u"--sd"_s, u"1"_s, u"--json"_s});
    QVERIFY2(run.exitCode == 0, qPrintable(run.err));
    const QJsonObject o = QJsonDocument::fromJson(run.out.toUtf8()).object();
    QCOMPARE(o[u"level_names"_s].toArray().size(), 4);
    QCOMPARE(o[u"level_names"_s].toArray()[1].toString(), u"a1\u00b7b2"_s);
    const QJsonArray contrasts = o[u"contrasts"_s].toArray();
    QCOMPARE(contrasts.size(), 3);
    const QJsonObject mainA = contrasts[0].toObject(), interaction = contrasts[2].toObject();
    QCOMPARE(mainA[u"df"_s].toDouble(), 36.0);
    QCOMPARE(mainA[u"estimate"_s].toDouble(), 1.0);
    QVERIFY(std::abs(mainA[u"power"_s].toDouble() - 0.8679842825949) < 1e-9);
    QCOMPARE(interaction[u"estimate"_s].toDouble(), 1.0);
    QVERIFY(std::abs(interaction[u"power"_s].toDouble() - 0.3371329261052971) < 1e-9);
    QVERIFY(o[u"notes"_s].toArray().first().toString().startsWith(u"a design of 4 cells"_s));

    // An empty cell whose loss leaves the terms inestimable is refused, naming the file, the cell
    // and the reason (an estimable one: TestEmptyCells::powerAndExportOverTheCellsWithObservations).
    d.cellN = {10, 0, 10, 10};
    QVERIFY(f.open(QIODevice::WriteOnly | QIODevice::Truncate));
    f.write(designToJson(d));
    f.close();
    const CliRun empty = runCli({u"--file"_s, path, u"--means"_s, u"0,0.5,0.5,2"_s, u"--sd"_s, u"1"_s});
    QCOMPARE(empty.exitCode, 2);
    QVERIFY2(empty.err.contains(path + u": empty cell (planned n = 0): a1\u00b7b2. The chosen terms cannot be estimated"_s), qPrintable(empty.err));
}

void TestPower::commandLineRejectsInput_data()
{
    QTest::addColumn<QStringList>("args");
    QTest::addColumn<QString>("message");
    const QStringList levels = {u"--levels"_s, u"a,b,c"_s, u"--scheme"_s, u"treatment"_s};
    const QStringList sizes = {u"--n"_s, u"10,10,10"_s};
    const QStringList ok = levels + sizes + QStringList{u"--means"_s, u"0,1,2"_s, u"--sd"_s, u"1"_s};
    QTest::newRow("means count") << levels + sizes + QStringList{u"--means"_s, u"0,1"_s, u"--sd"_s, u"1"_s}
                                 << u"--means: 2 values for 3 levels; give one per level"_s;
    QTest::newRow("means not a number") << levels + sizes + QStringList{u"--means"_s, u"0,x,1"_s, u"--sd"_s, u"1"_s}
                                        << u"--means, item 2: weight 'x' is not a number"_s;
    QTest::newRow("no means") << levels + sizes + QStringList{u"--sd"_s, u"1"_s}
                              << u"give the expected level means with --means, or differences from a baseline with --differences"_s;
    QTest::newRow("no sd") << levels + sizes + QStringList{u"--means"_s, u"0,1,2"_s}
                           << u"give the expected SD with --sd, or one per level with --sds"_s;
    QTest::newRow("sd zero") << levels + sizes + QStringList{u"--means"_s, u"0,1,2"_s, u"--sd"_s, u"0"_s}
                             << u"--sd: 0 is not a positive standard deviation; the SD must be above 0"_s;
    QTest::newRow("sd and sds") << ok + QStringList{u"--sds"_s, u"1,1,1"_s}
                                << u"--sd and --sds: give a common SD or one per level, not both"_s;
    QTest::newRow("n below 2") << levels + QStringList{u"--n"_s, u"10,1,10"_s, u"--means"_s, u"0,1,2"_s, u"--sd"_s, u"1"_s}
                               << u"--n, item 2: 1 per level is too few; every level needs at least 2"_s;
    QTest::newRow("no sizes") << levels + QStringList{u"--means"_s, u"0,1,2"_s, u"--sd"_s, u"1"_s}
                              << u"give planned sizes per level with --n, or a total N with --total (and --ratios)"_s;
    QTest::newRow("ratios without total") << levels + QStringList{u"--means"_s, u"0,1,2"_s, u"--sd"_s, u"1"_s, u"--ratios"_s, u"1,2,1"_s}
                                          << u"--ratios: give the total N with --total"_s;
    QTest::newRow("total with n") << ok + QStringList{u"--total"_s, u"30"_s}
                                  << u"--total: the planned sizes are already given"_s;
    QTest::newRow("alpha twice") << ok + QStringList{u"--alpha"_s, u"0.05,0.1"_s} << u"--alpha: give one number, got 2"_s;
    QTest::newRow("alpha out of range") << ok + QStringList{u"--alpha"_s, u"1.2"_s}
                                        << u"--alpha: 1.2 is not between 0 and 1 (both excluded)"_s;
    QTest::newRow("target below alpha") << ok + QStringList{u"--target"_s, u"0.01"_s}
                                        << u"--target: 0.01 is not above alpha (0.05); a target power must exceed alpha"_s;
    QTest::newRow("unknown adjustment") << ok + QStringList{u"--adjust"_s, u"holm"_s}
                                        << u"--adjust: unknown adjustment 'holm'; expected none, bonferroni or sidak"_s;
    QTest::newRow("differences count") << levels + sizes + QStringList{u"--differences"_s, u"1"_s, u"--sd"_s, u"1"_s}
                                       << u"--differences: 1 value(s) for 3 levels; give one for each level other than the baseline 'a' (2)"_s;
    QTest::newRow("unknown baseline") << levels + sizes + QStringList{u"--differences"_s, u"1,2"_s, u"--baseline"_s, u"z"_s, u"--sd"_s, u"1"_s}
                                      << u"--baseline: 'z' is not one of the levels (a, b, c)"_s;
    QTest::newRow("ratio zero") << levels + QStringList{u"--means"_s, u"0,1,2"_s, u"--sd"_s, u"1"_s, u"--ratios"_s, u"1,0,1"_s, u"--total"_s, u"30"_s}
                                << u"--ratios, item 2: 0 is not a positive ratio; it must be above 0"_s;
    // Magnitudes whose squares or ratios overflow are refused (issue 21, class 4).
    QTest::newRow("sd tiny") << levels + sizes + QStringList{u"--means"_s, u"0,1,2"_s, u"--sd"_s, u"1e-300"_s}
                             << u"--sd, item 1: 1e-300 is beyond what power can be computed for; give magnitudes from 1e-100 to 1e100"_s;
    QTest::newRow("sds huge") << levels + sizes + QStringList{u"--means"_s, u"0,1,2"_s, u"--sds"_s, u"1,1,1e300"_s}
                              << u"--sds, item 3: 1e+300 is beyond what power can be computed for"_s;
    QTest::newRow("means far apart in SDs") << levels + sizes + QStringList{u"--means"_s, u"0,1,1e99"_s, u"--sd"_s, u"1e-90"_s}
                                            << u"--means: the means differ by 1e+189 SDs, beyond what power can be computed for (at most 1e100)"_s;
    QTest::newRow("unknown option") << ok + QStringList{u"--power"_s, u"0.9"_s} << u"Unknown option 'power'"_s;
}

void TestPower::commandLineRejectsInput()
{
    QFETCH(QStringList, args);
    QFETCH(QString, message);
    const CliRun run = runCli(args);
    QCOMPARE(run.exitCode, 2);
    QVERIFY2(run.err.contains(message), qPrintable(run.err));
    QVERIFY(run.out.isEmpty());
}

// Boost.Math's non_central_beta truncates lambda / 2 to an int with its default (throwing) policy,
// whatever policy the distribution was given: a noncentrality above about 4.3e9 threw a
// rounding_error that aborted the process. Such inputs now give NaN and a note.
void TestPower::libraryErrorsBecomeUnreliableResults_data()
{
    QTest::addColumn<double>("lambda");
    QTest::addColumn<double>("df2");
    QTest::newRow("lambda 5e9") << 5e9 << 2e10;
    QTest::newRow("lambda 1e12") << 1e12 << 100.0;
    QTest::newRow("lambda 1e300") << 1e300 << 1e300;
}

void TestPower::libraryErrorsBecomeUnreliableResults()
{
    QFETCH(double, lambda);
    QFETCH(double, df2);
    QVERIFY(std::isnan(fTestPower(lambda, 1.0, df2, 0.05)));

    PowerSettings s;
    s.means = {0.0, 1.0};
    s.sd = 1.0;
    s.n = {1e10, 1e10};
    const PowerReport r = mustCompute(rowsOf({{-1, 1}}), s);
    QVERIFY(std::isnan(r.omnibus.power));
    QVERIFY2(r.omnibus.notes.join(u' ').contains(u"could not be evaluated (noncentral F with noncentrality 5e+09"_s),
             qPrintable(r.omnibus.notes.join(u'|')));
    QVERIFY(r.omnibus.notes.join(u' ').contains(u"not reliable"_s));
    // The search still finds the smallest sizes: d = 1 needs 17 per level (Cohen 1988, Table 2.4.1, written from memory;
    // the exact noncentral t gives the same).
    QVERIFY(r.omnibus.required.reachable);
    QCOMPARE(r.omnibus.required.perLevel, (std::vector<long long>{17, 17}));
}

void TestPower::commandLineSurvivesLibraryErrors()
{
    const QStringList base = {u"--levels"_s, u"a,b"_s, u"--scheme"_s, u"treatment"_s, u"--means"_s, u"0,1"_s, u"--sd"_s, u"1"_s};
    for (const QStringList &extra : {QStringList{u"-n"_s, u"1e10,1e10"_s}, QStringList{u"--total"_s, u"100"_s, u"--alpha"_s, u"1e-300"_s},
                                     QStringList{u"-n"_s, u"1e10,1e10"_s, u"--json"_s}}) {
        const CliRun run = runCli(base + extra);
        QVERIFY2(run.exitCode == 0, qPrintable(extra.join(u' ') + u": "_s + run.err));
        static const QRegularExpression nonFinite(u"\\b(nan|inf|infinity)\\b"_s, QRegularExpression::CaseInsensitiveOption);
        QVERIFY2(!run.out.contains(nonFinite), qPrintable(run.out));
    }
}

QTEST_GUILESS_MAIN(TestPower)
#include "TestPower.moc"
