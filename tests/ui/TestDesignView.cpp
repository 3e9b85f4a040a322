#include "ui/design/CellPicture.h"
#include "core/files/StudyFile.h"
#include "ui/coding/CodingModel.h"
#include "ui/coding/CodingPanel.h"
#include "ui/window/Demos.h"
#include "ui/design/DesignPanel.h"
#include "tests/support/TableText.h"
#include "ui/export/ExportDialog.h"
#include "ui/document/Document.h"
#include "ui/levels/LevelsModel.h"
#include "ui/meaning/MeaningModel.h"
#include "ui/meaning/MeaningPanel.h"
#include "core/power/Power.h"
#include "ui/power/PowerPanel.h"
#include "ui/document/RecoveryStore.h"
#include "core/model/SchemeEdits.h"
#include "core/files/SchemeFile.h"
#include "core/model/Study.h"
#include "tests/support/WindowFixture.h"

#include <QDockWidget>
#include <QFile>
#include <QLineEdit>
#include <QTableView>
#include <QTest>
#include <QTreeView>
#include <QUndoStack>

using namespace Qt::StringLiterals;
using namespace cb;

class TestDesignView : public QObject
{
    Q_OBJECT

private slots:
    void demoLoadsAsADesign();
    void pictureShowsCoresWeightsForTheInteraction();
    void pictureHasOneGridPerLevelOfAThirdFactor();
    void editingTheActiveFactorUpdatesTheDesignAndUndoRestores();
    void choosingTheFactorToEditIsNotAnEditAndKeepsTheDesignNumbers();
    void leavingOutATermShowsTheCellSizeDependence();
    void addingAndRemovingAFactorIsUndoable();
    void removingAFactorKeepsTheTermsWithoutIt();
    void cellSizesFollowTheLevelNames();
    void factorSizesAreTheLevelTotalsOverTheCells();
    void exportIsOverTheCells();
    void emptyCellIsNamed();
    void emptyCellWithEstimableTermsIsAnalysedOverTheOthers();
    void saveThenOpenRoundTripsTheDesign();
    void badDesignFileNamesTheFieldAndKeepsTheWork();
    void recoveryKeepsTheDesign();
    void powerIsPerDesignColumnOverTheCells();
};

namespace {

Scheme centred(const QString &name, const QString &a, const QString &b)
{
    Scheme s;
    s.kind = SchemeKind::Custom;
    s.factor.name = name;
    s.factor.levels = {a, b};
    s.columns.push_back(Column{u"%1 vs %2"_s.arg(a, b), {Weight::exact(Rational(1, 2)), Weight::exact(Rational(-1, 2))}});
    return s;
}

Study twoByTwo()
{
    Study s;
    s.design.factors = {centred(u"cue"_s, u"valid"_s, u"invalid"_s), centred(u"load"_s, u"low"_s, u"high"_s)};
    s.design.terms = Design::fullFactorial(2);
    return s;
}

// A term's row in the term tree, found by its name; invalid when there is none.
QModelIndex termItem(const QTreeView *tree, const QString &name)
{
    const QAbstractItemModel *m = tree->model();
    for (int i = 0; i < m->rowCount(); ++i)
        if (m->index(i, 0).data().toString() == name)
            return m->index(i, 0);
    return {};
}

int childCount(const QModelIndex &item)
{
    return item.model()->rowCount(item);
}

QModelIndex child(const QModelIndex &item, int row)
{
    return item.model()->index(row, 0, item);
}

// Ticks or clears a term's box, as a click does.
void setTicked(const QModelIndex &item, bool ticked)
{
    QVERIFY(item.isValid());
    const_cast<QAbstractItemModel *>(item.model())->setData(item, ticked ? Qt::Checked : Qt::Unchecked, Qt::CheckStateRole);
}

QStringList texts(const std::vector<Weight> &weights)
{
    QStringList out;
    for (const Weight &w : weights)
        out << w.display(true);
    return out;
}

bool hasFinding(const QString &text, const QString &part)
{
    return text.contains(part, Qt::CaseInsensitive);
}

} // namespace

void TestDesignView::demoLoadsAsADesign()
{
    WindowFixture f;
    QVERIFY(f.window->openDemo(u"hedgerow"_s));
    Document *d = f.window->document();
    QVERIFY(d->isDesign());
    QCOMPARE(d->design().factors.size(), size_t(2));
    QCOMPARE(d->design().cellCount(), 6);
    QVERIFY(!d->isModified());
    DesignPanel *p = f.window->designPanel();
    QCOMPARE(rowCount(p->factorTable()), 2);
    QCOMPARE(cellText(p->factorTable(), 1, 1), u"mowing"_s);
    QCOMPARE(cellText(p->cellSizeTable(), 2, 1), u"4"_s); // wildflower\u00b7late
    QVERIFY(!p->picture()->isEmpty());
    QCOMPARE(p->picture()->cellTexts().size(), 6);
    // Treatment coding of mowing: the margin columns compare early-mown plots only.
    QVERIFY2(hasFinding(p->findingsText(), u"simple effect"_s), qPrintable(p->findingsText()));
    QVERIFY(p->findingsText().contains(u"Condition number"_s));
    QVERIFY(p->findingsText().contains(u"VIF"_s));
    QVERIFY(f.show());
    QVERIFY(!f.window->designDock()->visibleRegion().isEmpty()); // raised for a design
    QVERIFY(demoStudies().size() >= 4);
}

void TestDesignView::pictureShowsCoresWeightsForTheInteraction()
{
    // Centred +-1/2 coding of a balanced 2 x 2: the interaction coefficient tests
    // (valid·low - valid·high) - (invalid·low - invalid·high), cell weights +1, -1, -1, +1
    // (Schad, Vasishth, Hohenstein & Kliegl 2020, J Mem Lang 110, 104038, the 2 x 2 example).
    WindowFixture f;
    Document *d = f.window->document();
    d->reset(twoByTwo(), {});
    DesignPanel *p = f.window->designPanel();
    p->selectColumn(2);
    const QStringList expected{u"1"_s, u"\u22121"_s, u"\u22121"_s, u"1"_s};
    QCOMPARE(p->picture()->cellTexts(), expected);
    QCOMPARE(p->picture()->cellSigns(), (QStringList{u"\u25b2"_s, u"\u25bc"_s, u"\u25bc"_s, u"\u25b2"_s}));
    QCOMPARE(p->picture()->cellTexts(), texts(d->designAnalysis().analysis.hypotheses[3]));
    // Core writes it as a difference of differences (the same contrast, oriented its own way).
    QVERIFY2(p->hypothesisText().contains(u"(invalid\u00b7high - valid\u00b7high) - (invalid\u00b7low - valid\u00b7low)"_s), qPrintable(p->hypothesisText()));
    // Main effect of cue: the average over load, cell weights 1/2, 1/2, -1/2, -1/2 (same source).
    p->selectColumn(0);
    QCOMPARE(p->picture()->cellTexts(), (QStringList{u"1/2"_s, u"1/2"_s, u"\u22121/2"_s, u"\u22121/2"_s}));
    QVERIFY(!hasFinding(p->findingsText(), u"simple effect"_s));
    // Choosing a column in the term tree shows it too.
    const QModelIndex interaction = termItem(p->termTree(), u"cue \u00d7 load"_s);
    QVERIFY(interaction.isValid());
    QCOMPARE(childCount(interaction), 1);
    p->termTree()->setCurrentIndex(child(interaction, 0));
    QCOMPARE(p->selectedColumn(), 2);
    QCOMPARE(p->picture()->cellTexts(), expected);
}

void TestDesignView::pictureHasOneGridPerLevelOfAThirdFactor()
{
    WindowFixture f;
    Document *d = f.window->document();
    Study s = twoByTwo();
    s.design.factors.push_back(centred(u"age"_s, u"young"_s, u"old"_s));
    s.design.terms = Design::fullFactorial(3);
    d->reset(s, {});
    DesignPanel *p = f.window->designPanel();
    p->selectColumn(6); // the three-way interaction
    QCOMPARE(p->picture()->cellTexts(), texts(d->designAnalysis().analysis.hypotheses[7]));
    QCOMPARE(p->picture()->cellTexts().size(), 8);
    QCOMPARE(p->picture()->blockCount(), 2); // one grid per age group, side by side
    // Three-way interaction over +-1/2 codings: the product of the three signs (+1 where an
    // even number of factors sit at their second level).
    QCOMPARE(p->picture()->cellSigns(), (QStringList{u"\u25b2"_s, u"\u25bc"_s, u"\u25bc"_s, u"\u25b2"_s,
                                                     u"\u25bc"_s, u"\u25b2"_s, u"\u25b2"_s, u"\u25bc"_s}));
}

void TestDesignView::editingTheActiveFactorUpdatesTheDesignAndUndoRestores()
{
    WindowFixture f;
    QVERIFY(f.window->openDemo(u"hedgerow"_s));
    Document *d = f.window->document();
    DesignPanel *p = f.window->designPanel();
    p->makeActive(1);
    QCOMPARE(d->study().active, 1);
    QCOMPARE(d->scheme().factor.name, u"mowing"_s);
    QCOMPARE(cellText(p->factorTable(), 1, 0), u"\u270e"_s);
    QVERIFY(hasFinding(p->findingsText(), u"simple effect"_s));
    const std::vector<Weight> before = d->designAnalysis().analysis.hypotheses[1];
    const int steps = d->undoStack()->count();

    // Type +1/2 and -1/2 into mowing's column in the coding grid.
    CodingModel *grid = f.window->codingPanel()->codingModel();
    QVERIFY(grid->setData(grid->index(0, 0), u"1/2"_s, Qt::EditRole));
    QVERIFY(grid->setData(grid->index(1, 0), u"-1/2"_s, Qt::EditRole));
    QCOMPARE(d->design().factors[1].columns[0].weights[1].display(), u"-1/2"_s);
    // b1 (grass vs bare) now averages over mowing dates: half of each grass cell minus half of each bare cell.
    p->selectColumn(0);
    QCOMPARE(p->picture()->cellTexts(), (QStringList{u"−1/2"_s, u"−1/2"_s, u"1/2"_s, u"1/2"_s, u"0"_s, u"0"_s}));
    QVERIFY2(!hasFinding(p->findingsText(), u"of margin compares cells only"_s), qPrintable(p->findingsText()));
    // The warning moves to mowing's column, which compares bare plots only while margin keeps treatment coding.
    QVERIFY(hasFinding(p->findingsText(), u"of mowing compares cells only at margin = bare"_s));
    QVERIFY(texts(d->designAnalysis().analysis.hypotheses[1]) != texts(before));

    while (d->undoStack()->count() > steps && d->undoStack()->canUndo() && d->undoStack()->index() > steps)
        d->undoStack()->undo();
    QCOMPARE(texts(d->designAnalysis().analysis.hypotheses[1]), texts(before));
    QVERIFY(hasFinding(p->findingsText(), u"of margin compares cells only at mowing = early"_s));
}

// Which factor the grid edits is a choice of view: no undo step, not modified. Its cards then
// number its coefficients as the Design tab does (margin's two columns are b1 and b2, so
// mowing's one column is b3 in both places).
void TestDesignView::choosingTheFactorToEditIsNotAnEditAndKeepsTheDesignNumbers()
{
    WindowFixture f;
    QVERIFY(f.window->openDemo(u"hedgerow"_s));
    Document *d = f.window->document();
    QVERIFY(!d->isModified());
    f.window->designPanel()->makeActive(1);
    QCOMPARE(d->study().active, 1);
    QVERIFY(!d->isModified());
    QVERIFY(!f.window->isWindowModified());
    QCOMPARE(d->undoStack()->count(), 0);
    MeaningModel *cards = f.window->meaningPanel()->model();
    QCOMPARE(cards->index(0, 0).data(MeaningModel::TitleRole).toString(), u"b0 intercept"_s);
    QVERIFY2(cards->index(1, 0).data(MeaningModel::TitleRole).toString().startsWith(u"b3 "_s),
             qPrintable(cards->index(1, 0).data(MeaningModel::TitleRole).toString()));
    const QModelIndex mowing = termItem(f.window->designPanel()->termTree(), u"mowing"_s);
    QVERIFY(mowing.isValid());
    QCOMPARE(childCount(mowing), 1);
    QVERIFY2(child(mowing, 0).data().toString().startsWith(u"b3 "_s), qPrintable(child(mowing, 0).data().toString()));
    // Back to margin: b1 and b2 again, still no step.
    f.window->designPanel()->makeActive(0);
    QVERIFY(cards->index(2, 0).data(MeaningModel::TitleRole).toString().startsWith(u"b2 "_s));
    QVERIFY(!d->isModified());
    // An edit after the choice is one step, and undo keeps the factor in view.
    f.window->designPanel()->makeActive(1);
    d->edit(edits::withWeights(d->scheme(), {{0, 0, Weight::exact(Rational(-1, 2))}}), u"edit"_s);
    QCOMPARE(d->undoStack()->count(), 1);
    d->undoStack()->undo();
    QCOMPARE(d->study().active, 1);
    QVERIFY(!d->isModified());
}

void TestDesignView::leavingOutATermShowsTheCellSizeDependence()
{
    WindowFixture f;
    QVERIFY(f.window->openDemo(u"hedgerow"_s));
    Document *d = f.window->document();
    DesignPanel *p = f.window->designPanel();
    QVERIFY(!hasFinding(p->findingsText(), u"depend on the cell sizes"_s));
    const QModelIndex interaction = termItem(p->termTree(), u"margin \u00d7 mowing"_s);
    QVERIFY(interaction.isValid());
    setTicked(interaction, false);
    QCOMPARE(d->design().terms.size(), size_t(2));
    QVERIFY2(hasFinding(p->findingsText(), u"depend on the cell sizes"_s), qPrintable(p->findingsText()));
    QVERIFY(hasFinding(p->findingsText(), u"main effects only"_s));
    QVERIFY(!childCount(termItem(p->termTree(), u"margin \u00d7 mowing"_s)));
    d->undoStack()->undo();
    QCOMPARE(d->design().terms.size(), size_t(3));
    QVERIFY(!hasFinding(p->findingsText(), u"depend on the cell sizes"_s));

    // A nested term instead of the main effect and the interaction: margin within mowing.
    setTicked(termItem(p->termTree(), u"margin within mowing"_s), true);
    QVERIFY(hasFinding(p->findingsText(), u"columns for"_s)); // too many columns: core's message
    QVERIFY(p->picture()->isEmpty());
    setTicked(termItem(p->termTree(), u"margin"_s), false);
    setTicked(termItem(p->termTree(), u"margin \u00d7 mowing"_s), false);
    QCOMPARE(d->designAnalysis().analysis.columnCount, 5);
    QVERIFY(!p->picture()->isEmpty());
}

// In a design each factor's planned n is its levels' totals over the cells: the levels table
// shows them (read-only), and n-dependent codings such as weighted-effect use them.
void TestDesignView::factorSizesAreTheLevelTotalsOverTheCells()
{
    WindowFixture f;
    QVERIFY(f.window->openDemo(u"hedgerow"_s));
    Document *d = f.window->document();
    // Cells (margin x mowing, early/late): bare 6, 6; grass 6, 5; wildflower 6, 4.
    QCOMPARE(d->design().factors[0].factor.plannedN, (std::vector<Rational>{12, 11, 10}));
    QCOMPARE(d->design().factors[1].factor.plannedN, (std::vector<Rational>{18, 15}));
    LevelsModel levels(d);
    const QModelIndex grassSize = levels.index(1, LevelsModel::SizeColumn);
    QCOMPARE(levels.data(grassSize).toString(), u"11"_s);
    QVERIFY(!(levels.flags(grassSize) & Qt::ItemIsEditable));
    QVERIFY(levels.data(grassSize, Qt::ToolTipRole).toString().contains(u"per cell"_s));

    // Weighted-effect coding of margin weights by those totals (33 plots in all).
    auto weighted = edits::withStandard(d->scheme(), SchemeKind::WeightedEffect, {});
    QVERIFY2(weighted.ok(), qPrintable(weighted.error()));
    d->edit(weighted.take(), u"weighted"_s);
    const Analysis &a = d->analysis();
    QCOMPARE(texts(a.hypotheses[0]), (QStringList{u"4/11"_s, u"1/3"_s, u"10/33"_s})); // n_i / N
    // A cell size changed in the design tab moves the totals and the weighted coding with them.
    auto next = withCellSize(d->study(), 5, u"10"_s); // wildflower\u00b7late 4 -> 10
    QVERIFY2(next.ok(), qPrintable(next.error()));
    d->editStudy(next.take(), u"cell"_s);
    QCOMPARE(d->design().factors[0].factor.plannedN, (std::vector<Rational>{12, 11, 16}));
    QCOMPARE(texts(d->analysis().hypotheses[0]), (QStringList{u"4/13"_s, u"11/39"_s, u"16/39"_s}));
    d->undoStack()->undo();
    QCOMPARE(d->design().factors[0].factor.plannedN, (std::vector<Rational>{12, 11, 10}));

    // Crossing a one-factor plan with a new factor keeps the sizes' proportions.
    WindowFixture g;
    Document *one = g.window->document();
    auto sized = edits::withSizes(one->scheme(), {10, 20, 30, 40});
    QVERIFY(sized.ok());
    one->edit(sized.take(), u"sizes"_s);
    g.window->designPanel()->addFactor();
    QCOMPARE(one->design().cellN, (std::vector<Rational>{10, 10, 20, 20, 30, 30, 40, 40}));
    QCOMPARE(one->design().factors[0].factor.plannedN, (std::vector<Rational>{20, 40, 60, 80}));
    // The added factor shows the totals its cells imply (100 each), not "equal" without a number.
    QCOMPARE(one->study().active, 1);
    QCOMPARE(one->design().factors[1].factor.plannedN, (std::vector<Rational>{100, 100}));
    LevelsModel added(one);
    QCOMPARE(added.data(added.index(0, LevelsModel::SizeColumn)).toString(), u"100"_s);
}

// With a design open, File > Export writes the design's coding over its cells.
void TestDesignView::exportIsOverTheCells()
{
    WindowFixture f;
    QVERIFY(f.window->openDemo(u"hedgerow"_s));
    ExportDialog dialog(f.window->document());
    dialog.setFormat(ExportFormat::Csv);
    dialog.setMatrix(ExportDialog::Matrix::Coding);
    dialog.setExact(true);
    const QStringList lines = dialog.text().split(u"\r\n"_s, Qt::SkipEmptyParts);
    QCOMPARE(lines.size(), 7); // the header and six cells
    // Treatment coding of both factors: grass·late is grass (1, 0), late (1) and their product.
    QCOMPARE(lines[4], u"grass\u00b7late,1,0,1,1,0"_s);
    dialog.setMatrix(ExportDialog::Matrix::Hypotheses);
    QVERIFY2(dialog.text().startsWith(u"coefficient,"_s) && dialog.text().contains(u"\r\nintercept,"_s), qPrintable(dialog.text()));
}

void TestDesignView::addingAndRemovingAFactorIsUndoable()
{
    WindowFixture f;
    Document *d = f.window->document();
    DesignPanel *p = f.window->designPanel();
    QVERIFY(!d->isDesign());
    const QByteArray start = schemeToJson(d->scheme());
    p->addFactor();
    QVERIFY(d->isDesign());
    QCOMPARE(d->design().factors.size(), size_t(2));
    QCOMPARE(d->study().active, 1); // the new factor is the one the grid edits
    QCOMPARE(d->scheme().levelCount(), 2);
    QCOMPARE(d->design().terms.size(), size_t(3));
    QCOMPARE(p->picture()->cellTexts().size(), 8);
    p->addFactor();
    QCOMPARE(d->design().factors.size(), size_t(3));
    QVERIFY(d->design().factors[1].factor.name != d->design().factors[2].factor.name);
    d->undoStack()->undo();
    QCOMPARE(d->design().factors.size(), size_t(2));
    d->undoStack()->undo();
    QVERIFY(!d->isDesign());
    QCOMPARE(schemeToJson(d->scheme()), start);
    d->undoStack()->redo();
    QVERIFY(d->isDesign());
    p->factorTable()->selectRow(1);
    p->removeFactor();
    QVERIFY(!d->isDesign());
    QCOMPARE(schemeToJson(d->scheme()), start);
    d->undoStack()->undo();
    QCOMPARE(d->design().factors.size(), size_t(2));
}

// Terms without the removed factor stay (renumbered); "B within C" loses C and becomes B's main
// effect; terms with the removed factor go. Before, the design fell back to the full factorial.
void TestDesignView::removingAFactorKeepsTheTermsWithoutIt()
{
    Study s = twoByTwo();
    s.design.factors.push_back(centred(u"age"_s, u"young"_s, u"old"_s));
    s.design.terms = {Term{{0}, -1}, Term{{0, 1}, -1}, Term{{1}, 2}, Term{{0, 2}, -1}};
    auto withoutAge = withFactorRemoved(s, 2);
    QVERIFY(withoutAge);
    QStringList names;
    for (const Term &t : withoutAge->design.terms)
        names << termName(withoutAge->design, t);
    QCOMPARE(names, (QStringList{u"cue"_s, u"load"_s, u"cue \u00d7 load"_s}));

    auto withoutCue = withFactorRemoved(s, 0);
    QVERIFY(withoutCue);
    names.clear();
    for (const Term &t : withoutCue->design.terms)
        names << termName(withoutCue->design, t);
    QCOMPARE(names, (QStringList{u"load within age"_s}));

    // Nothing left without the factor: the full factorial of the others.
    s.design.terms = {Term{{0, 2}, -1}};
    auto fallback = withFactorRemoved(s, 2);
    QVERIFY(fallback);
    QCOMPARE(fallback->design.terms.size(), size_t(3));
}

void TestDesignView::cellSizesFollowTheLevelNames()
{
    WindowFixture f;
    QVERIFY(f.window->openDemo(u"hedgerow"_s));
    Document *d = f.window->document();
    DesignPanel *p = f.window->designPanel();
    // Move wildflower to the top of margin's levels: its sizes (6, 4) move with it.
    auto moved = edits::withLevelMoved(d->scheme(), 2, 0);
    QVERIFY(moved);
    d->edit(moved.take(), u"Move level"_s);
    QCOMPARE(d->design().factors[0].factor.levels.first(), u"wildflower"_s);
    QCOMPARE(rationalToString(d->design().cellN[1]), u"4"_s);
    QCOMPARE(rationalToString(d->design().cellN[5]), u"5"_s);
    // A renamed level keeps its place.
    d->edit(edits::withLevelName(d->scheme(), 0, u"meadow"_s).take(), u"Rename"_s);
    QCOMPARE(rationalToString(d->design().cellN[1]), u"4"_s);
    QVERIFY(d->study().cellSizeNote.isEmpty());
    // A new level has no sizes: back to equal, with a note beside the table.
    d->edit(edits::withLevelAdded(d->scheme()).take(), u"Add level"_s);
    QVERIFY(d->design().cellN.empty());
    QVERIFY2(p->cellSizeNote().contains(u"back to equal"_s), qPrintable(p->cellSizeNote()));
    d->undoStack()->undo();
    QCOMPARE(rationalToString(d->design().cellN[1]), u"4"_s);
    QVERIFY(!p->cellSizeNote().contains(u"back to equal"_s));
}

void TestDesignView::emptyCellIsNamed()
{
    WindowFixture f;
    QVERIFY(f.window->openDemo(u"hedgerow"_s));
    Document *d = f.window->document();
    DesignPanel *p = f.window->designPanel();
    QAbstractItemModel *sizes = p->cellSizeTable()->model();
    QVERIFY(sizes->setData(sizes->index(1, 1), u"0"_s)); // grass·late, as typed
    QCOMPARE(rationalToString(d->design().cellN[3]), u"0"_s);
    QVERIFY2(hasFinding(p->findingsText(), u"Empty cell (planned n = 0): grass\u00b7late. The chosen terms cannot be estimated"_s), qPrintable(p->findingsText()));
    QVERIFY(cellText(p->cellSizeTable(), 1, 1).startsWith(u"\u2717"_s));
    sizes->setData(sizes->index(1, 1), u"x"_s); // refused, nothing changes
    QCOMPARE(rationalToString(d->design().cellN[3]), u"0"_s);
    d->undoStack()->undo();
    QCOMPARE(rationalToString(d->design().cellN[3]), u"5"_s);
}

// Main effects only, grass·late emptied: the design is analysed over the other five cells; the
// picture hatches the empty cell, the cell-size table marks it as a caution, and the hypothesis
// text and the findings say which coefficients now test something different.
void TestDesignView::emptyCellWithEstimableTermsIsAnalysedOverTheOthers()
{
    WindowFixture f;
    QVERIFY(f.window->openDemo(u"hedgerow"_s));
    Document *d = f.window->document();
    DesignPanel *p = f.window->designPanel();
    setTicked(termItem(p->termTree(), u"margin \u00d7 mowing"_s), false);
    QAbstractItemModel *sizes = p->cellSizeTable()->model();
    QVERIFY(sizes->setData(sizes->index(1, 1), u"0"_s)); // grass·late
    QVERIFY(d->designAnalysis().empty.estimable);
    QCOMPARE(d->designAnalysis().analysis.levelCount, 5);
    QVERIFY(cellText(p->cellSizeTable(), 1, 1).startsWith(u"!"_s));
    p->selectColumn(2); // b3 late vs early
    QCOMPARE(p->picture()->cellTexts(),
             (QStringList{u"\u22125/9"_s, u"5/9"_s, u"0"_s, u"empty"_s, u"\u22124/9"_s, u"4/9"_s})); // TestEmptyCells derives them
    QVERIFY2(p->hypothesisText().contains(u"Without grass\u00b7late: b3 late vs early (mowing) now tests"_s), qPrintable(p->hypothesisText()));
    QVERIFY2(hasFinding(p->findingsText(), u"the empty cell grass\u00b7late (planned n = 0) changes what 4 of 4 coefficients test"_s),
             qPrintable(p->findingsText()));
    QVERIFY2(hasFinding(p->findingsText(), u"over the 5 cells with observations"_s), qPrintable(p->findingsText()));
}

void TestDesignView::saveThenOpenRoundTripsTheDesign()
{
    WindowFixture f;
    QVERIFY(f.window->openDemo(u"hedgerow"_s));
    Document *d = f.window->document();
    f.window->designPanel()->makeActive(1);
    setTicked(termItem(f.window->designPanel()->termTree(), u"margin \u00d7 mowing"_s), false);
    const QByteArray saved = designToJson(d->design());
    const QString path = f.dir.filePath(u"field.json"_s);
    QVERIFY(f.window->saveTo(path));
    QVERIFY(!d->isModified());
    QVERIFY(isDesignJson([&] {
        QFile file(path);
        return file.open(QIODevice::ReadOnly) ? file.readAll() : QByteArray();
    }()));
    QVERIFY(f.window->newScheme());
    QVERIFY(!d->isDesign());
    QVERIFY(f.window->openFile(path));
    QVERIFY(d->isDesign());
    QCOMPARE(designToJson(d->design()), saved);
    QCOMPARE(d->design().terms.size(), size_t(2));

    // One factor stays in the one-factor format.
    QVERIFY(f.window->newScheme());
    const QString single = f.dir.filePath(u"single.json"_s);
    QVERIFY(f.window->saveTo(single));
    auto back = loadStudy(single);
    QVERIFY2(back.ok(), qPrintable(back.error()));
    QVERIFY(!back->isDesign());
}

void TestDesignView::badDesignFileNamesTheFieldAndKeepsTheWork()
{
    WindowFixture f;
    QVERIFY(f.window->openDemo(u"hedgerow"_s));
    Document *d = f.window->document();
    f.window->designPanel()->makeActive(1);
    const QByteArray work = designToJson(d->design());
    QByteArray bad = designToJson(d->design());
    bad.replace("\"margin\",\n", "\"hedge\",\n");
    QVERIFY(bad.contains("\"hedge\""));
    const QString path = f.dir.filePath(u"bad.json"_s);
    QFile file(path);
    QVERIFY(file.open(QIODevice::WriteOnly));
    file.write(bad);
    file.close();
    f.prompter.saveChoice = ScriptedPrompter::SaveChoice::Discard;
    QVERIFY(!f.window->openFile(path));
    QCOMPARE(f.prompter.told.size(), 1);
    QVERIFY2(f.prompter.told.first().contains(u"design.terms[2].factors[0]"_s), qPrintable(f.prompter.told.first()));
    QVERIFY(f.prompter.told.first().contains(u"'hedge' is not a factor of the design"_s));
    QCOMPARE(designToJson(d->design()), work);
    QCOMPARE(d->study().active, 1);
}

void TestDesignView::recoveryKeepsTheDesign()
{
    WindowFixture f;
    QVERIFY(f.window->openDemo(u"hedgerow"_s));
    f.window->designPanel()->makeActive(1);
    Document *d = f.window->document();
    d->edit(edits::withWeights(d->scheme(), {{0, 0, Weight::exact(Rational(-1, 2))}}), u"edit"_s);
    QVERIFY(d->isModified());
    QVERIFY(f.window->writeRecovery());
    const QByteArray kept = designToJson(f.window->document()->design());
    f.window.reset();
    f.prompter.restore = true;
    f.open();
    QVERIFY(f.window->offerRecovery());
    QVERIFY(f.window->document()->isDesign());
    QCOMPARE(designToJson(f.window->document()->design()), kept);
}

void TestDesignView::powerIsPerDesignColumnOverTheCells()
{
    WindowFixture f;
    Document *d = f.window->document();
    Study s = twoByTwo();
    s.design.cellN.assign(4, Rational(10));
    d->reset(s, {});
    auto *power = f.window->findChild<PowerPanel *>();
    QVERIFY(power);
    QCOMPARE(rowCount(power->inputTable()), 4); // one row per cell
    power->setSizeSource(PowerPanel::SizeSource::PlannedN);
    power->sdEdit()->setText(u"1"_s);
    power->setExpectedTexts({u"0"_s, u"0"_s, u"0"_s, u"1"_s}); // only invalid\u00b7high differs
    power->recompute();
    QVERIFY2(power->report().has_value(), qPrintable(power->settings().error()));
    const PowerReport &r = *power->report();
    QCOMPARE(r.contrasts.size(), size_t(3));
    // Interaction row (1, -1, -1, 1), n = 10 per cell, sd 1: psi = 1, SE = sqrt(4/10), df = 36.
    // SciPy 1.10 stats.nct, two-sided alpha .05: 0.3371329261052971.
    QCOMPARE(r.contrasts[2].df, 36.0);
    QVERIFY(std::abs(r.contrasts[2].power - 0.3371329261052971) < 1e-6);
    // The same as core given the design's rows directly.
    PowerSettings direct;
    direct.means = {0, 0, 0, 1};
    direct.n = {10, 10, 10, 10};
    const auto rows = contrastRowsOf(d->designAnalysis().analysis);
    QVERIFY(rows.ok());
    const auto expected = computePower(rows->rows, rows->names, direct);
    QVERIFY(expected.ok());
    for (size_t i = 0; i < r.contrasts.size(); ++i)
        QCOMPARE(r.contrasts[i].power, expected->contrasts[i].power);
}

QTEST_MAIN(TestDesignView)
#include "TestDesignView.moc"
