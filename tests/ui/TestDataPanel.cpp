// The data panel reads a file in the background and shows core's fit. The
// check values are Dobson (1983), An Introduction to Statistical Modelling,
// plant-growth data (tests/data/fit_three_groups.csv): with treatment coding
// the intercept is 5.032 and the effects -0.371 and 0.494 (written from memory,
// the same values TestDataFit checks against NumPy's lstsq).

#include "ui/data/DataPanel.h"
#include "ui/data/ItemTable.h"
#include "core/base/NumberText.h"
#include "tests/support/TableText.h"
#include "core/report/FitReport.h"
#include "tests/support/FitTestSupport.h"
#include "tests/support/WithinFitSupport.h"
#include "ui/window/Demos.h"
#include "tests/support/PanelShot.h"
#include "tests/support/ScriptedPrompter.h"
#include "ui/document/Document.h"
#include "ui/common/SmallChart.h"

#include <QFile>

#include <cmath>
#include <QAbstractButton>
#include <QComboBox>
#include <QPushButton>
#include <QSignalSpy>
#include <QTableView>
#include <QTemporaryDir>
#include <QTest>

using namespace Qt::StringLiterals;
using namespace cb;

class TestDataPanel : public QObject
{
    Q_OBJECT

private slots:
    void publishedThreeGroupsTreatmentCoding();
    void mismatchedLevelIsReportedAndCanBeMapped();
    void skippedRowsAreListedWithLines();
    void unreadableFileShowsMessage();
    void openButtonAsksThePrompter();
    void rendersTheIrrigationDemo();
    void fitsADesignFromOneColumnPerFactor();
    void designCellWithoutDataIsLeftOutWhenTheTermsAllow();
    void responseIsAMeasurementNeverText_data();
    void responseIsAMeasurementNeverText();
    void participantColumnGivesTheByParticipantCheck();
    void mixedDesignShowsItsMultivariateTests();
    void itemColumnGivesTheByItemCheckAndMinF();

private:
    static void useLevels(Document &doc, const QStringList &levels);
    static bool readAndWait(DataPanel &panel);
};

const QString kThreeGroups = QStringLiteral(CB_TEST_DATA "/fit_three_groups.csv");

void TestDataPanel::useLevels(Document &doc, const QStringList &levels)
{
    Factor f;
    f.name = u"group"_s;
    f.levels = levels;
    doc.reset(makeScheme(f, SchemeKind::Treatment).take(), {});
}

bool TestDataPanel::readAndWait(DataPanel &panel)
{
    QSignalSpy done(&panel, &DataPanel::finished);
    panel.readAndFit();
    return done.wait(10'000);
}

void TestDataPanel::publishedThreeGroupsTreatmentCoding()
{
    Document doc;
    useLevels(doc, {u"g1"_s, u"g2"_s, u"g3"_s});
    DataPanel panel(&doc);
    QVERIFY(panel.openFile(kThreeGroups));
    // The columns are proposed from the preview: text for the level, numbers for the response.
    QCOMPARE(panel.previewTable()->model()->columnCount(), 2);
    QVERIFY(readAndWait(panel));
    QVERIFY2(panel.fit().has_value(), qPrintable(panel.message()));
    const FitResult &fit = *panel.fit();
    QCOMPARE(fit.coefficients.size(), size_t(3));
    QCOMPARE(qRound(fit.coefficients[0].estimate * 1000), 5032);
    QCOMPARE(qRound(fit.coefficients[1].estimate * 1000), -371);
    QCOMPARE(qRound(fit.coefficients[2].estimate * 1000), 494);
    const QTableView *t = panel.coefficientTable();
    QCOMPARE(rowCount(t), 3);
    QCOMPARE(cellText(t, 0, DataPanel::EstimateColumn), u"5.032"_s);
    QCOMPARE(cellText(t, 1, DataPanel::EstimateColumn), u"-0.371"_s);
    QCOMPARE(cellText(t, 2, DataPanel::EstimateColumn), u"0.494"_s);
    // Saturated coding: the hypotheses applied to the observed means give the same numbers.
    QCOMPARE(cellText(t, 2, DataPanel::FromMeansColumn), u"0.494"_s);
    // F(2, 27) = 4.846, p = 0.0159, residual SD 0.6234 on 27 df (Dobson); the same lines as the
    // command line's report.
    QVERIFY2(panel.summaryText().contains(u"Do the level means differ? F(2, 27) = 4.846, p = 0.0159"_s), qPrintable(panel.summaryText()));
    QVERIFY(panel.summaryText().contains(u"Spread within levels: SD 0.6234 (27 df)"_s));
    for (const QString &line : fitSummaryLines(fit, false))
        QVERIFY2(panel.summaryText().contains(line.toHtmlEscaped()), qPrintable(line));
    QCOMPARE(cellText(t, 0, DataPanel::NameColumn), u"b0 intercept"_s);
    QCOMPARE(cellText(t, 0, DataPanel::PColumn), u"< 0.0001"_s);
    // Three level means drawn, at the observed means 5.032, 4.661, 5.526.
    QCOMPARE(panel.meansChart()->intervals().size(), size_t(3));
    QCOMPARE(qRound(panel.meansChart()->intervals()[1].value * 1000), 4661);
    QVERIFY(panel.meansChart()->intervals()[1].low < 4.661 && panel.meansChart()->intervals()[1].high > 4.661);
    QVERIFY(panel.unmatchedText().isEmpty());
}

void TestDataPanel::mismatchedLevelIsReportedAndCanBeMapped()
{
    Document doc;
    useLevels(doc, {u"g1"_s, u"g2"_s, u"second"_s});
    DataPanel panel(&doc);
    QVERIFY(panel.openFile(kThreeGroups));
    QVERIFY(readAndWait(panel));
    QVERIFY(!panel.fit().has_value());
    QVERIFY2(panel.unmatchedText().contains(u"In the data only: g3"_s), qPrintable(panel.unmatchedText()));
    QVERIFY(panel.unmatchedText().contains(u"In the scheme without data: second"_s));
    QVERIFY(!panel.message().isEmpty()); // core's refusal, naming both sides
    QVERIFY(panel.message().contains(u"g3"_s));

    panel.mapLevel(u"g3"_s, u"second"_s);
    QVERIFY2(panel.fit().has_value(), qPrintable(panel.message()));
    QVERIFY(panel.unmatchedText().isEmpty());
    QCOMPARE(qRound(panel.fit()->coefficients[2].estimate * 1000), 494);
}

void TestDataPanel::skippedRowsAreListedWithLines()
{
    QTemporaryDir dir;
    QFile in(kThreeGroups);
    QVERIFY(in.open(QIODevice::ReadOnly));
    QByteArray bytes = in.readAll();
    bytes += "g1,heavy\n";
    const QString path = dir.filePath(u"groups.csv"_s);
    QFile out(path);
    QVERIFY(out.open(QIODevice::WriteOnly));
    out.write(bytes);
    out.close();

    Document doc;
    useLevels(doc, {u"g1"_s, u"g2"_s, u"g3"_s});
    DataPanel panel(&doc);
    QVERIFY(panel.openFile(path));
    QVERIFY(readAndWait(panel));
    QVERIFY(panel.fit().has_value());
    QVERIFY2(panel.problemsText().contains(u"line 32"_s), qPrintable(panel.problemsText()));
    QVERIFY(panel.problemsText().contains(u"heavy"_s));
    QCOMPARE(qRound(panel.fit()->coefficients[0].estimate * 1000), 5032);
}

void TestDataPanel::unreadableFileShowsMessage()
{
    Document doc;
    DataPanel panel(&doc);
    QVERIFY(!panel.openFile(u"/nonexistent/data.csv"_s));
    QVERIFY(panel.message().contains(u"/nonexistent/data.csv"_s));
}

// Invented yields for the irrigation demo (eight plots per schedule, one unreadable row).
void TestDataPanel::rendersTheIrrigationDemo()
{
    QTemporaryDir dir;
    const QString path = dir.filePath(u"irrigation-yields.csv"_s);
    QFile out(path);
    QVERIFY(out.open(QIODevice::WriteOnly));
    out.write("plot,schedule,yield_kg\n");
    const char *levels[] = {"none", "daily drip", "alternate-day drip", "weekly furrow", "fortnightly furrow"};
    const double base[] = {3.9, 5.5, 5.0, 4.8, 4.4};
    const double wiggle[] = {-0.6, 0.3, 0.8, -0.2, 0.1, -0.9, 0.5, 0.0};
    int plot = 1;
    for (int l = 0; l < 5; ++l)
        for (int i = 0; i < 8; ++i)
            out.write(QStringLiteral("%1,%2,%3\n").arg(plot++).arg(QString::fromLatin1(levels[l])).arg(base[l] + wiggle[(i + l) % 8], 0, 'f', 2).toUtf8());
    out.write("41,weekly furrow,lost\n");
    out.close();

    Document doc;
    doc.reset(loadDemoStudy(u"irrigation"_s).take(), {});
    DataPanel panel(&doc);
    QVERIFY(panel.openFile(path));
    panel.setColumns(u"schedule"_s, u"yield_kg"_s);
    QVERIFY(readAndWait(panel));
    QVERIFY2(panel.fit().has_value(), qPrintable(panel.message()));
    QVERIFY(panel.problemsText().contains(u"line 42"_s));
    QVERIFY(renderPanel(panel, QSize(1500, 470), u"data"_s));
}

// With the hedgerow design open (3 margins x 2 mowing dates, treatment coding with the
// interaction), the panel offers one column per factor, takes the columns named like the
// factors, and fits the design over the cells. With treatment coding every coefficient is a
// difference of cell means, computed here by hand from the rows written.
void TestDataPanel::fitsADesignFromOneColumnPerFactor()
{
    QTemporaryDir dir;
    const QString path = dir.filePath(u"margins.csv"_s);
    QByteArray csv = "plot,visits,mowing,margin\n"; // not in the design's order, on purpose
    const char *margins[] = {"bare", "grass", "wildflower"};
    const char *dates[] = {"early", "late"};
    double sum[6] = {}, count[6] = {};
    int plot = 0;
    for (int c = 0; c < 6; ++c)
        for (int i = 0; i < 3 + c % 2; ++i) {
            const double v = 10.0 + 2.0 * c + 0.3 * c * c + (i * 37 % 7) * 0.5;
            sum[c] += v;
            ++count[c];
            csv += QByteArray::number(++plot) + ',' + QByteArray::number(v) + ',' + dates[c % 2] + ',' + margins[c / 2] + '\n';
        }
    QVERIFY(test::writeFile(path, csv));
    double mean[6];
    for (int c = 0; c < 6; ++c)
        mean[c] = sum[c] / count[c];

    Document doc;
    doc.reset(loadDemoStudy(u"hedgerow"_s).take(), {});
    QVERIFY(doc.isDesign());
    DataPanel panel(&doc);
    QVERIFY(panel.openFile(path));
    panel.setColumns(u"margin"_s, u"visits"_s);
    QVERIFY(readAndWait(panel));
    QVERIFY2(panel.fit().has_value(), qPrintable(panel.message()));
    const FitResult &fit = *panel.fit();
    QCOMPARE(fit.levels, doc.designAnalysis().cells);
    QCOMPARE(fit.coefficients.size(), size_t(6));
    // Cells A-major: bare·early, bare·late, grass·early, grass·late, wildflower·early, wildflower·late.
    const double expected[] = {mean[0], mean[2] - mean[0], mean[4] - mean[0], mean[1] - mean[0],
                               mean[3] - mean[2] - mean[1] + mean[0], mean[5] - mean[4] - mean[1] + mean[0]};
    for (size_t i = 0; i < 6; ++i)
        QVERIFY2(std::abs(fit.coefficients[i].estimate - expected[i]) <= 1e-9 * std::max(1.0, std::abs(expected[i])),
                 qPrintable(u"coefficient %1: %2, expected %3"_s.arg(i).arg(fit.coefficients[i].estimate).arg(expected[i])));
    QVERIFY(panel.unmatchedText().isEmpty());
    QVERIFY2(panel.summaryText().contains(u"21 observations in 6 cells"_s), qPrintable(panel.summaryText()));
    QCOMPARE(panel.mappingTable()->model()->headerData(DataPanel::SchemeLevelColumn, Qt::Horizontal).toString(), u"Design cell"_s);
    QVERIFY(renderPanel(panel, QSize(1500, 470), u"data-design"_s));

    // A design that is not usable (here: no terms) is named as the reason, not fitted.
    Study broken = doc.study();
    broken.design.terms.clear();
    doc.reset(broken, {});
    QVERIFY(!panel.fit().has_value());
    QVERIFY2(panel.message().contains(u"the design cannot be fitted: design.terms: give at least one term"_s), qPrintable(panel.message()));
}

// The hedgerow design with no rows for grass·late: with the interaction the panel refuses and says
// which term to leave out; main effects only, it fits the five cells with data and says which
// coefficients now test something else (the numbers themselves: TestEmptyCells, against NumPy).
void TestDataPanel::designCellWithoutDataIsLeftOutWhenTheTermsAllow()
{
    Document doc;
    doc.reset(loadDemoStudy(u"hedgerow"_s).take(), {});
    QTemporaryDir dir;
    const QString path = dir.filePath(u"margins.csv"_s);
    QByteArray csv = "margin,mowing,visits\n";
    for (const char *cell : {"bare,early", "bare,late", "grass,early", "wildflower,early", "wildflower,late"})
        for (int i = 0; i < 3; ++i)
            csv += QByteArray(cell) + ',' + QByteArray::number(10 + i * 2 + int(qstrlen(cell)) % 5) + '\n';
    QVERIFY(test::writeFile(path, csv));
    DataPanel panel(&doc);
    QVERIFY(panel.openFile(path));
    panel.setColumns(u"margin"_s, u"visits"_s);
    QVERIFY(readAndWait(panel));
    QVERIFY(!panel.fit().has_value());
    QVERIFY2(panel.message().contains(u"empty cell (no rows in the data): grass\u00b7late. The chosen terms cannot be estimated"_s),
             qPrintable(panel.message()));
    QVERIFY2(panel.message().contains(u"Leave out the term margin \u00d7 mowing"_s), qPrintable(panel.message()));

    Study mainEffects = doc.study();
    mainEffects.design.terms.pop_back();
    doc.editStudy(mainEffects, u"Leave out the interaction"_s);
    QVERIFY2(panel.fit().has_value(), qPrintable(panel.message()));
    QCOMPARE(panel.fit()->levels.size(), 5);
    QCOMPARE(panel.fit()->coefficients.size(), size_t(4));
    QVERIFY2(panel.problemsText().contains(u"the empty cell grass\u00b7late (no rows in the data) changes what"_s), qPrintable(panel.problemsText()));
    QVERIFY(renderPanel(panel, QSize(1500, 470), u"data-design-empty-cell"_s));
}

// The proposed response is the first numeric column that is not a row label (named like one,
// or whole numbers counting up by one), and text columns are not offered at all.
void TestDataPanel::responseIsAMeasurementNeverText_data()
{
    QTest::addColumn<QByteArray>("csv");
    QTest::addColumn<QString>("proposed");
    QTest::addColumn<QStringList>("offered");
    QTest::newRow("counting id first") << QByteArray("id,group,weight\n1,a,4.2\n2,b,5.1\n3,a,3.9\n4,b,6.0\n") << u"weight"_s
                                       << QStringList{u"id"_s, u"weight"_s};
    QTest::newRow("named plot_id, not counting") << QByteArray("plot_id,dose,yield\n17,low,2.5\n4,high,3.1\n9,low,2.2\n")
                                                 << u"yield"_s << QStringList{u"plot_id"_s, u"yield"_s};
    QTest::newRow("whole-number response") << QByteArray("site,count,note\nnorth,12,dry\nsouth,7,wet\neast,30,dry\n") << u"count"_s
                                           << QStringList{u"count"_s};
    QTest::newRow("only a row label") << QByteArray("row,group\n1,a\n2,b\n3,a\n") << u"row"_s << QStringList{u"row"_s};
}

void TestDataPanel::responseIsAMeasurementNeverText()
{
    QFETCH(QByteArray, csv);
    QFETCH(QString, proposed);
    QFETCH(QStringList, offered);
    QTemporaryDir dir;
    const QString path = dir.filePath(u"data.csv"_s);
    QVERIFY(test::writeFile(path, csv));
    Document doc;
    DataPanel panel(&doc);
    QVERIFY2(panel.openFile(path), qPrintable(panel.message()));
    QCOMPARE(panel.responseBox()->currentText(), proposed);
    QStringList items;
    for (int i = 0; i < panel.responseBox()->count(); ++i)
        items << panel.responseBox()->itemText(i);
    QCOMPARE(items, offered);
}

// A participant column chosen: the check is by participant (core's fitParticipants, which
// TestParticipantFit holds against SciPy), said plainly, with what it does not fit.
void TestDataPanel::participantColumnGivesTheByParticipantCheck()
{
    QTemporaryDir dir;
    const QString path = dir.filePath(u"rt.csv"_s);
    QFile out(path);
    QVERIFY(out.open(QIODevice::WriteOnly));
    out.write("subject,cue,rt\ns1,a,500\ns1,b,480\ns1,c,530\ns2,a,610\ns2,b,600\ns2,c,650\ns3,a,450\ns3,b,440\ns3,c,470\n"
              "s4,a,520\ns4,b,490\ns4,c,560\ns5,a,580\ns5,b,575\n");
    out.close();
    Document doc;
    useLevels(doc, {u"a"_s, u"b"_s, u"c"_s});
    DataPanel panel(&doc);
    QVERIFY(panel.openFile(path));
    panel.setColumns(u"cue"_s, u"rt"_s, {});
    panel.participantBox()->setCurrentText(u"subject"_s);
    QVERIFY(readAndWait(panel));
    QVERIFY2(panel.fit().has_value(), qPrintable(panel.message()));
    QVERIFY(panel.fit()->byParticipant);
    QCOMPARE(panel.fit()->completeParticipants, 4);
    QCOMPARE(panel.fit()->coefficients[1].participants, 5); // b - a: s5 has both
    QCOMPARE(panel.fit()->coefficients[2].participants, 4); // c - a: s5 lacks c
    QVERIFY2(panel.summaryText().contains(u"5 participants, 4 with every level"_s), qPrintable(panel.summaryText()));
    QVERIFY(panel.summaryText().contains(u"not a mixed-effects model"_s));
}

// The warmup demo (routine between, vowel within) with a participant column: the check is core's
// fitMixedParticipants (TestMixedFit holds its multivariate tests against statsmodels' MANOVA);
// the summary leads with the within cells' Hotelling test, and the notes list the others.
void TestDataPanel::mixedDesignShowsItsMultivariateTests()
{
    QTemporaryDir dir;
    const QString path = dir.filePath(u"warmup.csv"_s);
    QByteArray csv = "singer,routine,vowel,drift\n";
    const char *vowels[] = {"ah", "ee", "oo"};
    const int drift[6][3] = {{10, 14, 12}, {12, 15, 13}, {9, 14, 10}, {8, 11, 9}, {9, 13, 11}, {7, 10, 10}};
    for (int singer = 0; singer < 6; ++singer)
        for (int v = 0; v < 3; ++v)
            csv += "s" + QByteArray::number(singer + 1) + (singer < 3 ? ",humming," : ",lip trills,") + vowels[v] + ','
                   + QByteArray::number(drift[singer][v]) + '\n';
    QVERIFY(test::writeFile(path, csv));
    Document doc;
    doc.reset(loadDemoStudy(u"warmup"_s).take(), {});
    DataPanel panel(&doc);
    QVERIFY(panel.openFile(path));
    panel.setColumns(u"routine"_s, u"drift"_s);
    // Without the participant column the rows are fitted as independent, and the summary leads
    // with the caution that says so (core's independentRowsCaution).
    QVERIFY(readAndWait(panel));
    QVERIFY2(panel.fit().has_value(), qPrintable(panel.message()));
    QVERIFY(!panel.fit()->mixedDesign);
    const QString caution = u"'vowel' is measured within participants, but the data were read without a participant column"_s;
    QVERIFY2(panel.summaryText().contains(caution), qPrintable(panel.summaryText()));
    QVERIFY(panel.summaryText().indexOf(caution) < panel.summaryText().indexOf(u"Do the cell means differ?"_s));
    panel.participantBox()->setCurrentText(u"singer"_s);
    QVERIFY(readAndWait(panel));
    QVERIFY2(panel.fit().has_value(), qPrintable(panel.message()));
    QVERIFY(panel.fit()->mixedDesign);
    QVERIFY(!panel.summaryText().contains(caution));
    QCOMPARE(panel.fit()->fDf1, 2.0);
    QCOMPARE(panel.fit()->fDf2, 3.0); // 6 singers in 2 groups: 4 - 2 + 1
    QVERIFY2(panel.summaryText().contains(u"Do the within cells differ? F(2, 3) = "_s), qPrintable(panel.summaryText()));
    QVERIFY2(panel.summaryText().contains(u"6 participants, 6 with every within cell"_s), qPrintable(panel.summaryText()));
    QVERIFY2(panel.problemsText().contains(u"routine \u00d7 vowel: \u039b = "_s), qPrintable(panel.problemsText()));
    QVERIFY(panel.problemsText().contains(u"not adjusted for multiplicity"_s));
    QVERIFY(renderPanel(panel, QSize(1366, 520), u"data-mixed"_s));

    // With the tunes sung as items (each tune rotated through both routines and every vowel over
    // the singers): the by-item check of the design beside it, paired by column name
    // (TestItemFit::designByItemAgreesWithScipy checks its figures).
    csv = "singer,tune,routine,vowel,drift\n";
    for (int singer = 0; singer < 6; ++singer)
        for (int tune = 0; tune < 6; ++tune)
            csv += "s" + QByteArray::number(singer + 1) + ",t" + QByteArray::number(tune + 1) + (singer < 3 ? ",humming," : ",lip trills,")
                   + vowels[(tune + singer) % 3] + ',' + QByteArray::number(10 + (tune + singer) % 3 * 2 + (singer * 7 + tune * 3) % 5) + '\n';
    QVERIFY(test::writeFile(path, csv));
    QVERIFY(panel.openFile(path));
    panel.setColumns(u"routine"_s, u"drift"_s);
    panel.participantBox()->setCurrentText(u"singer"_s);
    panel.itemBox()->setCurrentText(u"tune"_s);
    QVERIFY(readAndWait(panel));
    QVERIFY2(panel.itemAnalysis().has_value(), qPrintable(panel.message()));
    QCOMPARE(panel.itemAnalysis()->byItem.participants, 6);
    QCOMPARE(panel.itemAnalysis()->byItem.coefficients.size(), panel.fit()->coefficients.size());
    for (size_t c = 0; c < panel.fit()->coefficients.size(); ++c)
        QCOMPARE(panel.itemAnalysis()->byItem.coefficients[c].name, panel.fit()->coefficients[c].name);
    QVERIFY(panel.itemTable()->isVisibleTo(&panel));
}

// An item column beside the participant column: the by-item table with min F' from core's
// fitItems (checked against SciPy in TestItemFit), the scope sentence, and an item seen at one
// level named in the message while the by-participant check stays.
void TestDataPanel::itemColumnGivesTheByItemCheckAndMinF()
{
    QTemporaryDir dir;
    const QString path = dir.filePath(u"rt.csv"_s);
    const QByteArray bytes = test::latinSquareCsv("subject,sentence,cue,rt", {u"s"_s, u"w"_s}, {u"a"_s, u"b"_s, u"c"_s}, 9, 9,
                                                  [](int p, int i, int j) { return 500 + 7 * p + 5 * i - 12 * j + ((p * 31 + i * 17) % 23); });
    const auto readByItem = [&](DataPanel &panel) {
        panel.setColumns(u"cue"_s, u"rt"_s, {});
        panel.participantBox()->setCurrentText(u"subject"_s);
        panel.itemBox()->setCurrentText(u"sentence"_s);
        return readAndWait(panel);
    };
    QVERIFY(test::writeFile(path, bytes));
    Document doc;
    useLevels(doc, {u"a"_s, u"b"_s, u"c"_s});
    DataPanel panel(&doc);
    QVERIFY(panel.openFile(path));
    QVERIFY(readByItem(panel));
    QVERIFY2(panel.itemAnalysis().has_value(), qPrintable(panel.message()));
    const ItemAnalysis &items = *panel.itemAnalysis();
    QCOMPARE(items.byItem.participants, 9);
    const QTableView *t = panel.itemTable();
    QVERIFY(t->isVisibleTo(&panel));
    QCOMPARE(rowCount(t), 3);
    QCOMPARE(cellText(t, 1, MinFColumn), numberText(items.minF[1].f, 4));
    QCOMPARE(cellText(t, 1, MinFPColumn), pValueText(items.minF[1].p));
    QCOMPARE(cellText(t, 2, ItemTColumn), u"%1 (8)"_s.arg(numberText(items.byItem.coefficients[2].t, 3)));
    QVERIFY2(panel.summaryText().contains(u"over the 9 of 9 items with every level"_s), qPrintable(panel.summaryText()));
    QVERIFY(panel.summaryText().contains(u"not a mixed-effects model with crossed random effects"_s));
    QVERIFY(renderPanel(panel, QSize(1366, 420), u"data-by-item"_s));

    // An item seen at one level only: named, and the by-participant check stays.
    QVERIFY(test::writeFile(path, bytes + "s0,w99,a,500\ns1,w99,a,510\n"));
    QVERIFY(panel.openFile(path));
    QVERIFY(readByItem(panel));
    QVERIFY(panel.fit().has_value());
    QVERIFY(!panel.itemAnalysis().has_value());
    QVERIFY(!t->isVisibleTo(&panel));
    QVERIFY2(panel.message().contains(u"item 'w99' (column 'sentence', first on line 83) has values at level 'a' only"_s),
             qPrintable(panel.message()));
}

QTEST_MAIN(TestDataPanel)
// "Open data…" asks the window's prompter, so a script can answer the file dialog.
void TestDataPanel::openButtonAsksThePrompter()
{
    Document doc;
    useLevels(doc, {u"g1"_s, u"g2"_s, u"g3"_s});
    DataPanel panel(&doc);
    ScriptedPrompter prompter;
    panel.setPrompter(&prompter);
    auto *open = panel.findChild<QAbstractButton *>(u"openData"_s);
    QVERIFY(open);
    open->click(); // cancelled: nothing opened
    QCOMPARE(prompter.fileQuestions.size(), 1);
    QCOMPARE(prompter.fileQuestions.first().title, u"Open a data file"_s);
    QVERIFY(prompter.fileQuestions.first().filter.contains(u"*.csv"_s));
    QCOMPARE(panel.previewTable()->model()->columnCount(), 0);
    prompter.openPath = kThreeGroups;
    open->click();
    QCOMPARE(panel.previewTable()->model()->columnCount(), 2);
}

#include "TestDataPanel.moc"
