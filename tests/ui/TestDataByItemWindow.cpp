// The by-item check in the window on a laptop screen (ctest runs it as TestDataByItemWindow1366x768):
// the Check on data tab with a participant and an item column shows the by-item table with min F'
// (core's numbers, checked against SciPy in TestItemFit) and says what it is not. With
// CB_SCREENSHOT_DIR set it saves the window there as window-WxH-by-item.png.
#include "ui/data/DataPanel.h"
#include "ui/data/ItemTable.h"
#include "ui/document/Document.h"
#include "core/model/Scheme.h"
#include "tests/support/FitTestSupport.h"
#include "tests/support/WithinFitSupport.h"
#include "tests/support/WindowFixture.h"

#include <QDockWidget>
#include <QComboBox>
#include <QGuiApplication>
#include <QScreen>
#include <QSignalSpy>
#include <QTableView>
#include <QTest>

using namespace Qt::StringLiterals;
using namespace cb;

class TestDataByItemWindow : public QObject
{
    Q_OBJECT
private slots:
    void byItemTableAndMinFInTheWindow();
};

void TestDataByItemWindow::byItemTableAndMinFInTheWindow()
{
    // Sentences read under three cue types, rotated over the readers in a Latin square (invented numbers).
    QTemporaryDir dir;
    const QString path = dir.filePath(u"reading.csv"_s);
    const QByteArray bytes = test::latinSquareCsv(
        "reader,sentence,cue,ms", {u"r"_s, u"s"_s}, {u"plain"_s, u"hinted"_s, u"misleading"_s}, 12, 15,
        [](int p, int i, int j) { return 420 + 9 * p + 6 * i - 14 * (j == 1) + 11 * (j == 2) + ((p * 37 + i * 13) % 29); });
    QVERIFY(test::writeFile(path, bytes));

    WindowFixture fixture;
    MainWindow &w = *fixture.window;
    Factor f;
    f.name = u"cue"_s;
    f.levels = {u"plain"_s, u"hinted"_s, u"misleading"_s};
    f.measure = Measure::Within;
    w.document()->reset(makeScheme(f, SchemeKind::Treatment).take(), {});
    w.showMaximized();
    QVERIFY(QTest::qWaitForWindowExposed(&w));
    auto *data = w.findChild<DataPanel *>();
    QVERIFY(data);
    w.findChild<QDockWidget *>(u"dataDock"_s)->raise();
    QVERIFY(data->openFile(path));
    data->setColumns(u"cue"_s, u"ms"_s);
    data->participantBox()->setCurrentText(u"reader"_s);
    data->itemBox()->setCurrentText(u"sentence"_s);
    QSignalSpy finished(data, &DataPanel::finished);
    data->readAndFit();
    QVERIFY(finished.wait(10'000));
    QVERIFY2(data->itemAnalysis(), qPrintable(data->message()));
    QTest::qWait(100);
    const QSize screen = QGuiApplication::primaryScreen()->geometry().size();
    const QString shots = qEnvironmentVariable("CB_SCREENSHOT_DIR");
    if (!shots.isEmpty())
        w.grab().save(u"%1/window-%2x%3-by-item.png"_s.arg(shots).arg(screen.width()).arg(screen.height()));
    QVERIFY(data->itemBox()->isVisible());
    QVERIFY(data->itemTable()->isVisible());
    QCOMPARE(data->itemTable()->model()->rowCount(), 3);
    QCOMPARE(data->itemTable()->model()->headerData(MinFColumn, Qt::Horizontal).toString(), u"min F\u2032"_s);
    QVERIFY(data->summaryText().contains(u"not a mixed-effects model with crossed random effects"_s));
}

QTEST_MAIN(TestDataByItemWindow)
#include "TestDataByItemWindow.moc"
