// Crash safety at the level of the window: a save that cannot be done keeps the work in
// memory and in the recovery file; a window killed with unsaved work has it offered at the
// next start; a damaged recovery file is reported and set aside without stopping the start.
// (The same for the core's atomic save is in TestCrashSafety.)
#include "ui/document/Document.h"
#include "core/model/SchemeEdits.h"
#include "core/files/SchemeFile.h"
#include "tests/support/WindowFixture.h"

#include <QDir>
#include <QFile>
#include <QFileInfo>
#include <QJsonDocument>
#include <QJsonObject>
#include <QProcess>
#include <QRandomGenerator>
#include <QScopeGuard>
#include <QTest>
#include <QThread>
#include <QUndoStack>

#include <linux/capability.h>
#include <sys/stat.h>
#include <sys/syscall.h>
#include <unistd.h>

using namespace Qt::StringLiterals;
using namespace cb;

namespace {

const QString kChild = QStringLiteral(CB_BINARY_DIR "/tests/WindowCrashChild");

// While it lives, the calling thread obeys file permissions even as root: it drops the
// capabilities that override them from its effective set (they stay permitted and come
// back at the end). Capabilities belong to a thread on Linux, and the window saves on
// this one. Without root it changes nothing.
class PermissionsApply
{
public:
    PermissionsApply()
    {
        m_ok = syscall(SYS_capget, &m_header, m_saved) == 0;
        __user_cap_data_struct reduced[2] = {m_saved[0], m_saved[1]};
        reduced[0].effective &= ~((1u << CAP_DAC_OVERRIDE) | (1u << CAP_DAC_READ_SEARCH));
        m_ok = m_ok && syscall(SYS_capset, &m_header, reduced) == 0;
    }
    ~PermissionsApply()
    {
        if (m_ok)
            syscall(SYS_capset, &m_header, m_saved);
    }
    PermissionsApply(const PermissionsApply &) = delete;
    PermissionsApply &operator=(const PermissionsApply &) = delete;
    bool ok() const { return m_ok; }

private:
    __user_cap_header_struct m_header{_LINUX_CAPABILITY_VERSION_3, 0};
    __user_cap_data_struct m_saved[2]{};
    bool m_ok = false;
};

bool setMode(const QString &path, mode_t mode)
{
    return ::chmod(QFile::encodeName(path).constData(), mode) == 0;
}

bool writeBytes(const QString &path, const QByteArray &data)
{
    QFile f(path);
    return f.open(QIODevice::WriteOnly) && f.write(data) == data.size();
}

// Reads a recovery file with the core's scheme reader alone (not through the window's store).
Result<Scheme> readRecoveryWithCore(const QString &path)
{
    QFile f(path);
    if (!f.open(QIODevice::ReadOnly))
        return Result<Scheme>::failure(path + u": cannot open: "_s + f.errorString());
    const QJsonObject root = QJsonDocument::fromJson(f.readAll()).object();
    if (!root.value(u"scheme"_s).isObject())
        return Result<Scheme>::failure(path + u": no scheme object"_s);
    return schemeFromJson(QJsonDocument(root.value(u"scheme"_s).toObject()).toJson(), path);
}

// Makes two undoable edits and returns the edited scheme.
Scheme editTwice(Document *d)
{
    d->edit(edits::withWeights(d->scheme(), {{2, 1, Weight::exact(Rational(5, 7))}}), u"first edit"_s);
    d->edit(edits::withWeights(d->scheme(), {{0, 0, Weight::approx(0.1234567890123)}}), u"second edit"_s);
    return d->scheme();
}

// The generation a WindowCrashChild loop wrote into a scheme (see WindowCrashChild.cpp).
long long generationOf(const Scheme &s)
{
    const Weight &w = s.columns[0].weights[0];
    return w.isExact() && w.rational().get_den() == 1 ? w.rational().get_num().get_si() : -1;
}

struct Child
{
    QProcess process;
    QByteArray out;

    void start(const WindowFixture &f, const QStringList &mode)
    {
        process.start(kChild, QStringList{f.dir.filePath(u"recovery"_s), f.dir.filePath(u"settings.ini"_s)} + mode);
    }
    // Reads output until a line starting with `prefix` has arrived; returns that line.
    QByteArray waitFor(const QByteArray &prefix)
    {
        for (;;) {
            const QList<QByteArray> lines = out.split('\n');
            for (qsizetype i = 0; i + 1 < lines.size(); ++i) // complete lines only
                if (lines[i].startsWith(prefix))
                    return lines[i];
            if (!process.waitForReadyRead(60'000))
                return {};
            out += process.readAllStandardOutput();
        }
    }
    // SIGKILL, then reap; returns the complete lines printed.
    QList<QByteArray> killAndReap()
    {
        process.kill();
        process.waitForFinished(60'000);
        out += process.readAllStandardOutput();
        return out.left(out.lastIndexOf('\n')).split('\n');
    }
};

} // namespace

class TestWindowSafety : public QObject
{
    Q_OBJECT

private slots:
    void failedSaveKeepsTheWork_data();
    void failedSaveKeepsTheWork();
    void killedWindowIsRecoveredAtTheNextStart();
    void killedWindowDeclinedRecoveryIsDiscarded();
    void editKilledTwoSecondsLaterIsRecovered();
    void killDuringRecoveryWritesLeavesACompleteVersion();
    void damagedRecoveryFileAtStart_data();
    void damagedRecoveryFileAtStart();
};

// Saving where it cannot be done: the window says which file and why, and the work stays
// open (unsaved, same scheme, same undo history) and is written to the recovery file.
void TestWindowSafety::failedSaveKeepsTheWork_data()
{
    QTest::addColumn<QString>("target"); // relative to the fixture's folder, or absolute
    QTest::addColumn<QString>("reason");
    QTest::newRow("read-only folder") << u"locked/study.json"_s << u"ermission denied"_s;
    QTest::newRow("full disk (/dev/full)") << u"/dev/full"_s << u"No space left on device"_s;
    QTest::newRow("folder that is a file") << u"plain-file/study.json"_s << u"ot a directory"_s;
}

void TestWindowSafety::failedSaveKeepsTheWork()
{
    QFETCH(QString, target);
    QFETCH(QString, reason);
    WindowFixture f;
    MainWindow &w = *f.window;
    Document *d = w.document();

    // The work belongs to a file saved before, in a folder that is then made read-only.
    const QString locked = f.dir.filePath(u"locked"_s);
    QVERIFY(QDir().mkpath(locked));
    const QString previous = QDir(locked).filePath(u"study.json"_s);
    QVERIFY(w.saveTo(previous));
    const QByteArray previousBytes = schemeToJson(d->scheme());
    QVERIFY(setMode(locked, 0555));
    const auto unlock = qScopeGuard([&] { setMode(locked, 0755); });
    QVERIFY(writeBytes(f.dir.filePath(u"plain-file"_s), "not a folder\n"));
    const QString path = QFileInfo(target).isAbsolute() ? target : f.dir.filePath(target);

    const Scheme edited = editTwice(d);
    QCOMPARE(d->undoStack()->count(), 2);
    bool saved = true;
    {
        const PermissionsApply asUser;
        QVERIFY(asUser.ok());
        // The folder really is read-only for this thread now.
        QVERIFY(!QFile(QDir(locked).filePath(u"probe"_s)).open(QIODevice::WriteOnly));
        saved = w.saveTo(path);
    }

    QVERIFY(!saved);
    QCOMPARE(f.prompter.told.size(), 1);
    const QString told = f.prompter.told.first();
    qInfo("told: %s", qPrintable(told));
    QVERIFY2(told.contains(path), qPrintable(told));
    QVERIFY2(told.contains(reason), qPrintable(told));
    QVERIFY2(told.contains(u"recovery file"_s), qPrintable(told));

    // In memory: unsaved, the edited scheme, both steps undoable, still tied to its file.
    QVERIFY(d->isModified());
    QCOMPARE(schemeToJson(d->scheme()), schemeToJson(edited));
    QCOMPARE(d->filePath(), previous);
    QCOMPARE(d->undoStack()->count(), 2);
    QCOMPARE(d->undoStack()->undoText(), u"second edit"_s);
    QVERIFY(w.isWindowModified());
    // The file saved before is untouched.
    QFile before(previous);
    QVERIFY(before.open(QIODevice::ReadOnly));
    QCOMPARE(before.readAll(), previousBytes);

    // On disk: the recovery file holds the unsaved work, weight for weight.
    auto recovered = readRecoveryWithCore(w.recoveryStore().path());
    QVERIFY2(recovered.ok(), qPrintable(recovered.error()));
    QCOMPARE(recovered->columns[1].weights[2], Weight::exact(Rational(5, 7)));
    QCOMPARE(recovered->columns[0].weights[0], Weight::approx(0.1234567890123));
    QCOMPARE(schemeToJson(*recovered), schemeToJson(edited));

    // The history still works, and a save that can be done clears the recovery file.
    d->undoStack()->undo();
    d->undoStack()->undo();
    QCOMPARE(schemeToJson(d->scheme()), previousBytes);
    QVERIFY(!d->isModified());
    d->undoStack()->redo();
    d->undoStack()->redo();
    QCOMPARE(schemeToJson(d->scheme()), schemeToJson(edited));
    QVERIFY(w.saveTo(previous));
    QVERIFY(!d->isModified());
    QVERIFY(!w.recoveryStore().exists());
}

// A window killed (SIGKILL) after writing its recovery file: the next window on the same
// recovery folder offers the work, and restoring it gives the child's scheme, unsaved.
void TestWindowSafety::killedWindowIsRecoveredAtTheNextStart()
{
    WindowFixture f;
    f.window.reset(); // the child is the only window on this folder until it is killed
    Child child;
    child.start(f, {u"once"_s});
    const QByteArray ready = child.waitFor("ready ");
    QVERIFY2(!ready.isEmpty(), child.process.readAllStandardError().constData());
    child.killAndReap();
    QCOMPARE(child.process.exitStatus(), QProcess::CrashExit);
    const QByteArray childScheme = QByteArray::fromBase64(ready.mid(6));

    f.open();
    QVERIFY(f.window->recoveryStore().exists());
    QVERIFY(f.window->offerRecovery());
    QCOMPARE(f.prompter.restoreQuestions, 1);
    QVERIFY(f.prompter.told.isEmpty());
    Document *d = f.window->document();
    QCOMPARE(schemeToJson(d->scheme()), childScheme);
    QCOMPARE(d->scheme().columns[1].weights[2], Weight::exact(Rational(5, 7)));
    QCOMPARE(d->scheme().notes, u"left unsaved when the window was killed"_s);
    QVERIFY(d->isModified());
    QVERIFY(f.window->isWindowModified());
    QVERIFY(d->filePath().isEmpty());
    // Restoring is one undoable step back to the fresh window's scheme.
    d->undoStack()->undo();
    QCOMPARE(schemeToJson(d->scheme()), schemeToJson(Document::starterScheme()));
}

// Declining the offer after a kill: the recovery file is removed (the window's rule for a
// declined offer), the window starts on a fresh scheme and nothing is offered again.
void TestWindowSafety::killedWindowDeclinedRecoveryIsDiscarded()
{
    WindowFixture f;
    f.window.reset();
    Child child;
    child.start(f, {u"once"_s});
    QVERIFY2(!child.waitFor("ready ").isEmpty(), child.process.readAllStandardError().constData());
    child.killAndReap();

    f.prompter.restore = false;
    f.open();
    QVERIFY(!f.window->offerRecovery());
    QCOMPARE(f.prompter.restoreQuestions, 1);
    QVERIFY(!f.window->recoveryStore().exists());
    QVERIFY(!f.window->document()->isModified());
    QCOMPARE(schemeToJson(f.window->document()->scheme()), schemeToJson(Document::starterScheme()));
    f.open();
    QVERIFY(!f.window->offerRecovery());
    QCOMPARE(f.prompter.restoreQuestions, 1);
}

// A level renamed in a child window that is killed (SIGKILL) 2 s later, with no explicit
// write: the window's own delay after the edit (about 1 s) has put it in the recovery file,
// and the next start offers it back.
void TestWindowSafety::editKilledTwoSecondsLaterIsRecovered()
{
    WindowFixture f;
    f.window.reset();
    Child child;
    child.start(f, {u"edit"_s});
    const QByteArray edited = child.waitFor("edited ");
    QVERIFY2(!edited.isEmpty(), child.process.readAllStandardError().constData());
    QThread::msleep(2'000);
    child.killAndReap();
    QCOMPARE(child.process.exitStatus(), QProcess::CrashExit);

    f.open();
    QVERIFY(f.window->recoveryStore().exists());
    QVERIFY(f.window->offerRecovery());
    QCOMPARE(f.prompter.restoreQuestions, 1);
    Document *d = f.window->document();
    QCOMPARE(schemeToJson(d->scheme()), QByteArray::fromBase64(edited.mid(7)));
    QCOMPARE(d->scheme().factor.levels[1], u"renamed 2 s before the kill"_s);
    QVERIFY(d->isModified());
}

// A child window writes its recovery file again and again (1 MiB each) and is killed at
// random moments, some before its first write. After every kill the recovery file is one
// complete version: the previous round's last one or one of this round's, never older than
// the last one reported written. Then a new window restores the last one.
void TestWindowSafety::killDuringRecoveryWritesLeavesACompleteVersion()
{
    WindowFixture f;
    f.window.reset();
    const QString recoveryFile = QDir(f.dir.filePath(u"recovery"_s)).filePath(u"recovery.json"_s);
    const quint32 seed = QRandomGenerator::global()->generate();
    QRandomGenerator random(seed);
    qInfo("random seed %u", seed);
    constexpr int kRounds = 16;
    long long onDisk = 0; // generation in the recovery file, 0 while there is none
    int killedMidWrite = 0;
    int killedBeforeFirstWrite = 0;
    for (int round = 0; round < kRounds; ++round) {
        const long long first = onDisk + 1000; // this round's generations start here
        Child child;
        child.start(f, {u"loop"_s, QString::number(first)});
        const bool early = round % 4 == 1;
        QVERIFY2(!child.waitFor(early ? "started" : "wrote ").isEmpty(), child.process.readAllStandardError().constData());
        if (!early)
            QThread::msleep(random.bounded(120));
        const QList<QByteArray> lines = child.killAndReap();
        QCOMPARE(child.process.exitStatus(), QProcess::CrashExit);
        long long reported = 0;
        long long begun = 0;
        for (const QByteArray &l : lines) {
            if (l.startsWith("wrote "))
                reported = l.mid(6).toLongLong();
            else if (l.startsWith("writing "))
                begun = l.mid(8).toLongLong();
        }

        const QString where = u"round %1: "_s.arg(round);
        if (onDisk == 0 && begun == 0) {
            QVERIFY2(!QFile::exists(recoveryFile), qPrintable(where + u"a recovery file appeared without a write"_s));
            ++killedBeforeFirstWrite;
            continue;
        }
        auto scheme = readRecoveryWithCore(recoveryFile);
        QVERIFY2(scheme.ok(), qPrintable(where + scheme.error()));
        const long long generation = generationOf(*scheme);
        QCOMPARE(scheme->notes.size(), 1 << 20);
        if (reported > 0)
            QVERIFY2(generation >= reported && generation <= begun,
                     qPrintable(where + u"generation %1 on disk, %2 reported written, %3 begun"_s.arg(generation).arg(reported).arg(begun)));
        else
            QVERIFY2(generation == onDisk || generation == begun,
                     qPrintable(where + u"generation %1 on disk, %2 before the round, %3 begun"_s.arg(generation).arg(onDisk).arg(begun)));
        if (reported == 0)
            ++killedBeforeFirstWrite;
        if (!lines.isEmpty() && lines.last().startsWith("writing "))
            ++killedMidWrite;
        onDisk = generation;
    }
    qInfo("%d of %d kills came during a write, %d before the first write", killedMidWrite, kRounds, killedBeforeFirstWrite);
    QVERIFY2(killedBeforeFirstWrite >= 1, "no kill came before a round's first write");
    QVERIFY2(killedMidWrite >= 3, "fewer than 3 kills came during a write: the test did not test enough");
    QVERIFY2(onDisk > 0, "no recovery file was ever written");

    f.open();
    QVERIFY(f.window->offerRecovery());
    QCOMPARE(generationOf(f.window->document()->scheme()), onDisk);
    QVERIFY(f.window->document()->isModified());
}

// What a start finds in place of the recovery file. (Wrong fields inside valid JSON and a
// few cut-off bytes are in TestMainWindow::corruptRecoveryIsReportedAndSetAside.)
void TestWindowSafety::damagedRecoveryFileAtStart_data()
{
    QTest::addColumn<QString>("damage");
    QTest::newRow("real recovery file cut in half") << u"half"_s;
    QTest::newRow("binary junk") << u"junk"_s;
    QTest::newRow("empty file") << u"empty"_s;
    QTest::newRow("a folder in its place") << u"folder"_s;
    QTest::newRow("larger than any scheme (sparse 65 MiB)") << u"huge"_s;
}

void TestWindowSafety::damagedRecoveryFileAtStart()
{
    QFETCH(QString, damage);
    WindowFixture f;
    Document *d = f.window->document();
    editTwice(d);
    QVERIFY(f.window->writeRecovery());
    const QString path = f.window->recoveryStore().path();
    f.window.reset();

    if (damage == u"half"_s) {
        QFile file(path);
        QVERIFY(file.resize(file.size() / 2));
    } else if (damage == u"junk"_s) {
        QRandomGenerator random(8);
        QByteArray junk(4096, '\0');
        for (char &c : junk)
            c = static_cast<char>(random.bounded(256));
        junk[0] = '\xff'; // never valid UTF-8 JSON
        QVERIFY(writeBytes(path, junk));
    } else if (damage == u"empty"_s) {
        QVERIFY(writeBytes(path, {}));
    } else if (damage == u"folder"_s) {
        QVERIFY(QFile::remove(path));
        QVERIFY(QDir().mkpath(QDir(path).filePath(u"inside"_s)));
    } else if (damage == u"huge"_s) {
        QFile file(path);
        QVERIFY(file.resize(65LL * 1024 * 1024));
    }

    // The start: a new window, then the offer, as app/gui/main.cpp does.
    f.open();
    QVERIFY(!f.window->offerRecovery());
    QCOMPARE(f.prompter.restoreQuestions, 0);
    QCOMPARE(f.prompter.told.size(), 1);
    const QString told = f.prompter.told.first();
    QVERIFY2(told.contains(path), qPrintable(told));
    QVERIFY2(told.contains(u"moved to"_s), qPrintable(told));
    QVERIFY(!QFileInfo::exists(path));
    const QStringList aside = QDir(f.dir.filePath(u"recovery"_s)).entryList({u"recovery-unreadable-*"_s}, QDir::Files | QDir::Dirs);
    QCOMPARE(aside.size(), 1);
    QVERIFY2(told.contains(aside.first()), qPrintable(told));

    // The window starts normally on a fresh scheme, and its recovery works again.
    QVERIFY(f.show());
    d = f.window->document();
    QVERIFY(!d->isModified());
    QCOMPARE(schemeToJson(d->scheme()), schemeToJson(Document::starterScheme()));
    const Scheme edited = editTwice(d);
    QVERIFY(f.window->writeRecovery());
    auto again = readRecoveryWithCore(path);
    QVERIFY2(again.ok(), qPrintable(again.error()));
    QCOMPARE(schemeToJson(*again), schemeToJson(edited));
}

QTEST_MAIN(TestWindowSafety)
#include "TestWindowSafety.moc"
