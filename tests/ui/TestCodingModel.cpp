#include "ui/coding/CodingModel.h"
#include "ui/coding/CodingPanel.h"
#include "ui/document/Document.h"
#include "ui/meaning/MeaningModel.h"
#include "ui/meaning/MeaningPanel.h"
#include "ui/coding/WeightGridView.h"
#include "tests/support/WindowFixture.h"

#include <QAbstractItemModelTester>
#include <QLineEdit>
#include <QSignalSpy>
#include <QTest>

using namespace Qt::StringLiterals;
using namespace cb;

class TestCodingModel : public QObject
{
    Q_OBJECT

private slots:
    void passesTheModelTester();
    void typingIntoACellUpdatesHypothesesAndIndicators();
    void undoRestoresTheCellAndTheIndicators();
    void badTextIsRefusedAndThePreviousValueKept_data();
    void badTextIsRefusedAndThePreviousValueKept();
    void acceptedTexts_data();
    void acceptedTexts();
    void unchangedTextPushesNothing();
    void floatingWeightsKeepTheirValueWhenReentered();
    void footerShowsSumsOrthogonalityAndVif();
    void renamingAColumnIsOneUndoStep();

private:
    static QModelIndex cell(MainWindow &w, int row, int column) { return w.codingPanel()->codingModel()->index(row, column); }
    static bool typeInto(MainWindow &w, int row, int column, const QString &text);
};

bool TestCodingModel::typeInto(MainWindow &w, int row, int column, const QString &text)
{
    WeightGridView *view = w.codingPanel()->codingView();
    const QModelIndex i = cell(w, row, column);
    view->setCurrentIndex(i);
    view->edit(i);
    QLineEdit *editor = nullptr;
    const QList<QLineEdit *> candidates = view->viewport()->findChildren<QLineEdit *>();
    for (QLineEdit *e : candidates)
        if (e->isVisible())
            editor = e;
    if (!editor)
        return false;
    editor->selectAll();
    QTest::keyClicks(editor, text);
    QTest::keyClick(editor, Qt::Key_Return);
    QCoreApplication::processEvents(); // the delegate commits Enter through a queued call
    QCoreApplication::sendPostedEvents(nullptr, QEvent::DeferredDelete); // and the closed editor goes away
    return true;
}

void TestCodingModel::passesTheModelTester()
{
    WindowFixture f;
    QAbstractItemModelTester tester(f.window->codingPanel()->codingModel(), QAbstractItemModelTester::FailureReportingMode::QtTest);
    f.window->document()->edit(edits::withLevelAdded(f.window->document()->scheme()).take(), u"add"_s);
    f.window->document()->undoStack()->undo();
}

void TestCodingModel::typingIntoACellUpdatesHypothesesAndIndicators()
{
    WindowFixture f;
    QVERIFY(f.show());
    MainWindow &w = *f.window;
    MeaningModel *meaning = w.meaningPanel()->model();
    CodingModel *coding = w.codingPanel()->codingModel();
    // Starter: treatment coding of A, B, C, D; b1 is B minus A.
    QCOMPARE(meaning->index(1, 0).data(MeaningModel::SymbolsRole).toString(), u"b1: mean(B) - mean(A) = 0"_s);
    QCOMPARE(coding->index(4 + CodingModel::SumRow, 0).data().toString(), u"! 1"_s);

    // Column 1 becomes B against the average of A and C: weights -1/2, 1, -1/2, 0, which sum to 0.
    QVERIFY(typeInto(w, 0, 0, u"-1/2"_s));
    QCOMPARE(coding->index(4 + CodingModel::SumRow, 0).data().toString(), u"! 1/2"_s);
    QVERIFY(typeInto(w, 2, 0, u"-0.5"_s));
    const Scheme &s = w.document()->scheme();
    QCOMPARE(s.columns[0].weights[0], Weight::exact(Rational(-1, 2)));
    QCOMPARE(s.columns[0].weights[2], Weight::exact(Rational(-1, 2)));
    QCOMPARE(s.kind, SchemeKind::Custom);
    // Shown as exact fractions with a true minus sign.
    QCOMPARE(cell(w, 0, 0).data().toString(), u"\u22121/2"_s);
    QCOMPARE(cell(w, 2, 0).data().toString(), u"\u22121/2"_s);
    // The sum indicator turned to a check, and the hypothesis text followed.
    QCOMPARE(coding->index(4 + CodingModel::SumRow, 0).data().toString(), u"\u2713 0"_s);
    const QString b1 = meaning->index(1, 0).data(MeaningModel::SymbolsRole).toString();
    QVERIFY2(b1 != u"b1: mean(B) - mean(A) = 0"_s, qPrintable(b1));
    QCOMPARE(b1, w.document()->analysis().hypothesisSymbols[1]);
    QVERIFY(w.isWindowModified());
    QCOMPARE(w.document()->undoStack()->count(), 2);
}

void TestCodingModel::undoRestoresTheCellAndTheIndicators()
{
    WindowFixture f;
    QVERIFY(f.show());
    MainWindow &w = *f.window;
    CodingModel *coding = w.codingPanel()->codingModel();
    const QString sumBefore = coding->index(4 + CodingModel::SumRow, 0).data().toString();
    const QString b1Before = w.meaningPanel()->model()->index(1, 0).data(MeaningModel::SymbolsRole).toString();
    QVERIFY(typeInto(w, 0, 0, u"-1"_s));
    QCOMPARE(coding->index(4 + CodingModel::SumRow, 0).data().toString(), u"\u2713 0"_s);
    QVERIFY(w.document()->undoStack()->undoText().contains(u"-1"_s));
    w.document()->undoStack()->undo();
    QCOMPARE(cell(w, 0, 0).data().toString(), u"0"_s);
    QCOMPARE(coding->index(4 + CodingModel::SumRow, 0).data().toString(), sumBefore);
    QCOMPARE(w.meaningPanel()->model()->index(1, 0).data(MeaningModel::SymbolsRole).toString(), b1Before);
    QCOMPARE(w.document()->scheme().kind, SchemeKind::Treatment);
    QVERIFY(!w.isWindowModified());
}

void TestCodingModel::badTextIsRefusedAndThePreviousValueKept_data()
{
    QTest::addColumn<QString>("text");
    QTest::addColumn<QString>("reason");
    QTest::newRow("word") << u"half"_s << u"not a number"_s;
    QTest::newRow("zero denominator") << u"1/0"_s << u"1/0"_s;
    QTest::newRow("empty") << u" "_s << u"empty"_s;
    QTest::newRow("infinity") << u"inf"_s << u"finite"_s;
}

void TestCodingModel::badTextIsRefusedAndThePreviousValueKept()
{
    QFETCH(QString, text);
    QFETCH(QString, reason);
    WindowFixture f;
    QVERIFY(f.show());
    MainWindow &w = *f.window;
    QSignalSpy refused(w.codingPanel()->codingModel(), &WeightTableModel::editRefused);
    const Weight before = w.document()->scheme().columns[0].weights[1];
    QVERIFY(!w.codingPanel()->codingModel()->setData(cell(w, 1, 0), text));
    QCOMPARE(w.document()->scheme().columns[0].weights[1], before);
    QCOMPARE(w.document()->undoStack()->count(), 0);
    QCOMPARE(refused.count(), 1);
    const QString message = refused.first().first().toString();
    QVERIFY2(message.contains(reason, Qt::CaseInsensitive), qPrintable(message));
    QVERIFY2(message.contains(u"previous value 1 is kept"_s), qPrintable(message));
    QVERIFY2(message.contains(u"level \u2018B\u2019"_s), qPrintable(message)); // names the cell
    QCOMPARE(w.codingPanel()->notice(), message);
}

void TestCodingModel::acceptedTexts_data()
{
    QTest::addColumn<QString>("text");
    QTest::addColumn<QString>("shown");
    QTest::newRow("fraction") << u"2/6"_s << u"1/3"_s;
    QTest::newRow("decimal") << u"0.25"_s << u"1/4"_s;
    QTest::newRow("exponent") << u"1e-3"_s << u"1/1000"_s;
    QTest::newRow("unicode minus") << u"\u22122/3"_s << u"\u22122/3"_s;
    QTest::newRow("spaces") << u"  3 "_s << u"3"_s;
}

void TestCodingModel::acceptedTexts()
{
    QFETCH(QString, text);
    QFETCH(QString, shown);
    WindowFixture f;
    MainWindow &w = *f.window;
    QVERIFY(w.codingPanel()->codingModel()->setData(cell(w, 2, 1), text));
    QCOMPARE(cell(w, 2, 1).data().toString(), shown);
}

void TestCodingModel::unchangedTextPushesNothing()
{
    WindowFixture f;
    MainWindow &w = *f.window;
    QVERIFY(w.codingPanel()->codingModel()->setData(cell(w, 1, 0), u"1"_s));
    QVERIFY(w.codingPanel()->codingModel()->setData(cell(w, 1, 0), u"2/2"_s));
    QCOMPARE(w.document()->undoStack()->count(), 0);
    QCOMPARE(w.document()->scheme().kind, SchemeKind::Treatment);
}

void TestCodingModel::floatingWeightsKeepTheirValueWhenReentered()
{
    WindowFixture f;
    MainWindow &w = *f.window;
    Document *d = w.document();
    d->reset(makeScheme(d->scheme().factor, SchemeKind::Polynomial).take(), {}); // orthonormal: floating weights
    const QModelIndex i = cell(w, 0, 0);
    const QString edit = i.data(Qt::EditRole).toString();
    QVERIFY2(edit.startsWith(u"~"_s), qPrintable(edit)); // marked as floating when edited
    QVERIFY(i.data().toString().startsWith(u"\u2248"_s) || i.data().toString().contains(u'/'));
    QVERIFY(w.codingPanel()->codingModel()->setData(i, edit));
    QCOMPARE(d->undoStack()->count(), 0);
}

void TestCodingModel::footerShowsSumsOrthogonalityAndVif()
{
    WindowFixture f;
    MainWindow &w = *f.window;
    Document *d = w.document();
    // Four levels with planned n 20, 10, 10, 10 and the columns (1,1,-1,-1), (1,-1,0,0), (0,0,1,-1):
    // orthogonal as written, but columns 1 and 2 are not under the planned n:
    // sum n c1 c2 - (sum n c1)(sum n c2)/N = 10 - 10 * 10 / 50 = 8 (by hand).
    Scheme s = d->scheme();
    s.factor.plannedN = {20, 10, 10, 10};
    s.kind = SchemeKind::Custom;
    auto q = [](long v) { return Weight::exact(Rational(v)); };
    s.columns[0].weights = {q(1), q(1), q(-1), q(-1)};
    s.columns[1].weights = {q(1), q(-1), q(0), q(0)};
    s.columns[2].weights = {q(0), q(0), q(1), q(-1)};
    d->edit(s, u"set"_s);
    CodingModel *m = w.codingPanel()->codingModel();
    const int footer = s.levelCount();
    QCOMPARE(m->index(footer + CodingModel::OrthogonalityRow, 0).data().toString(), u"! 2"_s);
    QCOMPARE(m->index(footer + CodingModel::OrthogonalityRow, 1).data().toString(), u"! 1"_s);
    QCOMPARE(m->index(footer + CodingModel::OrthogonalityRow, 2).data().toString(), u"\u2713 none"_s);
    QVERIFY(m->index(footer + CodingModel::OrthogonalityRow, 0).data(Qt::ToolTipRole).toString().contains(u"column 2"_s));
    QVERIFY(m->index(footer + CodingModel::VifRow, 0).data().toString().startsWith(u"\u2713"_s));
    // The pairwise view: as written above the diagonal, under n below.
    QAbstractItemModel *pairs = w.codingPanel()->pairsView()->model();
    QCOMPARE(pairs->index(0, 1).data().toString(), u"\u2713"_s);
    QCOMPARE(pairs->index(1, 0).data().toString(), u"\u2717"_s);
    QVERIFY(pairs->index(1, 0).data(Qt::ToolTipRole).toString().contains(u"is 8"_s));

    // The fix: column 2 as (1, -2, 0, 0), weights inversely proportional to n, is orthogonal under n.
    QVERIFY(m->setData(m->index(1, 1), u"-2"_s));
    QCOMPARE(m->index(footer + CodingModel::OrthogonalityRow, 0).data().toString(), u"\u2713 none"_s);
    QCOMPARE(pairs->index(1, 0).data().toString(), u"\u2713"_s);
}

void TestCodingModel::renamingAColumnIsOneUndoStep()
{
    WindowFixture f;
    MainWindow &w = *f.window;
    CodingModel *m = w.codingPanel()->codingModel();
    QVERIFY(m->setHeaderData(0, Qt::Horizontal, u"B against A"_s));
    QCOMPARE(w.document()->scheme().columns[0].name, u"B against A"_s);
    QVERIFY(m->headerData(0, Qt::Horizontal).toString().contains(u"B against A"_s));
    QVERIFY(w.meaningPanel()->model()->index(1, 0).data(MeaningModel::TitleRole).toString().contains(u"B against A"_s));
    QVERIFY(!m->setHeaderData(0, Qt::Horizontal, u"  "_s));
    QCOMPARE(w.document()->undoStack()->count(), 1);
}

QTEST_MAIN(TestCodingModel)
#include "TestCodingModel.moc"
