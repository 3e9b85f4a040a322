#include "ui/coding/CodingPanel.h"
#include "ui/document/Document.h"
#include "ui/coding/HypothesisModel.h"
#include "core/model/SchemeEdits.h"
#include "ui/coding/WeightGridView.h"
#include "tests/support/WindowFixture.h"

#include <QAbstractItemModelTester>
#include <QJsonArray>
#include <QJsonDocument>
#include <QProcess>
#include <QSignalSpy>
#include <QTest>

using namespace Qt::StringLiterals;
using namespace cb;

class TestHypothesisModel : public QObject
{
    Q_OBJECT

private slots:
    void passesTheModelTester();
    void showsWhatEachCoefficientTests();
    void editingHypothesesRebuildsTheCodingAndRoundTrips();
    void codingAgreesWithNumpysInverse();
    void untestableHypothesesStayADraft();
    void undoAfterAReverseEditRestoresBoth();
    void rankDeficientCodingHasNoHypothesesToEdit();
    void aNewComparisonIsADraftUntilItsWeightsAreTyped();
};

namespace {
Weight q(long p, long d = 1)
{
    return Weight::exact(Rational(p, d));
}
} // namespace

void TestHypothesisModel::passesTheModelTester()
{
    WindowFixture f;
    HypothesisModel *m = f.window->codingPanel()->hypothesisModel();
    QAbstractItemModelTester tester(m, QAbstractItemModelTester::FailureReportingMode::QtTest);
    QVERIFY(m->setData(m->index(0, 1), u"1/2"_s)); // a draft: b1 no longer sums to 0
    m->discardDraft();
}

void TestHypothesisModel::showsWhatEachCoefficientTests()
{
    WindowFixture f;
    HypothesisModel *m = f.window->codingPanel()->hypothesisModel();
    // Treatment coding of A..D: intercept = mean(A) (weights 1,0,0,0), b1 = B - A (weights -1,1,0,0).
    QCOMPARE(m->columnCount(), 4);
    QCOMPARE(m->rowCount(), 4);
    QCOMPARE(m->index(0, 0).data().toString(), u"1"_s);
    QCOMPARE(m->index(1, 0).data().toString(), u"0"_s);
    QCOMPARE(m->index(0, 1).data().toString(), u"\u22121"_s);
    QCOMPARE(m->index(1, 1).data().toString(), u"1"_s);
    QCOMPARE(m->headerData(0, Qt::Horizontal).toString(), u"b0 intercept"_s);
    QCOMPARE(m->headerData(1, Qt::Horizontal).toString(), u"b1 B vs A"_s);
}

void TestHypothesisModel::editingHypothesesRebuildsTheCodingAndRoundTrips()
{
    WindowFixture f;
    QVERIFY(f.show());
    MainWindow &w = *f.window;
    w.codingPanel()->showDirection(CodingPanel::HypothesisDirection);
    WeightGridView *v = w.codingPanel()->hypothesisView();
    // Make b1 test (B + C)/2 - A: weights -1, 1/2, 1/2, 0. Paste the column in one step.
    v->setCurrentIndex(v->model()->index(0, 1));
    QVERIFY(v->pasteText(u"-1\n1/2\n1/2\n0\n"_s));
    const Analysis &a = w.document()->analysis();
    QCOMPARE(a.hypotheses[1], (std::vector<Weight>{q(-1), q(1, 2), q(1, 2), q(0)}));
    QCOMPARE(a.hypotheses[0], (std::vector<Weight>{q(1), q(0), q(0), q(0)})); // the intercept is kept
    QCOMPARE(w.document()->scheme().kind, SchemeKind::Custom);
    // The column was named by the tool, so its name follows what it tests now.
    QCOMPARE(w.document()->scheme().columns[0].name, u"B, C vs A"_s);
    // The coding grid shows the new coding, and reading it forward gives the typed hypotheses back.
    const Scheme s = w.document()->scheme();
    QCOMPARE(analyze(s).hypotheses, a.hypotheses);
    QVERIFY(!w.codingPanel()->hypothesisModel()->hasDraft());
    QCOMPARE(w.document()->undoStack()->count(), 1);
}

void TestHypothesisModel::codingAgreesWithNumpysInverse()
{
    WindowFixture f;
    HypothesisModel *m = f.window->codingPanel()->hypothesisModel();
    // Helmert-type hypotheses for A..D with the grand mean as intercept, typed cell by cell:
    // b1 = A - mean(B, C, D), b2 = B - mean(C, D), b3 = C - D.
    const QList<QStringList> columns = {
        {u"1/4"_s, u"1/4"_s, u"1/4"_s, u"1/4"_s},
        {u"1"_s, u"-1/3"_s, u"-1/3"_s, u"-1/3"_s},
        {u"0"_s, u"1"_s, u"-1/2"_s, u"-1/2"_s},
        {u"0"_s, u"0"_s, u"1"_s, u"-1"_s},
    };
    std::vector<CellText> cells;
    for (int c = 0; c < 4; ++c)
        for (int r = 0; r < 4; ++r)
            cells.push_back(CellText{r, c, columns[c][r]});
    QVERIFY(m->setCellTexts(cells, u"type all"_s));
    QVERIFY(!m->hasDraft());

    // NumPy: the coding is the inverse of the hypothesis matrix (rows = coefficients); its
    // columns after the first are the coding columns.
    QTemporaryDir dir;
    QJsonArray rows;
    for (const QStringList &c : columns) {
        QJsonArray row;
        for (const QString &t : c)
            row.append(parseWeight(t)->value());
        rows.append(row);
    }
    QFile in(dir.filePath(u"h.json"_s));
    QVERIFY(in.open(QIODevice::WriteOnly));
    in.write(QJsonDocument(rows).toJson());
    in.close();
    QProcess py;
    py.start(QString::fromUtf8(CB_PYTHON), {QString::fromUtf8(CB_SOURCE_DIR) + u"/tests/python/inverse_check.py"_s, in.fileName(),
                                            dir.filePath(u"x.json"_s)});
    QVERIFY(py.waitForFinished(60'000));
    QCOMPARE(py.exitCode(), 0);
    QFile out(dir.filePath(u"x.json"_s));
    QVERIFY(out.open(QIODevice::ReadOnly));
    const QJsonArray x = QJsonDocument::fromJson(out.readAll()).array();
    const Scheme &s = f.window->document()->scheme();
    for (int level = 0; level < 4; ++level)
        for (int column = 0; column < 3; ++column) {
            const double expected = x[level].toArray()[column + 1].toDouble();
            const double got = s.columns[size_t(column)].weights[size_t(level)].value();
            QVERIFY2(std::abs(got - expected) < 1e-12, qPrintable(u"level %1 column %2: %3 vs NumPy %4"_s.arg(level).arg(column).arg(got).arg(expected)));
        }
    // And the exact values by hand: the first coding column is (3/4, -1/4, -1/4, -1/4).
    QCOMPARE(s.columns[0].weights, (std::vector<Weight>{q(3, 4), q(-1, 4), q(-1, 4), q(-1, 4)}));
}

void TestHypothesisModel::untestableHypothesesStayADraft()
{
    WindowFixture f;
    HypothesisModel *m = f.window->codingPanel()->hypothesisModel();
    QSignalSpy draft(m, &HypothesisModel::draftChanged);
    const Scheme before = f.window->document()->scheme();
    // b1 = -1, 1, 0, 0. Changing A's weight to -1/2 breaks the sum: kept as a draft, coding untouched.
    QVERIFY(m->setData(m->index(0, 1), u"-1/2"_s));
    QVERIFY(m->hasDraft());
    QVERIFY2(m->draftProblem().contains(u"sum"_s), qPrintable(m->draftProblem()));
    QCOMPARE(draft.count(), 1);
    QCOMPARE(m->index(0, 1).data().toString(), u"\u22121/2"_s);
    QCOMPARE(f.window->document()->undoStack()->count(), 0);
    QCOMPARE(f.window->document()->scheme().columns[0].weights, before.columns[0].weights);
    // Completing the comparison (C gets -1/2) applies it.
    QVERIFY(m->setData(m->index(2, 1), u"-1/2"_s));
    QVERIFY(!m->hasDraft());
    QCOMPARE(f.window->document()->analysis().hypotheses[1], (std::vector<Weight>{q(-1, 2), q(1), q(-1, 2), q(0)}));
    QCOMPARE(f.window->document()->undoStack()->count(), 1);
}

void TestHypothesisModel::undoAfterAReverseEditRestoresBoth()
{
    WindowFixture f;
    HypothesisModel *m = f.window->codingPanel()->hypothesisModel();
    const Scheme before = f.window->document()->scheme();
    QVERIFY(m->setCellTexts({{0, 3, u"-1/2"_s}, {1, 3, u"-1/2"_s}}, u"two cells"_s)); // b3 = D - mean(A, B)
    QCOMPARE(f.window->document()->undoStack()->count(), 1);
    f.window->document()->undoStack()->undo();
    QCOMPARE(f.window->document()->scheme().columns[2].weights, before.columns[2].weights);
    QCOMPARE(m->index(0, 3).data().toString(), u"\u22121"_s);
}

void TestHypothesisModel::rankDeficientCodingHasNoHypothesesToEdit()
{
    WindowFixture f;
    Document *d = f.window->document();
    // Column 3 equal to column 1: rank 3 of 4.
    Scheme s = d->scheme();
    s.columns[2].weights = s.columns[0].weights;
    s.kind = SchemeKind::Custom;
    d->edit(s, u"dependent"_s);
    HypothesisModel *m = f.window->codingPanel()->hypothesisModel();
    QCOMPARE(m->index(0, 0).data().toString(), u"\u2014"_s);
    QVERIFY(!(m->flags(m->index(0, 0)) & Qt::ItemIsEditable));
    QVERIFY(m->index(0, 0).data(Qt::ToolTipRole).toString().contains(u"rank deficient"_s));
}

void TestHypothesisModel::aNewComparisonIsADraftUntilItsWeightsAreTyped()
{
    WindowFixture f;
    Document *d = f.window->document();
    HypothesisModel *m = f.window->codingPanel()->hypothesisModel();
    QSignalSpy refused(m, &WeightTableModel::editRefused);
    QVERIFY(!m->addComparison()); // treatment on four levels: already three comparisons
    QCOMPARE(refused.count(), 1);

    d->edit(edits::withColumnRemoved(d->scheme(), 2).take(), u"drop D vs A"_s);
    QCOMPARE(m->columnCount(), 3);
    QVERIFY(m->addComparison());
    QCOMPARE(m->columnCount(), 4);
    QVERIFY(m->hasDraft());
    QCOMPARE(m->headerData(3, Qt::Horizontal).toString().replace(u'\n', u' '), u"\u2717 b3 new comparison"_s);
    QCOMPARE(d->undoStack()->count(), 1); // nothing applied yet
    // D against the average of B and C.
    QVERIFY(m->setCellTexts({{1, 3, u"-1/2"_s}, {2, 3, u"-1/2"_s}, {3, 3, u"1"_s}}, u"new comparison"_s));
    QVERIFY(!m->hasDraft());
    QCOMPARE(d->scheme().columnCount(), 3);
    QCOMPARE(d->scheme().columns[2].name, u"D vs B, C"_s); // named after what it tests
    QCOMPARE(d->analysis().hypotheses[3], (std::vector<Weight>{q(0), q(-1, 2), q(-1, 2), q(1)}));
    // Undo takes the comparison away again.
    d->undoStack()->undo();
    QCOMPARE(m->columnCount(), 3);
}

QTEST_MAIN(TestHypothesisModel)
#include "TestHypothesisModel.moc"
