#include "ui/coding/CodingModel.h"
#include "ui/coding/CodingPanel.h"
#include "ui/document/Document.h"
#include "core/model/Scheme.h"
#include "ui/coding/WeightGridView.h"
#include "ui/common/CachedText.h"
#include "tests/support/WindowFixture.h"

#include <QApplication>
#include <QClipboard>
#include <QHeaderView>
#include <QLineEdit>
#include <QSignalSpy>
#include <QTabWidget>
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
    void anEditRepaintsOnlyTheCellsThatChanged();
    void aHeaderGrowsAndShrinksWithItsNames();
};

namespace {

// The window's item delegate, counting the cells it paints.
class PaintCounter : public CachedTextDelegate
{
public:
    using CachedTextDelegate::CachedTextDelegate;
    mutable int painted = 0;
    void paint(QPainter *painter, const QStyleOptionViewItem &option, const QModelIndex &index) const override
    {
        ++painted;
        CachedTextDelegate::paint(painter, option, index);
    }
};

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

// Renaming a column repaints its header section and no cell, and a typed weight repaints the
// cells that changed, not every cell of the grid: the view no longer lays itself out again on
// every change of a header's text (relayoutOnlyWhenHeadersResize).
void TestWeightGridView::anEditRepaintsOnlyTheCellsThatChanged()
{
    WindowFixture f;
    Factor factor;
    factor.name = u"factor"_s;
    for (int i = 1; i <= 6; ++i)
        factor.levels << u"level %1"_s.arg(i);
    f.window->document()->reset(makeScheme(factor, SchemeKind::Helmert).take(), {});
    QVERIFY(f.show());
    WeightGridView *v = f.window->codingPanel()->codingView();
    QAbstractItemModel *m = v->model();
    auto *counter = new PaintCounter(v);
    v->setItemDelegate(counter);
    // Typed weights, as BenchWindow types them: the first makes the coding custom (the panel
    // above the grid changes); after that the names alternate with the same number of lines.
    for (const QString &w : {u"1/3"_s, u"-2/7"_s}) {
        QVERIFY(m->setData(m->index(1, 0), w));
        QTest::qWait(50);
    }
    counter->painted = 0;
    v->viewport()->repaint();
    const int everyCell = counter->painted;
    QVERIFY(everyCell >= 20); // the rows in view of 6 levels x 5 columns

    QSignalSpy renamed(m, &QAbstractItemModel::headerDataChanged);
    QSignalSpy changed(m, &QAbstractItemModel::dataChanged);
    const QString before = m->headerData(0, Qt::Horizontal).toString();
    counter->painted = 0;
    QVERIFY(m->setData(m->index(1, 0), u"1/3"_s));
    QTest::qWait(50); // the paint, and a delayed layout if one were started
    QVERIFY(m->headerData(0, Qt::Horizontal).toString() != before); // the column tests something else
    QVERIFY(renamed.count() > 0);
    int changedCells = 0;
    for (const QList<QVariant> &signal : changed) {
        const QModelIndex a = signal[0].toModelIndex(), b = signal[1].toModelIndex();
        changedCells += (b.row() - a.row() + 1) * (b.column() - a.column() + 1);
    }
    qInfo("%d of %d cells repainted after %d changed", counter->painted, everyCell, changedCells);
    QVERIFY(counter->painted > 0);
    QVERIFY(counter->painted < everyCell / 2);

    // A new name of as many lines: its header section only.
    QVERIFY(m->setHeaderData(4, Qt::Horizontal, u"last one"_s, Qt::EditRole));
    QTest::qWait(50);
    counter->painted = 0;
    QVERIFY(m->setHeaderData(4, Qt::Horizontal, u"final one"_s, Qt::EditRole));
    QTest::qWait(50);
    QCOMPARE(counter->painted, 0);
}

// A column name that needs a second line makes the header taller, and a shorter one makes it
// short again; a view hidden in the other tab has the right header once shown.
void TestWeightGridView::aHeaderGrowsAndShrinksWithItsNames()
{
    WindowFixture f;
    QVERIFY(f.show());
    WeightGridView *v = f.window->codingPanel()->codingView();
    WeightGridView *hidden = f.window->codingPanel()->hypothesisView();
    QVERIFY(!hidden->isVisible());
    QAbstractItemModel *m = v->model();
    const QString longName = u"the mean of the middle dose against the mean of the controls"_s;
    for (int c = 0; c < m->columnCount(); ++c)
        QVERIFY(m->setHeaderData(c, Qt::Horizontal, u"c%1"_s.arg(c), Qt::EditRole));
    QTest::qWait(20);
    QVERIFY(!m->headerData(1, Qt::Horizontal).toString().contains(u'\n'));
    const int oneLine = v->horizontalHeader()->height();
    QVERIFY(m->setHeaderData(1, Qt::Horizontal, longName, Qt::EditRole));
    QVERIFY(m->headerData(1, Qt::Horizontal).toString().contains(u'\n'));
    QTRY_VERIFY(v->horizontalHeader()->height() > oneLine);
    QCOMPARE(v->horizontalHeader()->height(), v->horizontalHeader()->sizeHint().height());
    QVERIFY(m->setHeaderData(1, Qt::Horizontal, u"c1"_s, Qt::EditRole));
    QTRY_COMPARE(v->horizontalHeader()->height(), oneLine);
    // The other tab's grid shows the same names: changed while hidden, laid out when shown.
    QVERIFY(m->setHeaderData(1, Qt::Horizontal, longName, Qt::EditRole));
    auto *tabs = f.window->codingPanel()->findChild<QTabWidget *>();
    QVERIFY(tabs);
    tabs->setCurrentIndex(1);
    QTRY_VERIFY(hidden->isVisible());
    QTRY_COMPARE(hidden->horizontalHeader()->height(), hidden->horizontalHeader()->sizeHint().height());
    QVERIFY(hidden->horizontalHeader()->height() > oneLine);
}

QTEST_MAIN(TestWeightGridView)
#include "TestWeightGridView.moc"
