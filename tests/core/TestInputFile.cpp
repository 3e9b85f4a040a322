// Tests of the one whole-file reader (core/files/InputFile.h) and of the loaders that use it:
// every input is read once, as a stream, with the limit kept whatever the file reports.
#include "core/files/InputFile.h"
#include "core/files/StudyFile.h"
#include "core/files/SchemeFile.h"
#include "core/model/Study.h"

#include <QFile>
#include <QTemporaryDir>
#include <QTest>

#include <sys/stat.h>

#include <csignal>
#include <thread>

using namespace Qt::StringLiterals;
using namespace cb;

namespace {

const QByteArray kScheme = R"({"format": "contrast-bench-scheme", "version": 1,
  "factor": {"name": "dose", "levels": ["low", "high"]},
  "scheme": {"kind": "custom"}, "columns": [{"name": "high vs low", "weights": ["-1", "1"]}]})";

void writeFile(const QString &path, const QByteArray &data)
{
    QFile f(path);
    QVERIFY(f.open(QIODevice::WriteOnly));
    QCOMPARE(f.write(data), data.size());
}

} // namespace

class TestInputFile : public QObject
{
    Q_OBJECT

private slots:
    void readsARegularFile();
    void refusesWhatIsNotAFile_data();
    void refusesWhatIsNotAFile();
    void stopsAtTheLimit();
    void readsAFifoOnce();
    void emptyFileIsNamed();
    void loadersShareTheReader();
};

void TestInputFile::readsARegularFile()
{
    QTemporaryDir dir;
    const QString path = dir.filePath(u"s.json"_s);
    writeFile(path, kScheme);
    auto data = readInput(path);
    QVERIFY2(data, qPrintable(data.error()));
    QCOMPARE(*data, kScheme);
    QCOMPARE(inputLabel(u"-"_s), u"standard input"_s);
    // Qt resources (the demos compiled in) are files too.
    QVERIFY(inputPathProblem(u":/no/such/resource.json"_s, u"a file"_s).contains(u"no such file"_s));
    QCOMPARE(inputLabel(path), path);
}

void TestInputFile::refusesWhatIsNotAFile_data()
{
    QTest::addColumn<QString>("path");
    QTest::addColumn<QString>("message");
    QTest::newRow("missing") << u"/nonexistent/dir/s.json"_s << u"/nonexistent/dir/s.json: no such file"_s;
    QTest::newRow("folder") << u"/tmp"_s << u"/tmp is a folder; expected a file"_s;
    QTest::newRow("endless device") << u"/dev/zero"_s << u"/dev/zero is a device, not a file; expected a file, a pipe, or - for standard input"_s;
    QTest::newRow("empty device") << u"/dev/null"_s << u"/dev/null is a device, not a file; expected a file, a pipe, or - for standard input"_s;
    QTest::newRow("no path") << QString() << u"no file given; expected a path, or - for standard input"_s;
}

void TestInputFile::refusesWhatIsNotAFile()
{
    QFETCH(QString, path);
    QFETCH(QString, message);
    auto data = readInput(path);
    QVERIFY(!data);
    QCOMPARE(data.error(), message);
}

void TestInputFile::stopsAtTheLimit()
{
    QTemporaryDir dir;
    const QString path = dir.filePath(u"big.json"_s);
    writeFile(path, QByteArray(1001, ' '));
    auto over = readInput(path, 1000);
    QVERIFY(!over);
    QCOMPARE(over.error(), path + u": more than 1000 bytes; such files are at most 1000 bytes"_s);
    auto exact = readInput(path, 1001);
    QVERIFY(exact);
    QCOMPARE(exact->size(), 1001);
}

// A FIFO reports size 0 and gives its bytes once; a second open would wait for another writer.
void TestInputFile::readsAFifoOnce()
{
    QTemporaryDir dir;
    const QString path = dir.filePath(u"fifo"_s);
    QCOMPARE(::mkfifo(QFile::encodeName(path).constData(), 0600), 0);
    std::thread writer([&] {
        QFile f(path);
        if (f.open(QIODevice::WriteOnly))
            f.write(kScheme);
    });
    auto loaded = loadStudy(path);
    writer.join();
    QVERIFY2(loaded, qPrintable(loaded.error()));
    QCOMPARE(loaded->activeScheme().factor.levels, (QStringList{u"low"_s, u"high"_s}));

    // An endless writer is cut off at the limit (and then sees EPIPE rather than SIGPIPE).
    std::signal(SIGPIPE, SIG_IGN);
    std::thread endless([&] {
        QFile f(path);
        if (f.open(QIODevice::WriteOnly))
            for (int i = 0; i < 64 && f.write(QByteArray(1024, ' ')) > 0; ++i) {
            }
    });
    auto cut = readInput(path, 4096);
    endless.join();
    QVERIFY(!cut);
    QVERIFY2(cut.error().contains(u"more than 4096 bytes"_s), qPrintable(cut.error()));
}

void TestInputFile::emptyFileIsNamed()
{
    QTemporaryDir dir;
    const QString path = dir.filePath(u"empty.json"_s);
    writeFile(path, "  \n");
    auto s = loadStudy(path);
    QVERIFY(!s);
    QCOMPARE(s.error(), path + u": the file is empty; expected a scheme file (JSON)"_s);
}

void TestInputFile::loadersShareTheReader()
{
    // Scheme, design and recovery files are all read by loadStudy (RecoveryStore reads through readInput too).
    for (const auto &load : {std::function<QString(const QString &)>([](const QString &p) { return loadStudy(p).error(); })}) {
        QCOMPARE(load(u"/dev/zero"_s), u"/dev/zero is a device, not a file; expected a file, a pipe, or - for standard input"_s);
        QCOMPARE(load(u"/tmp"_s), u"/tmp is a folder; expected a file"_s);
    }
}

QTEST_GUILESS_MAIN(TestInputFile)
#include "TestInputFile.moc"
