#include "ui/coding/CodingPanel.h"
#include "ui/document/Document.h"
#include "ui/levels/LevelsModel.h"
#include "ui/levels/LevelsPanel.h"
#include "ui/levels/LevelsView.h"
#include "ui/meaning/MeaningModel.h"
#include "ui/meaning/MeaningPanel.h"
#include "ui/coding/SchemePicker.h"
#include "tests/support/WindowFixture.h"

#include <QAbstractItemModelTester>
#include <QComboBox>
#include <QLabel>
#include <QLineEdit>
#include <QMimeData>
#include <QSignalSpy>
#include <QTest>

using namespace Qt::StringLiterals;
using namespace cb;

class TestLevelsModel : public QObject
{
    Q_OBJECT

private slots:
    void passesTheModelTester();
    void enterAfterANameMovesToTheNextLevel();
    void aRenamedLevelAppearsInEveryHypothesis_data();
    void aRenamedLevelAppearsInEveryHypothesis();
    void aClashingNameIsRefused();
    void keyboardReorderMovesTheLevelAndItsWeights();
    void droppingARowMovesTheLevel();
    void plannedSizesAndPositions();
    void addAndRemoveLevelsAreUndoable();
    void measureIsChosenAndUndoable();
};

namespace {
QStringList allHypothesisTexts(MainWindow &w)
{
    QStringList out;
    MeaningModel *m = w.meaningPanel()->model();
    for (int r = 0; r < m->rowCount(); ++r)
        out << m->index(r, 0).data(MeaningModel::SymbolsRole).toString() + u" | "_s + m->index(r, 0).data(MeaningModel::WordsRole).toString();
    return out;
}
} // namespace

void TestLevelsModel::passesTheModelTester()
{
    WindowFixture f;
    LevelsModel *m = f.window->levelsPanel()->model();
    QAbstractItemModelTester tester(m, QAbstractItemModelTester::FailureReportingMode::QtTest);
    QVERIFY(m->addLevel());
    QVERIFY(m->moveLevel(4, 0));
    QVERIFY(m->removeLevel(2));
}

// Typing names one after another: Enter commits a name and moves down, so the next name goes
// to the next level instead of overwriting the one just typed (as in the coding grid).
void TestLevelsModel::enterAfterANameMovesToTheNextLevel()
{
    WindowFixture f;
    QVERIFY(f.show());
    LevelsView *v = f.window->levelsPanel()->view();
    v->setCurrentIndex(v->model()->index(0, LevelsModel::NameColumn));
    int row = 0;
    for (const QString &name : {u"low"_s, u"mid"_s}) {
        v->edit(v->currentIndex());
        QLineEdit *editor = nullptr;
        for (QLineEdit *e : v->viewport()->findChildren<QLineEdit *>())
            if (e->isVisible())
                editor = e;
        QVERIFY(editor);
        editor->selectAll();
        QTest::keyClicks(editor, name);
        QTest::keyClick(editor, Qt::Key_Return);
        ++row;
        QTRY_COMPARE(v->currentIndex().row(), row); // the delegate commits from the event loop
    }
    QCOMPARE(f.window->document()->scheme().factor.levels, (QStringList{u"low"_s, u"mid"_s, u"C"_s, u"D"_s}));
    QCOMPARE(v->currentIndex().row(), 2);
    QCOMPARE(v->currentIndex().column(), int(LevelsModel::NameColumn));
}

void TestLevelsModel::aRenamedLevelAppearsInEveryHypothesis_data()
{
    QTest::addColumn<QString>("scheme");
    QTest::newRow("treatment") << u"treatment"_s;
    QTest::newRow("sum") << u"sum"_s;
    QTest::newRow("reverse helmert") << u"reverse-helmert"_s;
    QTest::newRow("polynomial") << u"polynomial"_s;
    QTest::newRow("custom") << u"custom"_s;
}

void TestLevelsModel::aRenamedLevelAppearsInEveryHypothesis()
{
    QFETCH(QString, scheme);
    WindowFixture f;
    MainWindow &w = *f.window;
    Factor factor;
    factor.levels = {u"lvlA"_s, u"lvlB"_s, u"lvlC"_s, u"lvlD"_s};
    w.document()->reset(makeScheme(factor, SchemeKind::Treatment).take(), {});
    if (scheme == u"custom"_s) {
        // Every column compares lvlA with one other level, halved.
        Scheme s = w.document()->scheme();
        s.kind = SchemeKind::Custom;
        for (Column &c : s.columns)
            c.weights[0] = Weight::exact(Rational(-1, 2));
        w.document()->edit(s, u"custom"_s);
    } else {
        QVERIFY(w.codingPanel()->picker()->applyStandard(*schemeFromId(scheme)));
    }
    const QStringList before = allHypothesisTexts(w);
    QCOMPARE(before.size(), 4);
    QVERIFY(before.join(u' ').contains(u"lvlA"_s));

    LevelsModel *m = w.levelsPanel()->model();
    QVERIFY(m->setData(m->index(0, LevelsModel::NameColumn), u"no irrigation"_s));
    // Every text that named the level now names it by its new name, and nothing else changed.
    const QStringList after = allHypothesisTexts(w);
    for (int i = 0; i < before.size(); ++i)
        QCOMPARE(after[i], QString(before[i]).replace(u"lvlA"_s, u"no irrigation"_s));
    // One undo step, named after what happened.
    QCOMPARE(w.document()->undoStack()->undoText(), u"Rename level \u2018lvlA\u2019 to \u2018no irrigation\u2019"_s);
    w.document()->undoStack()->undo();
    QCOMPARE(allHypothesisTexts(w), before);
}

void TestLevelsModel::aClashingNameIsRefused()
{
    WindowFixture f;
    LevelsModel *m = f.window->levelsPanel()->model();
    QSignalSpy refused(m, &LevelsModel::editRefused);
    QVERIFY(!m->setData(m->index(0, LevelsModel::NameColumn), u"B"_s));
    QCOMPARE(refused.count(), 1);
    QVERIFY(refused.first().first().toString().contains(u"unique"_s));
    QCOMPARE(f.window->document()->scheme().factor.levels[0], u"A"_s);
}

void TestLevelsModel::keyboardReorderMovesTheLevelAndItsWeights()
{
    WindowFixture f;
    QVERIFY(f.show());
    MainWindow &w = *f.window;
    Document *d = w.document();
    Scheme s = d->scheme();
    s.kind = SchemeKind::Custom;
    s.columns[0].weights = {Weight(1), Weight(2), Weight(3), Weight(4)};
    d->edit(s, u"custom"_s);
    LevelsView *v = w.levelsPanel()->view();
    v->setFocus();
    v->setCurrentIndex(v->model()->index(0, LevelsModel::NameColumn));
    QTest::keyClick(v, Qt::Key_Down, Qt::ControlModifier);
    QTest::keyClick(v, Qt::Key_Down, Qt::ControlModifier);
    QCOMPARE(d->scheme().factor.levels, (QStringList{u"B"_s, u"C"_s, u"A"_s, u"D"_s}));
    QCOMPARE(d->scheme().columns[0].weights, (std::vector<Weight>{Weight(2), Weight(3), Weight(1), Weight(4)}));
    QCOMPARE(v->currentIndex().row(), 2); // the cursor follows the level
    QTest::keyClick(v, Qt::Key_Up, Qt::ControlModifier);
    QCOMPARE(d->scheme().factor.levels, (QStringList{u"B"_s, u"A"_s, u"C"_s, u"D"_s}));
    QCOMPARE(d->undoStack()->undoText(), u"Move level \u2018A\u2019 to place 2"_s);
}

void TestLevelsModel::droppingARowMovesTheLevel()
{
    WindowFixture f;
    LevelsModel *m = f.window->levelsPanel()->model();
    std::unique_ptr<QMimeData> data(m->mimeData({m->index(3, 0)}));
    // Dropped between rows 0 and 1: D becomes the second level.
    QVERIFY(!m->dropMimeData(data.get(), Qt::MoveAction, 1, 0, {})); // false: the view must not remove the source row
    QCOMPARE(f.window->document()->scheme().factor.levels, (QStringList{u"A"_s, u"D"_s, u"B"_s, u"C"_s}));
    // The treatment reference stays with A, and columns are rebuilt for the new order.
    QCOMPARE(f.window->document()->scheme().reference, 0);
    QCOMPARE(f.window->document()->scheme().columns[0].name, u"D vs A"_s);
}

void TestLevelsModel::plannedSizesAndPositions()
{
    WindowFixture f;
    LevelsModel *m = f.window->levelsPanel()->model();
    QCOMPARE(m->index(0, LevelsModel::SizeColumn).data().toString(), u"1"_s);
    QVERIFY(m->index(0, LevelsModel::SizeColumn).data(Qt::ForegroundRole).isValid()); // grey: none planned
    QVERIFY(m->setData(m->index(1, LevelsModel::SizeColumn), u"30"_s));
    QCOMPARE(f.window->document()->scheme().factor.plannedN, (std::vector<Rational>{1, 30, 1, 1}));
    QVERIFY(!m->setData(m->index(1, LevelsModel::SizeColumn), u"0"_s));
    QVERIFY(m->setData(m->index(3, LevelsModel::PositionColumn), u"10"_s));
    QCOMPARE(f.window->document()->scheme().factor.positions()[3], Weight(10));
    QVERIFY(!m->setData(m->index(3, LevelsModel::PositionColumn), u"1"_s)); // same position as A
    QVERIFY(m->useEqualSizes());
    QVERIFY(!f.window->document()->scheme().factor.hasPlannedN());
}

void TestLevelsModel::addAndRemoveLevelsAreUndoable()
{
    WindowFixture f;
    LevelsModel *m = f.window->levelsPanel()->model();
    Document *d = f.window->document();
    QVERIFY(m->addLevel());
    QCOMPARE(d->scheme().levelCount(), 5);
    QCOMPARE(d->scheme().columnCount(), 4); // treatment rebuilt for five levels
    QVERIFY(m->removeLevel(0));
    QCOMPARE(d->scheme().factor.levels.first(), u"B"_s);
    QCOMPARE(d->undoStack()->count(), 2);
    d->undoStack()->undo();
    d->undoStack()->undo();
    QCOMPARE(d->scheme().factor.levels, (QStringList{u"A"_s, u"B"_s, u"C"_s, u"D"_s}));
    QVERIFY(!d->isModified());
}


// The factor's kind: a choice beside its name, one undo step; a choice the sizes do not allow is
// refused with the reason and the control goes back to what the factor is.
void TestLevelsModel::measureIsChosenAndUndoable()
{
    WindowFixture f;
    Document *d = f.window->document();
    auto *measure = f.window->levelsPanel()->findChild<QComboBox *>(u"factorMeasure"_s);
    QVERIFY(measure);
    QCOMPARE(d->scheme().factor.measure, Measure::Between);
    QCOMPARE(measure->currentText(), u"between participants"_s);
    const int steps = d->undoStack()->count();
    measure->setCurrentIndex(1);
    emit measure->activated(1);
    QCOMPARE(d->scheme().factor.measure, Measure::Within);
    QCOMPARE(d->undoStack()->count(), steps + 1);
    QVERIFY(d->undoStack()->undoText().contains(u"within participants"_s));
    d->undoStack()->undo();
    QCOMPARE(d->scheme().factor.measure, Measure::Between);
    QCOMPARE(measure->currentIndex(), 0);
    d->undoStack()->redo();
    QCOMPARE(measure->currentIndex(), 1);
    d->undoStack()->undo();

    // Unequal planned sizes are separate groups: within is refused, naming the levels.
    QVERIFY(f.window->levelsPanel()->model()->setData(f.window->levelsPanel()->model()->index(1, LevelsModel::SizeColumn), u"30"_s));
    measure->setCurrentIndex(1);
    emit measure->activated(1);
    QCOMPARE(d->scheme().factor.measure, Measure::Between);
    QCOMPARE(measure->currentIndex(), 0);
    const QList<QLabel *> notice = f.window->levelsPanel()->findChildren<QLabel *>();
    bool said = false;
    for (QLabel *label : notice)
        said = said || label->text().contains(u"same participants at every level"_s);
    QVERIFY(said);
}

QTEST_MAIN(TestLevelsModel)
#include "TestLevelsModel.moc"
