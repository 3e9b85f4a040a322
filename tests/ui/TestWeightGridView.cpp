#include "ui/coding/CodingModel.h"
#include "ui/coding/CodingPanel.h"
#include "ui/document/Document.h"
#include "ui/coding/WeightGridView.h"
#include "tests/support/WindowFixture.h"

#include <QApplication>
#include <QClipboard>
#include <QHeaderView>
#include <QLineEdit>
#include <QSignalSpy>
#include <QTest>

using namespace Qt::StringLiterals;
using namespace cb;

class TestWeightGridView : public QObject
{
    Q_OBJECT

private slots:
    void pastingAThreeByTwoBlockIsOneUndoStep();
    void pasteWithABadCellChangesNothing();
    void pasteThatDoesNotFitIsRefused();
    void oneValueFillsTheSelection();
    void copyGivesTabSeparatedExactText();
    void deleteClearsSelectedCellsToZero();
    void keyboardCopyAndPasteGoThroughTheClipboard();
    void aColumnIsRenamedInItsHeader();
};

namespace {
QString weightText(const Document &d, int level, int column)
{
    return d.scheme().columns[size_t(column)].weights[size_t(level)].display();
}
} // namespace

void TestWeightGridView::pastingAThreeByTwoBlockIsOneUndoStep()
{
    WindowFixture f;
    WeightGridView *v = f.window->codingPanel()->codingView();
    Document *d = f.window->document();
    v->setCurrentIndex(v->model()->index(1, 1));
    // As a spreadsheet puts it on the clipboard: tabs between cells, a newline after each row, Windows line ends.
    QVERIFY(v->pasteText(u"1/3\t-1\r\n0.5\t2\r\n-2/3\t0\r\n"_s));
    QCOMPARE(weightText(*d, 1, 1), u"1/3"_s);
    QCOMPARE(weightText(*d, 1, 2), u"-1"_s);
    QCOMPARE(weightText(*d, 2, 1), u"1/2"_s);
    QCOMPARE(weightText(*d, 2, 2), u"2"_s);
    QCOMPARE(weightText(*d, 3, 1), u"-2/3"_s);
    QCOMPARE(weightText(*d, 3, 2), u"0"_s);
    QCOMPARE(d->undoStack()->count(), 1);
    QCOMPARE(d->undoStack()->undoText(), u"Paste 3 \u00d7 2 weights"_s);
    QCOMPARE(v->selectionModel()->selectedIndexes().size(), 6);
    d->undoStack()->undo();
    QCOMPARE(weightText(*d, 1, 1), u"0"_s);
    QCOMPARE(d->scheme().kind, SchemeKind::Treatment);
}

void TestWeightGridView::pasteWithABadCellChangesNothing()
{
    WindowFixture f;
    WeightGridView *v = f.window->codingPanel()->codingView();
    QSignalSpy refused(v->weightModel(), &WeightTableModel::editRefused);
    v->setCurrentIndex(v->model()->index(0, 0));
    QVERIFY(!v->pasteText(u"1\t2\n3\tx\n"_s));
    QCOMPARE(f.window->document()->undoStack()->count(), 0);
    QCOMPARE(refused.count(), 1);
    QVERIFY2(refused.first().first().toString().contains(u"level \u2018B\u2019, column 2"_s), qPrintable(refused.first().first().toString()));
}

void TestWeightGridView::pasteThatDoesNotFitIsRefused()
{
    WindowFixture f;
    WeightGridView *v = f.window->codingPanel()->codingView();
    QSignalSpy refused(v->weightModel(), &WeightTableModel::editRefused);
    v->setCurrentIndex(v->model()->index(3, 2)); // last level, last column
    QVERIFY(!v->pasteText(u"1\t2\n"_s));
    QCOMPARE(refused.count(), 1);
    QVERIFY(refused.first().first().toString().contains(u"1 \u00d7 2"_s));
    // The footer rows are not part of the grid's weights.
    QCOMPARE(f.window->document()->undoStack()->count(), 0);
}

void TestWeightGridView::oneValueFillsTheSelection()
{
    WindowFixture f;
    WeightGridView *v = f.window->codingPanel()->codingView();
    v->selectionModel()->select(QItemSelection(v->model()->index(0, 0), v->model()->index(1, 1)), QItemSelectionModel::ClearAndSelect);
    QVERIFY(v->pasteText(u"1/4\n"_s));
    Document &d = *f.window->document();
    for (int r = 0; r < 2; ++r)
        for (int c = 0; c < 2; ++c)
            QCOMPARE(weightText(d, r, c), u"1/4"_s);
    QCOMPARE(d.undoStack()->count(), 1);
}

void TestWeightGridView::copyGivesTabSeparatedExactText()
{
    WindowFixture f;
    Document *d = f.window->document();
    d->edit(edits::withWeights(d->scheme(), {{0, 0, Weight::exact(Rational(-2, 3))}, {1, 1, Weight::approx(0.1)}}), u"set"_s);
    WeightGridView *v = f.window->codingPanel()->codingView();
    v->selectionModel()->select(QItemSelection(v->model()->index(0, 0), v->model()->index(1, 1)), QItemSelectionModel::ClearAndSelect);
    // Exact fractions as typed, floating weights as plain decimals (spreadsheets do not know "~").
    QCOMPARE(v->selectionText(), u"-2/3\t0\n1\t0.1\n"_s);
}

void TestWeightGridView::deleteClearsSelectedCellsToZero()
{
    WindowFixture f;
    QVERIFY(f.show());
    WeightGridView *v = f.window->codingPanel()->codingView();
    v->setFocus();
    v->setCurrentIndex(v->model()->index(1, 0));
    v->selectionModel()->select(QItemSelection(v->model()->index(1, 0), v->model()->index(2, 1)), QItemSelectionModel::ClearAndSelect);
    QTest::keyClick(v, Qt::Key_Delete);
    Document &d = *f.window->document();
    QCOMPARE(weightText(d, 1, 0), u"0"_s);
    QCOMPARE(weightText(d, 2, 1), u"0"_s);
    QCOMPARE(weightText(d, 3, 2), u"1"_s); // outside the selection
    QCOMPARE(d.undoStack()->count(), 1);
    QVERIFY(d.undoStack()->undoText().contains(u"Clear"_s));
}

void TestWeightGridView::keyboardCopyAndPasteGoThroughTheClipboard()
{
    WindowFixture f;
    QVERIFY(f.show());
    WeightGridView *v = f.window->codingPanel()->codingView();
    v->setFocus();
    v->setCurrentIndex(v->model()->index(1, 0));
    v->selectionModel()->select(QItemSelection(v->model()->index(1, 0), v->model()->index(2, 1)), QItemSelectionModel::ClearAndSelect);
    QTest::keySequence(v, QKeySequence::Copy);
    QCOMPARE(QApplication::clipboard()->text(), u"1\t0\n0\t1\n"_s);
    v->setCurrentIndex(v->model()->index(0, 1));
    QTest::keySequence(v, QKeySequence::Paste);
    Document &d = *f.window->document();
    QCOMPARE(weightText(d, 0, 1), u"1"_s);
    QCOMPARE(weightText(d, 0, 2), u"0"_s);
    QCOMPARE(weightText(d, 1, 1), u"0"_s);
    QCOMPARE(weightText(d, 1, 2), u"1"_s);
    QCOMPARE(d.undoStack()->count(), 1);
}

void TestWeightGridView::aColumnIsRenamedInItsHeader()
{
    WindowFixture f;
    QVERIFY(f.show());
    WeightGridView *v = f.window->codingPanel()->codingView();
    v->renameColumn(1);
    auto *editor = v->horizontalHeader()->viewport()->findChild<QLineEdit *>();
    QVERIFY(editor);
    QCOMPARE(editor->text(), u"C vs A"_s);
    editor->selectAll();
    QTest::keyClicks(editor, u"mid dose"_s);
    QTest::keyClick(editor, Qt::Key_Return);
    QCOMPARE(f.window->document()->scheme().columns[1].name, u"mid dose"_s);
    QCOMPARE(f.window->document()->undoStack()->undoText(), u"Rename column 2 to \u2018mid dose\u2019"_s);
    // Enter only saved the name: no weight cell is open for the next keystrokes.
    for (QLineEdit *cellEditor : v->viewport()->findChildren<QLineEdit *>())
        QVERIFY(!cellEditor->isVisible());
    QCOMPARE(f.window->document()->undoStack()->count(), 1);
    // Escape leaves the name alone.
    v->renameColumn(0);
    QLineEdit *second = nullptr;
    const QList<QLineEdit *> editors = v->horizontalHeader()->viewport()->findChildren<QLineEdit *>();
    for (QLineEdit *e : editors)
        if (e->isVisible())
            second = e;
    QVERIFY(second);
    QTest::keyClicks(second, u"xyz"_s);
    QTest::keyClick(second, Qt::Key_Escape);
    QVERIFY(!second->isVisible());
    QCOMPARE(f.window->document()->scheme().columns[0].name, u"B vs A"_s);
}

QTEST_MAIN(TestWeightGridView)
#include "TestWeightGridView.moc"
