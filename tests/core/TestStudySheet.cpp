// The study sheet as HTML (core/report/StudySheet.h): byte for byte against the example sheet in
// docs/ (the golden file, regenerated with CB_UPDATE_SHEETS=1), deterministic, well-formed for a
// strict parser (tests/python/check_sheet_html.py, Python's standard library, which also holds
// the checksum to hashlib's SHA-256), and inert with hostile names.
#include "core/analysis/Analysis.h"
#include "core/files/StudyFile.h"
#include "core/base/NumberText.h"
#include "core/files/InputFile.h"
#include "core/model/SchemeEdits.h"
#include "core/model/Study.h"
#include "core/report/StudySheet.h"

#include "tests/support/ProcessRunner.h"

#include <QFile>
#include <QTemporaryDir>
#include <QTest>

using namespace Qt::StringLiterals;
using namespace cb;

namespace {

const QString kDemo = QStringLiteral(CB_SOURCE_DIR "/resources/demos/irrigation.json");
const QString kGolden = QStringLiteral(CB_SOURCE_DIR "/docs/study-sheet/irrigation.html");

SheetOptions demoOptions()
{
    SheetOptions o;
    o.date = u"2026-03-31"_s;
    o.fileName = u"irrigation.json"_s;
    o.fileBytes = readInput(kDemo).take();
    return o;
}

Study demoStudy()
{
    auto s = loadStudy(kDemo);
    if (!s)
        qFatal("%s", qPrintable(s.error()));
    return s.take();
}

// Runs the strict checker on html; returns its verdict ("ok" when well-formed and inert).
QString strictCheck(const QString &html, const QString &studyFile = {})
{
    QTemporaryDir dir;
    const QString path = dir.filePath(u"sheet.html"_s);
    QFile f(path);
    if (!f.open(QIODevice::WriteOnly))
        return u"cannot write"_s;
    f.write(html.toUtf8());
    f.close();
    QStringList args{QStringLiteral(CB_SOURCE_DIR "/tests/python/check_sheet_html.py"), path};
    if (!studyFile.isEmpty())
        args << studyFile;
    const auto run = test::runProcess(QStringLiteral(CB_PYTHON), args);
    return run.outText().trimmed() + run.errText().trimmed();
}

} // namespace

class TestStudySheet : public QObject
{
    Q_OBJECT

private slots:
    // docs/study-sheet/irrigation.html is the example the README links to and the golden file:
    // the sheet of the irrigation demo with the date fixed. A change of the sheet (or of the
    // version) is seen here; CB_UPDATE_SHEETS=1 writes the file again, to be looked at and committed.
    void irrigationSheetMatchesTheExampleInDocs()
    {
        const QString html = studySheet(demoStudy(), demoOptions()).html;
        if (qEnvironmentVariableIsSet("CB_UPDATE_SHEETS")) {
            QFile out(kGolden);
            QVERIFY(out.open(QIODevice::WriteOnly | QIODevice::Truncate));
            out.write(html.toUtf8());
        }
        QFile golden(kGolden);
        QVERIFY2(golden.open(QIODevice::ReadOnly), "docs/study-sheet/irrigation.html is missing (CB_UPDATE_SHEETS=1 writes it)");
        const QString want = QString::fromUtf8(golden.readAll());
        if (html != want) {
            const QStringList a = html.split(u'\n'), b = want.split(u'\n');
            for (qsizetype i = 0; i < std::max(a.size(), b.size()); ++i)
                if (a.value(i) != b.value(i))
                    QFAIL(qPrintable(u"line %1 differs:\n  made: %2\n  file: %3\n(CB_UPDATE_SHEETS=1 writes the file again)"_s
                                         .arg(i + 1).arg(a.value(i), b.value(i))));
        }
    }

    void sameStudyGivesTheSameBytes()
    {
        const QString a = studySheet(demoStudy(), demoOptions()).html;
        const QString b = studySheet(demoStudy(), demoOptions()).html;
        QCOMPARE(a, b);
    }

    void sheetHoldsEveryPart()
    {
        const StudySheet s = studySheet(demoStudy(), demoOptions());
        for (const QString &part : {u"<h2>Notes</h2>"_s, u"<h2>Factors</h2>"_s, u"<h2>Coding matrix</h2>"_s, u"<h2>Hypothesis matrix</h2>"_s,
                                    u"<h2>What each coefficient tests</h2>"_s, u"<h2>Design health</h2>"_s, u"<h2>Cautions</h2>"_s,
                                    u"2026-03-31"_s, u"Contrast Bench " CB_PROJECT_VERSION ""_s})
            QVERIFY2(s.html.contains(part), qPrintable(part));
        // Exact fractions in the matrices (a true minus sign), one inline picture per coefficient.
        QVERIFY(s.html.contains(u"<td>\u22124/5</td>"_s));
        QCOMPARE(s.html.count(u"<svg "_s), 5);
        QVERIFY(s.pictures.empty());
    }

    void sheetIsWellFormedAndCarriesTheFilesChecksum()
    {
        QCOMPARE(strictCheck(studySheet(demoStudy(), demoOptions()).html, kDemo), u"ok"_s);
    }

    // Qt's rich text gets the same sheet with the pictures as images: one SVG document each.
    void picturesForQtAreReferencedNotInlined()
    {
        const StudySheet s = studySheet(demoStudy(), demoOptions(), SheetPictures::ImageReferences);
        QCOMPARE(int(s.pictures.size()), 5);
        QVERIFY(!s.html.contains(u"<svg"_s));
        QVERIFY(s.html.contains(u"<img src=\"picture:4\""_s));
        QVERIFY(s.pictures[0].startsWith("<svg xmlns=\"http://www.w3.org/2000/svg\""));
    }

    void designSheetCoversEveryFactor()
    {
        auto study = loadStudy(QStringLiteral(CB_SOURCE_DIR "/resources/demos/hedgerow.json"));
        QVERIFY2(study, qPrintable(study.error()));
        SheetOptions o;
        o.date = u"2026-03-31"_s;
        const QString html = studySheet(study.value(), o).html;
        QVERIFY(html.contains(u"<h2>Design</h2>"_s));
        for (const Scheme &s : study->design.factors)
            QVERIFY2(html.contains(htmlEscaped(s.factor.name)), qPrintable(s.factor.name));
        QCOMPARE(strictCheck(html), u"ok"_s);
    }

    // Names and notes that come from the user stay text: no element, no attribute, no script.
    void hostileNamesStayInert()
    {
        Factor f;
        f.name = u"\"><script>alert('factor')</script>"_s;
        f.levels = {u"<script>alert(1)</script>"_s, u"<img src=x onerror=alert(2)>"_s, u"a & b \"quoted\" 'single'"_s, u"]]><!-- -->"_s,
                    u"%1 %2 \u0007bell"_s};
        auto scheme = makeScheme(f, SchemeKind::Treatment);
        QVERIFY2(scheme, qPrintable(scheme.error()));
        Scheme s = scheme.take();
        s.notes = u"</p><svg onload=alert(3)><style>body{display:none}</style>"_s;
        SheetOptions o;
        o.date = u"2026-03-31"_s;
        o.title = u"<b>title</b> & </title><script>x</script>"_s;
        o.fileName = u"<i>file</i>.json"_s;
        o.fileBytes = "{}";
        const QString html = studySheet(studyOf(s), o).html;
        QVERIFY(!html.contains(u"<script"_s));
        QVERIFY(!html.contains(u"<img"_s));
        QVERIFY(!html.contains(u"onerror=alert(2)>"_s)); // the text is there, escaped; the checker finds no handler attribute
        QVERIFY(!html.contains(u"<svg onload"_s));
        QVERIFY(!html.contains(u"<b>title"_s));
        QVERIFY(html.contains(u"&lt;script&gt;alert(1)&lt;/script&gt;"_s));
        QVERIFY(html.contains(u"a &amp; b &quot;quoted&quot; &#39;single&#39;"_s));
        QVERIFY(html.contains(u"%1 %2 \ufffdbell"_s)); // no placeholder filled in, the control character replaced
        QCOMPARE(strictCheck(html), u"ok"_s);
    }

    // With power settings the sheet has the power table (computePower's numbers, which TestPower
    // holds to SciPy) and the curves. Means 10, 12, 12, 14, 14 (invented), SD 4, 8 per level.
    void powerSettingsAddTheTableAndCurves()
    {
        SheetOptions o = demoOptions();
        PowerSettings p;
        p.means = {10, 12, 12, 14, 14};
        p.sd = 4;
        p.n = {8, 8, 8, 8, 8};
        o.power = p;
        const Study study = demoStudy();
        const QString html = studySheet(study, o).html;
        QVERIFY(html.contains(u"<h2>Power</h2>"_s));
        const Analysis a = analyze(study.activeScheme());
        const auto rows = contrastRowsOf(a);
        QVERIFY(rows);
        const auto report = computePower(rows->rows, rows->names, p);
        QVERIFY(report);
        // irrigated vs none: psi = 13 - 10 = 3, se = 4 sqrt(1/8 + 4/(16 * 8)) = 1.5811.
        QCOMPARE(report->contrasts[0].estimate, 3.0);
        QVERIFY(html.contains(u"<tr><td class=\"name\">irrigated vs none</td><td>3</td><td>"_s));
        QVERIFY(html.contains(u"<td>"_s + numberText(report->contrasts[0].power, 3) + u"</td>"_s));
        QCOMPARE(html.count(u"<polyline"_s), 5); // four contrasts and the F-test
        QCOMPARE(strictCheck(html), u"ok"_s);
        if (qEnvironmentVariableIsSet("CB_SCREENSHOT_DIR")) { // to look at
            QFile out(qEnvironmentVariable("CB_SCREENSHOT_DIR") + u"/sheet-with-power.html"_s);
            QVERIFY(out.open(QIODevice::WriteOnly));
            out.write(html.toUtf8());
        }
    }

    void escapingCoversTheFiveCharacters()
    {
        QCOMPARE(htmlEscaped(u"<a href=\"x\">'&'</a>"), u"&lt;a href=&quot;x&quot;&gt;&#39;&amp;&#39;&lt;/a&gt;"_s);
    }

    // The picture's geometry is the window's (core/report/LevelBars.h): weights 1, -1/2, 0 over a
    // 240 x 110 box with 16-pixel text lines above and below: the chart is 78 high, the baseline in
    // the middle at 16 + floor(77/2) = 54, reach floor(78/2) - 1 = 38; 80-pixel slots, bars 34 wide.
    void levelPictureGeometry()
    {
        const QByteArray svg = levelBarsSvg({Weight(1), Weight::exact(Rational(-1, 2)), Weight(0)}, {u"a"_s, u"b"_s, u"c"_s}, 240, 110);
        QVERIFY2(svg.contains("<rect x=\"23.0\" y=\"16.0\" width=\"34.0\" height=\"38.0\" fill=\"#2b6cb0\" />"), svg.constData());
        QVERIFY2(svg.contains("<rect x=\"103.0\" y=\"54.0\" width=\"34.0\" height=\"19.0\" fill=\"#d67a1e\" />"), svg.constData());
        QVERIFY(svg.contains(">\u2212" "1/2</text>"));
    }
};

QTEST_GUILESS_MAIN(TestStudySheet)
#include "TestStudySheet.moc"
