// Column names in the window: a column the user has not named follows what it tests, a named one
// keeps its name, is marked when it goes out of date and takes the generated name in one click
// (one undo step); the export carries the current names. The issue's scenario end to end.
#include "core/analysis/ColumnNames.h"
#include "core/export/Export.h"
#include "core/model/Study.h"
#include "ui/coding/CodingModel.h"
#include "ui/coding/CodingPanel.h"
#include "ui/document/Document.h"
#include "ui/export/ExportDialog.h"
#include "ui/levels/LevelsModel.h"
#include "ui/levels/LevelsPanel.h"
#include "tests/support/ExportedCsv.h"
#include "tests/support/WindowFixture.h"

#include <QAction>
#include <QMenu>
#include <QTest>

#include <memory>

using namespace Qt::StringLiterals;
using namespace cb;

namespace {

QStringList namesOf(const Document *d)
{
    QStringList out;
    for (const Column &c : d->scheme().columns)
        out << c.name;
    return out;
}

// Types one cell at a time, as a person would.
void typeColumn(MainWindow &w, int column, const QStringList &texts)
{
    CodingModel *m = w.codingPanel()->codingModel();
    for (int row = 0; row < texts.size(); ++row)
        QVERIFY(m->setData(m->index(row, column), texts[row]));
}

void renameLevels(MainWindow &w, const QStringList &names)
{
    LevelsModel *m = w.levelsPanel()->model();
    for (int row = 0; row < names.size(); ++row)
        QVERIFY(m->setData(m->index(row, LevelsModel::NameColumn), names[row]));
}

QString header(MainWindow &w, int column, int role = Qt::DisplayRole)
{
    return w.codingPanel()->codingModel()->headerData(column, Qt::Horizontal, role).toString().replace(u'\n', u' ');
}

QAction *actionStartingWith(QMenu *menu, const QString &start)
{
    const QList<QAction *> actions = menu->actions();
    for (QAction *a : actions)
        if (a->text().startsWith(start))
            return a;
    return nullptr;
}

} // namespace

class TestColumnNamesWindow : public QObject
{
    Q_OBJECT

private slots:
    void theIssuesScenarioNamesFollowTheWeightsAndTheLevels();
    void typingWeightsRenamesAnUnnamedColumn();
    void aUsersNameIsKeptMarkedAndReplacedInOneUndoableClick();
    void keepTheNameClearsTheMark();
    void theFlagSurvivesUndoRedoAndTheRecoveryFile();
    void theExportCarriesTheCurrentNames();
};

void TestColumnNamesWindow::theIssuesScenarioNamesFollowTheWeightsAndTheLevels()
{
    // Start with no file: four levels, treatment coding.
    WindowFixture f;
    MainWindow &w = *f.window;
    Document *d = w.document();
    QCOMPARE(namesOf(d), (QStringList{u"B vs A"_s, u"C vs A"_s, u"D vs A"_s}));
    // Column 1 as 1, 1, -1, -1: on the way the coding is rank deficient and no column tests
    // anything identifiable, so none keeps a name that says it does.
    typeColumn(w, 0, {u"1"_s, u"1"_s, u"-1"_s, u"-1"_s});
    QVERIFY(!d->analysis().fullRank);
    QCOMPARE(namesOf(d), (QStringList{u"column 1"_s, u"column 2"_s, u"column 3"_s}));
    // 1, -1, 0, 0 into column 2: full rank again; hypotheses from tests/python/column_name_hypotheses.py.
    typeColumn(w, 1, {u"1"_s, u"-1"_s, u"0"_s, u"0"_s});
    QVERIFY(d->analysis().fullRank);
    QCOMPARE(namesOf(d), (QStringList{u"1/2 (A, B vs C)"_s, u"1/2 (A vs B)"_s, u"D vs C"_s}));
    // The card of column 2 and its name say the same thing.
    QCOMPARE(d->analysis().hypothesisWords[2], u"1/2 times the difference: A minus B"_s);
    // Renaming the levels: the names follow.
    renameLevels(w, {u"control"_s, u"low"_s, u"mid"_s, u"high"_s});
    QCOMPARE(namesOf(d), (QStringList{u"1/2 (control, low vs mid)"_s, u"1/2 (control vs low)"_s, u"high vs mid"_s}));
    QCOMPARE(header(w, 1), u"2  1/2 (control vs low)"_s);
    // Changing the reference level of a standard scheme renames with it.
    auto treatment = makeScheme(d->scheme().factor, SchemeKind::Treatment, SchemeOptions{2});
    d->edit(treatment.take(), u"treatment, reference mid"_s);
    QCOMPARE(namesOf(d), (QStringList{u"control vs mid"_s, u"low vs mid"_s, u"high vs mid"_s}));
}

void TestColumnNamesWindow::typingWeightsRenamesAnUnnamedColumn()
{
    WindowFixture f;
    Document *d = f.window->document();
    // Column 3 (D vs A) typed as -1, 0, 0, 1: A = b0 - b3 and D = b0 + b3, so b3 = (D - A)/2.
    typeColumn(*f.window, 2, {u"-1"_s, u"0"_s, u"0"_s, u"1"_s});
    QCOMPARE(d->scheme().kind, SchemeKind::Custom);
    QCOMPARE(d->scheme().columns[2].name, u"1/2 (D vs A)"_s);
    QCOMPARE(d->scheme().columns[2].name, generatedColumnName(d->scheme(), d->analysis(), 2));
    QCOMPARE(d->analysis().hypotheses[3], (std::vector<Weight>{Weight::exact(Rational(-1, 2)), Weight(0), Weight(0), Weight::exact(Rational(1, 2))}));
    QVERIFY(!header(*f.window, 2).contains(CodingModel::kStaleNameMark));
}

void TestColumnNamesWindow::aUsersNameIsKeptMarkedAndReplacedInOneUndoableClick()
{
    WindowFixture f;
    MainWindow &w = *f.window;
    Document *d = w.document();
    CodingModel *m = w.codingPanel()->codingModel();
    QVERIFY(m->setHeaderData(1, Qt::Horizontal, u"mid dose"_s));
    QVERIFY(!header(w, 1).contains(CodingModel::kStaleNameMark));
    typeColumn(w, 1, {u"1"_s, u"-1"_s, u"0"_s, u"0"_s});
    // Beside the indicators of B and D, column 2 now tests A minus C; the user's name stays, marked.
    QCOMPARE(d->scheme().columns[1].name, u"mid dose"_s);
    QVERIFY(m->nameIsStale(1));
    QVERIFY2(header(w, 1).startsWith(CodingModel::kStaleNameMark.toString() + u" 2  mid dose"_s), qPrintable(header(w, 1)));
    const QString generated = m->generatedName(1);
    QCOMPARE(generated, u"A vs C"_s);
    QCOMPARE(generated, generatedColumnName(d->scheme(), d->analysis(), 1));
    const QString tip = header(w, 1, Qt::ToolTipRole);
    QVERIFY2(tip.contains(d->analysis().hypothesisWords[2]) && tip.contains(generated), qPrintable(tip));
    // Other columns' names followed the edit; only the user's is marked.
    QVERIFY(!m->nameIsStale(0));
    QVERIFY(!m->nameIsStale(2));

    // One click on "Use the name ..." in the header's menu.
    const int steps = d->undoStack()->count();
    std::unique_ptr<QMenu> menu(w.codingPanel()->columnNameMenu(1));
    QVERIFY(menu);
    QAction *use = actionStartingWith(menu.get(), u"Use the name \u2018%1\u2019"_s.arg(generated));
    QVERIFY(use);
    use->trigger();
    QCOMPARE(d->scheme().columns[1].name, generated);
    QVERIFY(!d->scheme().columns[1].named);
    QVERIFY(!m->nameIsStale(1));
    QCOMPARE(d->undoStack()->count(), steps + 1);
    // Undo brings the user's name back, marked; redo the generated one.
    d->undoStack()->undo();
    QCOMPARE(d->scheme().columns[1].name, u"mid dose"_s);
    QVERIFY(d->scheme().columns[1].named);
    QVERIFY(m->nameIsStale(1));
    d->undoStack()->redo();
    QCOMPARE(d->scheme().columns[1].name, generated);
    // Unnamed again, it follows the next edit.
    typeColumn(w, 1, {u"0"_s, u"0"_s, u"1"_s, u"-1"_s});
    QCOMPARE(d->scheme().columns[1].name, generatedColumnName(d->scheme(), d->analysis(), 1));
    QVERIFY(d->scheme().columns[1].name != generated);
}

void TestColumnNamesWindow::keepTheNameClearsTheMark()
{
    WindowFixture f;
    MainWindow &w = *f.window;
    CodingModel *m = w.codingPanel()->codingModel();
    QVERIFY(m->setHeaderData(0, Qt::Horizontal, u"first"_s));
    typeColumn(w, 0, {u"0"_s, u"2"_s, u"0"_s, u"0"_s}); // now 1/2 (B vs A)
    QVERIFY(m->nameIsStale(0));
    std::unique_ptr<QMenu> menu(w.codingPanel()->columnNameMenu(0));
    QAction *keep = actionStartingWith(menu.get(), u"Keep the name \u2018first\u2019"_s);
    QVERIFY(keep);
    keep->trigger();
    QVERIFY(!m->nameIsStale(0));
    QCOMPARE(w.document()->scheme().columns[0].name, u"first"_s);
    QVERIFY(!header(w, 0).contains(CodingModel::kStaleNameMark));
    // An unnamed column has no menu: there is nothing to offer.
    QVERIFY(!w.codingPanel()->columnNameMenu(1));
}

void TestColumnNamesWindow::theFlagSurvivesUndoRedoAndTheRecoveryFile()
{
    WindowFixture f;
    Document *d = f.window->document();
    CodingModel *m = f.window->codingPanel()->codingModel();
    QVERIFY(m->setHeaderData(2, Qt::Horizontal, u"top dose"_s));
    typeColumn(*f.window, 2, {u"0"_s, u"0"_s, u"0"_s, u"2"_s}); // now 1/2 (D vs A)
    QVERIFY(m->nameIsStale(2));
    const Study edited = d->study();
    // Undo to before the rename: the tool's name, unflagged; redo: the user's again.
    while (d->undoStack()->canUndo())
        d->undoStack()->undo();
    QVERIFY(!d->scheme().columns[2].named);
    QCOMPARE(d->scheme().columns[2].name, u"D vs A"_s);
    while (d->undoStack()->canRedo())
        d->undoStack()->redo();
    QCOMPARE(d->study(), edited);
    QVERIFY(m->nameIsStale(2));
    // The recovery file holds the flag and what the name was given for.
    QVERIFY(f.window->writeRecovery());
    f.window.reset();
    f.open();
    QVERIFY(f.window->offerRecovery());
    QCOMPARE(f.window->document()->study(), edited);
    QVERIFY(f.window->codingPanel()->codingModel()->nameIsStale(2));
}

void TestColumnNamesWindow::theExportCarriesTheCurrentNames()
{
    WindowFixture f;
    MainWindow &w = *f.window;
    Document *d = w.document();
    typeColumn(w, 0, {u"1"_s, u"1"_s, u"-1"_s, u"-1"_s});
    typeColumn(w, 1, {u"1"_s, u"-1"_s, u"0"_s, u"0"_s});
    renameLevels(w, {u"control"_s, u"low"_s, u"mid"_s, u"high"_s});
    ExportDialog dialog(d);
    dialog.setFormat(ExportFormat::Csv);
    for (ExportDialog::Matrix matrix : {ExportDialog::Matrix::Coding, ExportDialog::Matrix::Hypotheses}) {
        dialog.setMatrix(matrix);
        auto table = cb::test::readExportedCsv(dialog.text());
        QVERIFY2(table.ok(), qPrintable(table.error()));
        const QStringList expected = matrix == ExportDialog::Matrix::Coding
                                         ? QStringList{u"1/2 (control, low vs mid)"_s, u"1/2 (control vs low)"_s, u"high vs mid"_s}
                                         : QStringList{u"control"_s, u"low"_s, u"mid"_s, u"high"_s};
        QCOMPARE(table->columnNames, expected);
        if (matrix == ExportDialog::Matrix::Hypotheses)
            QCOMPARE(table->rowNames, (QStringList{u"intercept"_s, u"1/2 (control, low vs mid)"_s, u"1/2 (control vs low)"_s, u"high vs mid"_s}));
        QVERIFY(!dialog.text().contains(u"C vs A"_s) && !dialog.text().contains(u"mid vs control"_s));
    }
    // A user's name is exported as chosen, even once out of date.
    QVERIFY(w.codingPanel()->codingModel()->setHeaderData(2, Qt::Horizontal, u"my top"_s));
    typeColumn(w, 2, {u"0"_s, u"0"_s, u"1"_s, u"1"_s});
    dialog.setMatrix(ExportDialog::Matrix::Coding);
    QCOMPARE(cb::test::readExportedCsv(dialog.text())->columnNames.last(), u"my top"_s);
}

QTEST_MAIN(TestColumnNamesWindow)
#include "TestColumnNamesWindow.moc"
