// The scheme file: round trips, every loading error with its message, atomic saving.
#include "core/files/SchemeFile.h"
#include "core/files/StudyFile.h"
#include "core/model/Study.h"
#include "core/model/SchemeEdits.h"
#include "core/analysis/Adjustment.h"
#include "core/export/Export.h"

#include <QBuffer>
#include <QFile>
#include <QTemporaryDir>
#include <QTest>

using namespace Qt::StringLiterals;
using namespace cb;

namespace {

// A device that accepts n bytes and then fails, to test write errors.
class FailingDevice : public QIODevice
{
public:
    explicit FailingDevice(qint64 limit) : m_limit(limit) { open(QIODevice::WriteOnly); }

protected:
    qint64 readData(char *, qint64) override { return -1; }
    qint64 writeData(const char *, qint64 len) override
    {
        if (m_written >= m_limit) {
            setErrorString(u"No space left on device"_s);
            return -1;
        }
        const qint64 n = std::min(len, m_limit - m_written);
        m_written += n;
        return n;
    }

private:
    qint64 m_limit;
    qint64 m_written = 0;
};

QByteArray validFile()
{
    return R"({
  "format": "contrast-bench-scheme", "version": 1,
  "factor": {"name": "roast", "levels": ["light", "medium", "dark"], "n": ["12", "10", "8"], "spacing": ["196", "210", "224"]},
  "scheme": {"kind": "custom"},
  "intercept": true,
  "columns": [{"name": "dark vs light", "weights": ["-1", "0", "1"]},
              {"name": "middle", "weights": ["-1/2", "1", "-0.5"]}],
  "notes": "tasting panel"
})";
}

} // namespace

class TestSchemeFile : public QObject
{
    Q_OBJECT
private slots:
    void roundTripStandardSchemes();
    void readsValidFile();
    void loadErrors_data();
    void loadErrors();
    void newerVersionRefused();
    void missingFile();
    void saveIsAtomic();
    void writeErrorIsReported();
    void saveToUnwritablePlace();
    void idsAreReadByOneRule();
    void factorProblemsNameTheirField();
    void measureRoundTripsAndOldFilesAreBetween();
    void withinFactorKeepsOneParticipantCount();
};

void TestSchemeFile::roundTripStandardSchemes()
{
    Factor f;
    f.name = u"dose \"mg\""_s;
    f.levels = QStringList{u"0"_s, u"5 mg"_s, u"10 mg"_s, u"20 mg"_s};
    f.plannedN = {Rational(8), Rational(9), Rational(10), Rational(7)};
    f.spacing = {Weight(0), Weight(5), Weight(10), Weight(20)};
    for (SchemeKind kind : standardSchemes()) {
        Scheme s = makeScheme(f, kind, {}).take();
        s.notes = u"line one\nline two"_s;
        auto back = schemeFromJson(schemeToJson(s), u"memory"_s);
        QVERIFY2(back.ok(), qPrintable(back.error()));
        QCOMPARE(back->kind, s.kind);
        QCOMPARE(back->reference, s.reference);
        QCOMPARE(back->intercept, s.intercept);
        QCOMPARE(back->notes, s.notes);
        QCOMPARE(back->factor.name, f.name);
        QCOMPARE(back->factor.levels, f.levels);
        QVERIFY(back->factor.plannedN == f.plannedN);
        QCOMPARE(back->columns.size(), s.columns.size());
        for (size_t j = 0; j < s.columns.size(); ++j) {
            QCOMPARE(back->columns[j].name, s.columns[j].name);
            for (size_t i = 0; i < 4; ++i)
                QVERIFY(back->columns[j].weights[i] == s.columns[j].weights[i]); // exact and floating, bit for bit
        }
    }
}

void TestSchemeFile::readsValidFile()
{
    auto s = schemeFromJson(validFile(), u"roast.json"_s);
    QVERIFY2(s.ok(), qPrintable(s.error()));
    QCOMPARE(s->factor.levels.size(), 3);
    QCOMPARE(s->columns[1].weights[2].rational(), Rational(-1, 2));
    QCOMPARE(s->factor.spacing[1].rational(), Rational(210));
    QCOMPARE(s->notes, u"tasting panel"_s);
}

void TestSchemeFile::loadErrors_data()
{
    QTest::addColumn<QByteArray>("from");
    QTest::addColumn<QByteArray>("to");
    QTest::addColumn<QString>("message");
    QTest::newRow("not json") << QByteArray("\"intercept\": true,") << QByteArray("\"intercept\": true,,")
                              << u"roast.json: line 5, column 22: not valid JSON"_s;
    QTest::newRow("wrong format tag") << QByteArray("contrast-bench-scheme") << QByteArray("something-else")
                                      << u"roast.json: field 'format': expected \"contrast-bench-scheme\"; this is not a Contrast Bench scheme file"_s;
    QTest::newRow("version not a number") << QByteArray("\"version\": 1") << QByteArray("\"version\": \"1\"")
                                          << u"roast.json: field 'version': expected a whole number such as 2"_s;
    QTest::newRow("levels missing") << QByteArray("\"levels\"") << QByteArray("\"levelz\"")
                                    << u"roast.json: field 'factor.levels': expected an array of level names"_s;
    QTest::newRow("level not a string") << QByteArray("\"medium\",") << QByteArray("7,")
                                        << u"roast.json: field 'factor.levels[1]': expected a level name (a string)"_s;
    QTest::newRow("duplicate level") << QByteArray("\"dark\"]") << QByteArray("\"light\"]")
                                     << u"roast.json: field 'factor.levels': level 3 repeats the name 'light'; level names must be unique"_s;
    QTest::newRow("bad n") << QByteArray("\"10\", \"8\"") << QByteArray("\"10\", \"-8\"")
                           << u"roast.json: field 'factor.n[2]': expected a positive planned group size"_s;
    QTest::newRow("n wrong count") << QByteArray("\"10\", \"8\"") << QByteArray("\"10\"")
                                   << u"roast.json: field 'factor.n': 2 planned group sizes for 3 levels; give one per level"_s;
    QTest::newRow("equal spacing") << QByteArray("\"224\"") << QByteArray("\"210\"")
                                   << u"roast.json: field 'factor.spacing': levels 'medium' and 'dark' have the same position 210; positions must differ"_s;
    QTest::newRow("bad weight") << QByteArray("\"-0.5\"") << QByteArray("\"1/0\"")
                                << u"roast.json: field 'columns[1].weights[2]': weight '1/0' divides by zero: the denominator must not be 0"_s;
    QTest::newRow("weight not text") << QByteArray("\"-0.5\"") << QByteArray("true")
                                     << u"roast.json: field 'columns[1].weights[2]': expected a weight as a string such as \"-2/3\" or a number"_s;
    QTest::newRow("short column") << QByteArray("[\"-1\", \"0\", \"1\"]") << QByteArray("[\"-1\", \"1\"]")
                                  << u"roast.json: field 'columns[0].weights': 2 weights for 3 levels; expected one per level"_s;
    QTest::newRow("unknown scheme") << QByteArray("\"kind\": \"custom\"") << QByteArray("\"kind\": \"mystery\"")
                                    << u"roast.json: field 'scheme.kind': unknown scheme 'mystery'"_s;
    QTest::newRow("unknown reference") << QByteArray("\"kind\": \"custom\"") << QByteArray("\"kind\": \"treatment\", \"reference\": \"burnt\"")
                                       << u"roast.json: field 'scheme.reference': 'burnt' is not one of the levels"_s;
    QTest::newRow("intercept not bool") << QByteArray("\"intercept\": true") << QByteArray("\"intercept\": \"yes\"")
                                        << u"roast.json: field 'intercept': expected true or false"_s;
    QTest::newRow("no columns") << QByteArray("\"columns\": [") << QByteArray("\"columnz\": [")
                                << u"roast.json: field 'columns': expected an array of columns, each with a name and weights"_s;
    QTest::newRow("notes not text") << QByteArray("\"tasting panel\"") << QByteArray("12")
                                    << u"roast.json: field 'notes': expected a string"_s;
    // Every key checks its type (issue 21, class 3): these were read as defaults before.
    for (const char *wrong : {"true", "12", "\"text\"", "[]"})
        QTest::newRow(qPrintable(u"scheme is "_s + QString::fromLatin1(wrong)))
            << QByteArray("\"scheme\": {\"kind\": \"custom\"}") << QByteArray("\"scheme\": ") + wrong
            << u"roast.json: field 'scheme': expected an object with kind"_s;
    QTest::newRow("kind a number") << QByteArray("\"kind\": \"custom\"") << QByteArray("\"kind\": 3")
                                   << u"roast.json: field 'scheme.kind': expected a string"_s;
    QTest::newRow("polynomial_form a bool") << QByteArray("\"kind\": \"custom\"") << QByteArray("\"kind\": \"custom\", \"polynomial_form\": true")
                                            << u"roast.json: field 'scheme.polynomial_form': expected a string"_s;
    QTest::newRow("polynomial_weighted a string") << QByteArray("\"kind\": \"custom\"")
                                                  << QByteArray("\"kind\": \"custom\", \"polynomial_weighted\": \"yes\"")
                                                  << u"roast.json: field 'scheme.polynomial_weighted': expected true or false"_s;
    QTest::newRow("reference a number") << QByteArray("\"kind\": \"custom\"") << QByteArray("\"kind\": \"treatment\", \"reference\": 0")
                                        << u"roast.json: field 'scheme.reference': expected a string"_s;
    QTest::newRow("long unknown scheme is cut") << QByteArray("\"kind\": \"custom\"") << QByteArray("\"kind\": \"") + QByteArray(100000, 'x') + "\""
                                                << u"roast.json: field 'scheme.kind': unknown scheme '"_s + QString(59, u'x') + u"\u2026'; expected"_s;
    QTest::newRow("measured unknown") << QByteArray("\"name\": \"roast\",") << QByteArray("\"name\": \"roast\", \"measured\": \"inside\",")
                                      << u"roast.json: field 'factor.measured': expected \"between\" (separate groups) or \"within\""_s;
    QTest::newRow("measured not a string") << QByteArray("\"name\": \"roast\",") << QByteArray("\"name\": \"roast\", \"measured\": true,")
                                           << u"roast.json: field 'factor.measured': expected \"between\""_s;
    QTest::newRow("within with unequal n") << QByteArray("\"name\": \"roast\",") << QByteArray("\"name\": \"roast\", \"measured\": \"within\",")
                                           << u"roast.json: field 'factor.n': a factor measured within participants has the same "
                                              u"participants at every level, but level 'light' plans 12 and level 'medium' plans 10"_s;
    QTest::newRow("top level array") << validFile() << QByteArray("[1, 2]") << u"roast.json: expected a JSON object at the top level"_s;
}

void TestSchemeFile::loadErrors()
{
    QFETCH(QByteArray, from);
    QFETCH(QByteArray, to);
    QFETCH(QString, message);
    QByteArray data = validFile();
    QVERIFY2(data.contains(from), from.constData());
    data.replace(data.indexOf(from), from.size(), to);
    auto s = schemeFromJson(data, u"roast.json"_s);
    QVERIFY(!s.ok());
    QVERIFY2(s.error().startsWith(message), qPrintable(s.error()));
}

void TestSchemeFile::newerVersionRefused()
{
    QByteArray data = validFile();
    data.replace("\"version\": 1", "\"version\": 7");
    auto s = schemeFromJson(data, u"future.json"_s);
    QVERIFY(!s.ok());
    QCOMPARE(s.error(), u"future.json: the file has format version 7, newer than this program reads (up to 2); please update Contrast Bench"_s);
}

void TestSchemeFile::missingFile()
{
    auto s = loadStudy(u"/nonexistent/dir/scheme.json"_s);
    QVERIFY(!s.ok());
    QVERIFY(s.error().startsWith(u"/nonexistent/dir/scheme.json: no such file"_s));
}

void TestSchemeFile::saveIsAtomic()
{
    QTemporaryDir dir;
    const QString path = dir.filePath(u"s.json"_s);
    Scheme s = schemeFromJson(validFile(), u"x"_s).take();
    QCOMPARE(saveScheme(s, path), QString());
    auto back = loadStudy(path);
    QVERIFY(back.ok());
    QCOMPARE(back->activeScheme().columns[0].name, u"dark vs light"_s);
    // No temporary files are left beside it.
    QCOMPARE(QDir(dir.path()).entryList(QDir::Files), QStringList{u"s.json"_s});
}

void TestSchemeFile::writeErrorIsReported()
{
    FailingDevice dev(10);
    const QString e = writeAll(dev, QByteArray(100, 'x'), u"s.json"_s);
    QCOMPARE(e, u"s.json: could not write the file: No space left on device"_s);
}

void TestSchemeFile::saveToUnwritablePlace()
{
    Scheme s = schemeFromJson(validFile(), u"x"_s).take();
    const QString e = saveScheme(s, u"/proc/no-such-place/s.json"_s);
    QVERIFY2(e.startsWith(u"/proc/no-such-place/s.json: cannot open for writing"_s), qPrintable(e));
    if (QFile::exists(u"/dev/full"_s)) {
        QFile full(u"/dev/full"_s);
        QVERIFY(full.open(QIODevice::WriteOnly | QIODevice::Unbuffered));
        const QString fe = writeAll(full, QByteArray(1 << 16, 'x'), u"/dev/full"_s);
        QVERIFY2(fe.startsWith(u"/dev/full: could not write the file"_s), qPrintable(fe));
    }
}

void TestSchemeFile::idsAreReadByOneRule()
{
    // Every enum read from a file or the command line goes through core/base/NameTable.h:
    // spaces around the id and letter case do not count; anything else is refused.
    QVERIFY(schemeFromId(u" Weighted-Effect "_s) == SchemeKind::WeightedEffect);
    QVERIFY(exportFormatFromId(u"CSV"_s) == ExportFormat::Csv);
    QVERIFY(adjustmentFromId(u" Holm"_s) == Adjustment::Holm);
    QVERIFY(!schemeFromId(u"weighted effect"_s));
    QVERIFY(!exportFormatFromId(u"xls"_s));
    QVERIFY(!adjustmentFromId(u"tukey"_s));
    // The lists in help texts and messages come from the same tables.
    QCOMPARE(schemeIdList(), u"indicator, treatment, sum, weighted-effect, simple, helmert, reverse-helmert, successive, polynomial"_s);
    QVERIFY(schemeIdList(true).endsWith(u", polynomial, custom"_s));
    QCOMPARE(adjustmentIdList(false), u"none, bonferroni, holm or sidak"_s);
    QCOMPARE(adjustmentIdList(true), u"none, bonferroni or sidak"_s);
}

void TestSchemeFile::factorProblemsNameTheirField()
{
    Factor f;
    f.levels = {u"a"_s, u"b"_s, u"a"_s};
    QCOMPARE(f.problem().field, u"levels"_s);
    QCOMPARE(f.validate(), u"levels: "_s + f.problem().message);
    f.levels = {u"a"_s, u"b"_s};
    f.plannedN = {Rational(1)};
    QCOMPARE(f.problem().field, u"n"_s);
    QCOMPARE(f.problem().message, u"1 planned group sizes for 2 levels; give one per level"_s);
    f.plannedN.clear();
    f.spacing = {Weight(1), Weight(1)};
    QCOMPARE(f.problem().field, u"spacing"_s);
    f.spacing.clear();
    QVERIFY(f.problem().isEmpty());
}

void TestSchemeFile::measureRoundTripsAndOldFilesAreBetween()
{
    // A file without the field (every file written before it existed) holds separate groups.
    auto old = schemeFromJson(validFile(), u"roast.json"_s);
    QVERIFY2(old.ok(), qPrintable(old.error()));
    QCOMPARE(old->factor.measure, Measure::Between);
    QVERIFY(schemeToJson(*old).contains("\"measured\": \"between\""));

    Factor f;
    f.name = u"cue"_s;
    f.levels = {u"none"_s, u"valid"_s, u"invalid"_s};
    f.plannedN = {Rational(24), Rational(24), Rational(24)};
    f.measure = Measure::Within;
    const Scheme s = makeScheme(f, SchemeKind::Helmert).take();
    const QByteArray json = schemeToJson(s);
    QVERIFY(json.contains("\"measured\": \"within\""));
    auto back = schemeFromJson(json, u"memory"_s);
    QVERIFY2(back.ok(), qPrintable(back.error()));
    QCOMPARE(back->factor.measure, Measure::Within);
    QVERIFY(*back == s);

    // In a design each factor keeps its own: 2 groups (between) x 3 cues (within).
    Factor group;
    group.name = u"group"_s;
    group.levels = {u"young"_s, u"older"_s};
    Design d;
    d.factors = {makeScheme(group, SchemeKind::Sum).take(), s};
    d.factors[1].factor.plannedN.clear();
    d.terms = Design::fullFactorial(2);
    auto loaded = studyFromJson(designToJson(d), u"mixed.json"_s);
    QVERIFY2(loaded.ok(), qPrintable(loaded.error()));
    QCOMPARE(loaded->design.factors[0].factor.measure, Measure::Between);
    QCOMPARE(loaded->design.factors[1].factor.measure, Measure::Within);
}

void TestSchemeFile::withinFactorKeepsOneParticipantCount()
{
    Factor f;
    f.levels = {u"a"_s, u"b"_s, u"c"_s};
    f.plannedN = {Rational(10), Rational(12), Rational(10)};
    Scheme s = makeScheme(f, SchemeKind::Treatment).take();
    // Unequal group sizes cannot be one set of participants: the edit says which levels differ.
    auto refused = edits::withMeasure(s, Measure::Within);
    QVERIFY(!refused.ok());
    QVERIFY2(refused.error().startsWith(u"n: a factor measured within participants has the same participants at every level, "
                                        u"but level 'a' plans 10 and level 'b' plans 12"_s),
             qPrintable(refused.error()));
    s = edits::withEqualSizes(s).take();
    s = edits::withMeasure(s, Measure::Within).take();
    // Typing one level's n sets the number of participants, so every level follows.
    s = edits::withPlannedSize(s, 1, u"30"_s).take();
    QVERIFY(s.factor.plannedN == std::vector<Rational>(3, Rational(30)));
    QCOMPARE(measureIdList(), u"between or within"_s);
    QCOMPARE(measureFromId(u" Within "_s), Measure::Within);
}

QTEST_GUILESS_MAIN(TestSchemeFile)
#include "TestSchemeFile.moc"
