// Tests of the streaming long-format reader and the summary-table reader.
#include "core/data/DataReader.h"
#include "core/model/Design.h"
#include "tests/support/FitTestSupport.h"

#include <QJsonArray>
#include <QTest>

#include <cmath>
#include <random>

using namespace Qt::StringLiterals;
using namespace cb;

namespace {

struct Row
{
    QByteArray level;
    double y;
};

// The small data set behind the format variants: level names that need quoting.
const std::vector<Row> &tricky()
{
    static const std::vector<Row> rows = {
        {"plain", 1.5}, {"with, comma", 10}, {"say \"hi\"", -3}, {"plain", 2.5},
        {"two\nlines", 7}, {"with, comma", 12}, {"plain", 4}, {"say \"hi\"", 32.5},
    };
    return rows;
}

// Two-pass mean and variance of the values of one level (the textbook formulas).
RunningStats twoPass(const std::vector<Row> &rows, const QByteArray &level)
{
    RunningStats s;
    double sum = 0;
    for (const Row &r : rows)
        if (r.level == level) {
            sum += r.y;
            s.n += 1;
        }
    s.mean = sum / s.n;
    for (const Row &r : rows)
        if (r.level == level)
            s.m2 += (r.y - s.mean) * (r.y - s.mean);
    s.rows = qint64(s.n);
    return s;
}

QByteArray quoteField(const QByteArray &f, char delim, bool always)
{
    if (!always && !f.contains(delim) && !f.contains('"') && !f.contains('\n'))
        return f;
    QByteArray q = f;
    q.replace("\"", "\"\"");
    return '"' + q + '"';
}

QByteArray render(const std::vector<Row> &rows, char delim, const QByteArray &eol, bool header, bool quoteAll)
{
    QByteArray out;
    if (header)
        out += quoteField("group", delim, quoteAll) + delim + quoteField("score", delim, quoteAll) + eol;
    for (const Row &r : rows)
        out += quoteField(r.level, delim, quoteAll) + delim + quoteField(QByteArray::number(r.y, 'g', 17), delim, quoteAll)
            + eol;
    return out;
}

DataReadOptions columns(const QString &factor, const QString &response)
{
    DataReadOptions o;
    o.factorColumn = factor;
    o.responseColumn = response;
    return o;
}

void compareStats(const RunningStats &got, const RunningStats &want, double tol)
{
    QCOMPARE(got.n, want.n);
    QVERIFY2(std::fabs(got.mean - want.mean) <= tol * std::max(1.0, std::fabs(want.mean)),
             qPrintable(u"mean %1, expected %2"_s.arg(got.mean, 0, 'g', 17).arg(want.mean, 0, 'g', 17)));
    QVERIFY2(std::fabs(got.m2 - want.m2) <= tol * std::max(1.0, std::fabs(want.m2)),
             qPrintable(u"m2 %1, expected %2"_s.arg(got.m2, 0, 'g', 17).arg(want.m2, 0, 'g', 17)));
}

void checkTricky(const Result<DataSummary> &r)
{
    QVERIFY2(r.ok(), qPrintable(r.error()));
    QCOMPARE(int(r->levels.size()), 4);
    const QStringList names = {u"plain"_s, u"with, comma"_s, u"say \"hi\""_s, u"two\nlines"_s};
    for (int i = 0; i < 4; ++i) {
        QCOMPARE(r->levels[size_t(i)].name, names[i]);
        compareStats(r->levels[size_t(i)].stats, twoPass(tricky(), names[i].toUtf8()), 1e-15);
    }
    QCOMPARE(r->usedRows, qint64(tricky().size()));
    QCOMPARE(r->skippedRows, qint64(0));
}

} // namespace

class TestDataReader : public QObject
{
    Q_OBJECT
private slots:
    void readsPublishedThreeGroups();
    void readsFormats_data();
    void readsFormats();
    void agreesWithPandas_data();
    void agreesWithPandas();
    void sameResultForAnyBlockSize();
    void streamsLargeInputInBlocks();
    void welfordIsStable();
    void stableForSortedDataFarFromZero();
    void mergeMatchesOnePass();
    void caseWeightsActAsRepeatedRows();
    void columnsByNumber_data();
    void columnsByNumber();
    void reportsRowProblems_data();
    void reportsRowProblems();
    void reportsFirstTwentyThenCount();
    void rejectsFile_data();
    void rejectsFile();
    void rejectsMissingPaths();
    void refusesTooManyLevels();
    void cancelsFromProgress();
    void readsSummaryTable_data();
    void readsSummaryTable();
    void rejectsSummaryTable_data();
    void rejectsSummaryTable();
    void previewsFile();
    void namesDelimiters();
    void joinsFactorColumnsIntoCells();
    void readsRecordsAsWritten();
    void readsRecordsAcrossBlocks();
    void rejectsBrokenRecords_data();
    void rejectsBrokenRecords();
};

// Dobson (1983), An Introduction to Statistical Modelling, plant-growth data (values
// written from memory as widely reprinted): group means 5.032, 4.661, 5.526, ten plants each.
// Stored under neutral names as tests/data/fit_three_groups.csv: levels g1 (the control) and
// g2, g3 (the two treatments), response y.
// SDs against pandas (tests/python/fit_group_stats.py).
void TestDataReader::readsPublishedThreeGroups()
{
    const QString path = QStringLiteral(CB_TEST_DATA "/fit_three_groups.csv");
    auto r = readLevelData(path, columns(u"group"_s, u"y"_s));
    QVERIFY2(r.ok(), qPrintable(r.error()));
    QVERIFY(r->hasHeader);
    QCOMPARE(r->delimiter, ',');
    QCOMPARE(r->columns, (QStringList{u"group"_s, u"y"_s}));
    QCOMPARE(int(r->levels.size()), 3);
    const double means[] = {5.032, 4.661, 5.526};
    for (int i = 0; i < 3; ++i) {
        QCOMPARE(r->levels[size_t(i)].stats.n, 10.0);
        QVERIFY(std::fabs(r->levels[size_t(i)].stats.mean - means[i]) < 1e-12);
    }
    QCOMPARE(r->records, qint64(30));
    QCOMPARE(r->lines, qint64(31));
    const QJsonObject ref = test::runPython(u"fit_group_stats.py"_s, {path, u"group"_s, u"y"_s, u","_s});
    QVERIFY2(!ref.contains(u"error"_s), qPrintable(ref.value(u"error"_s).toString()));
    for (const LevelStats &l : r->levels) {
        const QJsonArray want = ref.value(l.name).toArray();
        QCOMPARE(l.stats.n, want[0].toDouble());
        QVERIFY(std::fabs(l.stats.mean - want[1].toDouble()) < 1e-13);
        QVERIFY(std::fabs(l.stats.variance() - want[2].toDouble()) < 1e-13);
    }
}

void TestDataReader::readsFormats_data()
{
    QTest::addColumn<QByteArray>("bytes");
    QTest::addColumn<char>("delimiter");
    QTest::addColumn<bool>("header");
    const auto &rows = tricky();
    QTest::newRow("comma LF") << render(rows, ',', "\n", true, false) << ',' << true;
    QTest::newRow("comma CRLF") << render(rows, ',', "\r\n", true, false) << ',' << true;
    QTest::newRow("comma with BOM") << (QByteArray("\xEF\xBB\xBF") + render(rows, ',', "\n", true, false)) << ',' << true;
    QTest::newRow("BOM and CRLF, all quoted")
        << (QByteArray("\xEF\xBB\xBF") + render(rows, ',', "\r\n", true, true)) << ',' << true;
    QTest::newRow("tab") << render(rows, '\t', "\n", true, false) << '\t' << true;
    QTest::newRow("semicolon") << render(rows, ';', "\n", true, false) << ';' << true;
    QTest::newRow("vertical bar") << render(rows, '|', "\r\n", true, false) << '|' << true;
    QTest::newRow("no final line break") << render(rows, ',', "\n", true, false).chopped(1) << ',' << true;
    QTest::newRow("no final CRLF") << render(rows, ',', "\r\n", true, false).chopped(2) << ',' << true;
    QByteArray blanks = render(rows, ',', "\n", true, false);
    blanks.replace("\n1.5", "\n1.5\n\n   \n");
    blanks = "\n\n" + blanks + "\n\n";
    QTest::newRow("blank lines") << blanks << ',' << true;
    QByteArray spaced = render(rows, ',', "\n", true, false);
    spaced.replace(",4\n", ", +4 \n");
    QTest::newRow("spaces and plus sign") << spaced << ',' << true;
}

void TestDataReader::readsFormats()
{
    QFETCH(QByteArray, bytes);
    QFETCH(char, delimiter);
    QFETCH(bool, header);
    auto r = readLevelDataFromBytes(bytes, u"mem.csv"_s, columns(u"group"_s, u"score"_s));
    checkTricky(r);
    QCOMPARE(r->delimiter, delimiter);
    QCOMPARE(r->hasHeader, header);
}

// pandas.read_csv (Debian's python3-pandas) as the outside reference for quoting,
// BOM, CRLF and delimiters, on files written to disk.
void TestDataReader::agreesWithPandas_data()
{
    QTest::addColumn<QByteArray>("bytes");
    QTest::addColumn<QString>("sep");
    std::mt19937_64 rng(20240611);
    std::normal_distribution<double> noise(50.0, 12.0);
    std::vector<Row> rows;
    const QByteArray names[] = {"north", "south, coast", "\"east\" side", "west\nend", "centre"};
    for (int i = 0; i < 500; ++i)
        rows.push_back({names[rng() % 5], std::round(noise(rng) * 1e4) / 1e4});
    QTest::newRow("BOM CRLF quoted multiline") << (QByteArray("\xEF\xBB\xBF") + render(rows, ',', "\r\n", true, false))
                                               << u","_s;
    QTest::newRow("tab separated") << render(rows, '\t', "\n", true, false) << u"tab"_s;
    QTest::newRow("semicolon all quoted") << render(rows, ';', "\n", true, true) << u";"_s;
}

void TestDataReader::agreesWithPandas()
{
    QFETCH(QByteArray, bytes);
    QFETCH(QString, sep);
    QTemporaryDir dir;
    const QString path = dir.filePath(u"data.csv"_s);
    QVERIFY(test::writeFile(path, bytes));
    auto r = readLevelData(path, columns(u"group"_s, u"score"_s));
    QVERIFY2(r.ok(), qPrintable(r.error()));
    const QJsonObject ref = test::runPython(u"fit_group_stats.py"_s, {path, u"group"_s, u"score"_s, sep});
    QVERIFY2(!ref.contains(u"error"_s), qPrintable(ref.value(u"error"_s).toString()));
    QCOMPARE(qsizetype(r->levels.size()), ref.size());
    for (const LevelStats &l : r->levels) {
        QVERIFY2(ref.contains(l.name), qPrintable(l.name));
        const QJsonArray want = ref.value(l.name).toArray();
        QCOMPARE(l.stats.n, want[0].toDouble());
        QVERIFY(std::fabs(l.stats.mean - want[1].toDouble()) < 1e-12);
        QVERIFY(std::fabs(l.stats.variance() - want[2].toDouble()) < 1e-10);
    }
}

// Records cut anywhere by a block boundary (inside quotes, between CR and LF) read the same.
void TestDataReader::sameResultForAnyBlockSize()
{
    const QByteArray bytes = QByteArray("\xEF\xBB\xBF") + render(tricky(), ',', "\r\n", true, false);
    for (qsizetype block : {1, 2, 3, 5, 7, 11, 16, 64, 1000}) {
        DataReadOptions o = columns(u"group"_s, u"score"_s);
        o.blockBytes = block;
        auto r = readLevelDataFromBytes(bytes, u"mem.csv"_s, o);
        checkTricky(r);
        QCOMPARE(r->bytes, qint64(bytes.size()));
    }
}

void TestDataReader::streamsLargeInputInBlocks()
{
    std::mt19937_64 rng(7);
    std::uniform_real_distribution<double> u(-1000.0, 1000.0);
    std::vector<Row> rows;
    QByteArray bytes = "level,value,other\n";
    const QByteArray names[] = {"a", "bb", "ccc", "dddd", "eeeee", "f", "g7", "h8"};
    for (int i = 0; i < 200000; ++i) {
        const Row row{names[rng() % (1 + i % 8)], std::round(u(rng) * 1e3) / 1e3};
        rows.push_back(row);
        bytes += row.level + ',' + QByteArray::number(row.y, 'g', 17) + ",x\n";
    }
    DataReadOptions o = columns(u"level"_s, u"value"_s);
    o.blockBytes = 4096;
    qint64 calls = 0;
    o.progress = [&calls](qint64) { return ++calls > 0; };
    auto r = readLevelDataFromBytes(bytes, u"big.csv"_s, o);
    QVERIFY2(r.ok(), qPrintable(r.error()));
    QCOMPARE(int(r->levels.size()), 8);
    for (const LevelStats &l : r->levels)
        compareStats(l.stats, twoPass(rows, l.name.toUtf8()), 1e-12);
    QVERIFY(calls >= bytes.size() / 4096);
}

// The example of Welford's advantage over the one-pass sum of squares: 4, 7, 13, 16
// shifted by 1e9 have variance 30 (Chan, Golub & LeVeque 1983 discuss such shifts;
// the numbers are the usual illustration, written from memory).
void TestDataReader::welfordIsStable()
{
    const QByteArray bytes = "g,y\nx,1000000004\nx,1000000007\nx,1000000013\nx,1000000016\n";
    auto r = readLevelDataFromBytes(bytes, u"shift.csv"_s, columns(u"g"_s, u"y"_s));
    QVERIFY2(r.ok(), qPrintable(r.error()));
    QCOMPARE(r->levels[0].stats.mean, 1000000010.0);
    QVERIFY(std::fabs(r->levels[0].stats.variance() - 30.0) < 1e-6);
}

// Sorted values far from zero: 1e9 + i/1000 for i = 0 .. 99999. The variance of an
// arithmetic sequence of n terms with step h is h^2 n (n + 1) / 12 (closed form), here
// 833.341666...; the one-pass sum of squares would lose every digit of it.
void TestDataReader::stableForSortedDataFarFromZero()
{
    QByteArray bytes = "g,y,w\n";
    const int n = 100000;
    for (int i = 0; i < n; ++i)
        bytes += "a," + QByteArray::number(1000000000 + i / 1000) + '.' + QByteArray::number(i % 1000).rightJustified(3, '0')
            + ",1\n";
    const double exact = 1e-6 * n * (n + 1.0) / 12.0;
    for (const QString &weight : {QString(), u"w"_s}) {
        DataReadOptions o = columns(u"g"_s, u"y"_s);
        o.weightColumn = weight;
        auto r = readLevelDataFromBytes(bytes, u"sorted.csv"_s, o);
        QVERIFY2(r.ok(), qPrintable(r.error()));
        const RunningStats &s = r->levels[0].stats;
        QVERIFY2(std::fabs(s.variance() - exact) < 1e-9 * exact,
                 qPrintable(u"variance %1, exact %2"_s.arg(s.variance(), 0, 'g', 17).arg(exact, 0, 'g', 17)));
        QVERIFY(std::fabs(s.mean - (1e9 + 49.9995)) < 1e-6);
    }
}

void TestDataReader::mergeMatchesOnePass()
{
    std::mt19937_64 rng(11);
    std::normal_distribution<double> d(1e6, 3.0);
    RunningStats all, left, right;
    for (int i = 0; i < 1000; ++i) {
        const double y = d(rng);
        all.add(y);
        (i < 317 ? left : right).add(y);
    }
    left.merge(right);
    compareStats(left, all, 1e-9);
    QCOMPARE(left.rows, qint64(1000));
    RunningStats empty;
    empty.merge(all);
    compareStats(empty, all, 0);
}

// Case weights are frequency weights: weight 2 is the row written twice.
void TestDataReader::caseWeightsActAsRepeatedRows()
{
    const QByteArray weighted = "g,y,w\na,1,2\na,4,1\nb,2,3\nb,5,0\nb,7,1\n";
    const QByteArray repeated = "g,y\na,1\na,1\na,4\nb,2\nb,2\nb,2\nb,7\n";
    DataReadOptions o = columns(u"g"_s, u"y"_s);
    o.weightColumn = u"w"_s;
    auto w = readLevelDataFromBytes(weighted, u"w.csv"_s, o);
    auto r = readLevelDataFromBytes(repeated, u"r.csv"_s, columns(u"g"_s, u"y"_s));
    QVERIFY2(w.ok(), qPrintable(w.error()));
    QVERIFY(r.ok());
    QVERIFY(w->weighted);
    for (int i = 0; i < 2; ++i)
        compareStats(w->levels[size_t(i)].stats, r->levels[size_t(i)].stats, 1e-14);
    QCOMPARE(w->levels[1].stats.rows, qint64(3)); // the weight-0 row is read, adds nothing
}

void TestDataReader::columnsByNumber_data()
{
    QTest::addColumn<QByteArray>("bytes");
    QTest::addColumn<HeaderMode>("mode");
    QTest::addColumn<bool>("header");
    QTest::addColumn<int>("records");
    QTest::newRow("no header, detected") << QByteArray("a,1\na,2\nb,3\n") << HeaderMode::Detect << false << 3;
    QTest::newRow("header, detected") << QByteArray("g,y\na,1\na,2\nb,3\n") << HeaderMode::Detect << true << 3;
    QTest::newRow("numeric header forced") << QByteArray("1,2\na,1\na,2\nb,3\n") << HeaderMode::Present << true << 3;
    QTest::newRow("text first row, header off")
        << QByteArray("a,1\na,2\nb,3\n") << HeaderMode::Absent << false << 3;
}

void TestDataReader::columnsByNumber()
{
    QFETCH(QByteArray, bytes);
    QFETCH(HeaderMode, mode);
    QFETCH(bool, header);
    QFETCH(int, records);
    DataReadOptions o = columns(u"1"_s, u"2"_s);
    o.header = mode;
    auto r = readLevelDataFromBytes(bytes, u"n.csv"_s, o);
    QVERIFY2(r.ok(), qPrintable(r.error()));
    QCOMPARE(r->hasHeader, header);
    QCOMPARE(r->records, qint64(records));
    QCOMPARE(r->levels[0].stats.mean, 1.5);
    if (!header)
        QCOMPARE(r->columns, (QStringList{u"1"_s, u"2"_s}));
}

// Rows left out are reported with their line numbers (the header is line 1).
void TestDataReader::reportsRowProblems_data()
{
    QTest::addColumn<QByteArray>("bytes");
    QTest::addColumn<QString>("weight");
    QTest::addColumn<QStringList>("messages");
    QTest::newRow("missing response") << QByteArray("g,y\na,1\na,\nb,2\nb,3\n") << QString()
                                      << QStringList{u"line 3: response (column 'y') is missing"_s};
    QTest::newRow("not a number") << QByteArray("g,y\na,1\na,2\nb,abc\nb,3\nb,4\n") << QString()
                                  << QStringList{u"line 4: response (column 'y') 'abc' is not a number"_s};
    QTest::newRow("NA tokens") << QByteArray("g,y\na,NA\na,1\na,N/A\nb,.\nb,2\nb,3\nb, nan \n") << QString()
                               << QStringList{u"line 2: response (column 'y') is missing"_s,
                                              u"line 4: response (column 'y') is missing"_s,
                                              u"line 5: response (column 'y') is missing"_s,
                                              u"line 8: response (column 'y') is missing"_s};
    QTest::newRow("infinite") << QByteArray("g,y\na,1\na,-inf\nb,1e400\nb,2\na,4\n") << QString()
                              << QStringList{u"line 3: response (column 'y') '-inf' is not a finite number"_s,
                                             u"line 4: response (column 'y') '1e400' is out of range"_s};
    // Values whose squares would overflow the sums of squares: 1e200 and -1e200 once read as a
    // level with SD 0 (inf - inf, then clamped); now refused with their line.
    QTest::newRow("too large") << QByteArray("g,y,w\na,1e200,1\na,-1e200,1\na,1,1\nb,2,1e60\nb,3,1\nb,1e100,1\n") << u"w"_s
                               << QStringList{u"line 2: response (column 'y') '1e200' is too large; expected a number between -1e100 and 1e100 (rescale the response)"_s,
                                              u"line 3: response (column 'y') '-1e200' is too large; expected a number between -1e100 and 1e100 (rescale the response)"_s,
                                              u"line 5: weight (column 'w') '1e60' is too large; expected at most 1e50"_s};
    QTest::newRow("decimal comma") << QByteArray("g;y\na;1,5\na;2\nb;3\nb;4\n") << QString()
                                   << QStringList{u"line 2: response (column 'y') '1,5' is not a number (decimal commas are not read; write a point)"_s};
    QTest::newRow("number then junk, quoted") << QByteArray("g,y\na,12kg\n\"a\",\"3x\"\na,1\nb,2\nb,3\n") << QString()
                                              << QStringList{u"line 2: response (column 'y') '12kg' is not a number"_s,
                                                             u"line 3: response (column 'y') '3x' is not a number"_s};
    QTest::newRow("empty factor") << QByteArray("g,y\na,1\n,2\n  ,3\nb,4\nb,5\n") << QString()
                                  << QStringList{u"line 3: factor (column 'g') is empty"_s,
                                                 u"line 4: factor (column 'g') is empty"_s};
    QTest::newRow("bad weights") << QByteArray("g,y,w\na,1,1\na,2,-1\nb,3,\nb,4,x\nb,5,2\na,3,1\n") << u"w"_s
                                 << QStringList{u"line 3: weight (column 'w') '-1' is negative; expected a number >= 0"_s,
                                                u"line 4: weight (column 'w') is missing"_s,
                                                u"line 5: weight (column 'w') 'x' is not a number"_s};
    QTest::newRow("line numbers after a quoted line break")
        << QByteArray("g,y\n\"a\nb\",1\n\"a\nb\",x\nc,2\nc,3\n\"a\nb\",4\n") << QString()
        << QStringList{u"line 4: response (column 'y') 'x' is not a number"_s};
}

void TestDataReader::reportsRowProblems()
{
    QFETCH(QByteArray, bytes);
    QFETCH(QString, weight);
    QFETCH(QStringList, messages);
    DataReadOptions o = columns(u"g"_s, u"y"_s);
    o.weightColumn = weight;
    auto r = readLevelDataFromBytes(bytes, u"rows.csv"_s, o);
    QVERIFY2(r.ok(), qPrintable(r.error()));
    QCOMPARE(r->skippedRows, qint64(messages.size()));
    QStringList got;
    for (const RowProblem &p : r->skipped)
        got << u"line %1: %2"_s.arg(p.line).arg(p.message);
    QCOMPARE(got, messages);
    QCOMPARE(r->usedRows + r->skippedRows, r->records);
    QVERIFY(r->skippedReport().startsWith(u"%1 row"_s.arg(messages.size())));
}

void TestDataReader::reportsFirstTwentyThenCount()
{
    QByteArray bytes = "g,y\n";
    for (int i = 0; i < 25; ++i)
        bytes += "a,?\na,1\n";
    auto r = readLevelDataFromBytes(bytes, u"many.csv"_s, columns(u"g"_s, u"y"_s));
    QVERIFY2(r.ok(), qPrintable(r.error()));
    QCOMPARE(r->skippedRows, qint64(25));
    QCOMPARE(int(r->skipped.size()), kReportedRowProblems);
    QCOMPARE(r->skipped[0].line, qint64(2));
    QCOMPARE(r->skipped[19].line, qint64(40));
    QCOMPARE(r->levels[0].stats.n, 25.0);
    QVERIFY(r->skippedReport().startsWith(u"25 rows left out: line 2: response (column 'y') '?' is not a number; line 4"_s));
    QVERIFY(r->skippedReport().endsWith(u"; and 5 more"_s));
}

void TestDataReader::rejectsFile_data()
{
    QTest::addColumn<QByteArray>("bytes");
    QTest::addColumn<QString>("factor");
    QTest::addColumn<QString>("message");
    const QString g = u"g"_s;
    QTest::newRow("empty") << QByteArray() << g << u"f.csv is empty; expected a header and data rows"_s;
    QTest::newRow("blank lines only") << QByteArray("\n\r\n\n") << g << u"f.csv is empty"_s;
    QTest::newRow("header only") << QByteArray("g,y\n") << g << u"f.csv has a header but no data rows"_s;
    QTest::newRow("missing column") << QByteArray("g,y\na,1\n") << u"grp"_s
                                    << u"f.csv: no column 'grp' for the factor; the columns are: g, y"_s;
    QTest::newRow("missing column, near miss")
        << QByteArray("Group,y\na,1\n") << u"group"_s
        << u"f.csv: no column 'group' for the factor; the columns are: Group, y (did you mean 'Group'?)"_s;
    QTest::newRow("names without header")
        << QByteArray("a,1\nb,2\n") << g
        << u"f.csv: no column 'g' for the factor: the first row does not look like a header; give a column number from 1 to 2 or add a header row"_s;
    QTest::newRow("same column twice") << QByteArray("g,y\na,1\n") << u"y"_s
                                       << u"f.csv: the factor and the response are the same column ('y')"_s;
    QTest::newRow("short row") << QByteArray("g,y,z\na,1,2\nb,3\nb,4,5\n") << g
                               << u"f.csv line 3: 2 fields; expected 3 as in the header"_s;
    QTest::newRow("long row") << QByteArray("g,y\na,1\nb,3\nb,4,5\n") << g
                              << u"f.csv line 4: 3 fields; expected 2 as in the header"_s;
    QTest::newRow("ragged after quoted line break")
        << QByteArray("g,y\n\"x\ny\",1\nb\n") << g << u"f.csv line 4: 1 field; expected 2 as in the header"_s;
    QTest::newRow("unterminated quote") << QByteArray("g,y\na,1\n\"b,2\nc,3\n") << g
                                        << u"f.csv line 3: a quoted field is never closed; expected a closing quote"_s;
    QTest::newRow("unterminated quote in header")
        << QByteArray("\"g,y\na,1\n") << g << u"f.csv line 1: a quoted field is never closed"_s;
    QTest::newRow("text after closing quote")
        << QByteArray("g,y\na,1\n\"b\"x,2\n") << g
        << u"f.csv line 3: field 1 has text after its closing quote; expected a delimiter or the end of the line"_s;
    QTest::newRow("UTF-16") << QByteArray("\xFF\xFEg\0,\0y\0", 8) << g << u"f.csv is UTF-16 encoded; save it as UTF-8"_s;
    QTest::newRow("NUL bytes") << QByteArray("g,y\na,\0\n", 8) << g << u"f.csv contains NUL bytes"_s;
    QTest::newRow("not UTF-8 level") << QByteArray("g,y\na,1\n\xC3\x28,2\n") << g
                                     << u"f.csv line 3: the factor value is not valid UTF-8; save the file as UTF-8"_s;
    QTest::newRow("CR line ends") << QByteArray("g,y\ra,1\rb,2\r") << g
                                  << u"f.csv line 1: lines end with a lone carriage return; expected LF or CRLF line ends"_s;
    QTest::newRow("one column") << QByteArray("g\na\nb\n") << g
                                << u"f.csv line 1: no delimiter found (looked for tab, comma, semicolon and vertical bar); expected at least two columns"_s;
    QTest::newRow("no factor given") << QByteArray("g,y\na,1\n") << QString()
                                     << u"no factor column given; name the column that holds the levels"_s;
}

void TestDataReader::rejectsFile()
{
    QFETCH(QByteArray, bytes);
    QFETCH(QString, factor);
    QFETCH(QString, message);
    auto r = readLevelDataFromBytes(bytes, u"f.csv"_s, columns(factor, u"y"_s));
    QVERIFY(!r.ok());
    QVERIFY2(r.error().startsWith(message), qPrintable(r.error()));
}

void TestDataReader::rejectsMissingPaths()
{
    QTemporaryDir dir;
    auto missing = readLevelData(dir.filePath(u"nope.csv"_s), columns(u"g"_s, u"y"_s));
    QVERIFY(!missing.ok());
    QCOMPARE(missing.error(), dir.filePath(u"nope.csv"_s) + u": no such file"_s);
    auto folder = readLevelData(dir.path(), columns(u"g"_s, u"y"_s));
    QVERIFY(!folder.ok());
    QCOMPARE(folder.error(), dir.path() + u" is a folder; expected a data file"_s);
}

void TestDataReader::refusesTooManyLevels()
{
    QByteArray bytes = "id,y\n";
    for (int i = 0; i <= kMaxDataLevels; ++i)
        bytes += "s" + QByteArray::number(i) + ",1\n";
    auto r = readLevelDataFromBytes(bytes, u"ids.csv"_s, columns(u"id"_s, u"y"_s));
    QVERIFY(!r.ok());
    QCOMPARE(r.error(), u"ids.csv line %1: column 'id' has more than %2 different values; is it really the factor?"_s
                            .arg(kMaxDataLevels + 2)
                            .arg(kMaxDataLevels));
}

void TestDataReader::cancelsFromProgress()
{
    QByteArray bytes = "g,y\n";
    for (int i = 0; i < 1000; ++i)
        bytes += "a,1\n";
    DataReadOptions o = columns(u"g"_s, u"y"_s);
    o.blockBytes = 100;
    o.progress = [](qint64 read) { return read < 1000; };
    auto r = readLevelDataFromBytes(bytes, u"c.csv"_s, o);
    QVERIFY(!r.ok());
    QCOMPARE(r.error(), u"reading c.csv was cancelled"_s);
}

void TestDataReader::readsSummaryTable_data()
{
    QTest::addColumn<QByteArray>("bytes");
    // Dobson's plant-growth group summaries (n, mean, SD to 4 decimals, from the data above).
    QTest::newRow("header") << QByteArray("level,n,mean,sd\ng1,10,5.032,0.5831\ng2,10,4.661,0.7937\ng3,10,5.526,0.4426\n");
    QTest::newRow("header in another order, other names")
        << QByteArray("Mean;Group;SD;Count\r\n5.032;g1;0.5831;10\r\n4.661;g2;0.7937;10\r\n5.526;g3;0.4426;10\r\n");
    QTest::newRow("no header") << QByteArray("g1\t10\t5.032\t0.5831\ng2\t10\t4.661\t0.7937\ng3\t10\t5.526\t0.4426");
    QTest::newRow("a design's cells") << QByteArray("cell,n,mean,sd\ng1,10,5.032,0.5831\ng2,10,4.661,0.7937\ng3,10,5.526,0.4426\n");
    // The summary query's answer gives the variance (0.7937^2 = 0.62995969).
    QTest::newRow("variance instead of sd")
        << QByteArray("level,n,mean,variance\ng1,10,5.032,0.34000561\ng2,10,4.661,0.62995969\ng3,10,5.526,0.19589476\n");
}

void TestDataReader::readsSummaryTable()
{
    QFETCH(QByteArray, bytes);
    auto r = readSummaryTableFromBytes(bytes, u"s.csv"_s);
    QVERIFY2(r.ok(), qPrintable(r.error()));
    QVERIFY(r->fromSummaryTable);
    QCOMPARE(int(r->levels.size()), 3);
    QCOMPARE(r->levels[1].name, u"g2"_s);
    QCOMPARE(r->levels[1].stats.n, 10.0);
    QCOMPARE(r->levels[1].stats.mean, 4.661);
    QVERIFY(std::fabs(r->levels[1].stats.sd() - 0.7937) < 1e-12);
    QVERIFY(std::fabs(r->levels[1].stats.m2 - 9 * 0.7937 * 0.7937) < 1e-12);
}

void TestDataReader::rejectsSummaryTable_data()
{
    QTest::addColumn<QByteArray>("bytes");
    QTest::addColumn<QString>("message");
    QTest::newRow("three columns") << QByteArray("a,1,2\n") << u"s.csv line 1: 3 columns; a summary table needs four: level, n, mean, sd"_s;
    QTest::newRow("no sd column")
        << QByteArray("level,n,mean,spread\na,1,2,3\n")
        << u"s.csv line 1: no 'sd' column in the header (level, n, mean, spread); a summary table needs columns named level, n, mean and sd"_s;
    QTest::newRow("zero n") << QByteArray("level,n,mean,sd\na,0,2,1\n") << u"s.csv line 2: n '0' is not positive; expected a positive number"_s;
    QTest::newRow("missing mean") << QByteArray("level,n,mean,sd\na,3,,1\n") << u"s.csv line 2: mean is missing; expected a number"_s;
    QTest::newRow("negative sd") << QByteArray("level,n,mean,sd\na,3,1,-1\n") << u"s.csv line 2: sd '-1' is negative"_s;
    QTest::newRow("missing sd with n > 1") << QByteArray("level,n,mean,sd\na,3,1,NA\n")
                                           << u"s.csv line 2: sd is missing; expected a number >= 0 (it may be left empty only when n is 1)"_s;
    QTest::newRow("huge n") << QByteArray("level,n,mean,sd\na,1e51,1,1\n") << u"s.csv line 2: n '1e+51' is too large; expected at most 1e50"_s;
    QTest::newRow("huge mean") << QByteArray("level,n,mean,sd\na,3,-2e100,1\n")
                               << u"s.csv line 2: mean '-2e+100' is too large; expected a number between -1e100 and 1e100"_s;
    QTest::newRow("huge sd") << QByteArray("level,n,mean,sd\na,3,1,1e101\n") << u"s.csv line 2: sd '1e+101' is too large; expected at most 1e100"_s;
    QTest::newRow("duplicate level") << QByteArray("level,n,mean,sd\na,3,1,1\nb,1,2,\na,2,2,2\n")
                                     << u"s.csv line 4: level 'a' appears twice; give one row per level"_s;
    QTest::newRow("ragged") << QByteArray("level,n,mean,sd\na,3,1\n") << u"s.csv line 2: 3 fields; expected 4 as in the header"_s;
    QTest::newRow("header only") << QByteArray("level,n,mean,sd\n") << u"s.csv has no rows; expected one row per level"_s;
}

void TestDataReader::rejectsSummaryTable()
{
    QFETCH(QByteArray, bytes);
    QFETCH(QString, message);
    auto r = readSummaryTableFromBytes(bytes, u"s.csv"_s);
    QVERIFY(!r.ok());
    QVERIFY2(r.error().startsWith(message), qPrintable(r.error()));
}

void TestDataReader::previewsFile()
{
    auto p = previewData(QStringLiteral(CB_TEST_DATA "/fit_three_groups.csv"), 3);
    QVERIFY2(p.ok(), qPrintable(p.error()));
    QCOMPARE(p->delimiter, ',');
    QVERIFY(p->hasHeader);
    QCOMPARE(p->columns, (QStringList{u"group"_s, u"y"_s}));
    QCOMPARE(int(p->rows.size()), 3);
    QCOMPARE(p->rows[2], (QStringList{u"g1"_s, u"5.18"_s}));
    QVERIFY(p->fileSize > 0);
    auto bare = previewDataFromBytes("a\t1\nb\t2\n", u"b.tsv"_s);
    QVERIFY(bare.ok());
    QCOMPARE(bare->delimiter, '\t');
    QVERIFY(!bare->hasHeader);
    QCOMPARE(bare->columns, (QStringList{u"1"_s, u"2"_s}));
    QCOMPARE(int(bare->rows.size()), 2);
}

void TestDataReader::namesDelimiters()
{
    QCOMPARE(delimiterFromName(u"tab"_s), std::optional<char>('\t'));
    QCOMPARE(delimiterFromName(u";"_s), std::optional<char>(';'));
    QCOMPARE(delimiterFromName(u"pipe"_s), std::optional<char>('|'));
    QCOMPARE(delimiterFromName(u"ab"_s), std::nullopt);
    QCOMPARE(delimiterName('\t'), u"tab"_s);
    QCOMPARE(delimiterName(':'), u"':'"_s);
}

// A crossed design read with one column per factor: each row's cell is its values joined with
// kCellJoiner, a middle dot (Design::cellNames). Statistics per cell are checked against a plain two-pass computation
// over the rows written, for every block size down to a few bytes (records then straddle
// blocks) and with quoted and padded values; an empty value in any factor column leaves the
// row out with a message naming that column.
void TestDataReader::joinsFactorColumnsIntoCells()
{
    std::mt19937 rng(11);
    std::uniform_real_distribution<double> u(-50.0, 50.0);
    const QByteArray a[] = {"north", "south"}, b[] = {"dry", "wet"}, c[] = {"x", "y"};
    QByteArray bytes = "id,soil,site,y,season\n"; // factors: site, soil, season (not in file order)
    std::vector<Row> rows;
    for (int i = 0; i < 400; ++i) {
        const int ia = int(rng() % 2), ib = int(rng() % 2), ic = int(rng() % 2);
        const QByteArray dot(kCellJoiner.data(), qsizetype(kCellJoiner.size()));
        const Row row{a[ia] + dot + b[ib] + dot + c[ic], std::round(u(rng) * 100) / 100};
        rows.push_back(row);
        const QByteArray site = i % 7 == 0 ? '"' + a[ia] + '"' : (i % 11 == 0 ? "  " + a[ia] + " " : a[ia]);
        bytes += QByteArray::number(i) + ',' + b[ib] + ',' + site + ',' + QByteArray::number(row.y, 'g', 17) + ',' + c[ic] + '\n';
    }
    bytes += "400,dry,north,1.5,\n";
    for (qsizetype block : {qsizetype(5), qsizetype(64), kDefaultBlockBytes}) {
        DataReadOptions o = columns(u"site"_s, u"y"_s);
        o.moreFactorColumns = {u"soil"_s, u"season"_s};
        o.blockBytes = block;
        auto r = readLevelDataFromBytes(bytes, u"cells.csv"_s, o);
        QVERIFY2(r.ok(), qPrintable(r.error()));
        QCOMPARE(r->moreFactorIndices, (std::vector<int>{1, 4}));
        QCOMPARE(int(r->levels.size()), 8);
        for (const LevelStats &l : r->levels)
            compareStats(l.stats, twoPass(rows, l.name.toUtf8()), 1e-12);
        QCOMPARE(r->usedRows, qint64(400));
        QCOMPARE(r->skippedRows, qint64(1));
        QCOMPARE(r->skipped[0].line, qint64(402));
        QCOMPARE(r->skipped[0].message, u"factor (column 'season') is empty"_s);
    }
    DataReadOptions four = columns(u"site"_s, u"y"_s);
    four.moreFactorColumns = {u"soil"_s, u"season"_s, u"id"_s};
    QCOMPARE(readLevelDataFromBytes(bytes, u"cells.csv"_s, four).error(), u"4 factor columns; a design has at most 3 factors"_s);
    DataReadOptions twice = columns(u"site"_s, u"y"_s);
    twice.moreFactorColumns = {u"site"_s};
    QCOMPARE(readLevelDataFromBytes(bytes, u"cells.csv"_s, twice).error(),
             u"cells.csv: column 'site' is named for two factors; give each factor its own column"_s);
}

QTEST_GUILESS_MAIN(TestDataReader)
// Every record as written: quotes removed, quoted spaces, commas, quotes and line breaks kept,
// unquoted spaces kept (no trimming), blank lines skipped, each record with the line it starts on;
// a byte-order mark and LF or CRLF line ends read the same.
void TestDataReader::readsRecordsAsWritten()
{
    const QByteArray text = "level,\"  a   b  \",\"say \"\"hi\"\"\"\r\n"
                            "\"two\r\nlines\", x ,1/3\r\n"
                            "\r\n"
                            "'=1+2,,-1\r\n";
    const std::vector<DataRecord> want = {
        {1, {u"level"_s, u"  a   b  "_s, u"say \"hi\""_s}},
        {2, {u"two\r\nlines"_s, u" x "_s, u"1/3"_s}},
        {5, {u"'=1+2"_s, QString(), u"-1"_s}},
    };
    QByteArray lf = text;
    lf.replace("\r\n", "\n");
    const std::pair<QByteArray, QString> inputs[] = {
        {text, u"\r\n"_s}, {QByteArray("\xEF\xBB\xBF") + text, u"\r\n"_s}, {lf, u"\n"_s}};
    for (const auto &[input, lineEnd] : inputs) {
        auto r = readRecordsFromBytes(input, u"t.csv"_s, ',');
        QVERIFY2(r.ok(), qPrintable(r.error()));
        QCOMPARE(r->delimiter, ',');
        QCOMPARE(int(r->records.size()), int(want.size()));
        for (size_t i = 0; i < want.size(); ++i) {
            QCOMPARE(r->records[i].line, want[i].line);
            QStringList fields = want[i].fields;
            fields.replaceInStrings(u"\r\n"_s, lineEnd);
            QCOMPARE(r->records[i].fields, fields);
        }
    }
    // Without a delimiter given, it is detected as the other readers detect it.
    auto tsv = readRecordsFromBytes("a\tb\n1\t2\n", u"t.tsv"_s);
    QVERIFY2(tsv.ok(), qPrintable(tsv.error()));
    QCOMPARE(tsv->delimiter, '\t');
    QCOMPARE(tsv->records[1].fields, (QStringList{u"1"_s, u"2"_s}));
}

// An input larger than the reader's block (1 MiB), with a quoted line break in every record,
// reads whole: records that straddle blocks are joined, and their lines counted on.
void TestDataReader::readsRecordsAcrossBlocks()
{
    constexpr int kRecords = 40000; // about 1.4 MiB
    QByteArray text;
    for (int i = 0; i < kRecords; ++i)
        text += "row " + QByteArray::number(i) + ",\"first\nsecond\"," + QByteArray(12, 'x') + "\r\n";
    QVERIFY(text.size() > 1024 * 1024);
    auto r = readRecordsFromBytes(text, u"big.csv"_s, ',');
    QVERIFY2(r.ok(), qPrintable(r.error()));
    QCOMPARE(int(r->records.size()), kRecords);
    const DataRecord &last = r->records.back();
    QCOMPARE(last.line, qint64(2 * (kRecords - 1) + 1));
    QCOMPARE(last.fields, (QStringList{u"row %1"_s.arg(kRecords - 1), u"first\nsecond"_s, QString(12, u'x')}));
}

void TestDataReader::rejectsBrokenRecords_data()
{
    QTest::addColumn<QByteArray>("text");
    QTest::addColumn<QString>("message");
    QTest::newRow("empty") << QByteArray() << u"t.csv is empty; expected a header and data rows"_s;
    QTest::newRow("unclosed quote") << QByteArray("a,b\r\n\"x,1\r\n")
                                    << u"t.csv line 2: a quoted field is never closed; expected a closing quote"_s;
    QTest::newRow("text after quote")
        << QByteArray("a,b\r\n\"x\"y,1\r\n")
        << u"t.csv line 2: field 1 has text after its closing quote; expected a delimiter or the end of the line"_s;
    QTest::newRow("not UTF-8 after the first line") << QByteArray("a,b\r\n\n\"x\",\xFF\r\n")
                                                    << u"t.csv line 3: field 2 is not valid UTF-8; save the file as UTF-8"_s;
    QTest::newRow("NUL byte") << QByteArray("a,b\r\nx,\0\r\n", 10) << u"t.csv contains NUL bytes; expected a UTF-8 text file"_s;
}

void TestDataReader::rejectsBrokenRecords()
{
    QFETCH(QByteArray, text);
    QFETCH(QString, message);
    auto r = readRecordsFromBytes(text, u"t.csv"_s, ',');
    QVERIFY(!r.ok());
    QCOMPARE(r.error(), message);
}

#include "TestDataReader.moc"
