// The power planner's inputs belong to the study: saved in study files under "power", read back
// as typed, checked against the study's levels with messages that name the field, and read into
// the numbers core's power functions take by the one reader the window and the command line use.

#include "core/files/StudyFile.h"
#include "core/model/PowerPlan.h"
#include "core/model/SchemeEdits.h"
#include "core/model/Study.h"
#include "core/power/Power.h"
#include "core/power/PowerPlanSettings.h"

#include <QJsonArray>
#include <QJsonDocument>
#include <QJsonObject>
#include <QTest>

#include <cmath>

using namespace Qt::StringLiterals;
using namespace cb;

namespace {

Study demo(const QString &name)
{
    auto study = loadStudy(QStringLiteral(CB_SOURCE_DIR "/resources/demos/") + name + u".json"_s);
    if (!study)
        qFatal("%s", qPrintable(study.error()));
    return study.take();
}

// The irrigation demo (5 schedules, 8 plots each) planned with means 10, 12, ..., 18 and SD 4.
PowerPlan irrigationPlan(const Study &study)
{
    PowerPlan plan;
    const QStringList levels = study.powerLevelNames();
    for (int i = 0; i < levels.size(); ++i)
        plan.levels[levels[i]].expected = QString::number(10 + 2 * i);
    plan.sd = u"4"_s;
    return plan;
}

// A file of `study` with its "power" object changed by `edit`.
QByteArray withPower(const Study &study, const std::function<void(QJsonObject &)> &edit)
{
    QJsonObject root = QJsonDocument::fromJson(studyToJson(study)).object();
    QJsonObject power = root.value(u"power"_s).toObject();
    edit(power);
    root[u"power"_s] = power;
    return QJsonDocument(root).toJson();
}

} // namespace

class TestPowerPlan : public QObject
{
    Q_OBJECT

private slots:
    void aStudyWithoutAPlanWritesWhatItWroteBefore();
    void planRoundTripsThroughTheFile_data();
    void planRoundTripsThroughTheFile();
    void badPlanIsRefusedNamingTheField_data();
    void badPlanIsRefusedNamingTheField();
    void renamedLevelLosesOnlyItsValues();
    void settingsFromThePlan();
    void settingsNameTheLevelThatIsMissing();
    void planGivesTheTextbookPower();
};

void TestPowerPlan::aStudyWithoutAPlanWritesWhatItWroteBefore()
{
    // Files saved before plans were saved, and studies never planned, keep their bytes: no "power".
    for (const QString &name : {u"irrigation"_s, u"warmup"_s, u"hedgerow"_s}) {
        const Study study = demo(name);
        QVERIFY(study.power.isDefault());
        QVERIFY(!QJsonDocument::fromJson(studyToJson(study)).object().contains(u"power"_s));
    }
}

void TestPowerPlan::planRoundTripsThroughTheFile_data()
{
    QTest::addColumn<QString>("demoName");
    QTest::addRow("one factor, between") << u"irrigation"_s;
    QTest::addRow("mixed design, by cell") << u"warmup"_s;
}

void TestPowerPlan::planRoundTripsThroughTheFile()
{
    QFETCH(QString, demoName);
    Study study = demo(demoName);
    const QStringList levels = study.powerLevelNames();
    PowerPlan plan;
    plan.levels[levels[0]] = {u"10"_s, u"3.5"_s, u"2"_s};
    plan.levels[levels[2]] = {u"12,5"_s, {}, u"1"_s}; // not a number yet: kept as typed
    plan.differences = true;
    plan.baseline = levels[2];
    plan.sd = u"6"_s;
    plan.perLevelSd = true;
    plan.sizes = PowerPlan::Sizes::Ratios;
    plan.total = u"60"_s;
    plan.correlation = u"0.6"_s;
    plan.fullMatrix = true;
    plan.correlations = u"1, 0.6, 0.4\n0.6, 1, 0.5\n0.4, 0.5, 1"_s;
    plan.alpha = u"0.01"_s;
    plan.target = u"0.9"_s;
    plan.oneSided = true;
    plan.adjustment = u"sidak"_s;
    study = withPowerPlan(study, plan);
    QCOMPARE(study.power, plan);

    const QByteArray bytes = studyToJson(study);
    auto back = studyFromJson(bytes, u"plan.json"_s);
    QVERIFY2(back.ok(), qPrintable(back.error()));
    QVERIFY(back->power == plan);
    QVERIFY(*back == study);
    QCOMPARE(studyToJson(*back), bytes); // the same bytes come out again
}

void TestPowerPlan::badPlanIsRefusedNamingTheField_data()
{
    QTest::addColumn<QString>("field");
    QTest::addColumn<QJsonValue>("value");
    QTest::addColumn<QString>("message");
    QTest::addRow("alpha not a number") << u"alpha"_s << QJsonValue(true) << u"field 'power.alpha': expected a number"_s;
    QTest::addRow("sizes unknown") << u"sizes"_s << QJsonValue(u"some"_s) << u"field 'power.sizes': expected factor, planned or ratios"_s;
    QTest::addRow("Holm for power") << u"adjustment"_s << QJsonValue(u"holm"_s)
                                    << u"field 'power.adjustment': expected none, bonferroni or sidak"_s;
    QTest::addRow("sided") << u"sided"_s << QJsonValue(u"left"_s) << u"field 'power.sided': expected \"two\" or \"one\""_s;
    QTest::addRow("flag") << u"sd_per_level"_s << QJsonValue(u"yes"_s) << u"field 'power.sd_per_level': expected true or false"_s;
    QTest::addRow("baseline not a level") << u"baseline"_s << QJsonValue(u"rain"_s)
                                          << u"field 'power.baseline': 'rain' is not a level of the study"_s;
    QTest::addRow("levels not an array") << u"levels"_s << QJsonValue(3) << u"field 'power.levels': expected an array"_s;
    QTest::addRow("level unknown") << u"levels"_s
                                   << QJsonValue(QJsonArray{QJsonObject{{u"level"_s, u"none"_s}, {u"expected"_s, 1}},
                                                            QJsonObject{{u"level"_s, u"hose"_s}, {u"expected"_s, u"2"_s}}})
                                   << u"field 'power.levels[1].level': 'hose' is not a level of the study; expected one of none, "_s;
    QTest::addRow("level twice") << u"levels"_s
                                 << QJsonValue(QJsonArray{QJsonObject{{u"level"_s, u"none"_s}}, QJsonObject{{u"level"_s, u"none"_s}}})
                                 << u"field 'power.levels[1].level': 'none' is given twice"_s;
    QTest::addRow("level value") << u"levels"_s
                                 << QJsonValue(QJsonArray{QJsonObject{{u"level"_s, u"none"_s}, {u"sd"_s, QJsonArray{}}}})
                                 << u"field 'power.levels[0].sd': expected a number"_s;
}

void TestPowerPlan::badPlanIsRefusedNamingTheField()
{
    QFETCH(QString, field);
    QFETCH(QJsonValue, value);
    QFETCH(QString, message);
    const Study study = withPowerPlan(demo(u"irrigation"_s), irrigationPlan(demo(u"irrigation"_s)));
    const QByteArray bytes = withPower(study, [&](QJsonObject &power) { power[field] = value; });
    const auto loaded = studyFromJson(bytes, u"study.json"_s);
    QVERIFY(!loaded.ok());
    QVERIFY2(loaded.error().startsWith(u"study.json: "_s), qPrintable(loaded.error()));
    QVERIFY2(loaded.error().contains(message), qPrintable(loaded.error()));

    QJsonObject root = QJsonDocument::fromJson(studyToJson(study)).object();
    root[u"power"_s] = 12;
    const auto notObject = studyFromJson(QJsonDocument(root).toJson(), u"study.json"_s);
    QVERIFY(!notObject.ok());
    QVERIFY2(notObject.error().contains(u"field 'power': expected an object"_s), qPrintable(notObject.error()));
}

void TestPowerPlan::renamedLevelLosesOnlyItsValues()
{
    Study study = demo(u"irrigation"_s);
    study = withPowerPlan(study, irrigationPlan(study));
    study.power.baseline = u"weekly furrow"_s;
    study = withPowerPlan(study, study.power);
    auto renamed = edits::withLevelName(study.activeScheme(), 3, u"weekly flood"_s);
    QVERIFY2(renamed.ok(), qPrintable(renamed.error()));
    const Study next = consistent(withActiveScheme(study, renamed.take())); // as every edit of the window is settled
    QVERIFY(!next.power.levels.contains(u"weekly furrow"_s));
    QVERIFY(!next.power.levels.contains(u"weekly flood"_s)); // a renamed level starts empty
    QCOMPARE(next.power.levels.size(), 4);
    QCOMPARE(next.power.levels.value(u"fortnightly furrow"_s).expected, u"18"_s);
    QVERIFY(next.power.baseline.isEmpty()); // the first level again
}

void TestPowerPlan::settingsFromThePlan()
{
    const Study study = demo(u"irrigation"_s);
    PowerPlan plan = irrigationPlan(study);
    auto s = settingsFromPlan(plan, study.activeScheme().factor);
    QVERIFY2(s.ok(), qPrintable(s.error()));
    QCOMPARE(s->means, (std::vector<double>{10, 12, 14, 16, 18}));
    QCOMPARE(s->sd, 4.0);
    QCOMPARE(s->n, (std::vector<double>{8, 8, 8, 8, 8})); // the demo's planned n
    QCOMPARE(s->alpha, 0.05);
    QCOMPARE(s->target, 0.8);
    QVERIFY(!s->within());

    // Differences from 'weekly furrow' (its own value is not read), per-level SDs, ratios with a total.
    plan.differences = true;
    plan.baseline = u"weekly furrow"_s;
    plan.levels[u"weekly furrow"_s].expected = u"not read"_s;
    const QStringList levels = study.powerLevelNames();
    for (int i = 0; i < levels.size(); ++i) {
        plan.levels[levels[i]].sd = QString::number(i + 1);
        plan.levels[levels[i]].ratio = i == 0 ? u"2"_s : u"1"_s;
    }
    plan.perLevelSd = true;
    plan.sizes = PowerPlan::Sizes::Ratios;
    plan.total = u"60"_s;
    plan.adjustment = u"bonferroni"_s;
    plan.oneSided = true;
    s = settingsFromPlan(plan, study.activeScheme().factor);
    QVERIFY2(s.ok(), qPrintable(s.error()));
    QCOMPARE(s->means, (std::vector<double>{10, 12, 14, 0, 18}));
    QCOMPARE(s->sds, (std::vector<double>{1, 2, 3, 4, 5}));
    QVERIFY(s->n.empty());
    QCOMPARE(s->ratios, (std::vector<double>{2, 1, 1, 1, 1}));
    QCOMPARE(s->total, 60.0);
    QCOMPARE(s->adjustment, Adjustment::Bonferroni);
    QVERIFY(s->oneSided);

    // A mixed design: participants and the correlation are read.
    const Study warmup = demo(u"warmup"_s);
    PowerPlan within;
    for (const QString &cell : warmup.powerLevelNames())
        within.levels[cell].expected = u"10"_s;
    within.sd = u"6"_s;
    within.correlation = u"0.6"_s;
    Factor cells;
    cells.levels = warmup.powerLevelNames();
    cells.plannedN = std::vector<Rational>(size_t(cells.levels.size()), Rational(12));
    s = settingsFromPlan(within, cells, mixedLayout(warmup.design));
    QVERIFY2(s.ok(), qPrintable(s.error()));
    QVERIFY(s->within());
    QCOMPARE(s->correlation, 0.6);
}

void TestPowerPlan::settingsNameTheLevelThatIsMissing()
{
    const Study study = demo(u"irrigation"_s);
    PowerPlan plan = irrigationPlan(study);
    plan.levels[u"daily drip"_s].expected.clear();
    auto s = settingsFromPlan(plan, study.activeScheme().factor);
    QVERIFY(!s.ok());
    QCOMPARE(s.problem().field, u"means"_s);
    QCOMPARE(s.error(), u"means, level \u2018daily drip\u2019: no value; type a number"_s);

    plan = irrigationPlan(study);
    plan.alpha = u"1.5"_s;
    s = settingsFromPlan(plan, study.activeScheme().factor);
    QVERIFY(!s.ok());
    QCOMPARE(s.problem().field, u"alpha"_s);

    plan = irrigationPlan(study);
    plan.adjustment = u"holm"_s;
    s = settingsFromPlan(plan, study.activeScheme().factor);
    QVERIFY(!s.ok());
    QCOMPARE(s.problem().field, u"adjustment"_s);
}

void TestPowerPlan::planGivesTheTextbookPower()
{
    // The irrigation demo's first column, 'irrigated vs none' (none against the mean of the four
    // irrigated schedules): estimate 5, SE 4 sqrt(1/8 + 4/(16*8)) = sqrt(2.5) by hand, 35 df.
    // SciPy 1.10 (Debian 12): t = stats.t.ppf(0.975, 35); nc = 5/sqrt(2.5);
    // stats.nct.sf(t, 35, nc) + stats.nct.cdf(-t, 35, nc) = 0.8674559009999316; the omnibus
    // F test with lambda = 20: stats.ncf.sf(stats.f.ppf(0.95, 4, 35), 4, 35, 20) = 0.9357913099733473.
    const Study study = demo(u"irrigation"_s);
    auto s = settingsFromPlan(irrigationPlan(study), study.activeScheme().factor);
    QVERIFY(s.ok());
    Eigen::MatrixXd rows(1, 5);
    rows << -1, 0.25, 0.25, 0.25, 0.25;
    auto report = computePower(rows, {u"irrigated vs none"_s}, *s);
    QVERIFY2(report.ok(), qPrintable(report.error()));
    QVERIFY(std::abs(report->contrasts[0].se - std::sqrt(2.5)) < 1e-12);
    QVERIFY(std::abs(report->contrasts[0].power - 0.8674559009999316) < 1e-9);
    QVERIFY(std::abs(report->omnibus.power - 0.9357913099733473) < 1e-9);
}

QTEST_APPLESS_MAIN(TestPowerPlan)
#include "TestPowerPlan.moc"
