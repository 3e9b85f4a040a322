// The power panel shows core's numbers for the inputs typed into it, and
// core's message beside a field that is wrong. The numbers themselves are
// checked against SciPy's noncentral t and F in TestPower.

#include "ui/window/Demos.h"
#include "core/analysis/Settled.h"
#include "ui/document/Document.h"
#include "tests/support/PanelShot.h"
#include "ui/power/PowerPanel.h"
#include "core/model/SchemeEdits.h"
#include "core/model/Study.h"
#include "core/files/StudyFile.h"
#include "ui/document/RecoveryStore.h"
#include "tests/support/TableText.h"
#include "ui/common/SmallChart.h"

#include <QCheckBox>
#include <QLabel>
#include <QPlainTextEdit>
#include <QLineEdit>
#include <QComboBox>
#include <QHeaderView>
#include <QTableView>
#include <QSignalSpy>
#include <QTemporaryDir>
#include <QImage>
#include <QTest>
#include <QUndoStack>

using namespace Qt::StringLiterals;
using namespace cb;

namespace {

// The starter scheme's four levels: equal ratios, a total N of 40 and expected means 1, 2, 3, 4.
void planFourLevels(PowerPanel &panel)
{
    panel.setRatioTexts({u"1"_s, u"1"_s, u"1"_s, u"1"_s});
    panel.totalEdit()->setText(u"40"_s);
    panel.setExpectedTexts({u"1"_s, u"2"_s, u"3"_s, u"4"_s});
}

} // namespace

class TestPowerPanel : public QObject
{
    Q_OBJECT

private slots:
    void tableShowsCorePower_data();
    void tableShowsCorePower();
    void invalidInputShowsCoreMessage_data();
    void invalidInputShowsCoreMessage();
    void followsSchemeEdits();
    void plannedSizesComeFromTheLevels();
    void typingChangesOnlyItsCell();
    void rendersTheIrrigationDemo();
    void theCurvesShowWhenThePanelIsNarrow();
    void withinFactorAsksForACorrelationAndCountsParticipants();
    void fullCorrelationMatrixTypedOrPasted_data();
    void fullCorrelationMatrixTypedOrPasted();
    void fullCorrelationMatrixGivesCoresPower();
    void mixedDesignGivesEachColumnsPartAndGroups();
    void powerStaysInSightBesideLongTestNames();
    void designWithAnEmptyCellPlansTheOtherCells();
    void inputsAreTheStudysUndoneAndSaved();
    void enterMovesDownTheExpectedMeans();
};

void TestPowerPanel::tableShowsCorePower_data()
{
    QTest::addColumn<QStringList>("means");
    QTest::addColumn<QString>("sd");
    QTest::addColumn<QString>("total");
    QTest::addColumn<int>("adjustment");
    QTest::addColumn<bool>("oneSided");

    QTest::newRow("equal ratios, two-sided") << QStringList{u"10"_s, u"12"_s, u"13"_s, u"10"_s} << u"4"_s << u"80"_s << 0 << false;
    QTest::newRow("Bonferroni") << QStringList{u"10"_s, u"12"_s, u"13"_s, u"10"_s} << u"4"_s << u"80"_s << 1 << false;
    QTest::newRow("Sidak, one-sided, fractions") << QStringList{u"0"_s, u"1/2"_s, u"3/4"_s, u"-1/4"_s} << u"1"_s << u"60"_s << 2 << true;
}

void TestPowerPanel::tableShowsCorePower()
{
    QFETCH(QStringList, means);
    QFETCH(QString, sd);
    QFETCH(QString, total);
    QFETCH(int, adjustment);
    QFETCH(bool, oneSided);

    Document doc;
    PowerPanel panel(&doc);
    panel.setRatioTexts({u"1"_s, u"1"_s, u"1"_s, u"1"_s});
    panel.totalEdit()->setText(total);
    panel.sdEdit()->setText(sd);
    panel.adjustmentBox()->setCurrentIndex(adjustment);
    panel.sidedBox()->setCurrentIndex(oneSided ? 1 : 0);
    panel.setExpectedTexts(means);
    panel.recompute();
    QVERIFY2(panel.report().has_value(), qPrintable(panel.settings().error()));

    // The same inputs given to core directly.
    PowerSettings s;
    for (const QString &m : means)
        s.means.push_back(parseWeight(m)->value());
    s.sd = sd.toDouble();
    s.ratios = {1, 1, 1, 1};
    s.total = total.toDouble();
    s.adjustment = std::array{Adjustment::None, Adjustment::Bonferroni, Adjustment::Sidak}[size_t(adjustment)];
    s.oneSided = oneSided;
    const auto rows = contrastRowsOf(doc.analysis());
    QVERIFY(rows.ok());
    const auto direct = computePower(rows->rows, rows->names, s);
    QVERIFY(direct.ok());

    const QTableView *t = panel.resultTable();
    QCOMPARE(rowCount(t), int(direct->contrasts.size()) + 1);
    for (int i = 0; i < int(direct->contrasts.size()); ++i) {
        const ContrastPower &c = direct->contrasts[size_t(i)];
        QCOMPARE(panel.report()->contrasts[size_t(i)].power, c.power);
        QCOMPARE(cellText(t, i, PowerPanel::TestColumn), c.name);
        QCOMPARE(cellText(t, i, PowerPanel::EstimateColumn), QString::number(c.estimate, 'g', 4));
        QCOMPARE(cellText(t, i, PowerPanel::SeColumn), QString::number(c.se, 'g', 4));
        QCOMPARE(cellText(t, i, PowerPanel::EffectColumn), QString::number(c.effectSize, 'g', 3));
        QVERIFY(cellText(t, i, PowerPanel::PowerColumn).endsWith(QString::number(c.power, 'f', 3)));
        QCOMPARE(cellText(t, i, PowerPanel::NeededTotalColumn),
                 c.required.reachable ? QString::number(c.required.total) : u"\u2014"_s);
        QCOMPARE(cellText(t, i, PowerPanel::VersusOmnibusColumn).isEmpty(), !c.fewerThanOmnibus);
    }
    const int last = rowCount(t) - 1;
    QVERIFY(cellText(t, last, PowerPanel::PowerColumn).endsWith(QString::number(direct->omnibus.power, 'f', 3)));
    QCOMPARE(cellText(t, last, PowerPanel::EffectColumn), u"f = "_s + QString::number(direct->omnibus.effectSize, 'g', 3));
    // One curve per contrast and one for the F test, each agreeing with core's powerCurve at its points.
    QCOMPARE(int(panel.chart()->lines().size()), int(direct->contrasts.size()) + 1);
    const SmallChart::Line &first = panel.chart()->lines()[1];
    const auto curve = powerCurve(rows->rows, 0, s, {static_cast<long long>(first.points[3].x())});
    QVERIFY(curve.ok());
    QCOMPARE(first.points[3].y(), curve->front());
}

void TestPowerPanel::invalidInputShowsCoreMessage_data()
{
    QTest::addColumn<QString>("sd");
    QTest::addColumn<QString>("alpha");
    QTest::addColumn<QString>("field");
    QTest::addColumn<QString>("message");
    QTest::newRow("negative SD") << u"-1"_s << u"0.05"_s << u"sd"_s
                                 << u"sd: -1 is not a positive standard deviation; the SD must be above 0"_s;
    QTest::newRow("zero SD") << u"0"_s << u"0.05"_s << u"sd"_s << u"sd: 0 is not a positive standard deviation; the SD must be above 0"_s;
    QTest::newRow("SD not a number") << u"wide"_s << u"0.05"_s << u"sd"_s << u"sd: "_s + parseWeight(u"wide"_s).error();
    QTest::newRow("alpha of 1") << u"2"_s << u"1"_s << u"alpha"_s << u"alpha: 1 is not between 0 and 1 (both excluded)"_s;
}

void TestPowerPanel::invalidInputShowsCoreMessage()
{
    QFETCH(QString, sd);
    QFETCH(QString, alpha);
    QFETCH(QString, field);
    QFETCH(QString, message);

    Document doc;
    PowerPanel panel(&doc);
    planFourLevels(panel);
    panel.sdEdit()->setText(sd);
    panel.alphaEdit()->setText(alpha);
    panel.recompute();
    QVERIFY(!panel.report().has_value());
    QVERIFY2(panel.fieldMessage(field).endsWith(message), qPrintable(panel.fieldMessage(field)));
    QCOMPARE(rowCount(panel.resultTable()), 0);
    QVERIFY(panel.chart()->lines().empty());

    // Corrected, the message goes and the table comes back.
    panel.sdEdit()->setText(u"2"_s);
    panel.alphaEdit()->setText(u"0.05"_s);
    panel.recompute();
    QVERIFY(panel.fieldMessage(field).isEmpty());
    QCOMPARE(rowCount(panel.resultTable()), 4);
}

void TestPowerPanel::followsSchemeEdits()
{
    Document doc;
    PowerPanel panel(&doc);
    planFourLevels(panel);
    panel.recompute();
    QCOMPARE(cellText(panel.resultTable(), 0, PowerPanel::EstimateColumn), u"1"_s); // B - A

    // Reference level D: the first contrast becomes A - D = -3.
    Scheme next = makeScheme(doc.scheme().factor, SchemeKind::Treatment, SchemeOptions{3}).take();
    doc.edit(next, u"reference D"_s);
    QTRY_COMPARE(cellText(panel.resultTable(), 0, PowerPanel::EstimateColumn), u"-3"_s);

    // A fifth level has no expected mean yet: the message names it.
    Factor f = doc.scheme().factor;
    f.levels << u"E"_s;
    doc.edit(makeScheme(f, SchemeKind::Treatment).take(), u"add E"_s);
    QTRY_VERIFY(panel.fieldMessage(u"levels"_s).contains(u"level \u2018E\u2019: no value"_s));
}

void TestPowerPanel::plannedSizesComeFromTheLevels()
{
    Document doc;
    Factor f = doc.scheme().factor;
    f.plannedN = {Rational(10), Rational(10), Rational(20), Rational(20)};
    doc.reset(makeScheme(f, SchemeKind::Sum).take(), {});
    PowerPanel panel(&doc);
    panel.setExpectedTexts({u"1"_s, u"2"_s, u"3"_s, u"4"_s});
    panel.recompute();
    QVERIFY(panel.report().has_value());
    QCOMPARE(panel.report()->plannedN, (std::vector<double>{10, 10, 20, 20}));
    QCOMPARE(cellText(panel.inputTable(), 2, PowerPanel::PlannedNColumn), u"20"_s);
}

// The typed values are the panel's state, kept by level name; the table repaints only the cell
// that changed, and a scheme edit that keeps the levels leaves the inputs alone.
void TestPowerPanel::typingChangesOnlyItsCell()
{
    Document doc;
    PowerPanel panel(&doc);
    planFourLevels(panel);
    QAbstractItemModel *inputs = panel.inputTable()->model();
    QSignalSpy changed(inputs, &QAbstractItemModel::dataChanged);
    QSignalSpy reset(inputs, &QAbstractItemModel::modelReset);
    QVERIFY(inputs->setData(inputs->index(2, PowerPanel::ExpectedColumn), u"7"_s)); // as typed
    QCOMPARE(cellText(panel.inputTable(), 2, PowerPanel::ExpectedColumn), u"7"_s);
    QCOMPARE(changed.size(), 1);
    QCOMPARE(changed[0][0].toModelIndex(), inputs->index(2, PowerPanel::ExpectedColumn));
    QCOMPARE(changed[0][1].toModelIndex(), inputs->index(2, PowerPanel::ExpectedColumn));
    QCOMPARE(reset.size(), 0);
    panel.recompute();
    QVERIFY(panel.report().has_value());
    QCOMPARE(panel.settings()->means, (std::vector<double>{1, 2, 7, 4}));

    // Another coding of the same levels: no input cell changes.
    changed.clear();
    doc.edit(makeScheme(doc.scheme().factor, SchemeKind::Helmert).take(), u"Helmert"_s);
    QCOMPARE(changed.size(), 0);
    QCOMPARE(reset.size(), 0);
    // A renamed level starts empty; the others keep their values.
    Factor f = doc.scheme().factor;
    f.levels[1] = u"B2"_s;
    doc.edit(makeScheme(f, SchemeKind::Helmert).take(), u"rename"_s);
    QCOMPARE(cellText(panel.inputTable(), 1, PowerPanel::ExpectedColumn), QString());
    QCOMPARE(cellText(panel.inputTable(), 2, PowerPanel::ExpectedColumn), u"7"_s);
}

// The irrigation demo (invented) with expected plot yields per schedule, eight plots each.
void planIrrigation(Document &doc, PowerPanel &panel)
{
    doc.reset(loadDemoStudy(u"irrigation"_s).take(), {});
    panel.setExpectedTexts({u"4.0"_s, u"5.4"_s, u"5.1"_s, u"4.9"_s, u"4.3"_s});
    panel.sdEdit()->setText(u"0.9"_s);
    panel.recompute();
}

// The warmup demo (2 routines between x 3 vowels within singers), SD 6, correlation 0.6.
void planWarmup(Document &doc, PowerPanel &panel)
{
    doc.reset(loadDemoStudy(u"warmup"_s).take(), {});
    panel.setExpectedTexts({u"10"_s, u"14"_s, u"12"_s, u"8"_s, u"11"_s, u"9"_s});
    panel.sdEdit()->setText(u"6"_s);
    panel.correlationEdit()->setText(u"0.6"_s);
    panel.recompute();
}

void TestPowerPanel::rendersTheIrrigationDemo()
{
    Document doc;
    PowerPanel panel(&doc);
    planIrrigation(doc, panel);
    QVERIFY2(panel.report().has_value(), qPrintable(panel.settings().error()));
    QCOMPARE(rowCount(panel.resultTable()), 5);
    QVERIFY(renderPanel(panel, QSize(1500, 430), u"power"_s));
}

// In a panel as wide as a 1366-pixel window gives it, the irrigation demo's five long curve names
// left the plot no room beside the legend, and the chart stayed blank white; the legend now goes
// under the plot. With no room at all, the chart says so.
void TestPowerPanel::theCurvesShowWhenThePanelIsNarrow()
{
    Document doc;
    PowerPanel panel(&doc);
    planIrrigation(doc, panel);
    QVERIFY(panel.report().has_value());
    SmallChart *chart = panel.chart();
    QCOMPARE(int(chart->lines().size()), 5);
    auto pixelsOf = [](const QImage &image, const QColor &colour) {
        int count = 0;
        for (int y = 0; y < image.height(); ++y)
            for (int x = 0; x < image.width(); ++x)
                count += QColor(image.pixel(x, y)) == colour;
        return count;
    };
    chart->resize(250, 380); // its share of a 1000-pixel dock
    const QImage narrow = chart->grab().toImage();
    QVERIFY(pixelsOf(narrow, SmallChart::seriesColor(0)) > 20); // the first contrast's curve
    chart->resize(120, 90);
    const QImage tiny = chart->grab().toImage();
    QVERIFY(pixelsOf(tiny, Qt::white) < tiny.width() * tiny.height()); // the message, not a blank
}

// A factor measured within participants: the panel asks for the correlation (with its caution),
// counts participants, names Hotelling's test, and says why the number is so much smaller than
// for separate groups. The figures are core's (TestPowerWithin holds them against SciPy: 21
// participants, 64 per group).
void TestPowerPanel::withinFactorAsksForACorrelationAndCountsParticipants()
{
    Document doc;
    Factor f;
    f.levels = {u"plain"_s, u"cued"_s};
    PowerPanel panel(&doc);
    const auto *correlationCaution = panel.findChild<QLabel *>(u"correlationCaution"_s);
    QVERIFY(correlationCaution);
    QVERIFY(!correlationCaution->isVisibleTo(&panel));
    Scheme s = makeScheme(f, SchemeKind::Treatment).take();
    s = edits::withMeasure(s, Measure::Within).take();
    doc.edit(s, u"within"_s);
    QVERIFY(correlationCaution->isVisibleTo(&panel));
    panel.setExpectedTexts({u"0"_s, u"0.5"_s});
    panel.sdEdit()->setText(u"1"_s);
    panel.totalEdit()->setText(u"20"_s);
    panel.recompute();
    QVERIFY(!panel.report());
    QVERIFY2(panel.fieldMessage(u"correlation"_s).contains(u"correlation"_s), qPrintable(panel.fieldMessage(u"correlation"_s)));
    panel.correlationEdit()->setText(u"0.7"_s);
    panel.recompute();
    QVERIFY2(panel.report().has_value(), qPrintable(panel.settings().error()));
    QVERIFY(panel.report()->within);
    QCOMPARE(panel.report()->contrasts[0].required.total, 21LL);
    const QAbstractItemModel *results = panel.resultTable()->model();
    QCOMPARE(results->headerData(PowerPanel::NeededColumn, Qt::Horizontal).toString(), u"Participants for target"_s);
    QCOMPARE(results->index(0, PowerPanel::NeededColumn).data().toString(), u"21 participants"_s);
    QVERIFY(results->index(1, PowerPanel::TestColumn).data().toString().contains(u"Hotelling"_s));
    const auto *why = panel.findChild<QLabel *>(u"withinExplanation"_s);
    QVERIFY(why && !why->isHidden());
    QVERIFY2(why->text().contains(u"64 per group (128 people)"_s), qPrintable(why->text()));
    QVERIFY(panel.findChild<QLabel *>(u"powerCautions"_s)->text().contains(u"correlation between a participant's values"_s));
    QCOMPARE(panel.chart()->xTitle(), u"participants"_s);

    // A design with a within factor is a mixed design: each column's power, participants per group.
    Study study = withFactorAdded(doc.study()).take();
    doc.editStudy(settled(study), u"add a factor"_s);
    QVERIFY(doc.isDesign());
    panel.recompute();
    QVERIFY(!panel.findChild<QLabel *>(u"powerMessage"_s)->text().contains(u"not computed yet"_s)); // no longer refused
}

void TestPowerPanel::mixedDesignGivesEachColumnsPartAndGroups()
{
    // The warmup demo: 2 routines (12 and 10 singers) x 3 vowels within singers. With SD 6 and a
    // correlation of 0.6 the routine column's SE is 2.2 and the 'ee vs ah' column needs 12 and 10
    // singers (both derived in TestPowerMixed::handDerivedWarmupFigures, SciPy power 0.8257).
    Document doc;
    PowerPanel panel(&doc);
    planWarmup(doc, panel);
    QVERIFY2(panel.report().has_value(), qPrintable(panel.settings().error()));
    QCOMPARE(panel.report()->groups, (QStringList{u"humming"_s, u"lip trills"_s}));
    QVERIFY(!panel.findChild<QLabel *>(u"correlationCaution"_s)->isHidden());
    const QAbstractItemModel *results = panel.resultTable()->model();
    QCOMPARE(results->rowCount(), 8); // the five columns, the omnibus test and the data check's two other multivariate tests
    // Its power: TestPowerMixed::handDerivedWarmupFigures (lambda 925/99, SciPy 0.714866).
    QCOMPARE(results->index(5, PowerPanel::TestColumn).data().toString(), u"All 3 within cells equal, over the groups (Hotelling T\u00b2)"_s);
    QVERIFY(std::abs(panel.report()->omnibus.power - 0.7148660473684714) < 1e-9);
    QCOMPARE(results->headerData(PowerPanel::NeededColumn, Qt::Horizontal).toString(), u"Participants per group for target"_s);
    QCOMPARE(results->index(0, PowerPanel::TestColumn).data().toString(), u"lip trills vs humming [between]"_s);
    QCOMPARE(results->index(1, PowerPanel::NeededColumn).data().toString(), u"12, 10"_s);
    QCOMPARE(results->index(3, PowerPanel::TestColumn).data().toString(), u"lip trills vs humming \u00d7 ee vs ah [between \u00d7 within]"_s);
    QCOMPARE(panel.chart()->xTitle(), u"smallest group"_s);
    // The multivariate tests: the routine term on the participants' averages is the between
    // column's test (an F with 1 df is the square of its t), routine x vowel has 2 and 19 df.
    QCOMPARE(results->index(6, PowerPanel::TestColumn).data().toString(), u"routine (Wilks \u039b)"_s);
    QCOMPARE(panel.report()->terms.size(), size_t(3));
    QVERIFY(std::abs(panel.report()->terms[1].power - panel.report()->contrasts[0].power) < 1e-9);
    QVERIFY(std::abs(panel.report()->terms[0].noncentrality - 925.0 / 99.0) < 1e-9); // the omnibus, found again
    QCOMPARE(results->index(7, PowerPanel::DfColumn).data().toString(), u"2, 19"_s);
    QVERIFY(renderPanel(panel, QSize(1500, 700), u"power-mixed"_s));
}

// In a results table as narrow as a 1366-pixel window leaves it for the warmup design (about 300
// pixels), the test names took the whole width and the power was out of sight; the name column
// now stops at half the table, cut in its middle so the part of the design stays.
void TestPowerPanel::powerStaysInSightBesideLongTestNames()
{
    Document doc;
    PowerPanel panel(&doc);
    planWarmup(doc, panel);
    QVERIFY(panel.report().has_value());
    QTableView *table = panel.resultTable();
    QCOMPARE(table->textElideMode(), Qt::ElideMiddle);
    table->setParent(nullptr); // the table alone, at the width the panel gives it
    table->resize(300, 200);
    table->show();
    QVERIFY(QTest::qWaitForWindowExposed(table));
    QHeaderView *header = table->horizontalHeader();
    const int nameWidth = header->sectionSize(PowerPanel::TestColumn);
    const QString longest = table->model()->index(3, PowerPanel::TestColumn).data().toString();
    QVERIFY(table->fontMetrics().horizontalAdvance(longest) > nameWidth); // cut short
    QVERIFY(nameWidth <= std::max(table->width() / 2, 16 * table->fontMetrics().horizontalAdvance(u'M')));
    const int powerEnds = header->sectionViewportPosition(PowerPanel::PowerColumn) + header->sectionSize(PowerPanel::PowerColumn);
    QVERIFY2(powerEnds <= table->viewport()->width(), qPrintable(u"power ends at %1 of %2"_s.arg(powerEnds).arg(table->viewport()->width())));
    // With room, the names are whole again.
    table->resize(1400, 200);
    QTRY_VERIFY(header->sectionSize(PowerPanel::TestColumn) > table->fontMetrics().horizontalAdvance(longest));
    table->hide();
    table->setParent(&panel);
}

// The hedgerow demo, main effects only, with grass·late empty: the panel plans the five cells
// with observations, as the CLI's power does (TestEmptyCells::powerAndExportOverTheCellsWithObservations
// derives the 'late vs early' estimate 2 and SE 4 sqrt(5/27) by hand).
void TestPowerPanel::designWithAnEmptyCellPlansTheOtherCells()
{
    Study study = loadDemoStudy(u"hedgerow"_s).take();
    study.design.terms.pop_back();
    study.design.cellN = {Rational(6), Rational(6), Rational(6), Rational(0), Rational(6), Rational(4)};
    Document doc;
    doc.reset(study, {});
    PowerPanel panel(&doc);
    QCOMPARE(panel.inputTable()->model()->rowCount(), 5); // one row per cell with observations
    panel.setExpectedTexts({u"10"_s, u"12"_s, u"14"_s, u"13"_s, u"15"_s});
    panel.sdEdit()->setText(u"4"_s);
    panel.recompute();
    QVERIFY2(panel.report().has_value(), qPrintable(panel.settings().error()));
    QCOMPARE(panel.report()->levelCount, 5);
    const ContrastPower &late = panel.report()->contrasts.at(2);
    QCOMPARE(late.name, u"late vs early"_s);
    QVERIFY(std::abs(late.estimate - 2.0) < 1e-12);
    QVERIFY(std::abs(late.se - 4.0 * std::sqrt(5.0 / 27.0)) < 1e-12);
}

namespace {

// A panel over a three-level factor measured within participants, 20 participants, means 0, 0.4,
// 0.5, SD 1, with the full matrix chosen.
void planThreeWithin(Document &doc, PowerPanel &panel)
{
    Factor f;
    f.levels = {u"plain"_s, u"arrow"_s, u"word"_s};
    doc.edit(edits::withMeasure(makeScheme(f, SchemeKind::Treatment).take(), Measure::Within).take(), u"within"_s);
    panel.setExpectedTexts({u"0"_s, u"0.4"_s, u"0.5"_s});
    panel.sdEdit()->setText(u"1"_s);
    panel.totalEdit()->setText(u"20"_s);
    panel.correlationEdit()->setText(u"0.5"_s);
    panel.fullMatrixBox()->setChecked(true);
}

} // namespace

// The full matrix, typed or pasted: each mistake is named by its cell, in the note under the matrix.
void TestPowerPanel::fullCorrelationMatrixTypedOrPasted_data()
{
    QTest::addColumn<QString>("text");
    QTest::addColumn<QString>("message");
    QTest::newRow("not symmetric") << u"1, 0.6, 0.4\n0.5, 1, 0.5\n0.4, 0.5, 1"_s
                                   << u"correlations, row 1, column 2: 0.6, but row 2, column 1 is 0.5; the matrix must be symmetric"_s;
    QTest::newRow("diagonal not 1") << u"1, 0.6, 0.4\n0.6, 0.9, 0.5\n0.4, 0.5, 1"_s
                                    << u"correlations, row 2, column 2: 0.9 on the diagonal"_s;
    QTest::newRow("not a correlation") << u"1\t1.2\t0.4\n1.2\t1\t0.5\n0.4\t0.5\t1"_s
                                       << u"correlations, row 1, column 2: 1.2 is not a correlation"_s;
    QTest::newRow("not positive definite") << u"1; 0.9; -0.9\n0.9; 1; 0.9\n-0.9; 0.9; 1"_s
                                           << u"correlations, row 3: with this row the correlations of the first 3 levels are not positive definite"_s;
    QTest::newRow("too small") << u"1, 0.6\n0.6, 1"_s << u"correlations: a 2 x 2 matrix for 3 levels"_s;
    QTest::newRow("ragged") << u"1, 0.6, 0.4\n0.6, 1\n0.4, 0.5, 1"_s << u"correlations, line 2: 2 values, but the first row has 3"_s;
    QTest::newRow("not a number") << u"1, 0.6, 0.4\n0.6, 1, high\n0.4, 0.5, 1"_s << u"correlations, line 2, item 3: "_s;
    QTest::newRow("empty") << u"  \n"_s << u"correlations: no values"_s;
}

void TestPowerPanel::fullCorrelationMatrixTypedOrPasted()
{
    QFETCH(QString, text);
    QFETCH(QString, message);
    Document doc;
    PowerPanel panel(&doc);
    planThreeWithin(doc, panel);
    QVERIFY(panel.correlationsEdit()->isVisibleTo(&panel));
    QVERIFY(!panel.correlationEdit()->isEnabled());
    panel.correlationsEdit()->setPlainText(text);
    panel.recompute();
    QVERIFY(!panel.report());
    QVERIFY2(panel.fieldMessage(u"correlations"_s).contains(message), qPrintable(panel.fieldMessage(u"correlations"_s)));
}

// Choosing the full matrix starts it from the common correlation (the same report); a matrix
// with its own correlations gives core's power for those settings (TestPowerWithin holds core
// against SciPy's noncentral t and F with the covariance from NumPy).
void TestPowerPanel::fullCorrelationMatrixGivesCoresPower()
{
    Document doc;
    PowerPanel panel(&doc);
    planThreeWithin(doc, panel);
    QCOMPARE(panel.correlationsEdit()->toPlainText(), u"1, 0.5, 0.5\n0.5, 1, 0.5\n0.5, 0.5, 1"_s);
    panel.recompute();
    QVERIFY2(panel.report().has_value(), qPrintable(panel.settings().error()));
    const PowerReport fromMatrix = *panel.report();
    panel.fullMatrixBox()->setChecked(false);
    QVERIFY(!panel.correlationsEdit()->isVisibleTo(&panel));
    panel.recompute();
    QVERIFY(panel.report().has_value());
    for (size_t i = 0; i < fromMatrix.contrasts.size(); ++i)
        QVERIFY(std::abs(fromMatrix.contrasts[i].power - panel.report()->contrasts[i].power) < 1e-12);

    panel.fullMatrixBox()->setChecked(true);
    panel.correlationsEdit()->setPlainText(u"1\t0.7\t0.2\n0.7\t1\t0.4\n0.2\t0.4\t1\n"_s); // pasted from a spreadsheet
    panel.recompute();
    QVERIFY2(panel.report().has_value(), qPrintable(panel.settings().error()));
    const auto settings = panel.settings();
    QVERIFY(settings.ok());
    QCOMPARE(settings->correlations.rows(), 3);
    QCOMPARE(settings->correlations(0, 1), 0.7);
    QCOMPARE(settings->correlations(2, 1), 0.4);
    const auto rows = contrastRowsOf(doc.analysis());
    QVERIFY(rows.ok());
    const auto core = computePower(rows->rows, rows->names, *settings);
    QVERIFY(core.ok());
    QCOMPARE(panel.report()->contrasts.size(), core->contrasts.size());
    for (size_t i = 0; i < core->contrasts.size(); ++i) {
        QCOMPARE(panel.report()->contrasts[i].power, core->contrasts[i].power);
        QCOMPARE(panel.report()->contrasts[i].required.total, core->contrasts[i].required.total);
    }
    // arrow - plain with r = 0.7 has a smaller SE than word - plain with r = 0.2: sqrt(2 - 2r) / sqrt(20).
    QVERIFY(std::abs(panel.report()->contrasts[0].se - std::sqrt((2.0 - 2 * 0.7) / 20.0)) < 1e-12);
    QVERIFY(std::abs(panel.report()->contrasts[1].se - std::sqrt((2.0 - 2 * 0.2) / 20.0)) < 1e-12);
    QVERIFY(renderPanel(panel, QSize(1366, 240), u"power-within-matrix"_s));
}

// What is typed into the panel belongs to the study: the document is modified, typing into one
// field is one undo step that brings the old text back, and a saved study opened again shows the
// same inputs and the same power (the numbers: TestPowerPlan::planGivesTheTextbookPower).
void TestPowerPanel::inputsAreTheStudysUndoneAndSaved()
{
    Document doc;
    doc.reset(loadDemoStudy(u"irrigation"_s).take(), {});
    PowerPanel panel(&doc);
    QVERIFY(!doc.isModified());
    panel.setExpectedTexts({u"10"_s, u"12"_s, u"14"_s, u"16"_s, u"18"_s});
    QVERIFY(doc.isModified());
    panel.sdEdit()->selectAll();
    QTest::keyClicks(panel.sdEdit(), u"4"_s);
    panel.adjustmentBox()->setCurrentIndex(panel.adjustmentBox()->findText(adjustmentTitle(Adjustment::Sidak)));
    QCOMPARE(doc.study().power.sd, u"4"_s);
    QCOMPARE(doc.study().power.adjustment, u"sidak"_s);
    QCOMPARE(doc.study().power.levels.value(u"daily drip"_s).expected, u"12"_s);

    // Typing "4.5" over "4" is one step; undo brings "4" back into the field.
    const int steps = doc.undoStack()->count();
    panel.sdEdit()->selectAll();
    QTest::keyClicks(panel.sdEdit(), u"4.5"_s);
    QCOMPARE(doc.undoStack()->count(), steps + 1);
    QCOMPARE(doc.study().power.sd, u"4.5"_s);
    doc.undoStack()->undo();
    QCOMPARE(panel.sdEdit()->text(), u"4"_s);
    QCOMPARE(doc.study().power.sd, u"4"_s);
    panel.recompute();
    QVERIFY2(panel.report().has_value(), qPrintable(panel.settings().error()));
    const double power = panel.report()->contrasts[0].power;

    QTemporaryDir dir;
    const QString path = dir.filePath(u"planned.json"_s);
    QCOMPARE(saveStudy(doc.study(), path), QString());
    Document again;
    auto loaded = loadStudy(path);
    QVERIFY2(loaded.ok(), qPrintable(loaded.error()));
    again.reset(loaded.take(), path);
    PowerPanel reopened(&again);
    reopened.recompute();
    QCOMPARE(reopened.sdEdit()->text(), u"4"_s);
    QCOMPARE(reopened.adjustmentBox()->currentText(), adjustmentTitle(Adjustment::Sidak));
    QCOMPARE(cellText(reopened.inputTable(), 1, PowerPanel::ExpectedColumn), u"12"_s);
    QVERIFY(reopened.report().has_value());
    QCOMPARE(reopened.report()->contrasts[0].power, power);
    QCOMPARE(reopened.report()->perTestAlpha, panel.report()->perTestAlpha);

    // The recovery file keeps them too (unsaved work is never lost).
    RecoveryStore store(dir.filePath(u"recovery"_s));
    QCOMPARE(store.save(doc.study(), {}), QString());
    auto recovered = store.load();
    QVERIFY2(recovered.ok(), qPrintable(recovered.error()));
    QVERIFY(recovered->study.power == doc.study().power);
}

// Typed as into a spreadsheet (seen missing when the panel was used under Xvfb: Enter committed
// the value and stayed, so the next value overwrote it): Enter commits and moves to the next level.
void TestPowerPanel::enterMovesDownTheExpectedMeans()
{
    Document doc;
    doc.reset(loadDemoStudy(u"irrigation"_s).take(), {});
    PowerPanel panel(&doc);
    panel.resize(1200, 400);
    panel.show();
    QVERIFY(QTest::qWaitForWindowExposed(&panel));
    QTableView *table = panel.inputTable();
    table->setFocus();
    table->setCurrentIndex(table->model()->index(0, PowerPanel::ExpectedColumn));
    int row = 0;
    for (const QString &value : {u"10"_s, u"12"_s, u"14"_s}) {
        table->edit(table->currentIndex());
        QLineEdit *editor = nullptr;
        for (QLineEdit *e : table->viewport()->findChildren<QLineEdit *>())
            if (e->isVisible())
                editor = e;
        QVERIFY(editor);
        QTest::keyClicks(editor, value);
        QTest::keyClick(editor, Qt::Key_Return);
        ++row;
        QTRY_COMPARE(table->currentIndex().row(), row); // the delegate commits from the event loop
    }
    QCOMPARE(doc.study().power.levels.value(u"none"_s).expected, u"10"_s);
    QCOMPARE(doc.study().power.levels.value(u"daily drip"_s).expected, u"12"_s);
    QCOMPARE(doc.study().power.levels.value(u"alternate-day drip"_s).expected, u"14"_s);
    QCOMPARE(table->currentIndex().row(), 3);
}

QTEST_MAIN(TestPowerPanel)
#include "TestPowerPanel.moc"
