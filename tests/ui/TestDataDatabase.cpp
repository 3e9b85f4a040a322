// Check on data with data in a database: "Copy summary query" puts core's query on the
// clipboard, "Read from a database…" asks through the prompter and fits what the injected reader
// returns, through the same summary-table path as a file (the window never links Qt SQL, so the
// reader here is a stand-in; tests/cli/TestDatabaseFit runs the real one). Check values: the
// fit of the same rows read from tests/data/fit_three_groups.csv (Dobson 1983 plant growth).

#include "ui/data/DataPanel.h"
#include "core/data/SummaryQuery.h"
#include "tests/support/ScriptedPrompter.h"
#include "ui/document/Document.h"

#include <QAction>
#include <QClipboard>
#include <QGuiApplication>
#include <QPushButton>
#include <QComboBox>
#include <QFile>
#include <QSignalSpy>
#include <QTemporaryDir>
#include <QTest>

using namespace Qt::StringLiterals;
using namespace cb;

namespace {

const QString kThreeGroups = QStringLiteral(CB_TEST_DATA "/fit_three_groups.csv");

void useLevels(Document &doc)
{
    Factor f;
    f.name = u"group"_s;
    f.levels = {u"g1"_s, u"g2"_s, u"g3"_s};
    doc.reset(makeScheme(f, SchemeKind::Treatment).take(), {});
}

// The levels of the three-group file as the rows a database would return.
std::vector<SummaryRow> threeGroupRows()
{
    DataReadOptions o;
    o.factorColumn = u"group"_s;
    o.responseColumn = u"y"_s;
    auto data = readLevelData(kThreeGroups, o);
    std::vector<SummaryRow> rows;
    if (!data)
        return rows;
    for (const LevelStats &l : data->levels)
        rows.push_back({l.name, l.stats.n, l.stats.mean, l.stats.variance(), true, u"test row"_s, {}});
    return rows;
}

QPushButton *button(DataPanel &panel, const QString &name)
{
    return panel.findChild<QPushButton *>(name);
}

// "Read from a database…", in the menu of "Open data…".
QAction *databaseChoice(DataPanel &panel)
{
    return panel.findChild<QAction *>(u"readDatabase"_s);
}

} // namespace

class TestDataDatabase : public QObject
{
    Q_OBJECT

private slots:
    void copySummaryQueryPutsCoresQueryOnTheClipboard()
    {
        Document doc;
        useLevels(doc);
        DataPanel panel(&doc);
        ScriptedPrompter prompter;
        panel.setPrompter(&prompter);
        prompter.summaryAnswer.table = u"harvest"_s;
        prompter.summaryAnswer.response = u"yield"_s;
        QGuiApplication::clipboard()->setText(u"before"_s);
        button(panel, u"copySummaryQuery"_s)->click();
        QCOMPARE(prompter.summaryQuestions.size(), 1);
        // Without a file, the level column is proposed from the factor's name; no database is asked for.
        QCOMPARE(prompter.summaryQuestions[0].factorColumns, QStringList{u"group"_s});
        QVERIFY(!prompter.summaryQuestions[0].withDatabase);
        SummaryQuerySpec spec;
        spec.table = u"harvest"_s;
        spec.factorColumns = {u"group"_s};
        spec.responseColumn = u"yield"_s;
        QCOMPARE(QGuiApplication::clipboard()->text(), summaryQuery(spec)->sql + u";\n"_s);
        QVERIFY(panel.message().isEmpty());
        // Cancel leaves the clipboard alone; a refused name shows core's message.
        prompter.summaryCancel = true;
        QGuiApplication::clipboard()->setText(u"kept"_s);
        QVERIFY(!panel.copySummaryQuery());
        QCOMPARE(QGuiApplication::clipboard()->text(), u"kept"_s);
        prompter.summaryCancel = false;
        prompter.summaryAnswer.table = u" "_s;
        prompter.summaryAnswer.response = u"group"_s;
        QVERIFY(!panel.copySummaryQuery());
        QVERIFY2(panel.message().contains(u"--response: column 'group' is already used"_s), qPrintable(panel.message()));
        QCOMPARE(QGuiApplication::clipboard()->text(), u"kept"_s);
    }

    void readFromDatabaseFitsLikeTheFile()
    {
        Document doc;
        useLevels(doc);
        DataPanel fromFile(&doc);
        QVERIFY(fromFile.openFile(kThreeGroups));
        QSignalSpy fileDone(&fromFile, &DataPanel::finished);
        fromFile.readAndFit();
        QVERIFY(fileDone.wait(10'000));
        QVERIFY(fromFile.fit().has_value());

        DataPanel panel(&doc);
        ScriptedPrompter prompter;
        panel.setPrompter(&prompter);
        QVERIFY(!databaseChoice(panel)->isEnabled()); // no reader handed in
        QString askedUrl;
        SummaryQuerySpec askedSpec;
        panel.setDatabaseReader([&](const QString &url, const SummaryQuerySpec &spec) {
            askedUrl = url;
            askedSpec = spec;
            return summaryFromRows(threeGroupRows(), url + u", table 'plants'"_s);
        });
        QVERIFY(databaseChoice(panel)->isEnabled());
        prompter.summaryAnswer.url = u"sqlite:///srv/greenhouse.db"_s;
        prompter.summaryAnswer.table = u"plants"_s;
        prompter.summaryAnswer.response = u"weight"_s;
        QSignalSpy done(&panel, &DataPanel::finished);
        databaseChoice(panel)->trigger();
        QVERIFY(done.wait(10'000));
        QVERIFY(prompter.summaryQuestions.value(0).withDatabase);
        QCOMPARE(askedUrl, u"sqlite:///srv/greenhouse.db"_s);
        QCOMPARE(askedSpec.table, u"plants"_s);
        QCOMPARE(askedSpec.factorColumns, QStringList{u"group"_s});
        QCOMPARE(askedSpec.responseColumn, u"weight"_s);
        QVERIFY2(panel.fit().has_value(), qPrintable(panel.message()));
        QVERIFY(panel.data()->fromSummaryTable);
        const FitResult &a = *panel.fit(), &b = *fromFile.fit();
        QCOMPARE(a.coefficients.size(), b.coefficients.size());
        for (size_t i = 0; i < a.coefficients.size(); ++i) {
            QVERIFY(std::abs(a.coefficients[i].estimate - b.coefficients[i].estimate) < 1e-12);
            QVERIFY(std::abs(a.coefficients[i].se - b.coefficients[i].se) < 1e-12);
        }
        QVERIFY(std::abs(a.sigma - b.sigma) < 1e-12);
        QCOMPARE(qRound(a.coefficients[0].estimate * 1000), 5032); // Dobson's control mean
    }

    // The Participant chooser of the open file is proposed to the database read, which asks for the
    // two-level form; the rows that come back (each participant's cell) are checked by participant,
    // as the file itself is.
    void readFromDatabaseHonoursTheParticipantChooser()
    {
        QTemporaryDir dir;
        const QString path = dir.filePath(u"rt.csv"_s);
        QFile out(path);
        QVERIFY(out.open(QIODevice::WriteOnly));
        out.write("subject,cue,rt\ns1,a,500\ns1,b,480\ns1,a,520\ns1,c,530\ns2,a,610\ns2,b,600\ns2,c,650\ns2,c,640\n"
                  "s3,a,450\ns3,b,440\ns3,c,470\ns4,a,520\ns4,b,490\ns4,c,560\ns5,a,580\ns5,b,575\n");
        out.close();
        Document doc;
        Factor f;
        f.name = u"cue"_s;
        f.levels = {u"a"_s, u"b"_s, u"c"_s};
        doc.reset(makeScheme(f, SchemeKind::Helmert).take(), {});
        DataPanel panel(&doc);
        QVERIFY(panel.openFile(path));
        panel.setColumns(u"cue"_s, u"rt"_s, {});
        panel.participantBox()->setCurrentText(u"subject"_s);
        QSignalSpy fileDone(&panel, &DataPanel::finished);
        panel.readAndFit();
        QVERIFY(fileDone.wait(10'000));
        QVERIFY2(panel.fit().has_value() && panel.fit()->byParticipant, qPrintable(panel.message()));
        const FitResult fromFile = *panel.fit();
        // What the engine would return: one row per participant and level (n, mean, sum of squares).
        std::vector<SummaryRow> rows;
        const DataSummary data = *panel.data();
        for (size_t p = 0; p < data.participantCells.size(); ++p)
            for (size_t l = 0; l < data.levels.size(); ++l)
                if (const RunningStats &c = data.participantCells[p][l]; c.n > 0)
                    rows.push_back({data.levels[l].name, c.n, c.mean, c.m2, false, u"test row"_s, data.participants[qsizetype(p)]});

        ScriptedPrompter prompter;
        panel.setPrompter(&prompter);
        SummaryQuerySpec askedSpec;
        panel.setDatabaseReader([&](const QString &url, const SummaryQuerySpec &spec) {
            askedSpec = spec;
            return participantSummaryFromRows(rows, url + u", table 'trials'"_s, spec.participantColumn);
        });
        prompter.summaryAnswer.url = u"sqlite:///srv/cueing.db"_s;
        prompter.summaryAnswer.table = u"trials"_s;
        QSignalSpy done(&panel, &DataPanel::finished);
        databaseChoice(panel)->trigger();
        QVERIFY(done.wait(10'000));
        QCOMPARE(prompter.summaryQuestions.value(0).participant, u"subject"_s); // from the chooser
        QCOMPARE(askedSpec.participantColumn, u"subject"_s);
        QVERIFY2(panel.fit().has_value(), qPrintable(panel.message()));
        const FitResult &a = *panel.fit();
        QVERIFY(a.byParticipant);
        QCOMPARE(a.participants, 5);
        QCOMPARE(a.completeParticipants, 4);
        QCOMPARE(a.coefficients.size(), fromFile.coefficients.size());
        for (size_t i = 0; i < a.coefficients.size(); ++i) {
            QVERIFY(std::abs(a.coefficients[i].estimate - fromFile.coefficients[i].estimate) < 1e-9);
            QVERIFY(std::abs(a.coefficients[i].se - fromFile.coefficients[i].se) < 1e-9);
            QCOMPARE(a.coefficients[i].participants, fromFile.coefficients[i].participants);
        }
        QVERIFY(std::abs(a.f - fromFile.f) < 1e-9);
        QVERIFY(std::abs(a.sigma - fromFile.sigma) < 1e-9);

        // An item column typed into the question: the spec asks for the by-item query too (core's
        // summaryFromSource runs it; TestDatabaseFit::byItemFromSqliteEqualsFitFromCsv checks the
        // numbers), and without a participant column the answer is refused, naming the field.
        prompter.summaryAnswer.item = u"sentence"_s;
        databaseChoice(panel)->trigger();
        QVERIFY(done.wait(10'000));
        QCOMPARE(askedSpec.itemColumn, u"sentence"_s);
        panel.participantBox()->setCurrentIndex(0);
        prompter.summaryAnswer.participant.clear();
        databaseChoice(panel)->trigger();
        QVERIFY2(panel.message().contains(u"the by-item analysis needs a participant column"_s), qPrintable(panel.message()));
    }

    void readFailureShowsTheReadersMessage()
    {
        Document doc;
        useLevels(doc);
        DataPanel panel(&doc);
        ScriptedPrompter prompter;
        panel.setPrompter(&prompter);
        panel.setDatabaseReader([](const QString &url, const SummaryQuerySpec &) {
            return Result<DataSummary>::failure(url + u": cannot connect: the server did not answer"_s);
        });
        prompter.summaryAnswer.url = u"postgresql://ann@db.example:5432/field"_s;
        prompter.summaryAnswer.table = u"plots"_s;
        prompter.summaryAnswer.response = u"yield"_s;
        QSignalSpy done(&panel, &DataPanel::finished);
        panel.readFromDatabase();
        QVERIFY(done.wait(10'000));
        QVERIFY(!panel.fit().has_value());
        QVERIFY2(panel.message().contains(u"postgresql://ann@db.example:5432/field: cannot connect: the server did not answer"_s),
                 qPrintable(panel.message()));
        QVERIFY(databaseChoice(panel)->isEnabled());
    }
};

QTEST_MAIN(TestDataDatabase)
#include "TestDataDatabase.moc"
