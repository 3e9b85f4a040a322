#include "core/analysis/Analysis.h"
#include "core/analysis/HypothesisEdit.h"
#include "core/analysis/Settled.h"
#include "core/model/SchemeEdits.h"
#include "core/model/Study.h"

#include <QTest>

using namespace Qt::StringLiterals;
using namespace cb;

class TestSchemeEdits : public QObject
{
    Q_OBJECT

private slots:
    void typingTurnsAStandardSchemeCustomAndRenamesTypedColumns();
    void renamingALevelRebuildsAStandardScheme();
    void renamingALevelKeepsCustomWeights();
    void refusesDuplicateAndEmptyLevelNames();
    void movingALevelCarriesItsWeightsSizeAndReference();
    void addingAndRemovingLevelsInACustomScheme();
    void removingALevelIsRefusedWhenColumnsWouldNotFit();
    void plannedSizeTextIsCheckedAndOthersDefaultToOne();
    void standardSchemeKeepsNotesAndIntercept();
    void hypothesesGiveACodingThatTestsThem();
    void columnsAreAddedUpToTheLevelCount();
};

namespace {
Weight w(long p, long q = 1)
{
    return Weight::exact(Rational(p, q));
}

Scheme treatment(int k)
{
    Factor f;
    f.name = u"dose"_s;
    for (int i = 0; i < k; ++i)
        f.levels << u"L%1"_s.arg(i + 1);
    return makeScheme(f, SchemeKind::Treatment).take();
}

Scheme custom(int k)
{
    Scheme s = treatment(k);
    s.kind = SchemeKind::Custom;
    s.reference = -1;
    return s;
}
} // namespace

void TestSchemeEdits::typingTurnsAStandardSchemeCustomAndRenamesTypedColumns()
{
    const Scheme s = treatment(3);
    const Scheme t = edits::withWeights(s, {{0, 1, w(-1, 2)}});
    QCOMPARE(t.kind, SchemeKind::Custom);
    QCOMPARE(t.reference, -1);
    QCOMPARE(t.columns[1].weights[0], w(-1, 2));
    // The edit leaves names alone; settling the study names every column after what it tests
    // now (TestColumnNames): rows of inv([1 | C]) are (2 L1 + L3)/3 for b0, then
    // L2 - (2 L1 + L3)/3 and 2/3 (L3 - L1), worked by hand from L1 = b0 - b2/2, L2 = b0 + b1,
    // L3 = b0 + b2.
    QCOMPARE(t.columns[1].name, s.columns[1].name);
    const Scheme n = settled(studyOf(t)).activeScheme();
    QCOMPARE(n.columns[0].name, u"L2 - (2 L1 + L3)/3"_s);
    QCOMPARE(n.columns[1].name, u"2/3 (L3 vs L1)"_s);
    // Typing into a custom scheme keeps names.
    const Scheme u = edits::withWeights(t, {{1, 1, w(3)}});
    QCOMPARE(u.columns[1].name, t.columns[1].name);
}

void TestSchemeEdits::renamingALevelRebuildsAStandardScheme()
{
    auto r = edits::withLevelName(treatment(3), 1, u"  half dose "_s);
    QVERIFY2(r.ok(), qPrintable(r.error()));
    QCOMPARE(r->factor.levels[1], u"half dose"_s);
    QCOMPARE(r->kind, SchemeKind::Treatment);
    QCOMPARE(r->columns[0].name, u"half dose vs L1"_s);
}

void TestSchemeEdits::renamingALevelKeepsCustomWeights()
{
    Scheme s = custom(3);
    s.columns[0].weights = {w(1), w(-1), w(0)};
    auto r = edits::withLevelName(s, 0, u"first"_s);
    QVERIFY(r.ok());
    QCOMPARE(r->columns[0].weights, s.columns[0].weights);
    QCOMPARE(r->columns[0].name, s.columns[0].name);
}

void TestSchemeEdits::refusesDuplicateAndEmptyLevelNames()
{
    auto dup = edits::withLevelName(treatment(3), 0, u"L2"_s);
    QVERIFY(!dup.ok());
    QVERIFY2(dup.error().contains(u"L2"_s), qPrintable(dup.error()));
    QVERIFY(!edits::withLevelName(treatment(3), 0, u"   "_s).ok());
}

void TestSchemeEdits::movingALevelCarriesItsWeightsSizeAndReference()
{
    Scheme s = custom(4);
    s.factor.plannedN = {10, 20, 30, 40};
    s.columns[0].weights = {w(1), w(2), w(3), w(4)};
    auto r = edits::withLevelMoved(s, 0, 2);
    QVERIFY(r.ok());
    QCOMPARE(r->factor.levels, (QStringList{u"L2"_s, u"L3"_s, u"L1"_s, u"L4"_s}));
    QCOMPARE(r->columns[0].weights, (std::vector<Weight>{w(2), w(3), w(1), w(4)}));
    QCOMPARE(r->factor.plannedN[2], Rational(10));

    // A standard scheme's reference follows its level.
    SchemeOptions o;
    o.reference = 1;
    Scheme t = makeScheme(s.factor, SchemeKind::Sum, o).take();
    auto moved = edits::withLevelMoved(t, 1, 3);
    QVERIFY(moved.ok());
    QCOMPARE(moved->reference, 3);
    QCOMPARE(moved->factor.levels[moved->reference], u"L2"_s);
    auto other = edits::withLevelMoved(t, 3, 0); // L4 to the front pushes L2 down one place
    QCOMPARE(other->factor.levels[other->reference], u"L2"_s);
}

void TestSchemeEdits::addingAndRemovingLevelsInACustomScheme()
{
    Scheme s = custom(3);
    s.factor.spacing = {w(1), w(4), w(2)};
    auto added = edits::withLevelAdded(s);
    QVERIFY(added.ok());
    QCOMPARE(added->levelCount(), 4);
    QCOMPARE(added->factor.levels[3], u"level 4"_s);
    QCOMPARE(added->factor.spacing[3], w(5)); // one past the largest position
    for (const Column &c : added->columns)
        QCOMPARE(c.weights[3], Weight(0));
    auto removed = edits::withLevelRemoved(*added, 0);
    QVERIFY(removed.ok());
    QCOMPARE(removed->factor.levels, (QStringList{u"L2"_s, u"L3"_s, u"level 4"_s}));
}

void TestSchemeEdits::removingALevelIsRefusedWhenColumnsWouldNotFit()
{
    Scheme s = custom(3);
    s.columns.push_back(Column{u"extra"_s, {w(1), w(1), w(1)}}); // 3 columns, 3 levels
    auto r = edits::withLevelRemoved(s, 0);
    QVERIFY(!r.ok());
    QVERIFY2(r.error().contains(u"remove a column first"_s), qPrintable(r.error()));
    QVERIFY(!edits::withLevelRemoved(custom(2), 0).ok()); // at least two levels
}

void TestSchemeEdits::plannedSizeTextIsCheckedAndOthersDefaultToOne()
{
    auto r = edits::withPlannedSize(custom(3), 1, u"25"_s);
    QVERIFY(r.ok());
    QCOMPARE(r->factor.plannedN, (std::vector<Rational>{1, 25, 1}));
    QVERIFY(!edits::withPlannedSize(custom(3), 1, u"-2"_s).ok());
    QVERIFY(!edits::withPlannedSize(custom(3), 1, u"lots"_s).ok());
    auto equal = edits::withEqualSizes(*r);
    QVERIFY(!equal->factor.hasPlannedN());
}

void TestSchemeEdits::standardSchemeKeepsNotesAndIntercept()
{
    Scheme s = custom(3);
    s.notes = u"why these levels"_s;
    s.intercept = false;
    auto r = edits::withStandard(s, SchemeKind::Helmert, {});
    QVERIFY(r.ok());
    QCOMPARE(r->kind, SchemeKind::Helmert);
    QCOMPARE(r->notes, s.notes);
    QCOMPARE(r->intercept, false);
    auto indicator = edits::withStandard(s, SchemeKind::Indicator, {});
    QCOMPARE(indicator->intercept, false);
    auto back = edits::withStandard(*indicator, SchemeKind::Sum, {});
    QCOMPARE(back->intercept, true); // leaving one-hot coding brings the intercept back
}

void TestSchemeEdits::hypothesesGiveACodingThatTestsThem()
{
    // Helmert-type comparisons on three levels, grand mean intercept.
    const std::vector<std::vector<Weight>> rows = {
        {w(1, 3), w(1, 3), w(1, 3)},
        {w(1), w(-1, 2), w(-1, 2)},
        {w(0), w(1), w(-1)},
    };
    auto r = edits::withHypotheses(treatment(3), rows);
    QVERIFY2(r.ok(), qPrintable(r.error()));
    QCOMPARE(r->kind, SchemeKind::Custom);
    QCOMPARE(r->columns[0].name, u"L2 vs L1"_s); // names kept
    const Analysis a = analyze(*r);
    QCOMPARE(a.hypotheses, rows);
    // A comparison that does not sum to 0 is refused with core's reason.
    auto bad = edits::withHypotheses(treatment(3), {rows[0], {w(1), w(0), w(0)}, rows[2]});
    QVERIFY(!bad.ok());
    QVERIFY2(bad.error().contains(u"sum"_s), qPrintable(bad.error()));
}

void TestSchemeEdits::columnsAreAddedUpToTheLevelCount()
{
    Scheme s = custom(3);
    auto one = edits::withColumnAdded(s);
    QVERIFY(one.ok());
    QCOMPARE(one->columnCount(), 3);
    QVERIFY(!edits::withColumnAdded(*one).ok());
    auto fewer = edits::withColumnRemoved(*one, 0);
    QCOMPARE(fewer->columnCount(), 2);
    QVERIFY(!edits::withColumnRemoved(custom(2), 0).ok());
}

QTEST_GUILESS_MAIN(TestSchemeEdits)
#include "TestSchemeEdits.moc"
