// contrast-bench: the workbench window.
//   contrast-bench [file]
//   contrast-bench --demo irrigation
//   contrast-bench --screenshot out.png [--demo NAME] [--size WxH] [file]

#include "app/database/DatabaseSource.h"
#include "core/base/AllocatorTuning.h"
#include "core/base/Version.h"
#include "ui/data/DataPanel.h"
#include "ui/window/Demos.h"
#include "ui/window/MainWindow.h"

#include <QApplication>
#include <QCommandLineParser>
#include <QElapsedTimer>
#include <QPixmap>
#include <QRegularExpression>
#include <QTimer>

#include <cstdio>
#include <cstring>

using namespace Qt::StringLiterals;

namespace {

void fail(const QString &message)
{
    std::fprintf(stderr, "contrast-bench: %s\n", qUtf8Printable(message));
}

// With CB_STARTUP_REPORT set, prints the time from start to the first paint.
class FirstPaintProbe : public QObject
{
public:
    explicit FirstPaintProbe(const QElapsedTimer &clock) : m_clock(clock) {}

protected:
    bool eventFilter(QObject *watched, QEvent *event) override
    {
        if (event->type() == QEvent::Paint && !m_done) {
            m_done = true;
            std::fprintf(stderr, "contrast-bench: first paint after %.1f ms\n", double(m_clock.nsecsElapsed()) / 1e6);
        }
        return QObject::eventFilter(watched, event);
    }

private:
    const QElapsedTimer &m_clock;
    bool m_done = false;
};

} // namespace

int main(int argc, char *argv[])
{
    QElapsedTimer clock;
    clock.start();
    cb::tuneAllocatorForRepeatedAnalyses(); // every edit reruns the analysis
    // Check on data reads databases through app/database (Qt SQL); the window never links it.
    cb::DataPanel::setDefaultDatabaseReader(cb::readDatabaseSummary);

    // A screenshot is rendered offscreen unless a platform was chosen explicitly; help and
    // version need no display either.
    for (int i = 1; i < argc; ++i) {
        const bool noDisplay = std::strncmp(argv[i], "--screenshot", 12) == 0 || std::strcmp(argv[i], "--help") == 0
                               || std::strcmp(argv[i], "-h") == 0 || std::strcmp(argv[i], "--help-all") == 0
                               || std::strcmp(argv[i], "--version") == 0 || std::strcmp(argv[i], "-v") == 0;
        if (noDisplay && qEnvironmentVariableIsEmpty("QT_QPA_PLATFORM"))
            qputenv("QT_QPA_PLATFORM", "offscreen");
    }

    QApplication app(argc, argv);
    // Both names are needed for QSettings (recent files); they also place the recovery file
    // under ~/.local/share/contrast-bench/contrast-bench on Linux.
    QApplication::setOrganizationName(u"contrast-bench"_s);
    QApplication::setApplicationName(u"contrast-bench"_s);
    QApplication::setApplicationDisplayName(u"Contrast Bench"_s);
    QApplication::setApplicationVersion(QString::fromUtf16(cb::kVersion));
    QApplication::setDesktopFileName(u"contrast-bench"_s);

    QStringList demoNames;
    for (const cb::DemoStudy &d : cb::demoStudies())
        demoNames << d.name;
    QCommandLineParser parser;
    parser.setApplicationDescription(u"A workbench for designing contrast codings of categorical predictors."_s);
    parser.addHelpOption();
    parser.addVersionOption();
    parser.addPositionalArgument(u"file"_s, u"A scheme file to open."_s, u"[file]"_s);
    const QCommandLineOption screenshotOption(u"screenshot"_s, u"Render the window to a PNG file and exit."_s, u"out.png"_s);
    const QCommandLineOption demoOption(u"demo"_s, u"Open a demo study: %1."_s.arg(demoNames.join(u", "_s)), u"name"_s);
    const QCommandLineOption sizeOption(u"size"_s, u"Window size for --screenshot, such as 1400x900."_s, u"WxH"_s, u"1400x900"_s);
    parser.addOption(screenshotOption);
    parser.addOption(demoOption);
    parser.addOption(sizeOption);
    parser.process(app);

    const QStringList files = parser.positionalArguments();
    if (files.size() > 1) {
        fail(u"give at most one file to open, got %1"_s.arg(files.size()));
        return 2;
    }
    if (!files.isEmpty() && parser.isSet(demoOption)) {
        fail(u"give either a file or --demo, not both"_s);
        return 2;
    }
    const QRegularExpression sizePattern(u"^(\\d{2,5})x(\\d{2,5})$"_s);
    const auto sizeMatch = sizePattern.match(parser.value(sizeOption));
    if (!sizeMatch.hasMatch()) {
        fail(u"--size: '%1' is not a size; expected width x height in pixels, such as 1400x900"_s.arg(parser.value(sizeOption)));
        return 2;
    }
    const QSize size(sizeMatch.captured(1).toInt(), sizeMatch.captured(2).toInt());
    const bool screenshot = parser.isSet(screenshotOption);

    std::unique_ptr<FirstPaintProbe> probe;
    if (qEnvironmentVariableIsSet("CB_STARTUP_REPORT")) {
        probe = std::make_unique<FirstPaintProbe>(clock);
        app.installEventFilter(probe.get());
    }

    cb::WindowOptions options;
    options.useRecovery = !screenshot;
    options.rememberLayout = !screenshot;
    cb::MainWindow window(options);
    // The window fits itself to the screen (or takes the size it was left at); --size is for
    // screenshots, or when asked for.
    if (screenshot || parser.isSet(sizeOption))
        window.resize(size);

    const bool restored = !screenshot && window.offerRecovery();
    if (!restored) {
        if (parser.isSet(demoOption)) {
            const auto demo = cb::loadDemoStudy(parser.value(demoOption));
            if (!demo) {
                fail(demo.error());
                return 2;
            }
            window.openDemo(parser.value(demoOption));
        } else if (!files.isEmpty() && !window.openFile(files.first()) && screenshot) {
            return 2;
        }
    }

    if (!screenshot) {
        window.show();
        return app.exec();
    }
    window.show();
    QApplication::processEvents();
    QApplication::processEvents();
    const QString out = parser.value(screenshotOption);
    if (!window.grab().save(out, "PNG")) {
        fail(u"%1: could not write the PNG file"_s.arg(out));
        return 1;
    }
    return 0;
}
