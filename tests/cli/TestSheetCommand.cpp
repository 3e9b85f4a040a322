// contrast-bench-cli compare and sheet: the four pairs people ask about, the sheet as HTML (the
// same bytes as the example in docs/) and as PDF (pdftotext, from poppler-utils, finds every level
// name and every hypothesis text; pdffonts says every font is embedded), and bad input.
#include "core/analysis/Analysis.h"
#include "core/files/StudyFile.h"
#include "core/analysis/DesignAnalysis.h"
#include "core/model/Study.h"

#include "tests/support/ProcessRunner.h"

#include <QFile>
#include <QRegularExpression>
#include <QTemporaryDir>
#include <QTest>

using namespace Qt::StringLiterals;
using cb::test::runCli;
using cb::test::runProcess;

namespace {

const QString kDemos = QStringLiteral(CB_SOURCE_DIR "/resources/demos/");

// Text as found by search: words joined by single spaces, ligatures undone and hyphens left out
// (pdftotext joins a word broken at a line's end after a hyphen and drops the hyphen:
// "medium-" + "dark" comes out as "mediumdark").
QString searchable(QString text)
{
    text.replace(u"\ufb01"_s, u"fi"_s).replace(u"\ufb02"_s, u"fl"_s).replace(u"\ufb00"_s, u"ff"_s);
    text.replace(QRegularExpression(u"-\\s*\\n\\s*"_s), u"-"_s);
    return text.remove(u'-').simplified();
}

// pdftotext's pages without the page numbers Qt prints at their foot.
QString withoutPageNumbers(const QString &text)
{
    QStringList pages = text.split(u'\f');
    for (QString &page : pages) {
        QStringList lines = page.split(u'\n');
        while (!lines.isEmpty() && lines.last().trimmed().isEmpty())
            lines.removeLast();
        if (!lines.isEmpty() && QRegularExpression(u"^\\s*\\d+\\s*$"_s).match(lines.last()).hasMatch())
            lines.removeLast();
        page = lines.join(u'\n');
    }
    return pages.join(u'\n');
}

} // namespace

class TestSheetCommand : public QObject
{
    Q_OBJECT

private slots:
    void comparePairs_data()
    {
        QTest::addColumn<QStringList>("args");
        QTest::addColumn<QString>("line");
        QTest::newRow("treatment vs sum") << QStringList{u"--levels"_s, u"a,b,c"_s, u"--scheme"_s, u"treatment"_s, u"--with"_s, u"sum"_s}
                                          << u"The intercept changes meaning: under Treatment (dummy), reference a it is the mean of a; under Sum (effect, deviation), base level c it is the unweighted mean of the 3 level means."_s;
        QTest::newRow("sum vs weighted effect") << QStringList{u"--levels"_s, u"a,b,c"_s, u"--n"_s, u"10,20,30"_s, u"--scheme"_s, u"sum"_s, u"--with"_s, u"weighted-effect"_s}
                                                << u"Of the other coefficients, 0 test the same hypothesis, 0 a rescaled one and 2 something different."_s;
        QTest::newRow("helmert vs reverse helmert, two levels") << QStringList{u"--levels"_s, u"a,b"_s, u"--scheme"_s, u"helmert"_s, u"--with"_s, u"reverse-helmert"_s}
                                                                << u"Of the other coefficients, 0 test the same hypothesis, 1 a rescaled one and 0 something different."_s;
        QTest::newRow("polynomial, equal vs actual spacing") << QStringList{u"--levels"_s, u"a,b,c"_s, u"--spacing"_s, u"0,1,3"_s, u"--scheme"_s, u"polynomial"_s,
                                                                            u"--with"_s, u"polynomial"_s, u"--with-spacing"_s, u"equal"_s}
                                                             << u"  second: Orthogonal polynomial, equal spacing"_s;
        QTest::newRow("a design, its active factor recoded") << QStringList{u"--file"_s, kDemos + u"hedgerow.json"_s, u"--with"_s, u"sum"_s}
                                                             << u"  second: margin: Sum (effect, deviation), base level wildflower"_s;
        QTest::newRow("a design is compared over its cells") << QStringList{u"--file"_s, kDemos + u"hedgerow.json"_s, u"--with"_s, u"sum"_s}
                                                             << u"Two codings of the cells bare\u00b7early, bare\u00b7late, grass\u00b7early, grass\u00b7late, wildflower\u00b7early, wildflower\u00b7late"_s;
        QTest::newRow("a saved file as the second") << QStringList{u"--file"_s, kDemos + u"irrigation.json"_s, u"--with-file"_s, kDemos + u"irrigation.json"_s}
                                                    << u"The intercept keeps its meaning: under both codings it is the unweighted mean of the 5 level means."_s;
    }
    void comparePairs()
    {
        QFETCH(QStringList, args);
        QFETCH(QString, line);
        const auto run = runCli(QStringList{u"compare"_s} + args);
        QCOMPARE(run.exitCode, 0);
        QVERIFY2(run.outText().split(u'\n').contains(line), qPrintable(run.outText()));
    }

    // The command line writes the same bytes as the example sheet in docs/ (TestStudySheet holds
    // that file to core's sheet).
    void htmlSheetIsTheExampleInDocs()
    {
        QTemporaryDir dir;
        const QString out = dir.filePath(u"sheet.html"_s);
        const auto run = runCli({u"sheet"_s, u"--file"_s, kDemos + u"irrigation.json"_s, u"--date"_s, u"2026-03-31"_s, u"-o"_s, out});
        QCOMPARE(run.exitCode, 0);
        QFile made(out), golden(QStringLiteral(CB_SOURCE_DIR "/docs/study-sheet/irrigation.html"));
        QVERIFY(made.open(QIODevice::ReadOnly) && golden.open(QIODevice::ReadOnly));
        QVERIFY(made.readAll() == golden.readAll());
    }

    void pdfSheetHasEveryLevelAndHypothesis_data()
    {
        QTest::addColumn<QString>("demo");
        QTest::newRow("irrigation") << u"irrigation"_s;
        QTest::newRow("roast") << u"roast"_s;
        QTest::newRow("hedgerow (a design)") << u"hedgerow"_s;
        QTest::newRow("warmup (a mixed design)") << u"warmup"_s;
    }
    void pdfSheetHasEveryLevelAndHypothesis()
    {
        QFETCH(QString, demo);
        QTemporaryDir dir;
        const QString pdf = dir.filePath(u"sheet.pdf"_s);
        const auto run = runCli({u"sheet"_s, u"--file"_s, kDemos + demo + u".json"_s, u"-o"_s, pdf});
        QVERIFY2(run.exitCode == 0, qPrintable(run.errText()));
        const auto text = runProcess(u"pdftotext"_s, {pdf, u"-"_s});
        QCOMPARE(text.exitCode, 0);
        const QString found = searchable(withoutPageNumbers(text.outText()));

        auto study = cb::loadStudy(kDemos + demo + u".json"_s);
        QVERIFY(study);
        QStringList levels;
        cb::Analysis a;
        if (study->isDesign()) {
            const cb::DesignAnalysis da = cb::analyzeDesign(study->design);
            a = da.analysis;
            for (const cb::Scheme &s : study->design.factors)
                levels << s.factor.levels;
        } else {
            a = cb::analyze(study->activeScheme());
            levels = a.levels;
        }
        for (const QString &level : levels)
            QVERIFY2(found.contains(searchable(level)), qPrintable(level));
        QVERIFY(!a.hypothesisWords.isEmpty());
        for (const QString &words : a.hypothesisWords)
            QVERIFY2(found.contains(searchable(words)), qPrintable(words));

        const auto fonts = runProcess(u"pdffonts"_s, {pdf});
        QCOMPARE(fonts.exitCode, 0);
        const QStringList rows = fonts.outText().split(u'\n', Qt::SkipEmptyParts).mid(2);
        QVERIFY(!rows.isEmpty());
        for (const QString &row : rows) // columns: name type encoding emb sub uni object ID
            QVERIFY2(row.split(u' ', Qt::SkipEmptyParts).value(row.split(u' ', Qt::SkipEmptyParts).size() - 5) == u"yes"_s, qPrintable(row));
    }

    void badInputIsRefused_data()
    {
        QTest::addColumn<QStringList>("args");
        QTest::addColumn<QString>("message");
        QTest::newRow("no second coding (compare)") << QStringList{u"compare"_s, u"--levels"_s, u"a,b"_s, u"--scheme"_s, u"sum"_s}
                                   << u"give either --with SCHEME or --with-file FILE"_s;
        QTest::newRow("unknown scheme (compare)") << QStringList{u"compare"_s, u"--levels"_s, u"a,b"_s, u"--scheme"_s, u"sum"_s, u"--with"_s, u"nope"_s}
                                   << u"--with: unknown scheme 'nope'"_s;
        QTest::newRow("other levels (compare)") << QStringList{u"compare"_s, u"--levels"_s, u"a,b"_s, u"--scheme"_s, u"sum"_s, u"--with-file"_s, kDemos + u"irrigation.json"_s}
                                   << u"the two codings must have the same levels"_s;
        QTest::newRow("reference not a level (compare)") << QStringList{u"compare"_s, u"--levels"_s, u"a,b"_s, u"--scheme"_s, u"sum"_s, u"--with"_s, u"treatment"_s, u"--with-reference"_s, u"z"_s}
                                   << u"--with-reference: 'z' is not one of the levels"_s;
        QTest::newRow("no output (sheet)") << QStringList{u"sheet"_s, u"--levels"_s, u"a,b"_s, u"--scheme"_s, u"sum"_s}
                                   << u"give -o FILE"_s;
        QTest::newRow("bad date (sheet)") << QStringList{u"sheet"_s, u"--levels"_s, u"a,b"_s, u"--scheme"_s, u"sum"_s, u"-o"_s, u"-"_s, u"--date"_s, u"31/03/2026"_s}
                                   << u"--date: '31/03/2026' is not a date; expected YYYY-MM-DD"_s;
        QTest::newRow("bad format (sheet)") << QStringList{u"sheet"_s, u"--levels"_s, u"a,b"_s, u"--scheme"_s, u"sum"_s, u"-o"_s, u"-"_s, u"--format"_s, u"docx"_s}
                                   << u"--format: 'docx' is not a format"_s;
        QTest::newRow("pdf to standard output (sheet)") << QStringList{u"sheet"_s, u"--levels"_s, u"a,b"_s, u"--scheme"_s, u"sum"_s, u"-o"_s, u"-"_s, u"--format"_s, u"pdf"_s}
                                   << u"-o: a PDF is written to a file"_s;
    }
    void badInputIsRefused()
    {
        QFETCH(QStringList, args);
        QFETCH(QString, message);
        const auto run = runCli(args);
        QCOMPARE(run.exitCode, 2);
        QVERIFY2(run.errText().contains(message), qPrintable(run.errText()));
    }
};

QTEST_GUILESS_MAIN(TestSheetCommand)
#include "TestSheetCommand.moc"
