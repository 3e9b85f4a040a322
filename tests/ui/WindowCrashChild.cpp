// Test helper for TestWindowSafety: a window (offscreen) that leaves unsaved work in its
// recovery file and is then killed by the test.
//   WindowCrashChild RECOVERY_DIR SETTINGS_FILE once
//     makes three edits, writes the recovery file (the autosave step), prints
//     "ready <base64 of the scheme's JSON>" and waits to be killed.
//   WindowCrashChild RECOVERY_DIR SETTINGS_FILE edit
//     renames a level through the levels table, as typing does, prints
//     "edited <base64 of the scheme's JSON>" and waits to be killed: the window alone
//     (its usual delay after an edit) writes the recovery file.
//   WindowCrashChild RECOVERY_DIR SETTINGS_FILE loop FIRST_GENERATION
//     prints "started", then edits and writes the recovery file again and again:
//     generation g puts g into the first weight of the first column and carries a
//     1 MiB note, so that a write takes long enough to be hit by a kill. It prints
//     "writing <g>" before each write and "wrote <g>" after it.
// Both stop by themselves after two minutes, in case the test that started them died.
#include "ui/document/Document.h"
#include "ui/window/MainWindow.h"
#include "ui/levels/LevelsModel.h"
#include "ui/levels/LevelsPanel.h"
#include "core/model/SchemeEdits.h"
#include "core/files/SchemeFile.h"

#include <QApplication>
#include <QDeadlineTimer>
#include <QTimer>

#include <cstdio>

using namespace Qt::StringLiterals;

namespace {

constexpr int kLifetimeMs = 120'000;

void say(const QByteArray &line)
{
    std::fwrite(line.constData(), 1, size_t(line.size()), stdout);
    std::fputc('\n', stdout);
    std::fflush(stdout);
}

int once(cb::MainWindow &window, QApplication &app)
{
    cb::Document *d = window.document();
    d->edit(cb::edits::withWeights(d->scheme(), {{2, 1, cb::Weight::exact(cb::Rational(5, 7))}}), u"edit"_s);
    d->edit(cb::edits::withWeights(d->scheme(), {{0, 0, cb::Weight::approx(0.1234567890123)}}), u"edit"_s);
    cb::Scheme noted = d->scheme();
    noted.notes = u"left unsaved when the window was killed"_s;
    d->edit(noted, u"notes"_s);
    if (!window.writeRecovery()) {
        std::fprintf(stderr, "the recovery file was not written\n");
        return 1;
    }
    say("ready " + cb::schemeToJson(d->scheme()).toBase64());
    QTimer::singleShot(kLifetimeMs, &app, &QCoreApplication::quit);
    return app.exec();
}

int editOnly(cb::MainWindow &window, QApplication &app)
{
    cb::LevelsModel *levels = window.levelsPanel()->model();
    const QModelIndex name = levels->index(1, cb::LevelsModel::NameColumn);
    if (!levels->setData(name, u"renamed 2 s before the kill"_s, Qt::EditRole)) {
        std::fprintf(stderr, "the level was not renamed\n");
        return 1;
    }
    say("edited " + cb::schemeToJson(window.document()->scheme()).toBase64());
    QTimer::singleShot(kLifetimeMs, &app, &QCoreApplication::quit);
    return app.exec();
}

int loop(cb::MainWindow &window, long long first)
{
    cb::Document *d = window.document();
    cb::Scheme s = d->scheme();
    s.notes = QString(1 << 20, u'n');
    // Typed weights: a standard scheme is read back as its definition, not as the weights written.
    s.kind = cb::SchemeKind::Custom;
    const QDeadlineTimer lifetime(kLifetimeMs);
    say("started");
    for (long long g = first; !lifetime.hasExpired(); ++g) {
        s.columns[0].weights[0] = cb::Weight::exact(cb::Rational(static_cast<long>(g)));
        d->edit(s, u"generation"_s);
        say("writing " + QByteArray::number(g));
        if (!window.writeRecovery()) {
            std::fprintf(stderr, "generation %lld: the recovery file was not written\n", g);
            return 1;
        }
        say("wrote " + QByteArray::number(g));
    }
    return 0;
}

} // namespace

int main(int argc, char **argv)
{
    if (qEnvironmentVariableIsEmpty("QT_QPA_PLATFORM"))
        qputenv("QT_QPA_PLATFORM", "offscreen");
    QApplication app(argc, argv);
    const QStringList args = QCoreApplication::arguments();
    const bool isOnce = args.size() == 4 && args[3] == u"once"_s;
    const bool isEdit = args.size() == 4 && args[3] == u"edit"_s;
    const bool isLoop = args.size() == 5 && args[3] == u"loop"_s;
    if (!isOnce && !isEdit && !isLoop) {
        std::fprintf(stderr, "usage: WindowCrashChild RECOVERY_DIR SETTINGS_FILE once|edit|loop FIRST_GENERATION\n");
        return 2;
    }
    cb::WindowOptions options;
    options.recoveryDirectory = args[1];
    options.settingsFile = args[2];
    if (!isEdit)
        options.recoveryDelayMs = 3'600'000; // the writes here are the explicit ones
    cb::MainWindow window(options);
    if (isEdit)
        return editOnly(window, app);
    return isOnce ? once(window, app) : loop(window, args[4].toLongLong());
}
