// Crash safety of saving: a process killed while it saves leaves the previous file
// intact, and saving where it cannot be done gives a clear message and leaves the
// old file as it was.
#include "core/files/SchemeFile.h"

#include <QDir>
#include <QFile>
#include <QFileInfo>
#include <QProcess>
#include <QRandomGenerator>
#include <QTemporaryDir>
#include <QTest>
#include <QThread>

#include <sys/stat.h>
#include <unistd.h>

using namespace Qt::StringLiterals;
using namespace cb;

namespace {

const QString kSaveLoop = QStringLiteral(CB_BINARY_DIR "/tests/SaveLoop");
const QString kCli = QStringLiteral(CB_BINARY_DIR "/app/contrast-bench-cli");

// The generation of the intact version at path, or -1 (SaveLoop --check).
long long intactGeneration(const QString &path)
{
    QProcess p;
    p.start(kSaveLoop, {u"--check"_s, path});
    if (!p.waitForFinished(60000) || p.exitCode() != 0)
        return -1;
    return p.readAllStandardOutput().trimmed().toLongLong();
}

// Runs the command line; as root the child gives up its privileges first, so that
// file permissions apply to it. It runs from a copy in a folder everyone can enter (the
// build folder may sit below one that only root can).
struct Run
{
    int code = -1;
    QString err;
};
Run runCliWithoutPrivileges(const QStringList &args)
{
    QTemporaryDir bin;
    const QString cli = bin.filePath(u"contrast-bench-cli"_s);
    if (!QFile::copy(kCli, cli) || ::chmod(QFile::encodeName(bin.path()).constData(), 0755) != 0)
        return {-2, u"could not copy the command line to "_s + cli};
    QProcess p;
    p.setChildProcessModifier([] {
        if (::geteuid() == 0 && (::setgid(65534) != 0 || ::setuid(65534) != 0))
            ::_exit(126);
    });
    p.start(cli, args);
    p.waitForFinished(60000);
    return {p.exitStatus() == QProcess::NormalExit ? p.exitCode() : -1, QString::fromUtf8(p.readAllStandardError())};
}

const QByteArray kPrevious = "the previous version\n";

} // namespace

class TestCrashSafety : public QObject
{
    Q_OBJECT

private slots:
    void killWhileSavingLeavesACompleteFile();
    void readOnlyFolderKeepsThePreviousFile();
    void fullDeviceGivesAClearMessage();
};

// SaveLoop rewrites a 4 MiB file without pause; it is killed (SIGKILL) at a random
// moment, 25 times. After every kill the file holds one complete version, at least as
// new as the last one reported saved.
void TestCrashSafety::killWhileSavingLeavesACompleteFile()
{
    QTemporaryDir dir;
    const QString path = dir.filePath(u"study.json"_s);
    const quint32 seed = QRandomGenerator::global()->generate();
    QRandomGenerator random(seed);
    qInfo("random seed %u", seed);
    int killedMidWrite = 0;
    long long lastGeneration = 0;
    for (int round = 0; round < 25; ++round) {
        QProcess saver;
        saver.start(kSaveLoop, {path, u"4"_s});
        QVERIFY2(saver.waitForStarted(), qPrintable(saver.errorString()));
        // Wait for one complete save, then let it run on for 0 to 150 ms.
        QByteArray out;
        while (!out.contains("saved ") && saver.waitForReadyRead(60000))
            out += saver.readAllStandardOutput();
        QVERIFY2(out.contains("saved "), saver.readAllStandardError().constData());
        QThread::msleep(random.bounded(150));
        saver.kill();
        QVERIFY(saver.waitForFinished(60000));
        out += saver.readAllStandardOutput();
        const QList<QByteArray> lines = out.trimmed().split('\n');
        long long reported = 0;
        for (const QByteArray &l : lines)
            if (l.startsWith("saved "))
                reported = l.mid(6).toLongLong();

        const long long generation = intactGeneration(path);
        QVERIFY2(generation > 0, qPrintable(u"round %1: the file is damaged after the kill"_s.arg(round)));
        QVERIFY2(generation >= reported, qPrintable(u"round %1: generation %2 on disk, %3 reported saved"_s.arg(round).arg(generation).arg(reported)));
        lastGeneration = generation;
        if (lines.last().startsWith("saving "))
            ++killedMidWrite; // the kill came while a save was under way
    }
    qInfo("%d of 25 kills came during a write; last generation %lld", killedMidWrite, lastGeneration);
    // The loop does nothing but save, so most kills land in a save.
    QVERIFY2(killedMidWrite >= 5, "fewer than 5 kills came during a save: the test did not test enough");
}

// A folder without write permission: the save fails with a message that names the file and
// the reason, and the old file is untouched.
void TestCrashSafety::readOnlyFolderKeepsThePreviousFile()
{
    QTemporaryDir dir;
    const QString path = dir.filePath(u"coding.csv"_s);
    {
        QFile f(path);
        QVERIFY(f.open(QIODevice::WriteOnly));
        f.write(kPrevious);
    }
    QVERIFY(::chmod(QFile::encodeName(path).constData(), 0666) == 0);
    QVERIFY(::chmod(QFile::encodeName(dir.path()).constData(), 0555) == 0);
    const Run r = runCliWithoutPrivileges({u"export"_s, u"--levels"_s, u"a,b,c"_s, u"--scheme"_s, u"treatment"_s,
                                           u"--format"_s, u"csv"_s, u"-o"_s, path});
    QVERIFY(::chmod(QFile::encodeName(dir.path()).constData(), 0700) == 0);
    QVERIFY2(r.code == 1, qPrintable(u"exit code %1: %2"_s.arg(r.code).arg(r.err)));
    QVERIFY2(r.err.startsWith(u"contrast-bench-cli export: %1: cannot open for writing: "_s.arg(path)), qPrintable(r.err));
    QVERIFY2(r.err.contains(u"ermission denied"_s), qPrintable(r.err));
    QFile f(path);
    QVERIFY(f.open(QIODevice::ReadOnly));
    QCOMPARE(f.readAll(), kPrevious);
    QCOMPARE(QDir(dir.path()).entryList(QDir::Files), QStringList{u"coding.csv"_s});
}

// /dev/full accepts the open and fails every write with ENOSPC, as a full disk does.
// The device stays a device: it is written directly, never replaced by a renamed file.
void TestCrashSafety::fullDeviceGivesAClearMessage()
{
    const QString full = u"/dev/full"_s;
    QVERIFY(QFileInfo::exists(full));
    QVERIFY(!QFileInfo(full).isFile());
    const QString e = writeFileAtomically(full, QByteArray(1 << 20, 'x'));
    QCOMPARE(e, u"/dev/full: could not write the file: No space left on device"_s);
    QVERIFY(!QFileInfo(full).isFile());

    QProcess cli;
    cli.start(kCli, {u"export"_s, u"--levels"_s, u"a,b,c"_s, u"--scheme"_s, u"sum"_s, u"--format"_s, u"latex"_s, u"-o"_s, full});
    QVERIFY(cli.waitForFinished(60000));
    QCOMPARE(cli.exitCode(), 1);
    QCOMPARE(QString::fromUtf8(cli.readAllStandardError()),
             u"contrast-bench-cli export: /dev/full: could not write the file: No space left on device\n"_s);
    QVERIFY(!QFileInfo(full).isFile());
}

QTEST_GUILESS_MAIN(TestCrashSafety)
#include "TestCrashSafety.moc"
