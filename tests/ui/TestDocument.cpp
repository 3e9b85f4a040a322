#include "ui/document/Document.h"
#include "core/model/SchemeEdits.h"

#include <QSignalSpy>
#include <QTest>

using namespace Qt::StringLiterals;
using namespace cb;

class TestDocument : public QObject
{
    Q_OBJECT

private slots:
    void startsCleanWithAnalysis();
    void editRecomputesAnalysisOnceAndMarksModified();
    void undoRestoresAndCleanStateFollowsTheStack();
    void editsOfTheSameCellMergeIntoOneStep();
    void editsOfDifferentCellsStaySeparate();
    void typingBackTheOldValueLeavesNoStep();
    void anEditThatChangesNothingIsNoStep();
    void undoAndRedoExchangeTheStudyManyTimes();
    void resetClearsHistory();
    void restoreCountsAsUnsaved();
};

namespace {
Weight w(long p, long q = 1)
{
    return Weight::exact(Rational(p, q));
}
} // namespace

void TestDocument::startsCleanWithAnalysis()
{
    Document d;
    QVERIFY(!d.isModified());
    QCOMPARE(d.scheme().levelCount(), 4);
    QCOMPARE(d.analysis().levelCount, 4);
    QVERIFY(d.analysis().fullRank);
    QCOMPARE(d.displayName(), u"untitled"_s);
}

void TestDocument::editRecomputesAnalysisOnceAndMarksModified()
{
    Document d;
    QSignalSpy changed(&d, &Document::changed);
    QSignalSpy modified(&d, &Document::modifiedChanged);
    d.edit(edits::withWeights(d.scheme(), {{0, 0, w(1, 2)}}), u"type"_s);
    QCOMPARE(changed.count(), 1);
    QCOMPARE(modified.count(), 1);
    QVERIFY(d.isModified());
    QCOMPARE(d.scheme().kind, SchemeKind::Custom);
    // The analysis belongs to the new scheme: column 1 now sums to 1/2 + 1 (treatment column B: 0,1,0,0 -> 1/2,1,0,0).
    QCOMPARE(d.analysis().columnSums[0].display(), u"3/2"_s);
}

void TestDocument::undoRestoresAndCleanStateFollowsTheStack()
{
    Document d;
    const QString before = d.analysis().hypothesisSymbols.join(u'\n');
    d.edit(edits::withWeights(d.scheme(), {{0, 0, w(1, 2)}}), u"type"_s);
    QVERIFY(d.analysis().hypothesisSymbols.join(u'\n') != before);
    d.undoStack()->undo();
    QVERIFY(!d.isModified());
    QCOMPARE(d.scheme().kind, SchemeKind::Treatment);
    QCOMPARE(d.analysis().hypothesisSymbols.join(u'\n'), before);
    d.undoStack()->redo();
    QVERIFY(d.isModified());
    QCOMPARE(d.undoStack()->undoText(), u"type"_s);
}

void TestDocument::editsOfTheSameCellMergeIntoOneStep()
{
    Document d;
    d.edit(edits::withWeights(d.scheme(), {{1, 0, w(2)}}), u"first"_s, MergeId::Weight, u"1,0"_s);
    d.edit(edits::withWeights(d.scheme(), {{1, 0, w(3)}}), u"second"_s, MergeId::Weight, u"1,0"_s);
    QCOMPARE(d.undoStack()->count(), 1);
    QCOMPARE(d.undoStack()->undoText(), u"second"_s);
    d.undoStack()->undo();
    QCOMPARE(d.scheme().columns[0].weights[1], Weight(1));
}

void TestDocument::editsOfDifferentCellsStaySeparate()
{
    Document d;
    d.edit(edits::withWeights(d.scheme(), {{1, 0, w(2)}}), u"first"_s, MergeId::Weight, u"1,0"_s);
    d.edit(edits::withWeights(d.scheme(), {{2, 0, w(3)}}), u"second"_s, MergeId::Weight, u"2,0"_s);
    d.edit(edits::withWeights(d.scheme(), {{2, 0, w(4)}}), u"third"_s);
    QCOMPARE(d.undoStack()->count(), 3);
}

void TestDocument::typingBackTheOldValueLeavesNoStep()
{
    Document d;
    // The first typed weight turns the treatment coding custom (and renames the column): a step.
    d.edit(edits::withWeights(d.scheme(), {{3, 2, w(2)}}), u"custom"_s, MergeId::Weight, u"3,2"_s);
    QCOMPARE(d.undoStack()->count(), 1);
    d.undoStack()->setClean();
    // Then typing 2 into another cell and back to its 1 leaves nothing to undo.
    d.edit(edits::withWeights(d.scheme(), {{1, 0, w(2)}}), u"first"_s, MergeId::Weight, u"1,0"_s);
    QCOMPARE(d.undoStack()->count(), 2);
    QVERIFY(d.isModified());
    d.edit(edits::withWeights(d.scheme(), {{1, 0, w(1)}}), u"back"_s, MergeId::Weight, u"1,0"_s);
    QCOMPARE(d.undoStack()->count(), 1);
    QVERIFY(!d.isModified());
    QCOMPARE(d.scheme().columns[0].weights[1], Weight(1));
}

void TestDocument::anEditThatChangesNothingIsNoStep()
{
    Document d;
    d.edit(d.scheme(), u"nothing"_s);
    QCOMPARE(d.undoStack()->count(), 0);
    QVERIFY(!d.isModified());
}

void TestDocument::undoAndRedoExchangeTheStudyManyTimes()
{
    Document d;
    const Scheme start = d.scheme();
    d.edit(edits::withWeights(d.scheme(), {{1, 0, w(2)}}), u"first"_s);
    d.edit(edits::withWeights(d.scheme(), {{2, 1, w(5)}}), u"second"_s);
    const Scheme end = d.scheme();
    for (int round = 0; round < 3; ++round) {
        d.undoStack()->undo();
        d.undoStack()->undo();
        QVERIFY(d.scheme() == start);
        QVERIFY(!d.isModified());
        d.undoStack()->redo();
        QCOMPARE(d.scheme().columns[0].weights[1], w(2));
        QCOMPARE(d.scheme().columns[1].weights[2], Weight(1));
        d.undoStack()->redo();
        QVERIFY(d.scheme() == end);
        QCOMPARE(d.analysis().rank, analyze(end).rank);
    }
}

void TestDocument::resetClearsHistory()
{
    Document d;
    d.edit(edits::withWeights(d.scheme(), {{1, 0, w(2)}}), u"first"_s);
    QSignalSpy path(&d, &Document::filePathChanged);
    d.reset(Document::starterScheme(), u"/tmp/x.json"_s);
    QCOMPARE(d.undoStack()->count(), 0);
    QVERIFY(!d.isModified());
    QCOMPARE(path.count(), 1);
    QCOMPARE(d.displayName(), u"x.json"_s);
}

void TestDocument::restoreCountsAsUnsaved()
{
    Document d;
    Scheme s = edits::withWeights(d.scheme(), {{1, 0, w(5)}});
    d.restore(s, u"/tmp/y.json"_s);
    QVERIFY(d.isModified());
    QCOMPARE(d.filePath(), u"/tmp/y.json"_s);
    QCOMPARE(d.scheme().columns[0].weights[1], Weight(5));
}

QTEST_GUILESS_MAIN(TestDocument)
#include "TestDocument.moc"
