// The command line and the window read study files through one function (cb::loadStudy) and
// so analyse the same study: for every demo and for hand-edited files whose columns contradict
// their scheme, `contrast-bench-cli analyze --json --file F` equals the analysis the window
// shows after opening F.
#include "core/model/Study.h"
#include "core/files/StudyFile.h"
#include "core/report/AnalysisJson.h"
#include "ui/document/Document.h"
#include "tests/support/ProcessRunner.h"
#include "tests/support/WindowFixture.h"

#include <QDir>
#include <QFile>
#include <QJsonArray>
#include <QJsonDocument>
#include <QJsonObject>
#include <QTest>

using namespace Qt::StringLiterals;
using namespace cb;

class TestFrontEndsAgree : public QObject
{
    Q_OBJECT

private slots:
    void initTestCase();
    void cliAndWindowGiveTheSameAnalysis_data();
    void cliAndWindowGiveTheSameAnalysis();
    void contradictingColumnsAreCodedAsTheSchemeSays_data();
    void contradictingColumnsAreCodedAsTheSchemeSays();
    void aSchemeThatCannotBeMadeIsRefusedByBoth();

private:
    QString write(const QString &name, const QByteArray &text);
    QTemporaryDir m_dir;
};

namespace {

// Hand-edited files: each says one standard scheme and carries another's columns.
// A design (cells bare/grass/wildflower x early/late with 6, 6, 6, 5, 6, 4 plots) whose margin
// factor says weighted effect but holds treatment columns.
const char *const kWeightedDesign = R"({
  "format": "contrast-bench-scheme", "version": 2, "intercept": true, "notes": "",
  "design": {
    "cell_n": ["6", "6", "6", "5", "6", "4"],
    "factors": [
      {"factor": {"name": "margin", "levels": ["bare", "grass", "wildflower"]},
       "scheme": {"kind": "weighted-effect", "reference": "wildflower"},
       "columns": [{"name": "grass vs bare", "weights": ["0", "1", "0"]},
                   {"name": "wildflower vs bare", "weights": ["0", "0", "1"]}]},
      {"factor": {"name": "mowing", "levels": ["early", "late"]},
       "scheme": {"kind": "treatment", "reference": "early"},
       "columns": [{"name": "late vs early", "weights": ["0", "1"]}]}
    ]
  }
})";

// The same design, its margin factor's planned n written as 1, 1, 1 (the cells say 12, 11, 10)
// and its columns the weighted-effect columns for those wrong sizes.
const char *const kDesignWithStaleSizes = R"({
  "format": "contrast-bench-scheme", "version": 2, "intercept": true, "notes": "",
  "design": {
    "cell_n": ["6", "6", "6", "5", "6", "4"],
    "factors": [
      {"factor": {"name": "margin", "levels": ["bare", "grass", "wildflower"], "n": ["1", "1", "1"]},
       "scheme": {"kind": "weighted-effect", "reference": "wildflower"},
       "columns": [{"name": "bare vs weighted mean", "weights": ["1", "0", "-1"]},
                   {"name": "grass vs weighted mean", "weights": ["0", "1", "-1"]}]},
      {"factor": {"name": "mowing", "levels": ["early", "late"]},
       "scheme": {"kind": "sum", "reference": "late"},
       "columns": [{"name": "early vs mean", "weights": ["1", "0"]}]}
    ]
  }
})";

// One factor: sum coding said, treatment columns written.
const char *const kSumScheme = R"({
  "format": "contrast-bench-scheme", "version": 1,
  "factor": {"name": "site", "levels": ["a", "b", "c"]},
  "scheme": {"kind": "sum", "reference": "c"},
  "intercept": true,
  "columns": [{"name": "b vs a", "weights": ["0", "1", "0"]}, {"name": "c vs a", "weights": ["0", "0", "1"]}]
})";

// One factor with planned n 10, 20, 30: weighted effect said (base a), treatment columns written.
const char *const kWeightedScheme = R"({
  "format": "contrast-bench-scheme", "version": 1,
  "factor": {"name": "dose", "levels": ["a", "b", "c"], "n": ["10", "20", "30"]},
  "scheme": {"kind": "weighted-effect", "reference": "a"},
  "intercept": true,
  "columns": [{"name": "b vs a", "weights": ["0", "1", "0"]}, {"name": "c vs a", "weights": ["0", "0", "1"]}]
})";

// One factor: integer polynomial trends said, the linear trend written twice as large and the
// quadratic one left out.
const char *const kPolynomialScheme = R"({
  "format": "contrast-bench-scheme", "version": 1,
  "factor": {"name": "heat", "levels": ["low", "mid", "high"]},
  "scheme": {"kind": "polynomial", "polynomial_form": "integer", "polynomial_weighted": false},
  "intercept": false,
  "columns": [{"name": "linear", "weights": ["-2", "0", "2"]}]
})";

QJsonObject parsed(const QByteArray &json)
{
    QJsonParseError e;
    const QJsonDocument doc = QJsonDocument::fromJson(json, &e);
    if (e.error != QJsonParseError::NoError || !doc.isObject())
        qWarning("not a JSON object: %s", qPrintable(e.errorString()));
    return doc.object();
}

test::ProcessRun analyzeWithCli(const QString &path)
{
    return test::runCli({u"analyze"_s, u"--json"_s, u"--file"_s, path});
}

// What the window holds after opening the file, written as the command line writes it.
QJsonObject windowAnalysis(const Document &d)
{
    const QJsonObject o = d.isDesign() ? designAnalysisToJson(d.design(), d.designAnalysis()) : analysisToJson(d.scheme(), d.analysis());
    // Through text, as the command line's output goes, so that numbers compare as written.
    return parsed(QJsonDocument(o).toJson(QJsonDocument::Indented));
}

// coding_exact of an analysis: k rows of m strings.
QString codingCell(const QJsonObject &analysis, int level, int column)
{
    return analysis.value(u"coding_exact"_s).toArray().at(level).toArray().at(column).toString();
}

} // namespace

QString TestFrontEndsAgree::write(const QString &name, const QByteArray &text)
{
    const QString path = m_dir.filePath(name);
    QFile f(path);
    if (!f.open(QIODevice::WriteOnly) || f.write(text) != text.size())
        qFatal("cannot write %s", qPrintable(path));
    return path;
}

void TestFrontEndsAgree::initTestCase()
{
    QVERIFY(m_dir.isValid());
    write(u"weighted-design.json"_s, kWeightedDesign);
    write(u"stale-sizes-design.json"_s, kDesignWithStaleSizes);
    write(u"sum-scheme.json"_s, kSumScheme);
    write(u"weighted-scheme.json"_s, kWeightedScheme);
    write(u"polynomial-scheme.json"_s, kPolynomialScheme);
}

void TestFrontEndsAgree::cliAndWindowGiveTheSameAnalysis_data()
{
    QTest::addColumn<QString>("path");
    const QDir demos(QString::fromUtf8(CB_SOURCE_DIR) + u"/resources/demos"_s);
    const QStringList demoFiles = demos.entryList({u"*.json"_s}, QDir::Files, QDir::Name);
    QVERIFY(demoFiles.size() >= 4);
    for (const QString &name : demoFiles)
        QTest::newRow(qPrintable(u"demo "_s + name)) << demos.filePath(name);
    for (const QString &name : QDir(m_dir.path()).entryList({u"*.json"_s}, QDir::Files, QDir::Name))
        QTest::newRow(qPrintable(u"hand-edited "_s + name)) << m_dir.filePath(name);
}

void TestFrontEndsAgree::cliAndWindowGiveTheSameAnalysis()
{
    QFETCH(QString, path);
    const test::ProcessRun cli = analyzeWithCli(path);
    QVERIFY2(cli.exitCode == 0, qPrintable(cli.errText()));
    WindowFixture f;
    QVERIFY(f.window->openFile(path));
    QVERIFY2(f.prompter.told.isEmpty(), qPrintable(f.prompter.told.join(u"; "_s)));
    const QJsonObject fromCli = parsed(cli.out);
    const QJsonObject fromWindow = windowAnalysis(*f.window->document());
    QVERIFY(!fromCli.isEmpty());
    QCOMPARE(QJsonDocument(fromCli).toJson(), QJsonDocument(fromWindow).toJson());
}

void TestFrontEndsAgree::contradictingColumnsAreCodedAsTheSchemeSays_data()
{
    // Expected weights from each scheme's definition (DEVELOPERS.md, "Schemes"), worked by hand:
    // weighted effect codes level j 1 and the base level -n_j / n_base (Sweeney & Ulveling 1972);
    // sum codes the base level -1; the integer linear trend over three equally spaced levels is
    // -1, 0, 1 and the quadratic 1, -2, 1.
    QTest::addColumn<QString>("file");
    QTest::addColumn<int>("row");
    QTest::addColumn<int>("column");
    QTest::addColumn<QString>("weight");
    QTest::addColumn<int>("columnCount");
    // Over the cells (bare:early, bare:late, grass:early, ...): the margin totals are 12, 11, 10,
    // so bare's column puts -12/10 and grass's -11/10 on the wildflower cells.
    QTest::newRow("design: weighted effect from the cell totals") << u"weighted-design.json"_s << 4 << 0 << u"-6/5"_s << 5;
    QTest::newRow("design: second weighted-effect column") << u"weighted-design.json"_s << 5 << 1 << u"-11/10"_s << 5;
    QTest::newRow("design: treatment column as written") << u"weighted-design.json"_s << 1 << 2 << u"1"_s << 5;
    QTest::newRow("design: factor n follow the cells") << u"stale-sizes-design.json"_s << 4 << 0 << u"-6/5"_s << 5;
    QTest::newRow("design: sum column of the second factor") << u"stale-sizes-design.json"_s << 1 << 2 << u"-1"_s << 5;
    QTest::newRow("scheme: sum base coded -1") << u"sum-scheme.json"_s << 2 << 0 << u"-1"_s << 2;
    QTest::newRow("scheme: sum, first level not in b's column") << u"sum-scheme.json"_s << 0 << 1 << u"0"_s << 2;
    QTest::newRow("scheme: weighted effect, -20/10") << u"weighted-scheme.json"_s << 0 << 0 << u"-2"_s << 2;
    QTest::newRow("scheme: weighted effect, -30/10") << u"weighted-scheme.json"_s << 0 << 1 << u"-3"_s << 2;
    QTest::newRow("scheme: integer linear trend") << u"polynomial-scheme.json"_s << 0 << 0 << u"-1"_s << 2;
    QTest::newRow("scheme: integer quadratic trend") << u"polynomial-scheme.json"_s << 1 << 1 << u"-2"_s << 2;
}

void TestFrontEndsAgree::contradictingColumnsAreCodedAsTheSchemeSays()
{
    QFETCH(QString, file);
    QFETCH(int, row);
    QFETCH(int, column);
    QFETCH(QString, weight);
    QFETCH(int, columnCount);
    const test::ProcessRun cli = analyzeWithCli(m_dir.filePath(file));
    QVERIFY2(cli.exitCode == 0, qPrintable(cli.errText()));
    const QJsonObject analysis = parsed(cli.out);
    QCOMPARE(analysis.value(u"column_names"_s).toArray().size(), columnCount);
    QCOMPARE(codingCell(analysis, row, column), weight);
}

void TestFrontEndsAgree::aSchemeThatCannotBeMadeIsRefusedByBoth()
{
    // Integer trends need rational positions; a floating spacing cannot give them.
    QByteArray text = kPolynomialScheme;
    text.replace(R"("levels": ["low", "mid", "high"]})", R"("levels": ["low", "mid", "high"], "spacing": ["~0.1", "~0.2", "~0.4"]})");
    const QString path = write(u"unmakeable.json"_s, text);
    const test::ProcessRun cli = analyzeWithCli(path);
    QCOMPARE(cli.exitCode, 2);
    QVERIFY2(cli.errText().contains(u"field 'scheme.kind': factor 'heat' cannot be coded as polynomial"_s), qPrintable(cli.errText()));
    QVERIFY(cli.out.isEmpty());
    WindowFixture f;
    QVERIFY(!f.window->openFile(path));
    QCOMPARE(f.prompter.told.size(), 1);
    QVERIFY2(f.prompter.told[0].contains(u"factor 'heat' cannot be coded as polynomial"_s), qPrintable(f.prompter.told[0]));
    QFile::remove(path);
}

QTEST_MAIN(TestFrontEndsAgree)
#include "TestFrontEndsAgree.moc"
